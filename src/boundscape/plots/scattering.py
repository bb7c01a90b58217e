"""Scattering figures from a cube with ``scattering:`` on: the inverse scattering length 1/a_l
over the sweep, with its zeros beside the stored loss of each state (the threshold map's lines),
and the phase shifts δ_l(E) at a few cells.  Drawn from the cube alone: the zeros of 1/a_l are
read off the stored values (linear between grid points), never recomputed.
"""

from __future__ import annotations

import math

import matplotlib
import matplotlib.lines
import numpy as np
from matplotlib.figure import Figure

from ..labels import state_label
from ..physics.presets import NO_PRESET
from .level_fan import place_in_rows
from .style import (energy_unit, family_title, shade_invalid_x, strength_label, strength_values, tidy_log_axis,
                    unit_names)
from .views import FanRow, FanView, fan_view, picks

__all__ = ["inverse_length_figure", "phase_shift_figure", "zero_crossings"]

LABEL_WIDTH = 0.06  # a rotated 7-point state name: about this fraction of a panel's log-x span wide
ROW_POINTS = 17  # vertical step between rows of labels


def zero_crossings(x, inverse, count):
    """Where 1/a_l passes through zero along one row: the grid intervals in which the exact count
    changes by one and 1/a_l changes sign, with the zero interpolated linearly in log x.

    A sign change without a change of count is a zero of a_l (1/a_l through ±∞), not a lost state.

    Returns
    -------
    list of (n_r, x0)
        ``n_r`` of the state gained or lost in the interval (the smaller count), ``x0`` the zero.
    """
    found = []
    for j in range(len(x) - 1):
        y0, y1, c0, c1 = inverse[j], inverse[j + 1], count[j], count[j + 1]
        if not (np.isfinite([y0, y1, c0, c1]).all() and abs(c1 - c0) == 1 and y0 * y1 < 0):
            continue
        t = y0 / (y0 - y1)
        found.append((int(min(c0, c1)), float(10 ** ((1 - t) * math.log10(x[j]) + t * math.log10(x[j + 1])))))
    return found


def _broken(inverse, count):
    """1/a_l with a NaN between grid points where it jumps through ±∞ (a_l = 0, same count), so
    that the curve is not joined across the jump."""
    x_index, values = [], []
    for j, y in enumerate(inverse):
        if j and np.isfinite([y, inverse[j - 1]]).all() and y * inverse[j - 1] < 0 and count[j] == count[j - 1]:
            x_index.append(j - 0.5)
            values.append(np.nan)
        x_index.append(j)
        values.append(y)
    return np.asarray(x_index), np.asarray(values)


