"""Threshold maps: the (strength, λ) plane at one l, shaded by the exact bound-state count, with
every state's loss curve λ_c(Z) and the screening lengths where the screening model fails hatched;
a sweep over density × temperature gets a map per strength (:mod:`.condition_maps`), a sweep of
one strength the binding energies as curves.  Drawn from a cube alone: every curve is a stored
critical length."""

from __future__ import annotations

import matplotlib.lines
import numpy as np
from matplotlib.figure import Figure

from ..engine import INPUT_REJECTED
from ..labels import state_label
from ..physics.presets import NO_PRESET
from .resonance_overlay import draw_resonance_bands, has_resonances
from .condition_maps import binding_curves, condition_threshold_map
from .style import (HALO, cell_edges, count_colorbar, count_norm, cube_dims, family_title, invalid_mask, length_label,
                    length_unit, shade_invalid, strength_label, strength_values, tidy_log_axis, unit_names,
                    value_ticks)

__all__ = ["threshold_map"]


def threshold_map(ds, l, preset=NO_PRESET):
    """(strength, λ) plane at one l, shaded by the exact bound-state count, with every loss curve.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``count`` (strength × screening length, from ``num_bound``) and ``curves``, mapping a
        state name to the (strength, λ_c) arrays drawn (the finite stored critical lengths).
    """
    if len(cube_dims(ds)[1]) == 2:  # density × temperature: a map per strength
        return condition_threshold_map(ds, l, preset)
    z = strength_values(ds, preset)
    lam = ds["screening_length"].values
    if not np.isfinite(lam).all():
        return _count_against_strength(ds, l, preset)
    if z.size == 1:  # one coloured column: curves say more
        return binding_curves(ds, l, preset)
    count = ds["num_bound"].sel(l=l).values.astype(float)
    status = ds["status"].sel(l=l).values
    # A cell whose input the engine rejected has no count at all: left blank, not "0 states".
    count[status == INPUT_REJECTED] = np.nan
    # The count comes from the zero-energy solution, so it stands in flagged cells too (marked ×).
    # The engine's −1 means infinitely many (Coulomb tail, confining well): the top shade.
    # Shades stop at n_r_max ("n_r_max or more"): above that no loss curve is stored to explain them.
    top = int(ds.sizes["n_r"])
    infinite = count < 0
    count = np.where(infinite, np.inf, count)
    cmap, norm = count_norm(top)
    past = has_resonances(ds, l)  # resonance bands, and a panel below with each state's window
    fig = Figure(figsize=(6.4, 6.4 if past else 4.6), layout="constrained")
    ax, window_ax = fig.subplots(2, 1, height_ratios=(4.6, 1.6)) if past else (fig.add_subplot(), None)
    mesh = ax.pcolormesh(cell_edges(z), cell_edges(lam), np.ma.masked_invalid(np.minimum(count, top)).T,
                         cmap=cmap, norm=norm, rasterized=True)
    ax.set(xscale="log", yscale="log", xlim=cell_edges(z)[[0, -1]], ylim=cell_edges(lam)[[0, -1]],
           xlabel=strength_label(ds, preset), ylabel=length_label(ds, preset),
           title=f"{family_title(ds)}, $l$ = {l}: bound states and where each is lost")
    value_ticks(ax.xaxis, z)
    tidy_log_axis(ax.yaxis, lam.min(), lam.max())
    count_colorbar(fig, mesh, ax, top, f"number of bound states with $l$ = {l}", capped=True)
    invalid = invalid_mask(ds)
    shaded = None if invalid is None else shade_invalid(
        ax, cell_edges(z), cell_edges(lam), np.broadcast_to(invalid[None, :], (z.size, lam.size)))
    if (status != 0).any():
        bad = np.argwhere(status != 0)
        ax.plot(z[bad[:, 0]], lam[bad[:, 1]], "x", color="red", ms=5, label="solver flagged (see status)")
    curves = {}
    if "critical_screening_length" in ds:
        critical = ds["critical_screening_length"].sel(l=l)
        n_of = ds["n"].sel(l=l).values
        for k, n_r in enumerate(ds["n_r"].values):
            lc = critical.sel(n_r=n_r).values
            finite = np.isfinite(lc) & (lc > 0)
            if not finite.any():
                continue
            name = state_label(int(n_of[k]), int(l))
            curves[name] = (z[finite], lc[finite])
            ax.plot(z[finite], lc[finite], "-", color="white", lw=1.4, path_effects=HALO, gid=f"loss:{name}")
            spot = label_spot(z[finite], lc[finite], lam, (0.82, 0.55, 0.28)[k % 3])
            if spot is not None:
                ax.annotate(name, spot, ha="center", va="center", color="white", fontsize=7.5,
                            path_effects=HALO, annotation_clip=True)
    extra = []
    if past:  # past each loss curve: where the state lives on as a resonance
        extra = draw_resonance_bands(ax, window_ax, ds, l, z, lambda v: f"{strength_label(ds, preset).split(' of ')[0]} = {v:.3g}")[1]
    # A legend entry for every kind of line drawn.
    handles = ax.get_legend_handles_labels()[0]
    if curves:
        handles.append(matplotlib.lines.Line2D([], [], color="white", lw=1.4, path_effects=HALO,
                                               label="where each state is lost ($\\lambda_c$)"))
    handles += ([shaded] if shaded else []) + extra
    if handles:
        ax.legend(handles=handles, loc="lower left", fontsize=7, facecolor="0.85")
    if infinite.all():
        ax.text(0.5, 0.5, "infinitely many bound states in every cell\n(Coulomb tail or confining potential)",
                transform=ax.transAxes, ha="center", va="center", color="black")
    elif not curves and "critical_screening_length" in ds and np.isposinf(ds["critical_screening_length"].sel(l=l)).all():
        ax.text(0.5, 0.5, f"no stored state with l = {l} is ever bound", transform=ax.transAxes,
                ha="center", va="center", color="white", path_effects=HALO)
    unit, factor = length_unit(ds, preset)
    if unit and not (unit == unit_names(preset)[0] and factor == 1.0):  # not the left axis again
        right = ax.secondary_yaxis("right", functions=(lambda y: y * factor, lambda y: y / factor))
        right.set_ylabel(f"{ds['screening_length'].attrs.get('long_name', 'screening length')} ({unit})")
        tidy_log_axis(right.yaxis, lam.min() * factor, lam.max() * factor)
    return fig, {"count": count, "curves": curves}


