"""Line-shift maps: the shift of each E1 line against the unscreened line, relative and in the
trade's energy unit side by side, over (strength, screening length) with the curve where the line
is lost — or, in a sweep over density × temperature, over (density, temperature) per strength with
the density above which it is lost.  Where the screening model fails the cells are hatched.
Drawn from the cube's line variables and stored critical values alone."""

from __future__ import annotations

import numpy as np
from matplotlib.colors import LogNorm
from matplotlib.figure import Figure

from ..physics.presets import NO_PRESET
from .line_survival import line_loss_density, line_loss_length, line_survival_chart
from .style import (HALO, axis_label, cell_edges, cube_dims, energy_unit, family_title, invalid_mask, length_label,
                    shade_invalid, strength_label, strength_values, tidy_log_axis, unit_names, value_ticks)
from .views import picks

__all__ = ["line_shift_map", "line_survival_chart", "line_loss_length", "line_loss_density"]

MAX_ROWS = 3


def _shifts(ds, m, preset):
    """(relative shift, |absolute shift| in the shown unit, the unit's name) of line ``m``."""
    energy = ds["line_energy"].isel(line=m).values
    shift = ds["line_shift"].isel(line=m).values
    unit, factor = energy_unit(ds, preset)
    if unit is None:
        unit, factor = unit_names(preset)[1], 1.0
    with np.errstate(divide="ignore", invalid="ignore"):
        relative = shift / (energy - shift)
    return relative, shift * factor, unit


def _direction(relative):
    signs = np.sign(relative[np.isfinite(relative) & (relative != 0)])
    if signs.size and (signs < 0).all():
        return "red-shifted (to lower energy)"
    if signs.size and (signs > 0).all():
        return "blue-shifted (to higher energy)"
    return "shifted both ways"


def _bar_label(title, way):
    """A colour bar's label: the quantity, and which way the line moves ("red-shifted", not a colour)."""
    return f"{title}, {way.split(' (')[0]}"


def _panel(fig, ax, x_edges, y_edges, values, label):
    shown = np.abs(values)
    shown = np.where(shown > 0, shown, np.nan)
    finite = shown[np.isfinite(shown)]
    if not finite.size:
        ax.text(0.5, 0.5, "no unscreened counterpart to shift from\n(or the line is never present)",
                transform=ax.transAxes, ha="center", va="center", fontsize=8)
        return None
    norm = LogNorm(vmin=max(finite.min(), finite.max() * 1e-8), vmax=finite.max())
    mesh = ax.pcolormesh(x_edges, y_edges, np.ma.masked_invalid(shown).T, cmap="viridis", norm=norm, rasterized=True)
    bar = fig.colorbar(mesh, ax=ax, pad=0.02, label=label)
    bar.solids.set_rasterized(True)
    return mesh


def line_shift_map(ds, m, preset=NO_PRESET):
    """The shift of line ``m`` against the unscreened line: relative |ΔE − ΔE₀|/ΔE₀ beside
    |ΔE − ΔE₀| in the trade's energy unit, with the curve where the line is lost.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``relative_shift`` and ``shift`` (the cube's cells; NaN where the line is gone or has no
        unscreened counterpart; ``shift`` in ``shift_unit``), and ``loss``: the loss curve's
        arrays (strength, λ) — per strength (density, temperature) in a sweep over conditions.
    """
    label = str(ds["line_label"].values[m])
    relative, absolute, unit = _shifts(ds, m, preset)
    way = _direction(relative)
    pretty = label.replace("-", "–")
    if len(cube_dims(ds)[1]) == 2:
        fig, loss = _condition_shift_map(ds, m, preset, relative, absolute, unit, way)
    else:
        fig, loss = _strength_shift_map(ds, m, preset, relative, absolute, unit, way)
    fig.suptitle(f"{family_title(ds)}: line {pretty}, shift against the unscreened line; the line is {way}",
                 fontsize=9)
    return fig, {"relative_shift": relative, "shift": absolute, "shift_unit": unit, "loss": loss}


