"""Condition maps: how many stored levels survive over carrier density (× temperature) under a
plasma or semiconductor preset.

A stored state survives at a density n (and temperature T) where the preset's screening length
λ(n, T) exceeds its stored critical length λ_c.  No level is recomputed.
"""

from __future__ import annotations

import math

import matplotlib
import matplotlib.lines
import matplotlib.patches
import numpy as np
from matplotlib.figure import Figure

from ..labels import state_label
from ..physics.presets import NO_PRESET
from ..physics.units import convert
from .style import (HALO, cell_edges, count_colorbar, count_norm, cube_unit_system, family_title, invalid_handle,
                    is_condition_cube, shade_invalid, shade_invalid_x)
from .views import fan_strengths

# Panels drawn when the config names no strengths: every stored one up to this many.
MAX_PANELS = 6

__all__ = ["surviving_levels", "condition_map"]


def surviving_levels(ds, strength, screening_length):
    """Stored states (all l, n_r < n_r_max) with λ_c below ``screening_length`` (cube units, any shape)."""
    lc = ds["critical_screening_length"].sel(strength=strength).values.ravel()
    lc = lc[np.isfinite(lc)]
    lam = np.asarray(screening_length, dtype=float)
    return (lam[..., None] > lc).sum(axis=-1)


def _charge(ds, preset, strength):
    return float(preset.strength_values(strength, float(ds.attrs.get("mass", 1.0))))


def _axis_values(spec, default):
    spec = spec or default
    if isinstance(spec, dict):
        return np.geomspace(float(spec["start"]), float(spec["stop"]), int(spec.get("num", 60)))
    return np.asarray(spec, dtype=float)


