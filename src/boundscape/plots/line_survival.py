"""The line survival chart: for each E1 line and strength, where the line disappears (the
screening length below which, or under a preset the density above which, it is gone) against its
vacuum wavelength.  Drawn from the cube's line energies and stored critical values alone."""

from __future__ import annotations

import matplotlib.lines
import numpy as np
from matplotlib.figure import Figure
from scipy import constants

from ..labels import parse_state
from ..physics.presets import NO_PRESET
from .style import axis_label, cube_dims, family_title, length_label, strength_values, tidy_log_axis, with_note
from .views import picks

__all__ = ["line_survival_chart", "line_loss_length", "line_loss_density", "line_loss_state"]

MAX_TEMPERATURES = 3
MARKERS = "osD^v"


def _index(ds, state):
    n, l = parse_state(state)
    if l not in ds["l"].values or n - l - 1 >= ds.sizes["n_r"]:
        return None
    return {"l": l, "n_r": n - l - 1}


def _critical(ds, state):
    where = _index(ds, state)
    if "critical_screening_length" not in ds or where is None:
        return np.full(ds.sizes[cube_dims(ds)[0]], np.nan)
    return ds["critical_screening_length"].sel(where).values


def line_loss_state(ds, m):
    """Per strength, which of line ``m``'s two levels is lost first (the larger critical length:
    the upper level's, unless screening reorders them): its label."""
    lower, upper = str(ds["line_lower"].values[m]), str(ds["line_upper"].values[m])
    a, b = _critical(ds, lower), _critical(ds, upper)
    return np.where(np.nan_to_num(a, nan=-np.inf) > np.nan_to_num(b, nan=-np.inf), lower, upper)


def line_loss_length(ds, m):
    """The screening length below which line ``m`` is gone, per strength: the larger of its two
    levels' stored critical lengths (the upper level's, unless screening reorders them)."""
    return np.fmax(_critical(ds, str(ds["line_lower"].values[m])), _critical(ds, str(ds["line_upper"].values[m])))


def _loss_name(ds):
    names = [name for name in ds.data_vars if name.startswith("loss_") and not name.endswith("_validity")]
    return names[0] if names else None


def line_loss_density(ds, m, validity=False):
    """The density above which line ``m`` is gone, per strength (and temperature, in a sweep over
    them): the smaller of its levels' stored loss densities, or None if the cube stores none.
    With ``validity``, also the screening model's flag there."""
    name = _loss_name(ds)
    if name is None:
        return (None, None) if validity else None
    pairs = []
    for state in (str(ds["line_lower"].values[m]), str(ds["line_upper"].values[m])):
        where = _index(ds, state)
        if where is None:
            shape = ds[name].isel(l=0, n_r=0).shape
            pairs.append((np.full(shape, np.nan), np.zeros(shape, np.int8)))
            continue
        flag = ds[f"{name}_validity"].sel(where).values if f"{name}_validity" in ds else np.zeros(1, np.int8)
        pairs.append((ds[name].sel(where).values, flag))
    (a, fa), (b, fb) = pairs
    first = np.nan_to_num(a, nan=np.inf) <= np.nan_to_num(b, nan=np.inf)
    loss = np.where(first, a, b)
    return (loss, np.where(first, fa, fb)) if validity else loss


def _wavelength_nm(ds, at):
    """Vacuum wavelength hc/ΔE (nm) of each line in the least screened cell ``at`` (a selection of
    the condition dimensions), per strength: a unit conversion of the stored ΔE."""
    joules = ds["line_energy"].isel(at).values * float(ds["line_energy"].attrs["energy_unit_in_J"])
    with np.errstate(divide="ignore", invalid="ignore"):
        return constants.h * constants.c / joules / constants.nano  # (strength, line)


