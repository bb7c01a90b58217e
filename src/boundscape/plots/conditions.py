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
from ..physics.presets import Nuclear, Plasma, loss_density, screening_length_at
from ..physics.units import convert
from .level_fan import fan_strengths
from .style import HALO, cell_edges, count_colorbar, count_norm, cube_unit_system, family_title

# Panels drawn when the config names no strengths: every stored one up to this many.
MAX_PANELS = 6

__all__ = ["surviving_levels", "condition_map"]


def surviving_levels(ds, strength, screening_length):
    """Stored states (all l, n_r < n_r_max) with λ_c below ``screening_length`` (cube units, any shape)."""
    lc = ds["critical_screening_length"].sel(strength=strength).values.ravel()
    lc = lc[np.isfinite(lc)]
    lam = np.asarray(screening_length, dtype=float)
    return (lam[..., None] > lc).sum(axis=-1)


def _charge(preset, strength):
    return float(strength) if isinstance(preset, Plasma) else float(preset.donor_charge(strength))


def _axis_values(spec, default):
    spec = spec or default
    if isinstance(spec, dict):
        return np.geomspace(float(spec["start"]), float(spec["stop"]), int(spec.get("num", 60)))
    return np.asarray(spec, dtype=float)


def condition_map(ds, preset, settings=None):
    """Surviving stored levels over carrier density (× temperature): plasma or semiconductor preset.

    A state survives where the preset's screening length at (n, T) exceeds its stored λ_c.

    Returns
    -------
    fig : matplotlib.figure.Figure or None (nuclear, or no preset: no density axis)
    data : dict
        ``density_cm3``, ``temperature``, ``screening_length`` (T × n, cube units) and ``count``
        (T × n) per strength.
    """
    settings = settings or {}
    if isinstance(preset, Nuclear) or preset is None:
        return None, {}
    units = cube_unit_system(ds, preset)
    is_plasma = isinstance(preset, Plasma)
    two_d = is_plasma or preset.screening == "debye"
    if is_plasma:
        temperature = _axis_values(settings.get("temperature_eV"), {"start": 0.1, "stop": 1e4, "num": 81})
        t_label = "electron temperature T_e (eV)"
    else:
        temperature = _axis_values(settings.get("temperature_K"), {"start": 4, "stop": 600, "num": 61}) \
            if two_d else np.array([preset.temperature_K])
        t_label = "carrier temperature T (K)"
    lc_all = ds["critical_screening_length"].values
    lc_all = lc_all[np.isfinite(lc_all) & (lc_all > 0)] * units.length_m
    if lc_all.size == 0:
        return None, {}
    # Default densities: from where every stored state survives to where the deepest is lost.
    ends = [loss_density(preset, lc_all.max(), temperature[0]) / 30, loss_density(preset, lc_all.min(), temperature[-1]) * 30]
    density = _axis_values(settings.get("density_cm3"), {
        "start": float(convert(ends[0], "m-3", "cm-3")), "stop": float(convert(ends[1], "m-3", "cm-3")), "num": 121})
    n_m3 = convert(density, "cm-3", "m-3")
    lam_m = np.array([screening_length_at(preset, n_m3, t) for t in temperature])  # (T, n)
    lam = lam_m / units.length_m
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
    # A hydrogen-like ion of nuclear charge Z carries charge Z − 1: the strength is the nucleus's.
    what = "nuclear charge Z" if is_plasma else ("pair charge Z" if preset.is_exciton else "donor charge Z")
    l0 = ds["l"].values[0]
    for ax, s in zip(axes, strengths):
        charge = _charge(preset, s)
        ax.set(xscale="log", title=f"{what} = {charge:g}", xlim=(density.min(), density.max()))
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
            loss = convert(np.array([float(loss_density(preset, value * units.length_m, t)) for t in temperature]),
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
        if is_plasma:
            # Debye–Hückel screening needs many electrons in a Debye sphere, N_D = (4π/3) n λ_D³ ≫ 1.
            n_debye = 4 * math.pi / 3 * n_m3[None, :] * lam_m ** 3
            if n_debye.min() < 1 < n_debye.max():
                ax.contour(density, temperature, n_debye, levels=[1.0], colors="red", linestyles=":", linewidths=1.2)
        else:
            # Thomas–Fermi screening needs a degenerate gas (E_F > k_B T), Debye screening a
            # non-degenerate one: mark where E_F = k_B T, n = (2 m_e* k_B T)^{3/2}/(3π² ħ³).
            n_deg = convert(preset.degenerate_density(temperature), "m-3", "cm-3")
            if two_d:
                ax.plot(n_deg, temperature, ":", color="red", lw=1.2, gid="degenerate")
            elif density.min() < n_deg[0] < density.max():
                ax.axvspan(density.min(), n_deg[0], color="0.85", zorder=0, gid="degenerate")
                ax.axvline(n_deg[0], ls=":", color="red", lw=1.2)
    for ax in axes[len(strengths):]:
        ax.set_visible(False)
    for ax in axes[:len(strengths)]:
        if ax.get_subplotspec().is_last_row():
            ax.set_xlabel("electron density n_e (cm⁻³)" if is_plasma else "carrier density n (cm⁻³)")
        if ax.get_subplotspec().is_first_col():
            ax.set_ylabel(t_label if two_d else "surviving stored bound states")
    if two_d:
        count_colorbar(fig, mesh, list(axes[:len(strengths)]), top, "surviving stored bound states (all l)")
    handles = [matplotlib.lines.Line2D([], [], color="0.4" if two_d else "C0", ls="--",
                                       label=f"loss of the lowest l = {l0} states")]
    if is_plasma:
        handles.append(matplotlib.lines.Line2D([], [], color="red", ls=":",
                                               label="N_D = 1 (Debye picture fails to the right)"))
    elif two_d:
        handles.append(matplotlib.lines.Line2D([], [], color="red", ls=":",
                                               label="E_F = k_B T (non-degenerate Debye picture fails to the right)"))
    else:
        handles.append(matplotlib.patches.Patch(color="0.85", label=f"E_F < k_B T at {preset.temperature_K:g} K: "
                                                "not degenerate, Thomas–Fermi fails"))
    fig.legend(handles=handles, loc="outside lower center", fontsize=7, ncols=2)
    shown = ", ".join(f"{_charge(preset, s):g}" for s in strengths)
    note = "" if len(strengths) == stored.size else \
        f" (panels: {shown} of the {stored.size} stored; preset.map.strengths chooses)"
    where = "electron density and temperature" if is_plasma else ("carrier density and temperature" if two_d else
                                                                   f"carrier density at {preset.temperature_K:g} K")
    fig.suptitle(f"{family_title(ds)}: surviving stored states over {where}{note}", fontsize=9)
    return fig, {"density_cm3": density, "temperature": temperature, "screening_length": lam, "count": counts}
