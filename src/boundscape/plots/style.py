"""What every figure shares: cell edges, count shading, axis labels in the cube's units, and
files written with fixed metadata (an unchanged cube gives byte-identical PNG and PDF files)."""

from __future__ import annotations

import math
from pathlib import Path

import matplotlib
import matplotlib.ticker
import numpy as np
from matplotlib import patheffects
from matplotlib.colors import BoundaryNorm

from ..physics.presets import Nuclear, Semiconductor, cube_units
from ..physics.units import convert

__all__ = ["HALO", "RC", "cell_edges", "count_norm", "count_colorbar", "value_ticks", "strength_label",
           "cube_unit_system", "unit_names", "length_unit", "save"]

HALO = [patheffects.withStroke(linewidth=2.6, foreground="black")]
PNG_METADATA = {"Software": None}
PDF_METADATA = {"CreationDate": None, "ModDate": None, "Producer": None, "Creator": None}
RC = {"svg.hashsalt": "boundscape", "pdf.compression": 6, "font.size": 9, "axes.titlesize": 10}


def cell_edges(values):
    # Cell edges at geometric midpoints, for log axes; one value gets a ±20 % cell.
    v = np.asarray(values, dtype=float)
    if v.size == 1:
        return np.array([v[0] / 1.2, v[0] * 1.2])
    mid = np.sqrt(v[1:] * v[:-1])
    return np.concatenate([[v[0] ** 2 / mid[0]], mid, [v[-1] ** 2 / mid[-1]]])


def count_norm(top):
    top = max(int(top), 1)
    cmap = matplotlib.colormaps["cividis"].resampled(top + 1)
    return cmap, BoundaryNorm(np.arange(-0.5, top + 1.5), cmap.N)


def count_colorbar(fig, mesh, ax, top, label, capped=False):
    bar = fig.colorbar(mesh, ax=ax, label=label, pad=0.02)
    bar.solids.set_rasterized(True)  # no hairline seams between the colour blocks in PDF viewers
    step = max(1, math.ceil((top + 1) / 12))
    ticks = np.arange(0, top + 1, step)
    bar.set_ticks(ticks, labels=[f"≥{t}" if capped and t == top else f"{t}" for t in ticks])
    return bar


def value_ticks(axis, values, style="{:g}"):
    # A short log axis reads best with its grid values as plain numbers.
    if len(values) <= 10:
        axis.set_ticks(values, labels=[style.format(v) for v in values])
        axis.set_minor_locator(matplotlib.ticker.NullLocator())


def strength_label(ds):
    units = ds["strength"].attrs.get("units", "1")
    name = ds["strength"].attrs.get("long_name", "strength")
    if units == "1":
        return "strength Z" if name.startswith("charge number") else f"strength ({name})"
    return f"{name} (hartree)" if units.endswith(" J") else f"{name} ({units})"


def cube_unit_system(ds, preset):
    return cube_units(preset, float(ds.attrs.get("mass", 1.0)))


def unit_names(preset):
    """Names of the cube's length and energy units: atomic, unless the preset reads them otherwise."""
    if isinstance(preset, Semiconductor) and preset.units_choice == "effective":
        return "effective Bohr radii a*", "effective hartrees 2Ry*"
    if isinstance(preset, Nuclear):
        return f"b = {preset.length_fm:g} fm", "(ħc)²/(μc² b²)"
    return "bohr", "hartree"


def length_unit(ds, preset):
    """(unit name, factor from the cube's length unit) of the preset's physical length."""
    if preset is None:
        return None, None
    return preset.length_unit, cube_unit_system(ds, preset).length_m / convert(1.0, preset.length_unit, "m")


def save(fig, stem):
    """Write ``stem.png`` and ``stem.pdf`` with fixed metadata (byte-identical reruns)."""
    stem = Path(stem)
    stem.parent.mkdir(parents=True, exist_ok=True)
    with matplotlib.rc_context(RC):
        fig.savefig(stem.with_suffix(".png"), dpi=150, metadata=PNG_METADATA)
        fig.savefig(stem.with_suffix(".pdf"), metadata=PDF_METADATA)
    return [stem.with_suffix(".png"), stem.with_suffix(".pdf")]
