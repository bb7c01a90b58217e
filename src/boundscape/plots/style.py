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

from ..engine import FAMILIES
from ..physics.presets import NO_PRESET

__all__ = ["HALO", "RC", "cell_edges", "count_norm", "count_colorbar", "value_ticks", "tidy_log_axis",
           "strength_label", "strength_values", "family_title", "length_label", "cube_unit_system", "unit_names",
           "length_unit", "energy_unit", "save", "cube_dims", "is_condition_cube", "axis_label", "invalid_mask",
           "invalid_handle", "shade_invalid", "shade_invalid_x", "INVALID_LABEL", "STATE_FONTSIZE", "with_note"]

# State names (2p, 10d) on curves: readable where the report shows a figure at a page's width.
STATE_FONTSIZE = 9

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


# Counts up to this many get a shade each; above it shades cover growing ranges of counts, so
# that the few-state bands, where levels are being lost, stay far apart in colour.
EXACT_COUNTS = 6
MAX_SHADES = 11


def count_bins(top):
    """Lower edges of the count bins: 0, 1, … exactly, then ranges growing geometrically up to ``top``."""
    top = max(int(top), 1)
    if top < MAX_SHADES:
        return np.arange(top + 1)
    upper = np.unique(np.round(np.geomspace(EXACT_COUNTS, top + 1, MAX_SHADES - EXACT_COUNTS + 1)).astype(int))
    return np.concatenate([np.arange(EXACT_COUNTS), upper[:-1]])


def count_norm(top):
    """Colormap and norm of a count shading: every bin its own, well separated shade."""
    lows = count_bins(top)
    cmap = matplotlib.colormaps["cividis"].resampled(lows.size)
    return cmap, BoundaryNorm(np.append(lows, max(int(top), 1) + 1) - 0.5, cmap.N)


def count_colorbar(fig, mesh, ax, top, label, capped=False):
    bar = fig.colorbar(mesh, ax=ax, label=label, pad=0.02)
    bar.solids.set_rasterized(True)  # no hairline seams between the colour blocks in PDF viewers
    lows = count_bins(top)
    highs = np.append(lows[1:] - 1, max(int(top), 1))
    centres = (lows + highs) / 2
    labels = [f"{a}" if a == b else f"{a}–{b}" for a, b in zip(lows, highs)]
    if capped:
        labels[-1] = f"≥{lows[-1]}"
    bar.set_ticks(centres, labels=labels)
    bar.minorticks_off()
    return bar


def tidy_log_axis(axis, lo, hi):
    """Log ticks that never collide: under about a decade, plain numbers at 1, 2, 5 × 10^k."""
    decades = math.log10(hi / lo) if lo > 0 and hi > lo else 0.0
    if decades < 1.3:
        subs = (1.0, 2.0, 5.0) if decades > 0.5 else (1.0, 1.5, 2.0, 3.0, 4.0, 5.0, 7.0)
        axis.set_major_locator(matplotlib.ticker.LogLocator(base=10, subs=subs))
        axis.set_major_formatter(matplotlib.ticker.FuncFormatter(lambda v, _: f"{v:.3g}"))
        axis.set_minor_formatter(matplotlib.ticker.NullFormatter())


def value_ticks(axis, values, style="{:.3g}", width_fraction=0.09):
    """Grid values as the ticks of a short log axis, if they are far enough apart to be read;
    otherwise :func:`tidy_log_axis`."""
    values = np.asarray(values, dtype=float)
    logs = np.log10(values)
    span = logs.max() - logs.min()
    if 1 < len(values) <= 10 and span > 0 and np.diff(np.sort(logs)).min() > width_fraction * span:
        axis.set_ticks(values, labels=[style.format(v) for v in values])
        axis.set_minor_locator(matplotlib.ticker.NullLocator())
    else:
        tidy_log_axis(axis, values.min(), values.max())


def family_title(ds):
    family = ds.attrs.get("family", "")
    return f"{FAMILIES[family].display_name if family in FAMILIES else family} potential"


def _cube_mass(ds):
    return float(ds.attrs.get("mass", 1.0))


def strength_values(ds, preset=NO_PRESET):
    """The strengths as plotted: g² in MeV fm under the nuclear preset, the donor charge under a
    semiconductor preset (Z, also where the cube holds Z/ε_r), the cube's axis otherwise."""
    return preset.strength_values(ds["strength"].values, _cube_mass(ds))


def strength_label(ds, preset=NO_PRESET):
    return preset.strength_label(ds["strength"].attrs)


def length_label(ds, preset=NO_PRESET):
    """'screening length λ (bohr)', or the family's own name for the length (a well's radius)."""
    name = ds["screening_length"].attrs.get("long_name", "screening length")
    symbol = "λ" if name == "screening length" else "R"
    return f"{name} {symbol} ({unit_names(preset)[0]})"


def cube_unit_system(ds, preset=NO_PRESET):
    return preset.unit_system(_cube_mass(ds))


def unit_names(preset=NO_PRESET):
    """Names of the cube's length and energy units: atomic, unless the preset reads them otherwise."""
    return preset.unit_names()