def _strength_shift_map(ds, m, preset, relative, absolute, unit, way):
    label = str(ds["line_label"].values[m])
    z = strength_values(ds, preset)
    lam = ds["screening_length"].values
    fig = Figure(figsize=(11.6, 4.6), layout="constrained")
    axes = fig.subplots(1, 2, sharey=True)
    loss = line_loss_length(ds, m)
    ok = np.isfinite(loss) & (loss > 0)
    bad = invalid_mask(ds)
    titles = ("relative shift $|\\Delta E - \\Delta E_0|/\\Delta E_0$", f"shift $|\\Delta E - \\Delta E_0|$ ({unit})")
    for ax, values, title in zip(axes, (relative, absolute), titles):
        ax.set(xscale="log", yscale="log", xlim=cell_edges(z)[[0, -1]], ylim=cell_edges(lam)[[0, -1]],
               xlabel=strength_label(ds, preset), title=title)
        _panel(fig, ax, cell_edges(z), cell_edges(lam), values, _bar_label(title, way))
        handles = []
        if bad is not None:
            shaded = shade_invalid(ax, cell_edges(z), cell_edges(lam), np.broadcast_to(bad[None, :], (z.size, lam.size)))
            handles = [shaded] if shaded is not None else []
        if ok.any():
            (line,) = ax.plot(z[ok], loss[ok], "-", color="white", lw=1.6, path_effects=HALO, gid=f"loss:{label}",
                              label=f"{label.replace('-', '–')} lost below this line")
            handles.insert(0, line)
        if handles:
            ax.legend(handles=handles, loc="lower left", fontsize=7, framealpha=0.8)
        value_ticks(ax.xaxis, z)
        tidy_log_axis(ax.yaxis, lam.min(), lam.max())
    axes[0].set_ylabel(length_label(ds, preset))
    return fig, (z[ok], loss[ok])


def _condition_shift_map(ds, m, preset, relative, absolute, unit, way):
    label = str(ds["line_label"].values[m])
    strength_dim, (x_dim, y_dim) = cube_dims(ds)
    x, y = ds[x_dim].values, ds[y_dim].values
    rows = picks(ds.sizes[strength_dim], MAX_ROWS)
    fig = Figure(figsize=(11.6, 3.4 * rows.size + 0.8), layout="constrained")
    axes = fig.subplots(rows.size, 2, sharex=True, sharey=True, squeeze=False)
    loss = line_loss_density(ds, m)  # (strength, y)
    bad = invalid_mask(ds)
    drawn = {}
    titles = ("relative shift $|\\Delta E - \\Delta E_0|/\\Delta E_0$", f"shift $|\\Delta E - \\Delta E_0|$ ({unit})")
    for row, i in enumerate(rows):
        z = float(ds[strength_dim].values[i])
        name = preset.strength_text(z, ds[strength_dim].attrs)
        for col, (values, title) in enumerate(zip((relative[i], absolute[i]), titles)):
            ax = axes[row, col]
            ax.set(xscale="log", yscale="log", xlim=cell_edges(x)[[0, -1]], ylim=cell_edges(y)[[0, -1]],
                   title=f"{name}: {title}")
            _panel(fig, ax, cell_edges(x), cell_edges(y), values, _bar_label(title, way))
            handles = []
            if loss is not None:
                ok = np.isfinite(loss[i]) & (loss[i] > 0)
                if ok.any():
                    drawn[z] = (loss[i][ok], y[ok])
                    (line,) = ax.plot(loss[i][ok], y[ok], "-", color="white", lw=1.6, path_effects=HALO,
                                      gid=f"loss:{label}", label=f"{label.replace('-', '–')} lost right of this line")
                    handles.append(line)
            if bad is not None and (shaded := shade_invalid(ax, cell_edges(x), cell_edges(y), bad)) is not None:
                handles.append(shaded)
            if handles:
                ax.legend(handles=handles, loc="lower right", fontsize=7, framealpha=0.8)
            tidy_log_axis(ax.xaxis, x.min(), x.max())
            tidy_log_axis(ax.yaxis, y.min(), y.max())
            if row == rows.size - 1:
                ax.set_xlabel(axis_label(ds, x_dim, preset))
            if col == 0:
                ax.set_ylabel(axis_label(ds, y_dim, preset))
    if rows.size < ds.sizes[strength_dim]:
        shown = ", ".join(preset.strength_text(float(ds[strength_dim].values[i]), ds[strength_dim].attrs) for i in rows)
        fig.supxlabel(f"Note: {rows.size} of the {ds.sizes[strength_dim]} stored strengths drawn ({shown}); the "
                      "cube's line shift holds every one", fontsize="small")
    return fig, drawn