def inverse_length_figure(ds, preset=NO_PRESET, strengths=None):
    """1/a_l against the sweep's condition axis, one row per chosen strength (and temperature),
    one panel per l; each stored loss (λ_c, or the loss density) a dashed line, each zero of the
    stored 1/a_l a ring on it.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``zeros`` maps (row key, state name) to (stored loss, zero of 1/a_l read off the cube).
    """
    view = _view(ds, preset, strengths)
    ls, x = ds["l"].values, view.x
    length_name = unit_names(preset)[0]
    fig = Figure(figsize=(max(2.8 * len(ls) + 2.6, 8.0), 2.5 * len(view.rows) + 0.7), layout="constrained")
    axes = fig.subplots(len(view.rows), len(ls), sharex=True, squeeze=False)
    colors = matplotlib.colormaps["viridis"](np.linspace(0, 0.85, ds.sizes["n_r"]))
    zeros, invalid = {}, None
    span = math.log10(x.max() / x.min()) or 1.0
    for row, fan in enumerate(view.rows):
        for col, l in enumerate(ls):
            ax = axes[row, col]
            inverse = fan.cube["inverse_scattering_length"].sel(l=l).values
            count = fan.cube["num_bound"].sel(l=l).values
            finite = np.abs(inverse[np.isfinite(inverse) & (inverse != 0)])
            ax.set(xscale="log", xlim=(x.min(), x.max()))
            # symlog: 1/a_l spans decades on both sides of its zeros, which are what matters
            # (a power of ten, so that the ticks ±linthresh sit a decade's height from zero)
            ax.set_yscale("symlog", linthresh=10.0 ** math.floor(math.log10(np.median(finite) / 10))
                          if finite.size else 1.0)
            invalid = shade_invalid_x(ax, x, fan.invalid) or invalid
            ax.axhline(0.0, color="0.5", lw=0.6, zorder=1)
            where, values = _broken(inverse, count)
            ax.plot(_x_at(x, where), values, "-",
                    color="k", lw=1.2, zorder=3, gid=f"inverse_length:l{l}")
            ax.plot(x, inverse, ".", color="k", ms=3, zorder=3)
            found = dict(zero_crossings(x, inverse, count))
            for n_r, x0 in found.items():  # every zero, also of a state past n_r_max (grey)
                color = colors[n_r] if n_r < len(colors) else "0.5"
                ax.plot([x0], [0.0], "o", mfc="none", mec=color, ms=7, mew=1.5, zorder=4,
                        gid=f"zero:{state_label(n_r + int(l) + 1, int(l))}")
            marks = []
            for k, n_r in enumerate(ds["n_r"].values if fan.critical is not None else ()):
                lost = float(fan.critical.sel(l=l, n_r=n_r))
                if not (math.isfinite(lost) and x.min() <= lost <= x.max()):
                    continue
                name = state_label(int(ds["n"].sel(l=l, n_r=n_r)), int(l))
                ax.axvline(lost, color=colors[k], ls="--", lw=1.0, zorder=2, gid=f"loss:{name}")
                marks.append((math.log10(lost), name, colors[k]))
                if int(n_r) in found:
                    zeros[(fan.key, name)] = (lost, found[int(n_r)])
            _label_losses(ax, marks, span)
            ax.set_title(f"{fan.title}, $l$ = {l}", fontsize=9)
    tidy_log_axis(axes[-1, 0].xaxis, x.min(), x.max())
    for row in range(len(view.rows)):
        axes[row, 0].set_ylabel(f"$1/a_l$ ({length_name}$^{{-1}}$)")
    where = "$\\lambda_c$" if view.lost_towards_small else "loss density"
    handles = [matplotlib.lines.Line2D([], [], color="k", marker=".", lw=1.2, label="$1/a_l$ (cube)"),
               matplotlib.lines.Line2D([], [], color="0.3", ls="none", marker="o", mfc="none",
                                       label="zero of $1/a_l$ (interpolated)")]
    if any(row.critical is not None for row in view.rows):
        handles.insert(1, matplotlib.lines.Line2D([], [], color="0.3", ls="--", label=f"stored {where} (state lost)"))
    if invalid is not None:
        handles.append(invalid)
    fig.legend(handles=handles, loc="outside right center", fontsize=7)
    fig.supxlabel(view.x_label, fontsize="medium")
    fig.suptitle(f"Inverse scattering length of the {family_title(ds)}: zero where a state is lost")
    return fig, {"zeros": zeros}


def _view(ds, preset, strengths):
    """The rows to draw: the fans' (against λ, density or range), or, without a screening length
    (an unscreened table), one row against the strength, where no loss length is stored."""
    if np.isfinite(ds["screening_length"].values).all():
        return fan_view(ds, preset, strengths)
    row = FanRow("unscreened", "no screening length", ds.isel(screening_length=0).assign_coords(
        strength=strength_values(ds, preset)), None, None)
    return FanView("strength", row.cube["strength"].values, strength_label(ds, preset), True, [row])