def line_survival_chart(ds, preset=NO_PRESET):
    """Where each line disappears: per line and strength, the screening length below which it is
    gone (with a preset that reads densities, the density above which it is gone, at each chosen
    temperature of a sweep over them) against its vacuum wavelength in nm.  Points where the
    screening model fails are drawn open.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``threshold`` (strength × line, or strength × line × temperature; cube lengths, or cm⁻³),
        ``wavelength_nm`` (strength × line, or strength × line × temperature).
    """
    strength_dim, length_dims = cube_dims(ds)
    z = strength_values(ds, preset) if strength_dim == "strength" else ds[strength_dim].values
    labels = [str(v) for v in ds["line_label"].values]
    series = []  # (label, threshold over strength, wavelength over strength, invalid over strength, T text)
    if len(length_dims) == 2:
        t_dim = length_dims[1]
        temperatures = ds[t_dim].values
        chosen = picks(temperatures.size, MAX_TEMPERATURES)
        unit = ds[t_dim].attrs.get("units", "")
        symbol = preset.condition_labels.get(t_dim, t_dim).split("(")[0].split()[-1]
        threshold = np.full((z.size, len(labels), chosen.size), np.nan)
        wavelength = np.full(threshold.shape, np.nan)
        for c, k in enumerate(chosen):
            wave = _wavelength_nm(ds, {length_dims[0]: 0, t_dim: k})
            for m, label in enumerate(labels):
                loss, flag = line_loss_density(ds, m, validity=True)
                threshold[:, m, c], wavelength[:, m, c] = loss[:, k], wave[:, m]
                series.append((label, loss[:, k], wave[:, m], flag[:, k] != 0,
                               f", {symbol} = {temperatures[k]:.3g} {unit}", MARKERS[c % len(MARKERS)]))
        xlabel = f"{axis_label(ds, length_dims[0], preset).split(' (')[0]} above which the line is gone (cm$^{{-3}}$)"
        density = True
    else:
        wave = _wavelength_nm(ds, {length_dims[0]: -1})
        loss_density = _loss_name(ds) is not None and preset.density_name is not None
        threshold = np.full((z.size, len(labels)), np.nan)
        for m, label in enumerate(labels):
            if loss_density:
                loss, flag = line_loss_density(ds, m, validity=True)
                bad = flag != 0
            else:
                loss, bad = line_loss_length(ds, m), np.zeros(z.size, bool)
            threshold[:, m] = np.where(loss > 0, loss, np.nan)
            series.append((label, threshold[:, m], wave[:, m], bad, "", "o"))
        wavelength = wave
        density = loss_density
        if density:
            who = preset.density_name.replace("_", " ")
            xlabel = f"{who} above which the line is gone (cm$^{{-3}}$, {preset.density_note})"
        else:
            xlabel = f"screening length below which the line is gone ({length_label(ds, preset).rsplit('(', 1)[-1]}"
    fig = Figure(figsize=(7.4, 4.8), layout="constrained")
    ax = fig.add_subplot()
    placed, handles, never = [], [], []
    for label, x, y, bad, note, marker in series:
        m = labels.index(label)
        colour = f"C{m % 10}"
        ok = np.isfinite(x) & np.isfinite(y) & (y > 0)
        if not ok.any():
            never.append(f"{label.replace('-', '–')}{note}")
            continue
        (line,) = ax.plot(x[ok], y[ok], "-", marker=marker, color=colour, ms=4, lw=1, gid=f"line:{label}{note}",
                          label=f"{label.replace('-', '–')}{note}")
        handles.append(line)
        open_points = ok & bad
        if open_points.any():
            ax.plot(x[open_points], y[open_points], ls="none", marker=marker, ms=6, mfc="white", mec=colour,
                    gid=f"invalid:{label}{note}")
        placed.append((x[ok], y[ok]))
    ax.set(xscale="log", yscale="log", xlabel=xlabel, ylabel="vacuum wavelength (nm), least screened cell",
           title=f"{family_title(ds)}: where each line disappears")
    if placed:
        xs = np.concatenate([p[0] for p in placed])
        ys = np.concatenate([p[1] for p in placed])
        ax.set_xlim(xs.min() / 1.6, xs.max() * 1.6)
        ax.set_ylim(ys.min() / 1.4, ys.max() * 1.4)
        tidy_log_axis(ax.xaxis, xs.min() / 1.6, xs.max() * 1.6)
        tidy_log_axis(ax.yaxis, ys.min() / 1.4, ys.max() * 1.4)
        if any(line.get_gid().startswith("invalid:") for line in ax.get_lines() if line.get_gid()):
            handles.append(matplotlib.lines.Line2D([], [], ls="none", marker="o", mfc="white", mec="0.3",
                                                   label="open: the screening model fails there"))
        ax.legend(handles=handles, title="line", fontsize=7, title_fontsize=7, loc="best", framealpha=0.85)
        if z.size > 1:
            ax.text(0.99, 0.01, f"points along a line: strength {z.min():.3g} … {z.max():.3g} "
                                f"({'left to right' if density else 'right to left'} as it rises)",
                    transform=ax.transAxes, ha="right", va="bottom", fontsize=7, color="0.3")
    else:
        ax.text(0.5, 0.5, "no line is present in the sweep", transform=ax.transAxes, ha="center", va="center")
    notes = []
    if len(length_dims) == 2 and chosen.size < temperatures.size:
        notes.append(f"drawn at {symbol} = {', '.join(f'{temperatures[k]:.3g}' for k in chosen)} {unit} only, of the "
                     f"{temperatures.size} stored temperatures")
    if never and placed:
        notes.append(f"not drawn, never gone within the sweep (or never present): {', '.join(never)}")
    if notes:
        ax.set_xlabel(with_note(ax.get_xlabel(), "; ".join(notes)))
    return fig, {"threshold": threshold, "wavelength_nm": wavelength}
