"""Figures and tables drawn from a cube alone: threshold maps, level fans, physical-condition maps.

Nothing here solves the radial equation: every curve is a stored energy or a stored critical
screening length, and a physical-condition map only compares a preset's screening length with
the stored critical lengths.  Each function returns its figure together with the arrays it
plotted, so tests can hold the picture against the cube.  Files are written with fixed
metadata, so an unchanged cube gives byte-identical PNG and PDF files.
"""

from __future__ import annotations

import csv
import dataclasses
import math
from pathlib import Path

import matplotlib
import matplotlib.lines
import matplotlib.ticker
import numpy as np
import yaml
from matplotlib import patheffects
from matplotlib.colors import BoundaryNorm
from matplotlib.figure import Figure

from .presets import Nuclear, Plasma, Semiconductor, cube_units, from_config
from .units import BOHR_M, convert

__all__ = ["state_name", "threshold_map", "level_fan", "condition_map", "critical_rows",
           "write_critical_csv", "save", "render_all", "cube_preset", "fan_strengths"]

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
    step = max(1, math.ceil((top + 1) / 12))
    ticks = np.arange(0, top + 1, step)
    bar.set_ticks(ticks, labels=[f"≥{t}" if capped and t == top else f"{t}" for t in ticks])
    return bar


def _value_ticks(axis, values):
    # A short log axis reads best with its grid values as plain numbers.
    if len(values) <= 10:
        axis.set_ticks(values, labels=[f"{v:g}" for v in values])
        axis.set_minor_locator(matplotlib.ticker.NullLocator())


