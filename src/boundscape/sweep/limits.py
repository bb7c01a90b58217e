"""How big a sweep may be: checked from the configuration alone, before any axis is built.

A grid is refused at once when it is beyond what one run can hold or plan, with its size and
the limit named; the first two limits are config keys (``limits.max_cells``,
``limits.max_tiles``), since a bigger machine can hold more. The caps on ``grid.n_r_max`` and on
``l`` are fixed (the schema repeats them as its maxima): past them the request stops being a
screened bound-state problem anyone stores.
"""

from __future__ import annotations

import math

from ..errors import InputError

__all__ = ["LIMITS", "N_R_MAX_LIMIT", "L_LIMIT", "axis_size", "check_limits", "max_tiles"]

# Defaults of the config's ``limits`` section.
#   max_cells: collect holds a few bytes per cell and the cube stores n_r_max levels of three
#   float64 variables per cell, about 2 GB at 10^7 cells of 8 levels.
#   max_tiles: Snakemake keeps every job of the plan in memory; 20,000 one-cell tiles took
#   about 20 s and 0.5 GB to plan (a dry run, measured on the development machine).
LIMITS = {"max_cells": 10_000_000, "max_tiles": 50_000}
# Levels kept per l. The critical lengths' root searches cost about n_r_max² per l (yukawa,
# l = 0 and 5: 0.6 s at 20 levels, 7.7 s at 100, 35 s at 200, measured): a few hundred levels
# is more than any screened system keeps bound.
N_R_MAX_LIMIT = 200
# A level of angular momentum l has n > l; a hydrogen-like one has <r> = (3n² - l(l+1))/(2Z)
# bohr (any QM textbook), about 10^6/Z bohr at n = l + 1 = 1001: beyond any screened ion,
# donor or nucleus this models.
L_LIMIT = 1000


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
    strength_key = "strength" if "strength" in grid else "coupling_MeV_fm"
    sizes = (axis_size(grid.get(strength_key), strength_key),
             axis_size(grid.get("screening_length"), "screening_length"), axis_size(l_spec, "l"))
    if None in sizes or 0 in sizes:
        return
    limits = config.get("limits") if isinstance(config.get("limits"), dict) else {}
    max_cells = _int(limits.get("max_cells"), LIMITS["max_cells"])
    cells = math.prod(sizes)
    if cells > max_cells:
        raise InputError(f"config key grid: {cells:,} cells ({sizes[0]:,} strengths x {sizes[1]:,} screening lengths x "
                         f"{sizes[2]:,} l) is over the limit of {max_cells:,} (limits.max_cells); split the sweep, or "
                         "raise limits.max_cells if the machine holds it")


def max_tiles(config) -> int:
    """The configured ``limits.max_tiles`` (or its default)."""
    limits = config.get("limits") if isinstance(config.get("limits"), dict) else {}
    return _int(limits.get("max_tiles"), LIMITS["max_tiles"])
