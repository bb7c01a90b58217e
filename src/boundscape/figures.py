"""Figures drawn from a cube alone: threshold maps and level fans, and the files of a sweep.

Nothing here solves the radial equation: every curve is a stored energy or a stored critical
screening length (the physical-condition maps and the loss table live in :mod:`.conditions`,
with the same rule).  Each function returns its figure together with the arrays it
plotted, so tests can hold the picture against the cube.  Files are written with fixed
metadata, so an unchanged cube gives byte-identical PNG and PDF files.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import matplotlib
import matplotlib.lines
import matplotlib.ticker
import numpy as np
import yaml
from matplotlib import patheffects
from matplotlib.colors import BoundaryNorm
from matplotlib.figure import Figure

from .errors import InputError
from .presets import Nuclear, Semiconductor, cube_units, from_config
from .units import convert

__all__ = ["state_name", "threshold_map", "level_fan", "save", "render_all", "cube_preset", "fan_strengths"]

# Spectroscopic letters; j is skipped by convention (common practice, no source).
_LETTERS = "spdfghiklmnoqrtuvwxyz"
_HALO = [patheffects.withStroke(linewidth=2.6, foreground="black")]
_PNG_METADATA = {"Software": None}
_PDF_METADATA = {"CreationDate": None, "ModDate": None, "Producer": None, "Creator": None}
_RC = {"svg.hashsalt": "boundscape", "pdf.compression": 6, "font.size": 9, "axes.titlesize": 10}


def state_name(n: int, l: int) -> str:
    """Spectroscopic name of a state, e.g. ``state_name(2, 1) == "2p"``."""
    return f"{n}{_LETTERS[l]}" if l < len(_LETTERS) else f"{n}[l={l}]"


def cube_preset(ds):
    """The preset named in the cube's stored config (``None`` if it names none)."""
    config = yaml.safe_load(ds.attrs.get("config_yaml", "") or "{}") or {}
    return from_config(config.get("preset")), (config.get("preset") or {}).get("map", {})


def _edges(values):
    # Cell edges at geometric midpoints, for log axes; one value gets a ±20 % cell.
    v = np.asarray(values, dtype=float)
    if v.size == 1:
        return np.array([v[0] / 1.2, v[0] * 1.2])
    mid = np.sqrt(v[1:] * v[:-1])
    return np.concatenate([[v[0] ** 2 / mid[0]], mid, [v[-1] ** 2 / mid[-1]]])


def _count_norm(top):
    top = max(int(top), 1)
    cmap = matplotlib.colormaps["cividis"].resampled(top + 1)
    return cmap, BoundaryNorm(np.arange(-0.5, top + 1.5), cmap.N)


def _count_colorbar(fig, mesh, ax, top, label, capped=False):
    bar = fig.colorbar(mesh, ax=ax, label=label, pad=0.02)
    bar.solids.set_rasterized(True)  # no hairline seams between the colour blocks in PDF viewers
    step = max(1, math.ceil((top + 1) / 12))
    ticks = np.arange(0, top + 1, step)
    bar.set_ticks(ticks, labels=[f"≥{t}" if capped and t == top else f"{t}" for t in ticks])
    return bar


def _value_ticks(axis, values, style="{:g}"):
    # A short log axis reads best with its grid values as plain numbers.
    if len(values) <= 10:
        axis.set_ticks(values, labels=[style.format(v) for v in values])
        axis.set_minor_locator(matplotlib.ticker.NullLocator())


def _strength_label(ds):
    units = ds["strength"].attrs.get("units", "1")
    name = ds["strength"].attrs.get("long_name", "strength")
    if units == "1":
        return "strength Z" if name.startswith("charge number") else f"strength ({name})"
    return f"{name} (hartree)" if units.endswith(" J") else f"{name} ({units})"


def _units(ds, preset):
    return cube_units(preset, float(ds.attrs.get("mass", 1.0)))


def _unit_names(preset):
    """Names of the cube's length and energy units: atomic, unless the preset reads them otherwise."""
    if isinstance(preset, Semiconductor) and preset.units_choice == "effective":
        return "effective Bohr radii a*", "effective hartrees 2Ry*"
    if isinstance(preset, Nuclear):
        return f"b = {preset.length_fm:g} fm", "(ħc)²/(μc² b²)"
    return "bohr", "hartree"


def _length_unit(ds, preset):
    """(unit name, factor from the cube's length unit) of the preset's physical length."""
    if preset is None:
        return None, None
    return preset.length_unit, _units(ds, preset).length_m / convert(1.0, preset.length_unit, "m")