def _strength_label(ds):
    units = ds["strength"].attrs.get("units", "1")
    name = ds["strength"].attrs.get("long_name", "strength")
    if units == "1":
        return "Z" if name.startswith("charge number") else name
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
    count = np.where(count >= 0, count, np.nan)
    # Shades stop at n_r_max ("n_r_max or more"): above that no loss curve is stored to explain them.
    top = int(ds.sizes["n_r"])
    cmap, norm = _count_norm(top)
    fig = Figure(figsize=(6.4, 4.6), layout="constrained")
    ax = fig.add_subplot()
    mesh = ax.pcolormesh(_edges(z), _edges(lam), np.ma.masked_invalid(np.minimum(count, top)).T,
                         cmap=cmap, norm=norm)
    ax.set(xscale="log", yscale="log", xlim=_edges(z)[[0, -1]], ylim=_edges(lam)[[0, -1]],
           xlabel=f"strength {_strength_label(ds)}", ylabel=f"screening length λ ({_unit_names(preset)[0]})",
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
    if not curves and "critical_screening_length" in ds:
        ax.text(0.5, 0.5, f"no stored state with l = {l} is ever bound", transform=ax.transAxes,
                ha="center", va="center", color="white", path_effects=_HALO)
    unit, factor = _length_unit(ds, preset)
    if unit:
        ax.secondary_yaxis("right", functions=(lambda y: y * factor, lambda y: y / factor)).set_ylabel(
            f"screening length ({unit})")
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


def surviving_levels(ds, strength, screening_length):
    """Stored states (all l, n_r < n_r_max) with λ_c below ``screening_length`` (cube units, any shape)."""
    lc = ds["critical_screening_length"].sel(strength=strength).values.ravel()
    lc = lc[np.isfinite(lc)]
    lam = np.asarray(screening_length, dtype=float)
    return (lam[..., None] > lc).sum(axis=-1)


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
    units = _units(ds, preset)
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
    ends = [_density_for(preset, lc_all.max(), temperature[0]) / 30, _density_for(preset, lc_all.min(), temperature[-1]) * 30]
    density = _axis_values(settings.get("density_cm3"), {
        "start": float(convert(ends[0], "m-3", "cm-3")), "stop": float(convert(ends[1], "m-3", "cm-3")), "num": 121})
    n_m3 = convert(density, "cm-3", "m-3")
    lam_m = np.array([_screening_length(preset, n_m3, t) for t in temperature])  # (T, n)
    lam = lam_m / units.length_m
    strengths = _axis_values(settings.get("strengths"), list(fan_strengths(ds["strength"].values, 4)))
    strengths = [ds["strength"].sel(strength=s, method="nearest").item() for s in strengths]
    counts = {s: surviving_levels(ds, s, lam) for s in strengths}
    top = max(max(int(c.max()) for c in counts.values()), 1)
    cmap, norm = _count_norm(top)
    ncols = min(2, len(strengths))
    nrows = -(-len(strengths) // ncols)
    fig = Figure(figsize=(4.3 * ncols + 1.2, 3.4 * nrows + 0.4), layout="constrained")
    axes = fig.subplots(nrows, ncols, sharex=True, sharey=True, squeeze=False).ravel()
    what = "ion charge Z" if is_plasma else "donor charge"
    l0 = ds["l"].values[0]
    for ax, s in zip(axes, strengths):
        charge = s if is_plasma else float(preset.donor_charge(s))
        ax.set(xscale="log", title=f"{what} = {charge:g}", xlim=(density.min(), density.max()))
        if two_d:
            mesh = ax.pcolormesh(_edges(density), _edges(temperature), counts[s], cmap=cmap, norm=norm)
            ax.set_yscale("log")
        else:
            ax.step(density, counts[s][0], where="mid", color="black")
            ax.set_ylim(-0.3, top + 0.6)
        # The loss lines of the lowest states of the first l, each labelled where it crosses the middle.
        lc = ds["critical_screening_length"].sel(strength=s, l=l0).values
        for n_r, value in enumerate(lc[:3]):
            if not (math.isfinite(value) and value > 0):
                continue
            name = state_name(int(ds["n"].sel(l=l0).values[n_r]), int(l0))
            loss = convert(np.array([float(_density_for(preset, value * units.length_m, t)) for t in temperature]),
                           "m-3", "cm-3")
            if two_d:
                ax.plot(loss, temperature, "--", color="white", lw=1, path_effects=_HALO)
                # Staggered heights keep the labels of neighbouring lines apart.
                i = int(round((0.8 - 0.2 * n_r) * (temperature.size - 1)))
                if density.min() < loss[i] < density.max():
                    ax.annotate(name, (loss[i], temperature[i]), xytext=(4, 0), textcoords="offset points",
                                ha="left", va="center", color="white", fontsize=8, path_effects=_HALO)
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
    for ax in axes[len(strengths):]:
        ax.set_visible(False)
    for ax in axes[:len(strengths)]:
        if ax.get_subplotspec().is_last_row():
            ax.set_xlabel("electron density n_e (cm⁻³)" if is_plasma else "carrier density n (cm⁻³)")
        if ax.get_subplotspec().is_first_col():
            ax.set_ylabel(t_label if two_d else "surviving stored bound states")
    if two_d:
        _count_colorbar(fig, mesh, list(axes[:len(strengths)]), top, "surviving stored bound states (all l)")
    handles = [matplotlib.lines.Line2D([], [], color="0.4" if two_d else "C0", ls="--",
                                       label=f"loss of the lowest l = {l0} states")]
    if is_plasma:
        handles.append(matplotlib.lines.Line2D([], [], color="red", ls=":",
                                               label="N_D = 1 (Debye picture fails to the right)"))
    fig.legend(handles=handles, loc="outside lower center", fontsize=7, ncols=2)
    return fig, {"density_cm3": density, "temperature": temperature, "screening_length": lam, "count": counts}


def _screening_length(preset, n_m3, temperature):
    if isinstance(preset, Plasma):
        return preset.debye_length(n_m3, temperature)
    return dataclasses.replace(preset, temperature_K=temperature).screening_length(n_m3)


def _density_for(preset, lam_m, temperature):
    if isinstance(preset, Plasma):
        return preset.density_for(lam_m, temperature)
    return dataclasses.replace(preset, temperature_K=temperature).density_for(lam_m) \
        if preset.screening == "debye" else preset.density_for(lam_m)


def critical_rows(ds, preset=None):
    """One row per stored (strength, l, n_r): λ_c in bohr, in the preset's unit, and its loss density."""
    units_m = _units(ds, preset).length_m
    unit, factor = _length_unit(ds, preset)
    flags = ds["critical_screening_length_flag"] if "critical_screening_length_flag" in ds else None
    meanings = flags.attrs["flag_meanings"].split() if flags is not None else []
    rows = []
    for z in ds["strength"].values:
        for l in ds["l"].values:
            for n_r in ds["n_r"].values:
                lc = float(ds["critical_screening_length"].sel(strength=z, l=l, n_r=n_r))
                n = int(ds["n"].sel(l=l, n_r=n_r))
                row = {"strength": float(z), "n": n, "l": int(l), "n_r": int(n_r), "state": state_name(n, int(l)),
                       # Atomic-unit cubes keep every stored digit; others convert to bohr.
                       "critical_screening_length_bohr": lc if units_m == BOHR_M else lc * units_m / BOHR_M}
                if unit:
                    row[f"critical_screening_length_{unit}"] = lc * factor
                if isinstance(preset, (Plasma, Semiconductor)):
                    t = preset.temperature_eV if isinstance(preset, Plasma) else preset.temperature_K
                    density = float(_density_for(preset, lc * units_m, t)) if math.isfinite(lc) and lc > 0 else math.nan
                    key = "loss_electron_density_cm-3" if isinstance(preset, Plasma) else "loss_carrier_density_cm-3"
                    row[key] = convert(density, "m-3", "cm-3")
                if flags is not None:
                    row["flag"] = meanings[int(flags.sel(strength=z, l=l, n_r=n_r))]
                rows.append(row)
    return rows


def write_critical_csv(ds, path, preset=None):
    """Write ``critical_screening_lengths.csv`` (full float precision; inf where never bound)."""
    rows = critical_rows(ds, preset)
    with open(path, "w", newline="") as out:
        writer = csv.DictWriter(out, fieldnames=list(rows[0]), lineterminator="\n")
        writer.writeheader()
        writer.writerows({k: repr(v) if isinstance(v, float) else v for k, v in row.items()} for row in rows)
    return rows


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
    with open_cube(args.cube) as ds:
        for path in render_all(ds.load(), args.outdir):
            print(path)


if __name__ == "__main__":
    main()
