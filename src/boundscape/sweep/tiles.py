"""Solve one tile of a sweep with the engine: every cell, and the critical lengths of a block.

A cell the engine cannot solve to its tolerance is isolated: its levels are NaN, its status
says why, and the rest of the tile goes on. Only :class:`ConvergenceError` and
:class:`InputError` are isolated this way; anything else is a bug and stops the job.
"""

from __future__ import annotations

import math
import time

import numpy as np

from .. import engine
from ..engine import INPUT_REJECTED, NOT_CONVERGED
from ..errors import ConvergenceError, InputError
from . import population_tiles, resonance_tiles, scattering_tiles

__all__ = ["CRITICAL_FLAGS", "UNKNOWN_COUNT", "solve_tile", "solve_criticals"]

# num_bound of a cell whose count is unknown (its input rejected, or its solve failed); the
# engine's −1 means infinitely many (a Coulomb tail, a confining potential)
UNKNOWN_COUNT = -2

# CF flag_values are the positions in this tuple; flag_meanings are the names.  (The cells'
# status codes are the engine's: boundscape.engine.LEVEL_STATUS.)
CRITICAL_FLAGS = ("within_grid", "below_grid", "above_grid", "never_bound", "not_converged",
                  "not_applicable")


def _one_line(exc) -> str:
    text = str(exc).strip().splitlines()
    return f"{type(exc).__name__}: {text[0] if text else 'no message'}"


def solve_tile(spec: dict) -> dict:
    """Bound levels of every cell of a tile.

    Parameters
    ----------
    spec : dict
        A tile description from :meth:`boundscape.sweep.Plan.tile_spec`.

    Returns
    -------
    dict
        Arrays ``energy``, ``energy_error``, ``mean_radius`` (strength, screening_length, l, n_r),
        ``num_bound`` and ``status`` (strength, screening_length, l), ``reasons`` (list of
        ``(i, j, k, text)`` for flagged cells, tile-local indices) and ``engine_seconds``; with
        ``scattering`` in the spec also :func:`.scattering_tiles.empty_arrays`' arrays, filled.
    """
    strengths, lams, ls = spec["strength"], spec["screening_length"], spec["l"]
    n_r_max = int(spec["n_r_max"])
    cell_shape = (len(strengths), len(lams), len(ls))
    out = {name: np.full(cell_shape + (n_r_max,), np.nan)
           for name in ("energy", "energy_error", "mean_radius")}
    out["num_bound"] = np.full(cell_shape, UNKNOWN_COUNT, np.int32)
    out["status"] = np.zeros(cell_shape, np.int8)
    reasons = []
    engine_seconds = 0.0
    past = resonance_tiles.wanted(spec)  # also the states past threshold (resonance_tiles)
    if past:
        out.update(resonance_tiles.empty_arrays(cell_shape, n_r_max))
    scatter = scattering_tiles.wanted(spec)  # also a_l, 1/a_l, r_e (and δ_l, σ_l): scattering_tiles
    if scatter:
        out.update(scattering_tiles.empty_arrays(cell_shape, spec))
    populations = population_tiles.wanted(spec)  # each cell's complete level set (population_tiles)
    if populations:
        out.update(population_tiles.empty_arrays(spec, len(strengths), len(lams)))
    for i, strength in enumerate(strengths):
        for j, lam in enumerate(lams):
            start = time.perf_counter()
            try:
                pot = engine.potential_from_spec(spec, strength, lam)
            except InputError as exc:
                out["status"][i, j, :] = INPUT_REJECTED
                reasons += [(i, j, k, _one_line(exc)) for k in range(len(ls))]
                continue
            for k, l in enumerate(ls):
                try:
                    res = engine.bound_levels(pot, int(l), n_r_max=n_r_max)
                except ConvergenceError as exc:
                    out["status"][i, j, k] = NOT_CONVERGED
                    reasons.append((i, j, k, _one_line(exc)))
                    continue
                except InputError as exc:
                    out["status"][i, j, k] = INPUT_REJECTED
                    reasons.append((i, j, k, _one_line(exc)))
                    continue
                _store_levels(out, (i, j, k), res, n_r_max, reasons)
                if past:
                    resonance_tiles.solve_cell(out, (i, j, k), pot, int(l), int(res.num_bound), n_r_max)
                if scatter:
                    scattering_tiles.solve_cell(out, (i, j, k), pot, int(l), int(res.num_bound), spec)
            if populations:
                population_tiles.solve_cell(out, (i, j), pot, spec)
            engine_seconds += time.perf_counter() - start
    out["reasons"] = reasons
    out["engine_seconds"] = engine_seconds
    return out


