"""Level fans: −E_nl against λ (or, in a sweep over conditions, against the density), one row per
chosen strength and one panel per l, where each state is lost marked and named.  Drawn from a
cube alone."""

from __future__ import annotations

import math

import matplotlib
import matplotlib.lines
import numpy as np
from matplotlib.figure import Figure

from ..labels import state_label
from ..physics.presets import NO_PRESET
from .style import (STATE_FONTSIZE, energy_unit, family_title, shade_invalid_x, strength_label, strength_values,
                    tidy_log_axis, unit_names, with_note)
from .views import fan_strengths, fan_view

__all__ = ["level_fan", "fan_strengths", "place_in_rows"]

# A λ_c label is a rotated STATE_FONTSIZE-point text: about this fraction of a panel's log-λ span
# wide (the resonance fan's horizontal names; the level fan measures its panels, :func:`label_width`).
LABEL_WIDTH = 0.075
ROW_POINTS = 21  # vertical step between label rows


def place_in_rows(positions, width):
    """Row of each label at ``positions`` (sorted or not) so that labels in a row are ``width`` apart.

    Greedy: each label takes the lowest row whose last label is far enough to its left; none is dropped.
    """
    rows_end: list[float] = []
    rows = {}
    for i in np.argsort(positions):
        x = positions[i]
        row = next((r for r, end in enumerate(rows_end) if x - end >= width), len(rows_end))
        if row == len(rows_end):
            rows_end.append(x)
        rows_end[row] = x
        rows[int(i)] = row
    return [rows[i] for i in range(len(positions))]


def label_width(fig, ax, span):
    """The log-x width of one rotated state name in ``ax`` (``span`` decades wide), from the
    panel's width after layout: a name is about 1.5 font sizes wide with its box."""
    fig.draw_without_rendering()
    points = ax.get_window_extent().width * 72.0 / fig.dpi
    return span * 1.5 * STATE_FONTSIZE / max(points, 1.0)


def name_states(fig, pending, span):
    """Name each marked loss under its panel, in rows so that no two names overlap."""
    width = None
    for ax, bottom, marks in pending:
        width = width or label_width(fig, ax, span)  # the panels of a fan share one width
        for (xm, name, color), r in zip(marks, place_in_rows([m[0] for m in marks], width)):
            ax.annotate(name, (10 ** xm, bottom), xytext=(0, 7 + ROW_POINTS * r), textcoords="offset points",
                        rotation=90, ha="center", va="bottom", fontsize=STATE_FONTSIZE, color=color, zorder=5,
                        gid=f"label:{name}",
                        bbox={"boxstyle": "square,pad=0.1", "facecolor": "white", "edgecolor": "none",
                              "alpha": 0.85})