def condition_map(ds, preset=NO_PRESET, settings=None):
    """Surviving stored levels over carrier density (× temperature): plasma or semiconductor preset.

    A state survives where the preset's screening length at (n, T) exceeds its stored λ_c.  The
    preset's :attr:`~boundscape.physics.presets.Preset.condition_axes` say how the map reads it,
    its :meth:`~boundscape.physics.presets.Preset.validity` where its screening model fails
    (hatched).  A sweep over the conditions themselves has no such map: its threshold maps are
    over them.

    Returns
    -------
    fig : matplotlib.figure.Figure or None (a preset without a density reading, or none)
    data : dict
        ``density_cm3``, ``temperature``, ``screening_length`` (T × n, cube units) and ``count``
        (T × n) per strength.
    """
    settings = settings or {}
    axes_of = preset.condition_axes
    if axes_of is None or is_condition_cube(ds):  # a sweep over conditions has its own maps
        return None, {}
    units = cube_unit_system(ds, preset)
    two_d = axes_of.temperature_fixed is None
    if two_d:
        temperature = _axis_values(settings.get(axes_of.temperature_key), axes_of.temperature_default)
    else:
        temperature = np.array([axes_of.temperature_fixed])
    t_label = axes_of.temperature_label
    lc_all = ds["critical_screening_length"].values
    lc_all = lc_all[np.isfinite(lc_all) & (lc_all > 0)] * units.length_m
    if lc_all.size == 0:
        return None, {}
    # Default densities: from where every stored state survives to where the deepest is lost.
    ends = [preset.loss_density(lc_all.max(), temperature[0]) / 30,
            preset.loss_density(lc_all.min(), temperature[-1]) * 30]
    density = _axis_values(settings.get("density_cm3"), {
        "start": float(convert(ends[0], "m-3", "cm-3")), "stop": float(convert(ends[1], "m-3", "cm-3")), "num": 121})
    n_m3 = convert(density, "cm-3", "m-3")
    lam_m = np.array([preset.screening_length_at(n_m3, t) for t in temperature])  # (T, n)
    lam = lam_m / units.length_m
    # Where the screening model fails (T × n).
    fails = preset.validity(n_m3[None, :], temperature[:, None]).flag != 0
    stored = ds["strength"].values
    chosen = settings.get("strengths")
    strengths = _axis_values(chosen, list(stored if stored.size <= MAX_PANELS else fan_strengths(stored, 4)))
    strengths = sorted({ds["strength"].sel(strength=s, method="nearest").item() for s in strengths})
    counts = {s: surviving_levels(ds, s, lam) for s in strengths}
    top = max(max(int(c.max()) for c in counts.values()), 1)
    cmap, norm = count_norm(top)
    ncols = min(2, len(strengths))
    nrows = -(-len(strengths) // ncols)
    fig = Figure(figsize=(4.3 * ncols + 1.2, 3.4 * nrows + 0.4), layout="constrained")
    axes = fig.subplots(nrows, ncols, sharex=True, sharey=True, squeeze=False).ravel()
    what = axes_of.charge_name
    l0 = ds["l"].values[0]
    for ax, s in zip(axes, strengths):
        charge = _charge(ds, preset, s)
        ax.set(xscale="log", title=f"{what} = {charge:g}", xlim=cell_edges(density)[[0, -1]])
        if two_d:
            mesh = ax.pcolormesh(cell_edges(density), cell_edges(temperature), counts[s], cmap=cmap, norm=norm, rasterized=True)
            ax.set_yscale("log")
        else:
            ax.step(density, counts[s][0], where="mid", color="black")
            ax.set_ylim(-0.3, top + 0.6)
        # The loss lines of the lowest states of the first l, each labelled where it crosses the middle.
        lc = ds["critical_screening_length"].sel(strength=s, l=l0).values
        for n_r, value in enumerate(lc[:3]):
            if not (math.isfinite(value) and value > 0):
                continue
            name = state_label(int(ds["n"].sel(l=l0).values[n_r]), int(l0))
            loss = convert(np.array([float(preset.loss_density(value * units.length_m, t)) for t in temperature]),
                           "m-3", "cm-3")
            if two_d:
                ax.plot(loss, temperature, "--", color="white", lw=1, path_effects=HALO)
                # Staggered heights keep the labels of neighbouring lines apart.
                i = int(round((0.8 - 0.2 * n_r) * (temperature.size - 1)))
                if density.min() < loss[i] < density.max():
                    ax.annotate(name, (loss[i], temperature[i]), xytext=(4, 0), textcoords="offset points",
                                ha="left", va="center", color="white", fontsize=8, path_effects=HALO)
            else:
                if n_r == 0:
                    ax.set_title(f"{what} = {charge:g}: ground state lost at n = {loss[0]:.3g} cm⁻³")
                ax.axvline(loss[0], ls="--", color="C0", lw=1)
                ax.annotate(f"{name} lost", (loss[0], top), rotation=90, fontsize=7, xytext=(-8, 0),
                            textcoords="offset points", ha="center", va="top", color="C0")
        if two_d:
            shade_invalid(ax, cell_edges(density), cell_edges(temperature), fails.T)
        else:
            shade_invalid_x(ax, density, fails[0])
    for ax in axes[len(strengths):]:
        ax.set_visible(False)
    for ax in axes[:len(strengths)]:
        if ax.get_subplotspec().is_last_row():
            ax.set_xlabel(axes_of.density_label)
        if ax.get_subplotspec().is_first_col():
            ax.set_ylabel(t_label if two_d else "surviving stored bound states")
    if two_d:
        count_colorbar(fig, mesh, list(axes[:len(strengths)]), top, "surviving stored bound states (all l)")
    handles = [matplotlib.lines.Line2D([], [], color="0.4" if two_d else "C0", ls="--",
                                       label=f"loss of the lowest $l$ = {l0} states")]
    if not two_d:  # the count itself is a line here
        handles.insert(0, matplotlib.lines.Line2D([], [], color="black", label="surviving stored bound states (all $l$)"))
    if fails.any():
        handles.append(invalid_handle())
    fig.legend(handles=handles, loc="outside lower center", fontsize=7, ncols=2)
    shown = ", ".join(f"{_charge(ds, preset, s):g}" for s in strengths)
    note = "" if len(strengths) == stored.size else \
        f" (panels: {shown} of the {stored.size} stored; preset.map.strengths chooses)"
    fig.suptitle(f"{family_title(ds)}: surviving stored states over {axes_of.over}{note}", fontsize=9)
    return fig, {"density_cm3": density, "temperature": temperature, "screening_length": lam, "count": counts}