def threshold_map(ds, l, preset=None):
    """(strength, λ) plane at one l, shaded by the exact bound-state count, with every loss curve.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``count`` (strength × screening length, from ``num_bound``) and ``curves``, mapping a
        state name to the (strength, λ_c) arrays drawn (the finite stored critical lengths).
    """
    z = ds["strength"].values
    lam = ds["screening_length"].values
    count = ds["num_bound"].sel(l=l).values.astype(float)
    status = ds["status"].sel(l=l).values
    # The count comes from the zero-energy solution, so it stands in flagged cells too (marked ×).
    # The engine's −1 means infinitely many (Coulomb tail, confining well): the top shade.
    # Shades stop at n_r_max ("n_r_max or more"): above that no loss curve is stored to explain them.
    top = int(ds.sizes["n_r"])
    infinite = count < 0
    count = np.where(infinite, np.inf, count)
    cmap, norm = _count_norm(top)
    fig = Figure(figsize=(6.4, 4.6), layout="constrained")
    ax = fig.add_subplot()
    mesh = ax.pcolormesh(_edges(z), _edges(lam), np.ma.masked_invalid(np.minimum(count, top)).T,
                         cmap=cmap, norm=norm, rasterized=True)
    ax.set(xscale="log", yscale="log", xlim=_edges(z)[[0, -1]], ylim=_edges(lam)[[0, -1]],
           xlabel=_strength_label(ds), ylabel=f"screening length λ ({_unit_names(preset)[0]})",
           title=f"{ds.attrs.get('family', '')} potential, l = {l}: bound states and where each is lost")
    _value_ticks(ax.xaxis, z)
    _count_colorbar(fig, mesh, ax, top, f"number of bound states with l = {l}", capped=True)
    if (status != 0).any():
        bad = np.argwhere(status != 0)
        ax.plot(z[bad[:, 0]], lam[bad[:, 1]], "x", color="red", ms=5, label="solver flagged (see status)")
        ax.legend(loc="lower left", fontsize=7)
    curves = {}
    if "critical_screening_length" in ds:
        critical = ds["critical_screening_length"].sel(l=l)
        n_of = ds["n"].sel(l=l).values
        for k, n_r in enumerate(ds["n_r"].values):
            lc = critical.sel(n_r=n_r).values
            finite = np.isfinite(lc) & (lc > 0)
            if not finite.any():
                continue
            name = state_name(int(n_of[k]), int(l))
            curves[name] = (z[finite], lc[finite])
            ax.plot(z[finite], lc[finite], "-", color="white", lw=1.4, path_effects=_HALO, gid=f"loss:{name}")
            spot = _label_spot(z[finite], lc[finite], lam, (0.82, 0.55, 0.28)[k % 3])
            if spot is not None:
                ax.annotate(name, spot, ha="center", va="center", color="white", fontsize=7.5,
                            path_effects=_HALO, annotation_clip=True)
    if infinite.all():
        ax.text(0.5, 0.5, "infinitely many bound states in every cell\n(Coulomb tail or confining potential)",
                transform=ax.transAxes, ha="center", va="center", color="black")
    elif not curves and "critical_screening_length" in ds and np.isposinf(ds["critical_screening_length"].sel(l=l)).all():
        ax.text(0.5, 0.5, f"no stored state with l = {l} is ever bound", transform=ax.transAxes,
                ha="center", va="center", color="white", path_effects=_HALO)
    unit, factor = _length_unit(ds, preset)
    if unit:
        ax.secondary_yaxis("right", functions=(lambda y: y * factor, lambda y: y / factor)).set_ylabel(
            f"screening length ({unit})")
    if isinstance(preset, Nuclear):
        g2 = float(preset.coupling_MeV_fm(1.0, float(ds.attrs.get("mass", 1.0))))
        coupling_axis = ax.secondary_xaxis("top", functions=(lambda x: x * g2, lambda x: x / g2))
        coupling_axis.set_xlabel("coupling g² (MeV fm)")
        _value_ticks(coupling_axis.xaxis, z * g2, "{:.3g}")
    return fig, {"count": count, "curves": curves}


def _label_spot(x, y, ylim, fraction):
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


def fan_strengths(strength, most=3):
    """Up to ``most`` strengths spread over the axis (first, middle, last) for the level fans."""
    strength = np.asarray(strength)
    picks = np.unique(np.round(np.linspace(0, strength.size - 1, min(most, strength.size))).astype(int))
    return strength[picks]