def level_fan(ds, strengths=None, preset=NO_PRESET):
    """−E_nl against the condition axis, one row per stored strength (and chosen temperature) and
    one panel per l; where each state is lost marked and named.

    Every stored strength gets its row up to :data:`.views.MAX_STRENGTH_ROWS`; whatever the
    figure leaves out (strengths beyond that, the other temperatures of a condition sweep) is
    named in a note under its x label.

    Against λ in a sweep over screening lengths; against the density at a temperature in a sweep
    over density × temperature (the binding energy against density, several temperatures when
    the sweep has one strength); against the range in a nuclear sweep over coupling × range.
    Where the screening model fails the axis is greyed and hatched.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``lines`` maps (row key, state name) to the (x, −E) arrays drawn (finite stored energies)
        and ``critical`` maps them to the stored x value marked on the axis (λ_c, or the loss
        density); a row key is the strength, or (strength, temperature).
    """
    ls = ds["l"].values
    if not np.isfinite(ds["screening_length"].values).all():
        return _fan_against_strength(ds, preset)
    view = fan_view(ds, preset, strengths)
    x = view.x
    per_panel = 2.6 if view.lost_towards_small else 3.3  # condition rows have longer titles
    fig = Figure(figsize=(max(per_panel * len(ls) + 2.4, 5.6), 2.6 * len(view.rows) + 0.6), layout="constrained")
    axes = fig.subplots(len(view.rows), len(ls), sharex=True, sharey="row", squeeze=False)
    colors = matplotlib.colormaps["viridis"](np.linspace(0, 0.85, ds.sizes["n_r"]))
    e_unit, e_factor = energy_unit(ds, preset)
    span = math.log10(x.max() / x.min()) or 1.0
    lines, critical = {}, {}
    invalid = None
    pending = []  # (axes, bottom, λ_c marks): named once the layout gives each panel's width
    for row, fan in enumerate(view.rows):
        depth = -fan.cube["energy"].values  # (x, l, n_r)
        positive = depth[np.isfinite(depth) & (depth > 0)]
        top = positive.max() * 2 if positive.size else 1.0
        bottom = max(positive.min() if positive.size else top * 1e-6, top * 1e-7) / 2
        for col, l in enumerate(ls):
            ax = axes[row, col]
            ax.set(xscale="log", yscale="log", ylim=(bottom, top), xlim=(x.min(), x.max()))
            invalid = shade_invalid_x(ax, x, fan.invalid) or invalid
            drawn = False
            marks = []
            for k, n_r in enumerate(ds["n_r"].values):
                name = state_label(int(ds["n"].sel(l=l, n_r=n_r)), int(l))
                y = depth[:, col, k]
                keep = np.isfinite(y) & (y > 0)
                if keep.any():
                    drawn = True
                    lines[(fan.key, name)] = (x[keep], y[keep])
                    ax.plot(x[keep], y[keep], "-", color=colors[k], lw=1.3, gid=f"level:{name}", zorder=2)
                if fan.critical is None:
                    continue
                lc = float(fan.critical.sel(l=l, n_r=n_r))
                if not (math.isfinite(lc) and x.min() <= lc <= x.max()):
                    continue
                critical[(fan.key, name)] = lc
                ax.plot([lc], [bottom], "^", color=colors[k], ms=6, clip_on=False, gid=f"critical:{name}", zorder=4)
                if keep.any():
                    # The stored curve ends at the grid point nearest the loss; dotted on to where E = 0
                    # (a guide to the eye, not computed values).
                    last = np.flatnonzero(keep)[0 if view.lost_towards_small else -1]
                    ax.plot([x[last], lc], [y[last], bottom], ":", color=colors[k], lw=1.0,
                            gid=f"connector:{name}", zorder=2)
                marks.append((math.log10(lc), name, colors[k]))
            pending.append((ax, bottom, marks))
            if not drawn:
                ax.text(0.5, 0.5, "no bound level stored", transform=ax.transAxes, ha="center", va="center",
                        color="0.4")
            ax.set_title(f"{fan.title}, $l$ = {l}", fontsize=9)
            tidy_log_axis(ax.yaxis, bottom, top)
            if e_unit and col == len(ls) - 1:
                right = ax.secondary_yaxis("right", functions=(lambda v, f=e_factor: v * f,
                                                               lambda v, f=e_factor: v / f))
                right.set_ylabel(f"−E ({e_unit})")
                tidy_log_axis(right.yaxis, bottom * e_factor, top * e_factor)
    tidy_log_axis(axes[-1, 0].xaxis, x.min(), x.max())
    handles = [matplotlib.lines.Line2D([], [], color=c, lw=1.3, label=f"$n_r$ = {k}") for k, c in enumerate(colors)]
    where = "$\\lambda_c$" if view.lost_towards_small else "the loss density"
    handles.append(matplotlib.lines.Line2D([], [], color="0.3", marker="^", ls=":", label=f"on to {where} (state lost)"))
    if invalid is not None:
        handles.append(invalid)
    fig.legend(handles=handles, loc="outside right center", fontsize=8, title="$n = n_r + l + 1$", title_fontsize=8)
    fig.supxlabel(with_note(view.x_label, view.omitted), fontsize="medium")
    fig.supylabel(f"binding energy −E ({unit_names(preset)[1]})", fontsize="medium")
    against = view.x_label.rsplit(" (", 1)[0]
    fig.suptitle(f"{'Level fan' if view.lost_towards_small else 'Binding energies'} of the {family_title(ds)} "
                 f"against {against}")
    name_states(fig, pending, span)
    return fig, {"lines": lines, "critical": critical}


def _fan_against_strength(ds, preset):
    """No screening length (Coulomb, oscillator, an unscreened table): E against strength, per l."""
    z = strength_values(ds, preset)
    ls = ds["l"].values
    fig = Figure(figsize=(max(2.6 * len(ls) + 2.4, 5.6), 3.2), layout="constrained")
    axes = fig.subplots(1, len(ls), sharey=True, squeeze=False)[0]
    colors = matplotlib.colormaps["viridis"](np.linspace(0, 0.85, ds.sizes["n_r"]))
    energy = ds["energy"].values[:, 0]  # (strength, l, n_r)
    confining = np.nanmin(energy) > 0 if np.isfinite(energy).any() else False
    shown = energy if confining else -energy
    lines = {}
    for col, l in enumerate(ls):
        ax = axes[col]
        ax.set(xscale="log", yscale="log", title=f"$l$ = {l}")
        for k, n_r in enumerate(ds["n_r"].values):
            name = state_label(int(ds["n"].sel(l=l, n_r=n_r)), int(l))
            y = shown[:, col, k]
            keep = np.isfinite(y) & (y > 0)
            if keep.any():
                lines[name] = (z[keep], y[keep])
                ax.plot(z[keep], y[keep], "-o", ms=3, color=colors[k], lw=1.3, gid=f"level:{name}")
        tidy_log_axis(ax.xaxis, z.min(), z.max())
        ax.set_xlabel(strength_label(ds, preset))
    what = "energy E (confining: every level bound, E > 0)" if confining else "binding energy −E"
    axes[0].set_ylabel(f"{what} ({unit_names(preset)[1]})")
    handles = [matplotlib.lines.Line2D([], [], color=c, lw=1.3, label=f"$n_r$ = {k}") for k, c in enumerate(colors)]
    fig.legend(handles=handles, loc="outside right center", fontsize=8, title="$n = n_r + l + 1$", title_fontsize=8)
    fig.suptitle(f"Levels of the {family_title(ds)} against strength (no screening length)")
    return fig, {"lines": lines, "critical": {}}
