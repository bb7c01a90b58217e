"""One trajectory per state for the one-scale families, shared by every cell and process.

For V = Z·f(r/λ)/r scaling V at fixed λ is the same as shortening λ at fixed Z: the poles of
every cell lie on one trajectory per (family, own parameters, l, n_r) in the dimensionless
variable Zμλ, traced once from the threshold at Z = λ = μ = 1 (:func:`.tracking.trace`) and
read by each cell at its own point.  The trajectories can be written as plain records and loaded
in another process (a sweep traces them once), and the dissolution length λ_d (Γ = E_r) is a
root along them.
"""

from __future__ import annotations

import math
from functools import lru_cache

from ...checks import quantum_number
from ...errors import InputError
from ..potentials import Potential, potential
from .outgoing import CUT_TOLERANCE
from .siegert import Channel
from .tracking import Trajectory, refine, trace

__all__ = ["family_key", "dimensionless", "universal_potential", "universal_trajectory", "shares_trajectories",
           "trajectory_records", "load_trajectory_records", "dissolution_screening_length", "RTOL"]

RTOL = 1e-9  # relative tolerance on each pole (here and in :mod:`.lost_states`)


def family_key(pot: Potential):
    """(family, own parameters) of a potential: what a one-scale trajectory depends on besides l, n_r."""
    return pot.family, pot.own


def dimensionless(pot: Potential):
    """(family key, Zμλ, λ) for a one-scale family, whose poles are E = E₁(Zμλ)/(μλ²), else None."""
    if not shares_trajectories(pot):
        return None
    lam = pot.screening_length
    return family_key(pot), pot.strength * pot.mass * lam, lam


@lru_cache(maxsize=64)
def universal_potential(key) -> Potential:
    family, own = key
    return potential(family, 1.0, 1.0, 1.0, **dict(own))


# The one-scale trajectories of this process, by (family key, l, n_r, angle, tail_tolerance);
# filled on first use or from records another process computed (load_trajectory_records).
_TRAJECTORIES: dict = {}


def universal_trajectory(key, l: int, n_r: int, angle, tail_tolerance) -> Trajectory | None:
    """The whole trajectory of (family, l, n_r) at Z = λ = μ = 1, from threshold until the pole
    is out of reach: every cell of the family reads its own point, so a cell's value does not
    depend on which cells were solved before it."""
    entry = (key, l, n_r, angle, tail_tolerance)
    if entry not in _TRAJECTORIES:
        _TRAJECTORIES[entry] = _trace_universal(key, l, n_r, angle, tail_tolerance)
    return _TRAJECTORIES[entry]


def shares_trajectories(pot: Potential) -> bool:
    """Whether ``pot``'s poles follow one trajectory per (l, n_r) whatever its strength, length and
    mass (one-scale families with a screening length and a short-range tail): its family's
    :func:`trajectory_records` can then be computed once and shared between processes."""
    return bool(pot.info.one_scale and pot.uses_screening_length and pot.tail == "short")


def trajectory_records(pot: Potential, l_values, n_r_max: int) -> list[dict]:
    """The trajectories of (``pot``'s family and own parameters, l, n_r < n_r_max) for the default
    method parameters, as plain records (numbers and strings only; every float survives a JSON
    round trip exactly), so that a sweep follows each pole from its threshold once rather than
    once per process."""
    if not shares_trajectories(pot):
        return []
    key = family_key(pot)
    records = []
    for l in l_values:
        for n_r in range(int(n_r_max)):
            traj = universal_trajectory(key, int(l), n_r, None, CUT_TOLERANCE)
            item = None
            if traj is not None:
                item = {"l": traj.l, "g_c": traj.g_c, "g_c_coarse": traj.g_c_coarse, "s": [float(v) for v in traj.s],
                        "pole": [[complex(p).real, complex(p).imag] for p in traj.pole], "end": traj.end,
                        "end_at": traj.end_at, "g_dissolved": traj.g_dissolved}
            records.append({"family": key[0], "parameters": [list(p) for p in key[1]], "l": int(l), "n_r": n_r,
                            "trajectory": item})
    return records


def load_trajectory_records(records) -> None:
    """Take trajectories computed by :func:`trajectory_records` (in any process) as this process's:
    a cell then gives the same bits as if they had been traced here."""
    for rec in records:
        item = rec["trajectory"]
        traj = None
        if item is not None:
            poles = [float(re) if item["l"] == 0 else complex(re, im) for re, im in item["pole"]]
            traj = Trajectory(item["l"], item["g_c"], item["g_c_coarse"], list(item["s"]), poles, item["end"],
                              item["end_at"], item["g_dissolved"])
        key = (rec["family"], tuple(tuple(p) for p in rec.get("parameters", ())))
        _TRAJECTORIES[(key, int(rec["l"]), int(rec["n_r"]), None, CUT_TOLERANCE)] = traj


def _trace_universal(key, l: int, n_r: int, angle, tail_tolerance) -> Trajectory | None:
    base = universal_potential(key)
    ch = Channel(base, l, angle=None if angle is None else math.radians(angle), tail_tolerance=tail_tolerance)
    start = base.info.critical_length_start(1.0, 1.0, base.params)
    return trace(ch, n_r, g_stop=0.0, g_start=start, scale=base.energy_scale)


def dissolution_screening_length(family: str, strength: float, l: int, n_r: int, mass: float = 1.0,
                                 **params) -> float:
    """The screening length λ_d (bohr) below which the resonance (n_r, l) has Γ > E_r.

    Between λ_d and λ_c the state lives on as a shape resonance narrower than its energy; λ_d is
    the root of Γ − E_r along the state's trajectory (``scipy.optimize.brentq`` on refined poles,
    started from the trajectory's own coarse-grid root).  One-scale families only (λ_d ∝ 1/(Zμ),
    like λ_c); ``params`` are the family's own parameters.

    Returns
    -------
    float
        λ_d in bohr; NaN if the pole leaves reach before Γ reaches E_r.
    """
    l = quantum_number(l)
    n_r = quantum_number(n_r, "n_r")
    if l == 0:
        raise InputError("l = 0 states become virtual states, which have no width: no dissolution length")
    pot = potential(family, strength, 1.0, mass, **params)  # validates the parameters
    if not shares_trajectories(pot):
        raise InputError(f"dissolution lengths are computed for one-scale families (V = Z f(r/λ)/r) with a "
                         f"short-range tail, not {family!r}")
    return _dissolution(family_key(pot), l, n_r) / (pot.strength * pot.mass)


@lru_cache(maxsize=1024)
def _dissolution(key, l: int, n_r: int) -> float:
    from scipy.optimize import brentq

    traj = universal_trajectory(key, l, n_r, None, CUT_TOLERANCE)
    if traj is None or traj.dissolution() is None:
        return math.nan
    base = universal_potential(key)
    ch = Channel(base, l)
    shift = abs(traj.g_c - traj.g_c_coarse)

    def excess(g):  # Γ − E_r of the refined pole at coupling g
        s = traj.g_c - g
        pole, _, _ = refine(ch, g, traj.guess(s), s, shift, RTOL, base.energy_scale)
        return -2.0 * pole.imag - pole.real

    g_d = traj.dissolution()  # on the coarse grid: the refined root is within ~1e-5 of it
    g_lo, g_hi = g_d * (1 - 1e-3), g_d * (1 + 1e-3)
    return brentq(excess, g_lo, g_hi, xtol=1e-13 * g_hi, rtol=1e-13)
