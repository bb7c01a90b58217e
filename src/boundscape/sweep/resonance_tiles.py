"""Past the threshold in a sweep: each cell's lost states (resonances, virtual states) and the
dissolution lengths of a block, with the engine's ``resonances`` and
``dissolution_screening_length``; only when the configuration asks (``resonances: true``).

The one-scale families follow each pole from its threshold once per (l, n_r): a sweep computes
those trajectories once (:func:`trajectories`) and hands them to every job
(:func:`use_trajectories`), which then gives the same bits as if it had traced them itself.
"""

from __future__ import annotations

import json
import math
import time

import numpy as np

from .. import engine
from ..engine import DISSOLVED, NOT_CONVERGED, OK, RESONANCE_STATUS
from ..errors import ConvergenceError, InputError

__all__ = ["RESONANCE_VARS", "RESONANCE_FLAGS", "BOUND", "NOT_SOLVED", "DISSOLUTION_VARS", "DISSOLUTION_FLAGS", "wanted", "empty_arrays",
           "solve_cell", "solve_dissolutions", "trajectories", "use_trajectories"]

RESONANCE_VARS = ("resonance_energy", "resonance_width", "virtual_state_kappa", "resonance_status")
# The engine's codes first (ok, not_converged, dissolved), then the states it was not asked about.
RESONANCE_FLAGS = RESONANCE_STATUS + ("bound", "not_solved")
BOUND, NOT_SOLVED = RESONANCE_FLAGS.index("bound"), RESONANCE_FLAGS.index("not_solved")
DISSOLUTION_VARS = ("dissolution_screening_length", "dissolution_flag")
DISSOLUTION_FLAGS = ("found", "out_of_reach", "virtual_state", "not_applicable", "not_converged")


def wanted(spec: dict) -> bool:
    """Whether a tile or block spec asks for the states past threshold."""
    return bool(spec.get("resonances"))


def _one_line(exc) -> str:
    text = str(exc).strip().splitlines()
    return f"{type(exc).__name__}: {text[0] if text else 'no message'}"


def empty_arrays(cell_shape, n_r_max: int) -> dict:
    """The tile's arrays: NaN values, status ``not_solved`` until a cell's bound solve succeeds."""
    shape = tuple(cell_shape) + (int(n_r_max),)
    out = {name: np.full(shape, np.nan) for name in RESONANCE_VARS[:-1]}
    out["resonance_status"] = np.full(shape, NOT_SOLVED, np.int8)
    out["resonance_reasons"] = []
    out["resonance_seconds"] = 0.0
    return out


def solve_cell(out: dict, cell, pot, l: int, num_bound: int, n_r_max: int) -> None:
    """The states n_r ≥ num_bound (n_r < n_r_max) of one cell and l, stored at ``cell``; the bound
    ones are flagged ``bound``.  ``num_bound`` is the bound solve's count (not recomputed)."""
    start = time.perf_counter()
    status = out["resonance_status"][cell]
    status[:min(num_bound, n_r_max)] = BOUND
    if num_bound >= n_r_max:
        out["resonance_seconds"] += time.perf_counter() - start
        return
    try:
        res = engine.resonances(pot, l, n_r_max=n_r_max, num_bound=num_bound)
    except (ConvergenceError, InputError) as exc:
        status[num_bound:] = NOT_CONVERGED
        out["resonance_reasons"].append(tuple(cell) + (num_bound, _one_line(exc)))
        out["resonance_seconds"] += time.perf_counter() - start
        return
    n_r = np.asarray(res.n_r, dtype=int)
    status[n_r] = res.status
    # Values are kept where the engine gives them (ok, and dissolved with Γ > E_r); a state short
    # of its tolerance is NaN, its reason listed.
    keep = res.status != NOT_CONVERGED
    for name, values in (("resonance_energy", res.energy), ("resonance_width", res.width),
                         ("virtual_state_kappa", res.kappa)):
        out[name][cell + (n_r[keep],)] = np.asarray(values)[keep]
    for v, s, why in zip(n_r, res.status, res.reason):
        if s == NOT_CONVERGED:
            out["resonance_reasons"].append(tuple(cell) + (int(v), why or "no reason given"))
    out["resonance_seconds"] += time.perf_counter() - start


def solve_dissolutions(spec: dict) -> dict:
    """The dissolution length λ_d (Γ = E_r) of every state (strength, l, n_r < n_r_max) of a block.

    Returns ``dissolution_screening_length`` (bohr, NaN where there is none), ``dissolution_flag``
    (:data:`DISSOLUTION_FLAGS`), ``dissolution_reasons`` and ``dissolution_seconds``."""
    strengths, ls, n_r_max = spec["strength"], spec["l"], int(spec["n_r_max"])
    shape = (len(strengths), len(ls), n_r_max)
    value = np.full(shape, np.nan)
    flag = np.full(shape, DISSOLUTION_FLAGS.index("not_applicable"), np.int8)
    reasons = []
    start = time.perf_counter()
    family = spec["family"]
    probe = engine.potential_from_spec(spec, 1.0, 1.0)
    if engine.shares_trajectories(probe):
        own = dict(probe.own)
        for i, strength in enumerate(strengths):
            for k, l in enumerate(ls):
                for n_r in range(n_r_max):
                    if int(l) == 0:
                        flag[i, k, n_r] = DISSOLUTION_FLAGS.index("virtual_state")
                        continue
                    try:
                        lam_d = engine.dissolution_screening_length(family, strength, int(l), n_r, mass=spec["mass"], **own)
                    except (ConvergenceError, ArithmeticError, ValueError) as exc:
                        flag[i, k, n_r] = DISSOLUTION_FLAGS.index("not_converged")
                        reasons.append((i, k, n_r, _one_line(exc)))
                        continue
                    value[i, k, n_r] = lam_d
                    flag[i, k, n_r] = DISSOLUTION_FLAGS.index("found" if math.isfinite(lam_d) else "out_of_reach")
    return {"dissolution_screening_length": value, "dissolution_flag": flag, "dissolution_reasons": reasons,
            "dissolution_seconds": time.perf_counter() - start}


def trajectories(spec: dict) -> str:
    """Every trajectory the sweep's cells read (one-scale families; none otherwise), as JSON text."""
    probe = engine.potential_from_spec(spec, 1.0, 1.0)
    records = engine.trajectory_records(probe, spec["l"], int(spec["n_r_max"]))
    return json.dumps({"family": spec["family"], "records": records})


def use_trajectories(text: str, spec: dict) -> None:
    """Take the trajectories written by :func:`trajectories` for this sweep's family."""
    data = json.loads(text)
    if data["family"] != spec["family"]:
        raise InputError(f"the trajectories are of family {data['family']!r}, the sweep's is {spec['family']!r}")
    engine.load_trajectory_records(data["records"])


# The codes this module sets must be the engine's where they share a name.
assert (OK, NOT_CONVERGED, DISSOLVED) == tuple(RESONANCE_FLAGS.index(n) for n in ("ok", "not_converged", "dissolved"))
