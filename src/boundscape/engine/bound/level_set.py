"""The complete level set of one central potential: every bound (n_r, l), for every l that binds.

1. Count.  For each l = 0, 1, … the exact number N_l of bound states (the zero-energy node count,
   :func:`.zero_energy.count_bound`), until the first l that binds nothing.  N_l is non-increasing
   in l: the centrifugal term raises V_eff pointwise, so each Dirichlet eigenvalue rises with l
   (Sturm comparison, or min-max; e.g. Courant & Hilbert, vol. 1, ch. VI) and no l binds more
   than the one below it; every higher l then binds nothing too.  A count that rises with l would
   be an engine fault: it is flagged, not hidden.
2. Solve.  Every counted level, cell by cell (:func:`.levels.bound_levels`), if there are at
   most ``max_levels`` of them (and at most :data:`..limits.MAX_LEVELS` of one l).  Otherwise
   the set is *truncated*: the levels of principal number n = n_r + l + 1 ≤ n_cut, the largest
   n_cut within ``max_levels``, are solved and the counts of the rest are still exact, with a
   floor under their energies (each eigenvalue rises with n_r and with l), so that a sum over
   them can be bounded (:func:`boundscape.physics.populations.omitted_partition_bound`).
3. A Coulomb-tail or confining potential binds infinitely many states: the levels n ≤ n_cut
   (default :data:`DEFAULT_PRINCIPAL_CUT`) are given, flagged ``infinitely_many``.
4. A count beyond the engine's limits (:mod:`..limits`: a grid of more than MAX_NODES nodes, an
   l > MAX_L that still binds) is flagged ``beyond_engine_limits`` with the limit's message; the
   levels of the l counted before it are kept.

Time and memory are bounded: at most MAX_L + 1 counts, each on a grid within MAX_NODES, and at
most ``max_levels`` levels.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ...checks import quantum_number
from ...errors import InputError
from ...labels import state_label
from ..limits import MAX_L, MAX_LEVELS, LimitError
from ..status import LEVEL_SET_STATUS
from .levels import RTOL, bound_levels
from .zero_energy import count_bound

__all__ = ["LevelSet", "level_set", "LEVEL_SET_STATUS", "COMPLETE", "LEVEL_NOT_CONVERGED", "TRUNCATED",
           "INFINITELY_MANY", "BEYOND_ENGINE_LIMITS", "DEFAULT_MAX_LEVELS", "DEFAULT_PRINCIPAL_CUT",
           "MAX_LEVELS_PER_SET"]

# Completeness of a set (CF flag_values are the positions, flag_meanings the names), from the
# best to the worst; a set carries the worst that applies.
COMPLETE, LEVEL_NOT_CONVERGED, TRUNCATED, INFINITELY_MANY, BEYOND_ENGINE_LIMITS = range(len(LEVEL_SET_STATUS))

# Levels solved per set by default: a Yukawa Z = 1 at λ = 10^3 bohr binds 630 (n_r, l) levels,
# at λ = 10^4 bohr about 6300 (measured; ~1 ms each after compilation).
DEFAULT_MAX_LEVELS = 10_000
# The hard cap a caller may ask for (~100 s of levels).
MAX_LEVELS_PER_SET = 100_000
# n ≤ 20 for a potential that binds infinitely many: 210 hydrogen levels, down to 3.4 meV below
# the Z = 1 threshold.
DEFAULT_PRINCIPAL_CUT = 20


@dataclass
class LevelSet:
    """Every bound level of a potential that was solved, ascending in energy (atomic units).

    Attributes
    ----------
    energy, energy_error : ndarray
        Per level (hartree), as :func:`.levels.bound_levels` gives them.
    n_r, l : ndarray of int
        Quantum numbers per level; ``n`` = n_r + l + 1.
    status : ndarray of int8
        Per level, :data:`..status.LEVEL_STATUS` codes; ``reason`` per level.
    counts : ndarray of int
        N_l, the exact number of bound states of l = 0 … len − 1 (the last entry 0 when the
        counting reached an l that binds nothing); −1 where not known (infinitely many, or
        beyond the engine's limits).
    kept : ndarray of int
        Levels solved per l (the lowest n_r of each).
    omitted_floor : ndarray
        Per l, an energy every bound level of that l that was *not* solved lies at or above
        (hartree; NaN where none was omitted or none is known).
    set_status : int
        A :data:`LEVEL_SET_STATUS` code; ``set_reason`` says why it is not ``complete``.
    principal_cut : int or None
        n_cut where only the levels n ≤ n_cut were solved.
    """

    energy: np.ndarray
    energy_error: np.ndarray
    n_r: np.ndarray
    l: np.ndarray
    status: np.ndarray
    reason: list
    counts: np.ndarray
    kept: np.ndarray
    omitted_floor: np.ndarray
    set_status: int
    set_reason: str
    principal_cut: int | None = None
    potential: object = field(default=None, repr=False)

    @property
    def n(self) -> np.ndarray:
        return self.n_r + self.l + 1

    @property
    def degeneracy(self) -> np.ndarray:
        """2(2l + 1) per level: the m states and the two spin states of a spin-½ particle."""
        return 2 * (2 * self.l + 1)

    @property
    def complete(self) -> bool:
        """Whether every bound state is in the set (its energies may still miss their tolerance:
        see ``status``)."""
        return self.set_status in (COMPLETE, LEVEL_NOT_CONVERGED)

    @property
    def counts_known(self) -> bool:
        """Whether the exact count of every l is known (complete or truncated sets)."""
        return self.set_status in (COMPLETE, LEVEL_NOT_CONVERGED, TRUNCATED)

    @property
    def bound_state_count(self) -> int:
        """Σ over every bound (n_r, l) of 2(2l + 1), solved or not; −1 if not known."""
        if not self.counts_known:
            return -1
        ls = np.arange(self.counts.size)
        return int(np.sum(2 * (2 * ls + 1) * self.counts))

    @property
    def level_count(self) -> int:
        """Σ N_l, the bound (n_r, l) levels, solved or not; −1 if not known."""
        return int(self.counts.sum()) if self.counts_known else -1

    @property
    def status_name(self) -> str:
        return LEVEL_SET_STATUS[self.set_status]


def _positive_count(value, name):
    value = quantum_number(value, name)
    if value < 1:
        raise InputError(f"{name} must be at least 1, got {value}")
    return value


def level_set(pot, *, max_levels: int = DEFAULT_MAX_LEVELS, principal_cut: int | None = None,
              rtol: float = RTOL) -> LevelSet:
    """Every bound level (n_r, l) of ``pot``, with exact counts and a completeness flag.

    Parameters
    ----------
    pot : Potential
        From :func:`boundscape.potential`.
    max_levels : int
        At most this many levels are solved (≤ :data:`MAX_LEVELS_PER_SET`); a potential that binds
        more gives the levels n ≤ n_cut within it, flagged ``truncated``, with exact counts of all.
    principal_cut : int, optional
        Solve only levels with n = n_r + l + 1 ≤ ``principal_cut`` (the set is ``truncated`` if
        that leaves bound levels out).  For a Coulomb-tail or confining potential, default
        :data:`DEFAULT_PRINCIPAL_CUT`.
    rtol : float
        Relative tolerance of each energy (:func:`.levels.bound_levels`).

    Returns
    -------
    LevelSet
        Levels ascending in energy, exact counts per l, and ``set_status``/``set_reason``.

    Raises
    ------
    InputError
        For a bad ``max_levels`` or ``principal_cut``.
    """
    max_levels = _positive_count(max_levels, "max_levels")
    if max_levels > MAX_LEVELS_PER_SET:
        raise LimitError(f"max_levels = {max_levels} is beyond the engine's limit of {MAX_LEVELS_PER_SET} levels per set")
    if principal_cut is not None:
        principal_cut = _positive_count(principal_cut, "principal_cut")
    if pot.tail != "short":
        return _infinite_set(pot, max_levels, principal_cut, rtol)
    counts, problem = _counts(pot, max_levels)
    n_cut = _cut(counts, max_levels, principal_cut)
    known = np.maximum(counts, 0)
    kept = known if n_cut is None else np.minimum(known, np.maximum(0, n_cut - np.arange(counts.size)))
    solved = [bound_levels(pot, l, n_r_max=int(k), rtol=rtol) for l, k in enumerate(kept) if k > 0]
    status, reason = COMPLETE, ""
    if problem:
        status, reason = BEYOND_ENGINE_LIMITS, problem
    elif np.any(np.diff(counts) > 0):
        # Sturm comparison forbids it; a count that rises with l means the zero-energy counts failed
        status = BEYOND_ENGINE_LIMITS
        reason = f"bound-state counts rise with l ({counts.tolist()}), which Sturm comparison forbids: counts unreliable"
    elif np.any(kept < counts):
        status = TRUNCATED
        reason = (f"{int(counts.sum())} bound levels (n_r, l), more than max_levels = {max_levels} or than asked: "
                  f"those with n ≤ {n_cut} are solved, the counts of all are exact")
    return _assemble(pot, solved, counts, kept, status, reason, n_cut)


def _counts(pot, max_levels):
    """(N_l for l = 0 … until one binds nothing, problem): the problem is the engine's message if
    a count is beyond its limits (the counts before it are kept, −1 marks the one that failed).

    If l = MAX_L still binds (checked second, so that such a potential costs a few counts, not
    MAX_L of them), only the l that a cut within ``max_levels`` can reach are counted."""
    counts = []
    for l in _ls_to_count(pot, max_levels):
        try:
            n = count_bound(pot, l)
        except LimitError as err:
            counts.append(-1)
            return np.array(counts, dtype=np.int64), str(err)
        counts.append(n)
        if n == 0:
            return np.array(counts, dtype=np.int64), ""
    return np.array(counts, dtype=np.int64), (f"l = {MAX_L} still binds states: the set reaches beyond the engine's "
                                             f"limit l ≤ {MAX_L}; the lowest levels of l < {len(counts)} are given")


def _ls_to_count(pot, max_levels):
    yield 0
    try:
        beyond = count_bound(pot, MAX_L) > 0
    except LimitError:
        beyond = True
    reach = MAX_L + 1
    if beyond:  # n(n+1)/2 ≤ max_levels: no cut reaches an l beyond n
        reach = min(MAX_L, int((math.isqrt(8 * max_levels + 1) - 1) // 2))
    yield from range(1, reach)


def _cut(counts, max_levels, principal_cut):
    """n_cut (or None to keep every counted level): the largest n within ``max_levels`` levels
    and :data:`MAX_LEVELS` levels of one l, and within ``principal_cut``."""
    known = np.where(counts > 0, counts, 0)
    if principal_cut is None and known.sum() <= max_levels and known.max(initial=0) <= MAX_LEVELS:
        return None
    ls = np.arange(known.size)
    top = int(np.max(known + ls, initial=0))  # the largest n of any counted level
    n_cut = min(top, principal_cut or top, MAX_LEVELS)  # n_r < n_cut keeps any l within MAX_LEVELS

    def kept(n):
        return np.minimum(known, np.maximum(0, n - ls)).sum()

    while n_cut > 1 and kept(n_cut) > max_levels:
        n_cut -= 1
    return n_cut


def _infinite_set(pot, max_levels, principal_cut, rtol):
    n_cut = principal_cut or DEFAULT_PRINCIPAL_CUT
    n_cut = min(n_cut, MAX_LEVELS, int((math.isqrt(8 * max_levels + 1) - 1) // 2))  # n_cut(n_cut+1)/2 ≤ max_levels
    n_cut = max(n_cut, 1)
    kept = np.array([n_cut - l for l in range(n_cut)], dtype=np.int64)
    solved = [bound_levels(pot, l, n_r_max=int(k), rtol=rtol) for l, k in enumerate(kept)]
    counts = np.full(n_cut, -1, dtype=np.int64)
    reason = (f"{pot.family} has a {pot.tail} tail: it binds infinitely many levels; those with n = n_r + l + 1 ≤ "
              f"{n_cut} are given")
    return _assemble(pot, solved, counts, kept, INFINITELY_MANY, reason, n_cut)


def _assemble(pot, solved, counts, kept, status, reason, n_cut):
    energy = np.concatenate([s.energy for s in solved]) if solved else np.empty(0)
    error = np.concatenate([s.energy_error for s in solved]) if solved else np.empty(0)
    n_r = np.concatenate([s.n_r for s in solved]).astype(np.int64) if solved else np.empty(0, dtype=np.int64)
    ls = np.concatenate([np.full(s.n_r.size, s.l) for s in solved]).astype(np.int64) if solved \
        else np.empty(0, dtype=np.int64)
    level_status = np.concatenate([s.status for s in solved]).astype(np.int8) if solved else np.empty(0, np.int8)
    reasons = [why for s in solved for why in s.reason]
    floor = _omitted_floor(counts, kept, solved)
    order = np.lexsort((n_r, ls, energy))  # ascending energy; ties (hydrogen's degeneracy) by l, n_r
    if status == COMPLETE and np.any(level_status != 0):
        bad = [state_label(int(n_r[i] + ls[i] + 1), int(ls[i])) for i in np.flatnonzero(level_status != 0)]
        status, reason = LEVEL_NOT_CONVERGED, f"{len(bad)} level(s) missed their tolerance: {', '.join(bad[:10])}"
    return LevelSet(energy[order], error[order], n_r[order], ls[order], level_status[order],
                    [reasons[i] for i in order], counts, kept, floor, status, reason, n_cut, pot)


def _omitted_floor(counts, kept, solved):
    """Per l, an energy at or below every bound level of l that was not solved: the highest solved
    level of l (each eigenvalue rises with n_r); where no level of l was solved, the lowest level
    of the highest l below it that has one (each eigenvalue rises with l)."""
    floor = np.full(counts.size, np.nan)
    by_l = {s.l: s for s in solved}
    last = math.nan
    for l in range(counts.size):
        s = by_l.get(l)
        if s is not None and s.energy.size:
            last = float(s.energy[0])
        if counts[l] > kept[l]:
            floor[l] = float(s.energy[-1]) if s is not None and s.energy.size else last
    return floor
