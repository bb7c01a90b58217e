"""Level fans: −E_nl against λ, one row per chosen strength and one panel per l, each state's
critical length marked and named.  Drawn from a cube alone."""

from __future__ import annotations

import math

import matplotlib
import matplotlib.lines
import numpy as np
from matplotlib.figure import Figure

from ..labels import state_label
from ..physics.presets import NO_PRESET
from .style import energy_unit, family_title, length_label, strength_label, strength_values, tidy_log_axis, unit_names

__all__ = ["level_fan", "fan_strengths", "place_in_rows"]

# A λ_c label is a rotated 7-point text: about this fraction of a panel's log-λ span wide.
LABEL_WIDTH = 0.055
ROW_POINTS = 17  # vertical step between label rows


def fan_strengths(strength, most=3):
    """Up to ``most`` strengths spread over the axis (first, middle, last) for the level fans."""
    strength = np.asarray(strength)
    picks = np.unique(np.round(np.linspace(0, strength.size - 1, min(most, strength.size))).astype(int))
    return strength[picks]


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


def _strength_text(ds, z, preset):
    shown = float(strength_values(ds.sel(strength=[z]), preset)[0])
    return preset.strength_text(shown, ds["strength"].attrs)


def level_fan(ds, strengths=None, preset=NO_PRESET):
    """−E_nl against λ, one row per chosen strength and one panel per l; each state's critical length marked.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``lines`` maps (strength, state name) to the (λ, −E) arrays drawn (finite stored energies)
        and ``critical`` maps them to the stored λ_c marked on the axis.
    """
    strengths = fan_strengths(ds["strength"].values) if strengths is None else np.atleast_1d(strengths)
    ls = ds["l"].values
    lam = ds["screening_length"].values
    if not np.isfinite(lam).all():
        return _fan_against_strength(ds, preset)
    fig = Figure(figsize=(max(2.6 * len(ls) + 2.4, 5.6), 2.6 * len(strengths) + 0.6), layout="constrained")
    axes = fig.subplots(len(strengths), len(ls), sharex=True, sharey="row", squeeze=False)
    colors = matplotlib.colormaps["viridis"](np.linspace(0, 0.85, ds.sizes["n_r"]))
    e_unit, e_factor = energy_unit(ds, preset)
    span = math.log10(lam.max() / lam.min()) or 1.0
    lines, critical = {}, {}
    for row, z in enumerate(strengths):
        depth = -ds["energy"].sel(strength=z).values  # (λ, l, n_r)
        positive = depth[np.isfinite(depth) & (depth > 0)]
        top = positive.max() * 2 if positive.size else 1.0
        bottom = max(positive.min() if positive.size else top * 1e-6, top * 1e-7) / 2
        for col, l in enumerate(ls):
            ax = axes[row, col]
            ax.set(xscale="log", yscale="log", ylim=(bottom, top), xlim=(lam.min(), lam.max()))
            drawn = False
            marks = []
            for k, n_r in enumerate(ds["n_r"].values):
                name = state_label(int(ds["n"].sel(l=l, n_r=n_r)), int(l))
                y = depth[:, col, k]
                keep = np.isfinite(y) & (y > 0)
                if keep.any():
                    drawn = True
                    lines[(float(z), name)] = (lam[keep], y[keep])
                    ax.plot(lam[keep], y[keep], "-", color=colors[k], lw=1.3, gid=f"level:{name}", zorder=2)
                if "critical_screening_length" not in ds:
                    continue
                lc = float(ds["critical_screening_length"].sel(strength=z, l=l, n_r=n_r))
                if not (math.isfinite(lc) and lam.min() <= lc <= lam.max()):
                    continue
                critical[(float(z), name)] = lc
                ax.plot([lc], [bottom], "^", color=colors[k], ms=6, clip_on=False, gid=f"critical:{name}", zorder=4)
                if keep.any():
                    # The stored curve ends at the last grid point; dotted on to the state's λ_c, where E = 0
                    # (a guide to the eye, not computed values).
                    ax.plot([lam[keep][0], lc], [y[keep][0], bottom], ":", color=colors[k], lw=1.0,
                            gid=f"connector:{name}", zorder=2)
                marks.append((math.log10(lc), name, colors[k]))
            rows = place_in_rows([m[0] for m in marks], LABEL_WIDTH * span)
            for (x, name, color), r in zip(marks, rows):
                ax.annotate(name, (10 ** x, bottom), xytext=(0, 7 + ROW_POINTS * r), textcoords="offset points",
                            rotation=90, ha="center", va="bottom", fontsize=7, color=color, zorder=5,
                            gid=f"label:{name}",
                            bbox={"boxstyle": "square,pad=0.1", "facecolor": "white", "edgecolor": "none",
                                  "alpha": 0.85})
            if not drawn:
                ax.text(0.5, 0.5, "no bound level stored", transform=ax.transAxes, ha="center", va="center",
                        color="0.4")
            ax.set_title(f"{_strength_text(ds, z, preset)}, l = {l}")
            tidy_log_axis(ax.yaxis, bottom, top)
            if e_unit and col == len(ls) - 1:
                right = ax.secondary_yaxis("right", functions=(lambda v, f=e_factor: v * f,
                                                               lambda v, f=e_factor: v / f))
                right.set_ylabel(f"−E ({e_unit})")
                tidy_log_axis(right.yaxis, bottom * e_factor, top * e_factor)
    tidy_log_axis(axes[-1, 0].xaxis, lam.min(), lam.max())
    handles = [matplotlib.lines.Line2D([], [], color=c, lw=1.3, label=f"n_r = {k}") for k, c in enumerate(colors)]
    handles.append(matplotlib.lines.Line2D([], [], color="0.3", marker="^", ls=":", label="on to λ_c (state lost)"))
    fig.legend(handles=handles, loc="outside right center", fontsize=7, title="n = n_r + l + 1", title_fontsize=7)
    fig.supxlabel(length_label(ds, preset), fontsize="medium")
    fig.supylabel(f"binding energy −E ({unit_names(preset)[1]})", fontsize="medium")
    fig.suptitle(f"Level fan of the {family_title(ds)}: binding energy against "
                 f"{ds['screening_length'].attrs.get('long_name', 'screening length')}")
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
        ax.set(xscale="log", yscale="log", title=f"l = {l}")
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
    handles = [matplotlib.lines.Line2D([], [], color=c, lw=1.3, label=f"n_r = {k}") for k, c in enumerate(colors)]
    fig.legend(handles=handles, loc="outside right center", fontsize=7, title="n = n_r + l + 1", title_fontsize=7)
    fig.suptitle(f"Levels of the {family_title(ds)} against strength (no screening length)")
    return fig, {"lines": lines, "critical": {}}
