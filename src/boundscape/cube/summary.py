"""The run summary: every flag of every variable of a written cube, counted.

Any variable with CF ``flag_values`` and ``flag_meanings`` is a flag variable (the solver's
``status``, ``critical_screening_length_flag``, ``resonance_status``, ``line_status``, the
screening model's validity, ...): the summary counts each of its values, so a flag added to the
cube later is counted without changing this module.  The cube is read slab by slab from the
file, so the count holds as little memory as collect does.
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["flag_counts", "run_summary", "ATTENTION"]

# Meanings that say a number is missing or unchecked (the rest say where or what a value is).
ATTENTION = ("not_converged", "input_rejected", "not_solved")
SLAB = 1 << 24  # elements read at a time (int8: 16 MiB)


def _slabs(var):
    """The variable's values, a slab of at most :data:`SLAB` elements at a time."""
    shape = var.shape
    lead = 0
    while lead < len(shape) and math.prod(shape[lead:]) > SLAB:
        lead += 1
    for index in np.ndindex(*shape[:lead]):
        yield np.asarray(var[index] if index else var[...])


def flag_counts(path) -> dict:
    """``{variable: (dimensions, {meaning: count})}`` for every flag variable of the cube at
    ``path``, meanings in the variable's own order (zero counts kept)."""
    import netCDF4

    counts = {}
    with netCDF4.Dataset(path) as nc:
        nc.set_auto_mask(False)
        for name, var in nc.variables.items():
            attrs = var.ncattrs()
            if "flag_values" not in attrs or "flag_meanings" not in attrs:
                continue
            values = np.atleast_1d(var.getncattr("flag_values")).astype(np.int64)
            meanings = var.getncattr("flag_meanings").split()
            tally = dict.fromkeys(meanings, 0)
            for slab in _slabs(var):
                found, number = np.unique(slab.astype(np.int64), return_counts=True)
                for value, n in zip(found, number):
                    where = np.flatnonzero(values == value)
                    key = meanings[where[0]] if where.size else f"undeclared_value_{value}"
                    tally[key] = tally.get(key, 0) + int(n)
            counts[name] = (var.dimensions, tally)
    return counts


def run_summary(path, headline: str) -> str:
    """The summary text of the cube at ``path``: ``headline`` (cells and engine time), the number
    of values any flag marks as missing or unchecked (:data:`ATTENTION`), every flag variable's
    counts, and where to look."""
    counts = flag_counts(path)
    attention = {name: sum(n for meaning, n in tally.items() if meaning in ATTENTION)
                 for name, (_, tally) in counts.items()}
    total = sum(attention.values())
    where = ", ".join(f"{name} {n}" for name, n in attention.items() if n) or "none"
    lines = [headline,
             f"not converged, rejected or not solved: {total} ({where})",
             "every flag of the cube, counted (variable [dimensions]: flag value count):"]
    for name, (dims, tally) in counts.items():
        shown = ", ".join(f"{meaning} {n}" for meaning, n in tally.items() if n) or "empty"
        lines.append(f"  {name} [{' x '.join(dims)}]: {shown}")
    lines.append(f"cube: {path}")
    if total:
        lines.append("flagged cells and states: the attributes flagged_cells and flagged_states of the variables "
                     f"above in {path}, and the tile logs beside it")
    return "\n".join(lines)
