"""Line figures: the relative shift of each E1 line over (strength, screening length) with the
curve where it is lost, and a survival chart of every line (where it disappears, at which
wavelength).  Drawn from the cube's line variables and stored critical lengths alone."""

from __future__ import annotations

import numpy as np
from matplotlib.colors import LogNorm
from matplotlib.figure import Figure
from scipy import constants

from ..labels import parse_state
from ..physics.presets import NO_PRESET
from ..physics.units import convert
from .style import (HALO, cell_edges, cube_unit_system, family_title, length_label, strength_label, strength_values,
                    tidy_log_axis, value_ticks)

__all__ = ["line_shift_map", "line_survival_chart", "line_loss_length"]


def _critical(ds, state):
    n, l = parse_state(state)
    if "critical_screening_length" not in ds or l not in ds["l"].values or n - l - 1 >= ds.sizes["n_r"]:
        return np.full(ds.sizes["strength"], np.nan)
    return ds["critical_screening_length"].sel(l=l, n_r=n - l - 1).values


def line_loss_length(ds, m):
    """The screening length below which line ``m`` is gone, per strength: the larger of its two
    levels' stored critical lengths (the upper level's, unless screening reorders them)."""
    return np.fmax(_critical(ds, str(ds["line_lower"].values[m])), _critical(ds, str(ds["line_upper"].values[m])))


def line_shift_map(ds, m, preset=NO_PRESET):
    """Relative shift |ΔE − ΔE₀|/ΔE₀ of line ``m`` over (strength, λ), with its loss curve.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``relative_shift`` (strength × screening length; NaN where the line is gone or has no
        unscreened counterpart) and ``loss`` (the loss curve's (strength, λ) arrays).
    """
    label = str(ds["line_label"].values[m])
    z = strength_values(ds, preset)
    lam = ds["screening_length"].values
    energy = ds["line_energy"].isel(line=m).values
    shift = ds["line_shift"].isel(line=m).values
    relative = shift / (energy - shift)
    fig = Figure(figsize=(6.4, 4.6), layout="constrained")
    ax = fig.add_subplot()
    magnitude = np.abs(relative)
    shown = np.where(magnitude > 0, magnitude, np.nan)
    finite = shown[np.isfinite(shown)]
    title = f"{family_title(ds)}: line {label.replace('-', '–')}, shift against the unscreened line"
    ax.set(xscale="log", yscale="log", xlim=cell_edges(z)[[0, -1]], ylim=cell_edges(lam)[[0, -1]],
           xlabel=strength_label(ds, preset), ylabel=length_label(ds, preset), title=title)
    if finite.size:
        norm = LogNorm(vmin=max(finite.min(), finite.max() * 1e-8), vmax=finite.max())
        mesh = ax.pcolormesh(cell_edges(z), cell_edges(lam), np.ma.masked_invalid(shown).T, cmap="viridis",
                             norm=norm, rasterized=True)
        signs = np.sign(relative[np.isfinite(relative) & (relative != 0)])
        way = ("to lower energy (red)" if (signs < 0).all() else "to higher energy (blue)" if (signs > 0).all()
               else "in both directions")
        bar = fig.colorbar(mesh, ax=ax, pad=0.02, label=f"relative shift |ΔE − ΔE₀|/ΔE₀, lines move {way}")
        bar.solids.set_rasterized(True)
    else:
        ax.text(0.5, 0.5, "no unscreened counterpart to shift from\n(or the line is never present)",
                transform=ax.transAxes, ha="center", va="center")
    loss = line_loss_length(ds, m)
    ok = np.isfinite(loss) & (loss > 0)
    if ok.any():
        ax.plot(z[ok], loss[ok], "-", color="white", lw=1.6, path_effects=HALO, gid=f"loss:{label}",
                label=f"{label.replace('-', '–')} lost below this line")
        ax.legend(loc="lower left", fontsize=7, framealpha=0.8)
    value_ticks(ax.xaxis, z)
    tidy_log_axis(ax.yaxis, lam.min(), lam.max())
    return fig, {"relative_shift": relative, "loss": (z[ok], loss[ok])}


def _wavelength_nm(ds):
    """Vacuum wavelength hc/ΔE (nm) of each line at the sweep's largest screening length, per
    strength (NaN where the line is gone there): a unit conversion of the stored ΔE."""
    joules = ds["line_energy"].isel(screening_length=-1).values * float(ds["line_energy"].attrs["energy_unit_in_J"])
    with np.errstate(divide="ignore", invalid="ignore"):
        return constants.h * constants.c / joules / constants.nano  # (strength, line)


def line_survival_chart(ds, preset=NO_PRESET):
    """Where each line disappears: per line and strength, the screening length below which it is
    gone (under the plasma or semiconductor preset, the carrier density above which it is gone)
    against its vacuum wavelength in nm.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``threshold`` (strength × line; bohr-like cube lengths, or cm⁻³ under a preset),
        ``wavelength_nm`` (strength × line).
    """
    z = strength_values(ds, preset)
    labels = [str(v) for v in ds["line_label"].values]
    loss = np.stack([line_loss_length(ds, m) for m in range(len(labels))], axis=1)  # (strength, line)
    wavelength = _wavelength_nm(ds)
    density = preset.density_name is not None
    if density:
        length_m = cube_unit_system(ds, preset).length_m
        with np.errstate(divide="ignore", invalid="ignore"):
            threshold = np.where(np.isfinite(loss) & (loss > 0),
                                 convert(np.asarray(preset.loss_density(np.where(loss > 0, loss, 1.0) * length_m),
                                                    dtype=float), "m-3", "cm-3"),
                                 np.nan)
        who = preset.density_name.replace("_", " ")
        xlabel = f"{who} above which the line is gone (cm⁻³, {preset.density_note})"
    else:
        threshold = np.where(loss > 0, loss, np.nan)
        xlabel = f"screening length below which the line is gone ({length_label(ds, preset).rsplit('(', 1)[-1]}"
    fig = Figure(figsize=(6.8, 4.6), layout="constrained")
    ax = fig.add_subplot()
    colours = [f"C{i % 10}" for i in range(len(labels))]
    placed = []
    for m, label in enumerate(labels):
        x, y = threshold[:, m], wavelength[:, m]
        ok = np.isfinite(x) & np.isfinite(y) & (y > 0)
        if not ok.any():
            continue
        ax.plot(x[ok], y[ok], "-o", color=colours[m], ms=4, lw=1, label=label.replace("-", "–"), gid=f"line:{label}")
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
        ax.legend(title="line", fontsize=7, title_fontsize=7, loc="best", framealpha=0.85)
        if z.size > 1:
            ax.text(0.99, 0.01, f"points along a line: strength {z.min():.3g} … {z.max():.3g} "
                                f"({'left to right' if density else 'right to left'} as it rises)",
                    transform=ax.transAxes, ha="right", va="bottom", fontsize=7, color="0.3")
    else:
        ax.text(0.5, 0.5, "no line is present in the sweep", transform=ax.transAxes, ha="center", va="center")
    return fig, {"threshold": threshold, "wavelength_nm": wavelength}