def _store_levels(out, cell, res, n_r_max, reasons):
    n_r = np.asarray(res.n_r, dtype=int)
    keep = n_r < n_r_max
    status = np.asarray(getattr(res, "status", np.zeros(n_r.size, int)))
    # A level short of the engine's tolerance is not stored: NaN with the cell flagged.
    good = keep & (status == 0)
    for name in ("energy", "energy_error", "mean_radius"):
        out[name][cell + (n_r[good],)] = np.asarray(getattr(res, name))[good]
    out["num_bound"][cell] = int(res.num_bound)
    bad = keep & (status != 0)
    if bad.any():
        out["status"][cell] = NOT_CONVERGED
        why = [r for r, b in zip(getattr(res, "reason", [""] * n_r.size), bad) if b and r]
        levels = ", ".join(f"n_r={v}" for v in n_r[bad])
        reasons.append(cell + (f"not converged at {levels}: {'; '.join(why) or 'no reason given'}",))


def _critical_strengths(spec: dict, probe) -> dict:
    """The critical strength of every state (screening length, l, n_r) at the lengths
    ``spec["critical_strength_at"]`` (the nuclear critical coupling at each range)."""
    lams, ls, n_r_max = spec["critical_strength_at"], spec["l"], int(spec["n_r_max"])
    value = np.full((len(lams), len(ls), n_r_max), np.nan)
    flag = np.zeros(value.shape, np.int8)
    reasons = []
    extra = dict(probe.own)
    for j, lam in enumerate(lams):
        for k, l in enumerate(ls):
            for n_r in range(n_r_max):
                try:
                    value[j, k, n_r] = engine.critical_strength(spec["family"], lam, int(l), n_r, mass=spec["mass"],
                                                                **extra)
                except ConvergenceError as exc:
                    flag[j, k, n_r] = CRITICAL_FLAGS.index("not_converged")
                    reasons.append((j, k, n_r, _one_line(exc)))
                    continue
                if math.isinf(value[j, k, n_r]):
                    flag[j, k, n_r] = CRITICAL_FLAGS.index("never_bound")
    return {"critical_strength": value, "critical_strength_flag": flag, "critical_strength_reasons": reasons}


def solve_criticals(spec: dict) -> dict:
    """Critical screening length of every state (strength, l, n_r < n_r_max) of a block.

    Returns
    -------
    dict
        ``critical_screening_length`` (strength, l, n_r), bohr, +inf where the state is never
        bound, and ``critical_screening_length_error``, its error estimate; ``critical_flag`` (same shape, only ``never_bound``, ``not_converged`` and
        ``not_applicable`` are set here: the grid flags are set in collect, which knows the
        grid); ``reasons`` and ``engine_seconds``; with ``critical_strength_at`` in the spec also
        ``critical_strength`` and its flag over (screening length, l, n_r).
    """
    strengths, ls, n_r_max = spec["strength"], spec["l"], int(spec["n_r_max"])
    shape = (len(strengths), len(ls), n_r_max)
    critical = np.full(shape, np.nan)
    error = np.full(shape, np.nan)  # the engine's error estimate of each λ_c
    flag = np.zeros(shape, np.int8)
    reasons = []
    start = time.perf_counter()
    family = spec["family"]
    probe = engine.potential_from_spec(spec, 1.0, 1.0)
    if not probe.uses_screening_length:
        flag[...] = CRITICAL_FLAGS.index("not_applicable")
    else:
        extra = dict(probe.own)  # the family's own parameters, prepared once (a table read once)
        for i, strength in enumerate(strengths):
            for k, l in enumerate(ls):
                for n_r in range(n_r_max):
                    try:
                        value, error[i, k, n_r] = engine.critical_screening_length(
                            family, strength, int(l), n_r, mass=spec["mass"], full_output=True, **extra)
                    except ConvergenceError as exc:
                        flag[i, k, n_r] = CRITICAL_FLAGS.index("not_converged")
                        reasons.append((i, k, n_r, _one_line(exc)))
                        continue
                    critical[i, k, n_r] = value
                    if math.isinf(value):
                        flag[i, k, n_r] = CRITICAL_FLAGS.index("never_bound")
    result = {"critical_screening_length": critical, "critical_screening_length_error": error,
              "critical_flag": flag, "reasons": reasons}
    if "critical_strength_at" in spec:
        result.update(_critical_strengths(spec, probe))
    if resonance_tiles.wanted(spec):
        result.update(resonance_tiles.solve_dissolutions(spec))
    result["engine_seconds"] = time.perf_counter() - start
    return result
