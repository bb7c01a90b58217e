"""How big a sweep may be: checked from the configuration alone, before any axis is built.

A grid is refused at once when it is beyond what one run can hold or plan, with its size and
the limit named; the first two limits are config keys (``limits.max_cells``,
``limits.max_tiles``), since a bigger machine can hold more. The caps on ``grid.n_r_max`` and on
``l`` are fixed (the schema repeats them as its maxima): past them the request stops being a
screened bound-state problem anyone stores.
"""

from __future__ import annotations

import math

from ..engine.limits import MAX_CRITICAL_STATES, MAX_L
from ..errors import InputError

__all__ = ["LIMITS", "N_R_MAX_LIMIT", "L_LIMIT", "axis_size", "check_limits", "max_tiles"]

# Defaults of the config's ``limits`` section.
#   max_cells: collect holds a few bytes per cell and the cube stores n_r_max levels of three
#   float64 variables per cell, about 2 GB at 10^7 cells of 8 levels.
#   max_tiles: Snakemake keeps every job of the plan in memory; 20,000 one-cell tiles took
#   about 20 s and 0.5 GB to plan (a dry run, measured on the development machine).
LIMITS = {"max_cells": 10_000_000, "max_tiles": 50_000}
# Levels kept per l, and the largest l: the engine's own limits (boundscape.engine.limits; the
# critical lengths' root searches cost about n_r_max² per l: yukawa, l = 0 and 5: 0.6 s at 20
# levels, 7.7 s at 100, 35 s at 200, measured).
N_R_MAX_LIMIT = MAX_CRITICAL_STATES
L_LIMIT = MAX_L
# The grid's strength axis, and the trades' condition axes that replace screening_length
# (boundscape.physics.presets: condition_keys); read here from the raw config, before any preset.
STRENGTH_AXES = ("strength", "coupling_MeV_fm", "depth_MeV", "coupling")
CONDITION_AXES = ("electron_density", "electron_temperature", "carrier_density", "donor_concentration", "temperature",
                  "range")


def axis_size(spec, name) -> int | None:
    """Number of values of one grid axis, read from its spec without building it (None if the
    spec is malformed: the schema check reports that)."""
    if spec is None:
        return 1 if name == "screening_length" else None
    if isinstance(spec, list):
        return len(spec)
    if not isinstance(spec, dict):
        return None
    if name == "l":
        start, stop = spec.get("start"), spec.get("stop")
        ok = all(isinstance(v, int) and not isinstance(v, bool) for v in (start, stop))
        return max(0, stop - start + 1) if ok else None
    num = spec.get("num")
    return num if isinstance(num, int) and not isinstance(num, bool) and num >= 1 else None


def _int(value, default):
    return value if isinstance(value, int) and not isinstance(value, bool) and value >= 1 else default


def check_limits(config) -> None:
    """Refuse a sweep beyond a limit, in one line naming the key, the size and the limit.

    Runs on the raw configuration, before the schema check and before any axis is built, so
    that a 10^9-cell grid costs nothing; anything malformed is left to the schema check.

    Raises
    ------
    InputError
        A grid over ``limits.max_cells`` cells, ``grid.n_r_max`` over :data:`N_R_MAX_LIMIT`,
        or an l over :data:`L_LIMIT`. (The number of tiles is checked by the plan, which
        knows the tile size.)
    """
    if not isinstance(config, dict) or not isinstance(config.get("grid"), dict):
        return
    grid = config["grid"]
    n_r_max = grid.get("n_r_max")
    if isinstance(n_r_max, int) and n_r_max > N_R_MAX_LIMIT:
        raise InputError(f"config key grid.n_r_max: {n_r_max} is over the limit of {N_R_MAX_LIMIT} levels kept per "
                         f"l (the critical lengths' cost grows as n_r_max²; no screened system keeps more bound)")
    l_spec = grid.get("l")
    l_values = l_spec if isinstance(l_spec, list) else [l_spec.get("stop")] if isinstance(l_spec, dict) else []
    too_high = [v for v in l_values if isinstance(v, int) and v > L_LIMIT]
    if too_high:
        raise InputError(f"config key grid.l: l = {max(too_high)} is over the limit of {L_LIMIT} (a level of that l "
                         f"has n > {L_LIMIT} and a mean radius near 10^6/Z bohr, outside any screened system)")
    strength_key = next((key for key in STRENGTH_AXES if key in grid), "strength")
    conditions = [key for key in CONDITION_AXES if key in grid]
    named = [(strength_key, "strengths")] + ([(key, key.replace("_", " ") + " values") for key in conditions]
                                             or [("screening_length", "screening lengths")])
    sizes = tuple(axis_size(grid.get(key), key) for key, _ in named) + (axis_size(l_spec, "l"),)
    if None in sizes or 0 in sizes:
        return
    limits = config.get("limits") if isinstance(config.get("limits"), dict) else {}
    max_cells = _int(limits.get("max_cells"), LIMITS["max_cells"])
    cells = math.prod(sizes)
    if cells > max_cells:
        shown = " x ".join(f"{size:,} {words}" for size, (_, words) in zip(sizes, named))
        raise InputError(f"config key grid: {cells:,} cells ({shown} x {sizes[-1]:,} l) is over the limit of "
                         f"{max_cells:,} (limits.max_cells); split the sweep, or raise limits.max_cells if the machine "
                         "holds it")


def max_tiles(config) -> int:
    """The configured ``limits.max_tiles`` (or its default)."""
    limits = config.get("limits") if isinstance(config.get("limits"), dict) else {}
    return _int(limits.get("max_tiles"), LIMITS["max_tiles"])