def _count_against_strength(ds, l, preset):
    """A family without a screening length: the count against strength alone, one line."""
    z = strength_values(ds, preset)
    count = ds["num_bound"].sel(l=l).values[:, 0].astype(float)
    fig = Figure(figsize=(6.4, 3.2), layout="constrained")
    ax = fig.add_subplot()
    ax.set(xscale="log", xlabel=strength_label(ds, preset), ylabel=f"bound states with l = {l}",
           title=f"{family_title(ds)}, l = {l}: no screening length")
    if (count < 0).all():
        ax.text(0.5, 0.5, "infinitely many bound states at every strength\n(Coulomb tail or confining potential)",
                transform=ax.transAxes, ha="center", va="center")
        ax.set_xlim(cell_edges(z)[[0, -1]])
        ax.set_yticks([])
    else:
        ax.step(z, np.where(count < 0, np.nan, count), where="mid", color="black")
    value_ticks(ax.xaxis, z)
    return fig, {"count": count[:, None], "curves": {}}


def label_spot(x, y, ylim, fraction):
    """A point on the log–log polyline (x, y) inside ``ylim``, ``fraction`` of the way along it in log x.

    Neighbouring states get different fractions, so their labels do not stack.
    """
    inside = (y >= ylim.min()) & (y <= ylim.max())
    if not inside.any():
        return None
    lx, ly = np.log(x[inside]), np.log(y[inside])
    if lx.size == 1:
        return float(x[inside][0]), float(y[inside][0])
    at = lx[0] + fraction * (lx[-1] - lx[0])
    return float(np.exp(at)), float(np.exp(np.interp(at, lx, ly)))