def level_fan(ds, strengths=None, preset=None):
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
    fig = Figure(figsize=(max(2.6 * len(ls) + 2.0, 5.6), 2.5 * len(strengths) + 0.6), layout="constrained")
    axes = fig.subplots(len(strengths), len(ls), sharex=True, sharey="row", squeeze=False)
    colors = matplotlib.colormaps["viridis"](np.linspace(0, 0.85, ds.sizes["n_r"]))
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
            labelled = []  # log10 positions of labels already placed in this panel
            span = math.log10(lam.max() / lam.min()) or 1.0
            for k, n_r in enumerate(ds["n_r"].values):
                name = state_name(int(ds["n"].sel(l=l, n_r=n_r)), int(l))
                y = depth[:, col, k]
                keep = np.isfinite(y) & (y > 0)
                if keep.any():
                    drawn = True
                    lines[(float(z), name)] = (lam[keep], y[keep])
                    ax.plot(lam[keep], y[keep], "-", color=colors[k], lw=1.3, gid=f"level:{name}")
                if "critical_screening_length" in ds:
                    lc = float(ds["critical_screening_length"].sel(strength=z, l=l, n_r=n_r))
                    if math.isfinite(lc) and lam.min() <= lc <= lam.max():
                        critical[(float(z), name)] = lc
                        ax.plot([lc], [bottom], "^", color=colors[k], ms=6, clip_on=False, gid=f"critical:{name}")
                        if all(abs(math.log10(lc) - x) > 0.045 * span for x in labelled):
                            labelled.append(math.log10(lc))
                            ax.annotate(name, (lc, bottom), xytext=(0, 7), textcoords="offset points", rotation=90,
                                        ha="center", va="bottom", fontsize=7, color=colors[k])
            if not drawn:
                ax.text(0.5, 0.5, "no bound level stored", transform=ax.transAxes, ha="center", va="center",
                        color="0.4")
            ax.set_title(f"strength {z:g}, l = {l}")
    handles = [matplotlib.lines.Line2D([], [], color=c, lw=1.3, label=f"n_r = {k}") for k, c in enumerate(colors)]
    handles.append(matplotlib.lines.Line2D([], [], color="0.3", marker="^", ls="", label="λ_c (state lost)"))
    fig.legend(handles=handles, loc="outside right center", fontsize=7, title="n = n_r + l + 1", title_fontsize=7)
    fig.supxlabel(f"screening length λ ({_unit_names(preset)[0]})", fontsize="medium")
    fig.supylabel(f"binding energy −E ({_unit_names(preset)[1]})", fontsize="medium")
    fig.suptitle("Level fan: binding energy against screening length")
    return fig, {"lines": lines, "critical": critical}


def save(fig, stem):
    """Write ``stem.png`` and ``stem.pdf`` with fixed metadata (byte-identical reruns)."""
    stem = Path(stem)
    stem.parent.mkdir(parents=True, exist_ok=True)
    with matplotlib.rc_context(_RC):
        fig.savefig(stem.with_suffix(".png"), dpi=150, metadata=_PNG_METADATA)
        fig.savefig(stem.with_suffix(".pdf"), metadata=_PDF_METADATA)
    return [stem.with_suffix(".png"), stem.with_suffix(".pdf")]


def render_all(ds, outdir):
    """Every figure and the critical-lengths table of a cube, under ``outdir``; returns the paths."""
    from .conditions import condition_map, write_critical_csv

    outdir = Path(outdir)
    preset, settings = cube_preset(ds)
    written = []
    with matplotlib.rc_context(_RC):
        for l in ds["l"].values:
            written += save(threshold_map(ds, int(l), preset)[0], outdir / f"threshold_map_l{int(l)}")
        written += save(level_fan(ds, preset=preset)[0], outdir / "level_fan")
        fig, _ = condition_map(ds, preset, settings)
        if fig is not None:
            written += save(fig, outdir / "condition_map")
    write_critical_csv(ds, outdir / "critical_screening_lengths.csv", preset)
    # The configuration the cube was computed from, as stored in it, for the report.
    config = outdir / "sweep_config.yaml"
    config.write_text(f"# config_sha256: {ds.attrs.get('config_sha256', 'unknown')}\n{ds.attrs.get('config_yaml', '')}")
    return written + [outdir / "critical_screening_lengths.csv", config]


def main(argv=None):
    """``python -m boundscape.figures CUBE OUTDIR``: render everything (used by the workflow)."""
    import argparse

    from .cube import open_cube

    parser = argparse.ArgumentParser(prog="python -m boundscape.figures", description=main.__doc__)
    parser.add_argument("cube")
    parser.add_argument("outdir")
    args = parser.parse_args(argv)
    try:
        with open_cube(args.cube) as ds:
            for path in render_all(ds.load(), args.outdir):
                print(path)
    except InputError as exc:
        print(f"boundscape: error: {exc}", file=sys.stderr)
        return 2
    return 0


if __name__ == "__main__":
    sys.exit(main())