def _label_losses(ax, marks, span):
    """Each loss's state name at the top of its dashed line, in rows so that none overlaps."""
    rows = place_in_rows([m[0] for m in marks], LABEL_WIDTH * span)
    for (xm, name, color), r in zip(marks, rows):
        ax.annotate(name, (10 ** xm, 1.0), xycoords=("data", "axes fraction"), xytext=(0, -3 - ROW_POINTS * r),
                    textcoords="offset points", rotation=90, ha="center", va="top", fontsize=7, color=color,
                    zorder=5, gid=f"label:{name}",
                    bbox={"boxstyle": "square,pad=0.1", "facecolor": "white", "edgecolor": "none", "alpha": 0.85})


def _x_at(x, where):
    """x at fractional grid indices (halfway points in log x)."""
    return 10 ** np.interp(where, np.arange(x.size), np.log10(x))


def phase_shift_figure(ds, preset=NO_PRESET, strengths=None, cells=3):
    """δ_l(E)/π against the collision energy at a few cells of each row, one panel per l; the
    count N_b of bound states of each cell marked at the left edge, where Levinson's theorem puts
    δ_l(0⁺)/π.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``curves`` maps (row key, l, x) to (E, δ_l/π) drawn; ``counts`` to N_b.
    """
    view = _view(ds, preset, strengths)
    ls, x = ds["l"].values, view.x
    e = ds["scattering_energy"].values
    e_name, factor = energy_unit(ds, preset)
    if e_name is None:
        e_name, factor = unit_names(preset)[1], 1.0
    shown = e * factor
    chosen = picks(x.size, cells)
    colors = matplotlib.colormaps["plasma"](np.linspace(0, 0.8, chosen.size))
    fig = Figure(figsize=(max(2.8 * len(ls) + 2.6, 8.0), 2.5 * len(view.rows) + 0.7), layout="constrained")
    axes = fig.subplots(len(view.rows), len(ls), sharex=True, squeeze=False)
    curves, counts = {}, {}
    name, _, unit = view.x_label.rpartition(" (")
    symbol, unit = name.split()[-1], unit.rstrip(")")
    for row, fan in enumerate(view.rows):
        for col, l in enumerate(ls):
            ax = axes[row, col]
            ax.set(xscale="log", xlim=(shown.min() / 1.5, shown.max() * 1.2))
            for c, j in enumerate(chosen):
                delta = fan.cube["phase_shift"].sel(l=l).values[j] / math.pi
                n_b = float(fan.cube["num_bound"].sel(l=l).values[j])
                key = (fan.key, int(l), float(x[j]))
                curves[key], counts[key] = (shown, delta), n_b
                ax.plot(shown, delta, "-o", ms=3, color=colors[c], lw=1.2, gid=f"phase:l{l}:{j}")
                if math.isfinite(n_b):
                    ax.plot([shown.min() / 1.5], [n_b], "<", color=colors[c], ms=7, clip_on=False, zorder=4)
            top = np.nanmax([np.nanmax(np.abs(curves[(fan.key, int(l), float(x[j]))][1])) for j in chosen] + [1.0])
            ax.set_yticks(np.arange(math.floor(-top) if top < 0 else -0.0, math.ceil(top) + 1))
            ax.grid(axis="y", color="0.85", lw=0.6)
            ax.set_title(f"{fan.title}, $l$ = {l}", fontsize=9)
        axes[row, 0].set_ylabel("$\\delta_l / \\pi$")
    tidy_log_axis(axes[-1, 0].xaxis, shown.min() / 1.5, shown.max() * 1.2)
    handles = [matplotlib.lines.Line2D([], [], color=colors[c], marker="o", ms=3,
                                       label=f"{symbol} = {x[j]:.3g} {unit}") for c, j in enumerate(chosen)]
    handles.append(matplotlib.lines.Line2D([], [], color="0.3", ls="none", marker="<",
                                           label="$N_b$: Levinson, $\\delta_l(0^+) = N_b\\pi$"))
    fig.legend(handles=handles, loc="outside right center", fontsize=7)
    fig.supxlabel(f"collision energy $E$ ({e_name})", fontsize="medium")
    fig.suptitle(f"Phase shifts of the {family_title(ds)} at a few cells")
    return fig, {"curves": curves, "counts": counts}
