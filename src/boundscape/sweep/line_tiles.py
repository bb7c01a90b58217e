"""The E1 lines of one tile: every configured line in every cell, and its shift against the
same line of the unscreened potential.

A line whose lower or upper level is not bound in a cell is NaN there (flag ``absent``); one the
engine cannot solve to its tolerance is NaN with flag ``not_converged``.  The unscreened
reference is solved once per strength of the tile: it depends on nothing but the strength, so a
cell's bits do not depend on the tiling.
"""

from __future__ import annotations

import time

import numpy as np

from .. import engine
from ..errors import ConvergenceError, InputError
from ..labels import parse_state

__all__ = ["LINE_FLAGS", "LINE_VARS", "solve_line_tile"]

LINE_FLAGS = ("ok", "not_converged", "input_rejected", "absent")
LINE_VARS = ("line_energy", "oscillator_strength", "einstein_A", "line_shift")


def _pairs(labels):
    return [tuple(parse_state(part) for part in label.split("-")) for label in labels]


def _table(found):
    """{frozenset of the two (n, l): index} of an engine result."""
    return {frozenset((parse_state(a), parse_state(b))): i for i, (a, b) in enumerate(zip(found.lower, found.upper))}


def _solve(pot, pairs):
    n_max = max(n for pair in pairs for n, _ in pair)
    found = engine.lines(pot, n_max, l_max=max(l for pair in pairs for _, l in pair), pairs=pairs)
    return found, _table(found)


def solve_line_tile(spec: dict) -> dict:
    """Every configured line of every cell of a tile.

    Parameters
    ----------
    spec : dict
        A tile description from :meth:`boundscape.sweep.Plan.tile_spec` with ``lines``.

    Returns
    -------
    dict
        Arrays of :data:`LINE_VARS` and ``line_status`` over (strength, screening_length, line),
        ``line_reasons`` (``(i, j, m, text)``, tile-local) and ``engine_seconds``.
    """
    strengths, lams, labels = spec["strength"], spec["screening_length"], spec["lines"]
    pairs = _pairs(labels)
    shape = (len(strengths), len(lams), len(labels))
    out = {name: np.full(shape, np.nan) for name in LINE_VARS}
    out["line_status"] = np.full(shape, LINE_FLAGS.index("absent"), np.int8)
    reasons = []
    start = time.perf_counter()
    for i, strength in enumerate(strengths):
        reference = _reference(spec, strength, pairs)
        for j, lam in enumerate(lams):
            try:
                pot = engine.potential_from_spec(spec, strength, lam)
                found, index = _solve(pot, pairs)
            except (ConvergenceError, InputError) as exc:
                flag = "input_rejected" if isinstance(exc, InputError) else "not_converged"
                out["line_status"][i, j, :] = LINE_FLAGS.index(flag)
                reasons += [(i, j, m, f"{type(exc).__name__}: {str(exc).splitlines()[0]}") for m in range(len(labels))]
                continue
            for m, pair in enumerate(pairs):
                k = index.get(frozenset(pair))
                if k is None:
                    continue
                if found.status[k] != engine.OK:
                    out["line_status"][i, j, m] = LINE_FLAGS.index("not_converged")
                    reasons.append((i, j, m, found.reason[k] or "not converged"))
                    continue
                out["line_status"][i, j, m] = LINE_FLAGS.index("ok")
                out["line_energy"][i, j, m] = found.energy[k]
                out["oscillator_strength"][i, j, m] = found.oscillator_strength[k]
                out["einstein_A"][i, j, m] = found.einstein_A[k]
                out["line_shift"][i, j, m] = found.energy[k] - reference[m]
    out["line_reasons"] = reasons
    out["engine_seconds"] = time.perf_counter() - start
    return out


def _reference(spec, strength, pairs):
    """ΔE of each line in the unscreened potential of this strength (NaN where it has none)."""
    values = np.full(len(pairs), np.nan)
    try:
        base = engine.potential_from_spec(spec, strength, 1.0).unscreened()
        if base is None:
            return values
        found, index = _solve(base, pairs)
    except (ConvergenceError, InputError):
        return values
    for m, pair in enumerate(pairs):
        k = index.get(frozenset(pair))
        if k is not None and found.status[k] == engine.OK:
            values[m] = found.energy[k]
    return values