def energy_unit(ds, preset=NO_PRESET):
    """(unit name, factor from the cube's energy unit) of the preset's energies: eV, meV, MeV;
    (None, None) without a preset.  The factor is the cube's own ``energy_unit_in_J`` where it
    has one (the number every reader converts with)."""
    name, factor = preset.shown_energy_unit(_cube_mass(ds))
    if name is not None and "energy_unit_in_J" in ds["energy"].attrs:
        factor = float(ds["energy"].attrs["energy_unit_in_J"]) / preset.energy_unit.size
    return name, factor


def length_unit(ds, preset=NO_PRESET):
    """(unit name, factor from the cube's length unit) of the preset's physical length;
    (None, None) without a preset."""
    name, factor = preset.shown_length_unit(_cube_mass(ds))
    if name is not None and "length_unit_in_m" in ds["screening_length"].attrs:
        factor = float(ds["screening_length"].attrs["length_unit_in_m"]) / preset.length_unit.size
    return name, factor


def with_note(label: str, note: str) -> str:
    """An axis or figure label followed by a note on its own line (the figure's own statement of
    what it leaves out: no stored state may be dropped silently)."""
    return f"{label}\nNote: {note}" if note else label


def save(fig, stem):
    """Write ``stem.png`` and ``stem.pdf`` with fixed metadata (byte-identical reruns)."""
    stem = Path(stem)
    stem.parent.mkdir(parents=True, exist_ok=True)
    with matplotlib.rc_context(RC):
        fig.savefig(stem.with_suffix(".png"), dpi=150, metadata=PNG_METADATA)
        fig.savefig(stem.with_suffix(".pdf"), metadata=PDF_METADATA)
    return [stem.with_suffix(".png"), stem.with_suffix(".pdf")]


# -- the cube's dimensions, and where the screening model fails --------------------------------
INVALID_FACE = (0.55, 0.55, 0.55, 0.55)
INVALID_EDGE = (0.15, 0.15, 0.15, 0.7)
INVALID_HATCH = "////"
INVALID_LABEL = "screening model fails (hatched; the cube's screening validity flag)"


def cube_dims(ds):
    """(strength dimension, condition dimensions) of a cube: ``("strength", ("screening_length",))``,
    ``("strength", ("electron_density", "electron_temperature"))``, ``("coupling", ("range",))``."""
    dims = ds["energy"].dims
    return dims[0], tuple(dims[1:-2])


def is_condition_cube(ds) -> bool:
    return cube_dims(ds)[1] != ("screening_length",)


def axis_label(ds, name, preset=NO_PRESET):
    """A condition dimension's label: the preset's (mathtext), else the cube's long name and units."""
    if name in preset.condition_labels:
        return preset.condition_labels[name]
    attrs = ds[name].attrs
    return f"{attrs.get('long_name', name)} ({attrs.get('units', '1')})"


def invalid_mask(ds):
    """Where the screening model fails, over the cube's condition dimensions (None if the cube
    does not say)."""
    if "screening_validity" not in ds:
        return None
    return ds["screening_validity"].values != 0


def _runs(mask):
    """(start, stop) index pairs of the runs of True in a 1-D mask."""
    padded = np.concatenate([[False], np.asarray(mask, bool), [False]])
    edges = np.flatnonzero(np.diff(padded.astype(np.int8)))
    return list(zip(edges[::2], edges[1::2]))


def invalid_handle():
    from matplotlib.patches import Patch

    return Patch(facecolor=INVALID_FACE, edgecolor=INVALID_EDGE, hatch=INVALID_HATCH, lw=0, label=INVALID_LABEL)


def shade_invalid(ax, x_edges, y_edges, mask):
    """Grey and hatch the cells (x index, y index) of ``mask`` on a map with those cell edges;
    returns the legend handle, or None if no cell fails."""
    from matplotlib.collections import PatchCollection
    from matplotlib.patches import Rectangle

    mask = np.asarray(mask, bool)
    if not mask.any():
        return None
    boxes = [Rectangle((x_edges[a], y_edges[j]), x_edges[b] - x_edges[a], y_edges[j + 1] - y_edges[j])
             for j in range(mask.shape[1]) for a, b in _runs(mask[:, j])]
    ax.add_collection(PatchCollection(boxes, facecolor=INVALID_FACE, edgecolor=INVALID_EDGE, hatch=INVALID_HATCH,
                                      lw=0, zorder=1.8, gid="invalid"))
    return invalid_handle()


def shade_invalid_x(ax, x, mask):
    """Grey and hatch the stretches of a curve plot's x axis (values ``x``) where ``mask`` holds;
    returns the legend handle, or None."""
    if mask is None or not np.asarray(mask).any():
        return None
    order = np.argsort(x)
    x, mask = np.asarray(x)[order], np.asarray(mask, bool)[order]
    edges = cell_edges(x)
    for a, b in _runs(mask):
        ax.axvspan(edges[a], edges[b], facecolor=INVALID_FACE, edgecolor=INVALID_EDGE, hatch=INVALID_HATCH, lw=0,
                   zorder=0.5, gid="invalid")
    return invalid_handle()
