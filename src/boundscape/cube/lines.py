"""The cube's E1 lines: a ``line`` dimension with label coordinates for its lower and upper
levels, and per (strength, screening_length, line) the line energy, oscillator strength,
Einstein A, shift against the unscreened potential, and a status.

Collect adds them as NaN placeholders (:func:`add_lines`, with the small status gathered from
the tiles) and streams the values in tile by tile (:func:`fill_lines`), as it does the levels.
"""

from __future__ import annotations

import json

import numpy as np

from ..physics.units import HARTREE_EV, HARTREE_J, HARTREE_UDUNITS
from ..sweep.line_tiles import LINE_FLAGS, LINE_VARS
from .model import flag_attrs, listing
from .netcdf import read_part_variables

__all__ = ["LINE_DIMS", "add_lines", "fill_lines"]

LINE_DIMS = ("strength", "screening_length", "line")


def _attributes():
    energy = {"units": HARTREE_UDUNITS, "energy_unit_in_J": HARTREE_J, "energy_unit_in_eV": HARTREE_EV}
    gone = "NaN where the lower or upper level is not bound (line_status absent) or the line did not converge"
    return {
        "line_energy": {"long_name": "line energy (upper minus lower level)", **energy,
                        "ancillary_variables": "line_status",
                        "comment": f"energy of the E1 photon, positive; {gone}"},
        "oscillator_strength": {"long_name": "absorption oscillator strength f", "units": "1",
                                "ancillary_variables": "line_status",
                                "comment": "f = (2 mu/3) dE max(l, l')/(2l + 1) |<r>|^2 of the lower level's l, "
                                           f"atomic units; {gone}"},
        "einstein_A": {"long_name": "Einstein A coefficient of the upper to lower decay", "units": "s-1",
                       "ancillary_variables": "line_status",
                       "comment": "(4/3) alpha^3 dE^3 max(l, l')/(2l' + 1) |<r>|^2 per atomic unit of time, with the "
                                  f"cube's energies read as hartree (a vacuum emission rate); {gone}"},
        "line_shift": {"long_name": "line shift against the unscreened potential", **energy,
                       "ancillary_variables": "line_status",
                       "comment": "line energy minus that of the same line of the unscreened potential (lambda to "
                                  "infinity: -Z/r for yukawa, ecsc, hulthen; the bare table for a screened table); "
                                  f"NaN where that line does not exist (equal n in -Z/r, square_well); {gone}"},
    }


def add_lines(ds, plan, tile_paths, layout=None):
    """``ds`` with the plan's lines as coordinates, the status gathered from the tiles, and NaN
    placeholders of :data:`LINE_VARS` for :func:`fill_lines` to fill (over ``layout``'s
    dimensions: a sweep over conditions maps each engine cell onto its conditions)."""
    labels = list(plan.lines)
    lower = [label.split("-")[0] for label in labels]
    upper = [label.split("-")[1] for label in labels]
    shape = (plan.strength.size, plan.screening_length.size, len(labels))
    status = np.full(shape, LINE_FLAGS.index("absent"), np.int8)
    reasons = []
    for tile, path in zip(plan.tiles, tile_paths):
        where = (slice(*tile.strength_slice), list(tile.screening_length_index))
        status[where] = read_part_variables(path, ("line_status",))["line_status"]
        import netCDF4

        with netCDF4.Dataset(path) as nc:
            listed = json.loads(nc.getncattr("line_reasons_json"))
        reasons += [f"strength={tile.strength[i]!r} screening_length={tile.screening_length[j]!r} "
                    f"line={labels[m]}: {text}" for i, j, m, text in listed]
    dims = LINE_DIMS if layout is None else layout.line_dims
    if layout is not None:
        status = layout.cells(status)
    placeholder = np.broadcast_to(np.float64(np.nan), status.shape)
    attrs = _attributes()
    data = {name: (dims, placeholder, attrs[name]) for name in LINE_VARS}
    data["line_status"] = (dims, status, {
        "long_name": "status of the line in the cell", **flag_attrs(LINE_FLAGS),
        "comment": "absent: a level of the line is not bound in this cell",
        "flagged_lines": listing(reasons)})
    coords = {
        "line": ("line", np.arange(len(labels), dtype=np.int32),
                 {"long_name": "index of the E1 line", "units": "1"}),
        "line_label": ("line", np.array(labels, dtype=str), {"long_name": "E1 line, lower-upper level"}),
        "line_lower": ("line", np.array(lower, dtype=str), {"long_name": "lower level of the line (smaller n)"}),
        "line_upper": ("line", np.array(upper, dtype=str), {"long_name": "upper level of the line (larger n)"}),
    }
    return ds.assign_coords({k: v for k, v in coords.items()}).assign(data)


def fill_lines(nc, plan, tile, path):
    """Write one tile's line values into the open cube ``nc``."""
    arrays = read_part_variables(path, LINE_VARS)
    s0, s1 = tile.strength_slice
    index = list(tile.screening_length_index)
    for name in LINE_VARS:
        nc.variables[name][s0:s1, index, :] = arrays[name]
