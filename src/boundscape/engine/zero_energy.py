"""The zero-energy problem: exact bound-state counts.

Beyond the range R of a short-range potential the E = 0 solution is A r^{l+1} + B r^{−l}.
Closing the box at R with the condition of the decaying part alone, u'/u = −l/R, gives a
Sturm–Liouville problem whose k-th eigenvalue μ_k is negative exactly when the regular
zero-energy solution has more than k nodes on (0, ∞) — counting the node beyond R that
appears when A and u(R) differ in sign (Sturm oscillation theorem; e.g. Courant & Hilbert,
vol. 1, ch. VI).  So the number of bound states of that l is the number of negative μ_k, and
state k is lost where μ_k crosses zero (:mod:`.critical`).

On the discrete (Numerov) problem the number of μ_k below a value is a Sturm count, one pass
over the coarse grid.  The count at 0 can be wrong only for a μ_k within discretisation error
of zero: the counts at ±MARGIN·(energy scale) agree otherwise, and where they do not, the μ_k
between them are decided on their Richardson-extrapolated values, as the critical lengths are,
so a cell just on either side of a threshold is counted consistently with its critical length.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..checks import quantum_number
from ..errors import ConvergenceError, InputError
from . import grid as fd
from .jitcache import lazy_module
from .potential import Potential
from .problem import RadialProblem

nv = lazy_module("numerov")

__all__ = ["ZeroEnergyProblem", "zero_energy_problem", "count_bound", "zero_energy_solution",
           "MARGIN", "THETA_CRITICAL"]

# Coarse-grid μ_k are within ~1e-7 of the scale of their extrapolated values on the test
# cells; a margin 100× wider decides which need extrapolating.
MARGIN = 1e-5
# Critical parameters are root searches on extrapolated μ_k: a finer design for them.
THETA_CRITICAL = 0.15


@dataclass
class ZeroEnergyProblem:
    """The E = 0 problem for one potential and l on a design grid and its refinements."""

    pot: Potential
    l: int
    grid: fd.MappedGrid
    problem: RadialProblem
    _arrays: fd.GridArrays | None = field(default=None, repr=False)
    _coarse: fd.GridArrays | None = field(default=None, repr=False)
    _cache: dict = field(default_factory=dict, repr=False)

    @property
    def arrays(self) -> fd.GridArrays:
        """The design grid refined REFINE times (built when an eigenvalue is asked for)."""
        if self._arrays is None:
            self._arrays = self.problem.arrays(self.grid)
        return self._arrays

    @property
    def tail(self) -> tuple[int, float]:
        return nv.TAIL_FIXED, -self.l / self.grid.r_max

    @property
    def scale(self) -> float:
        """An energy scale of the problem (hartree), for tolerances."""
        return self.pot.energy_scale

    def _count_below(self, value: float) -> int:
        """Sturm count on the design grid alone (built on its own: a count needs no refinement)."""
        if self._coarse is None:
            self._coarse = self.problem.arrays(self.grid, refine=1)
            self._coarse_prm = self.problem.params(self._coarse, self.tail)
        a = self._coarse
        return int(nv.sturm(a.a, self._coarse_prm, 1, a.steps(1), a.step(1), value))

    def coarse_count(self) -> int:
        """Number of μ_k below zero on the design grid."""
        return self._count_below(0.0)

    def eigenvalue(self, k: int, factor: int) -> float:
        """μ_k on the design grid refined by ``factor`` (1, 2 or 4; cached)."""
        key = (k, factor)
        if key not in self._cache:
            a = self.arrays
            stride = fd.REFINE // factor
            n = a.steps(stride)
            coarser = [v for (kk, f), v in sorted(self._cache.items()) if kk == k and f < factor]
            start = coarser[-1] if coarser else 0.0
            out = nv.solve_grid(a.a, self.problem.params(a, self.tail), stride, n, a.step(stride), k, start, start,
                                np.empty(n + 2), False)
            if out[1] == 1:
                # deeper than this zero-energy grid resolves: the floor bounds it from above, and
                # only its sign matters (counts, critical brackets)
                out = (out[0], 0)
            if out[1] != 0:
                raise ConvergenceError(f"zero-energy eigenvalue k={k}, l={self.l} of {self.pot} did not "
                                       f"converge (status {out[1]})")
            self._cache[key] = float(out[0])
        return self._cache[key]

    def eigenvalues(self, k: int, factors=fd.FACTORS) -> np.ndarray:
        return np.array([self.eigenvalue(k, f) for f in factors])

    def extrapolated(self, k: int) -> float:
        """μ_k extrapolated to h → 0 from the grids h, h/2, h/4."""
        return fd.richardson(self.eigenvalues(k))[0]

    def count(self) -> int:
        """The exact number of bound states: negative μ_k, the marginal ones settled.

        Only the μ_k on either side of zero can be misjudged by the coarse count (two states
        within discretisation error of threshold at once do not occur): the highest negative one
        if it lies within MARGIN of zero, the lowest positive one likewise (in a wide box the
        positive μ_k near zero are mostly box states, settled at once)."""
        delta = MARGIN * self.scale
        count = self.coarse_count()
        if count > 0 and self._count_below(-delta) < count and self.settled(count - 1) >= 0.0:
            count -= 1
        elif self._count_below(delta) > count and self.settled(count) < 0.0:
            count += 1
        return count

    def settled(self, k: int) -> float:
        """μ_k on the grid h/2 if its sign is clearly beyond its error there, else extrapolated."""
        coarse, fine = self.eigenvalue(k, 1), self.eigenvalue(k, 2)
        if abs(fine) > 30.0 * abs(coarse - fine):
            return fine
        return self.extrapolated(k)


def zero_energy_problem(pot: Potential, l: int, m: int | None = None, theta: float = fd.THETA,
                        like: fd.MappedGrid | None = None) -> ZeroEnergyProblem:
    """The E = 0 problem of ``pot`` and ``l`` on a grid designed at ``theta`` (or with ``m`` steps),
    or on the map of ``like`` (its β, c, tc, start and steps) stretched to this potential's range:
    along a root search the grid then moves smoothly with the parameter."""
    if pot.tail != "short":
        raise InputError(
            f"family {pot.family!r} has a {pot.tail} tail: it binds infinitely many states, there is no finite count"
        )
    R = float(pot.support)
    problem = RadialProblem(pot, l, R)
    if like is not None:
        g = fd.MappedGrid(like.r_min, R, like.beta, like.c, like.tc, like.t0,
                          float(nv.t_of_r(like.beta, like.c, like.tc, R)), like.n)
    else:
        g = problem.design(0.0, R, theta)
    if m is not None:
        g = g.with_steps(m)
    return ZeroEnergyProblem(pot, l, g, problem)


def count_bound(pot: Potential, l: int) -> int:
    """Exact number of bound states of angular momentum ``l`` (zero-energy node count).

    Returns -1 for potentials that bind infinitely many (Coulomb tail, confining).
    """
    l = quantum_number(l)
    if pot.tail != "short":
        return -1
    return zero_energy_problem(pot, l).count()


def zero_energy_solution(pot: Potential, l: int):
    """The regular zero-energy solution u(r) out to the end R of the potential's range, normalised
    to max |u| = 1, and its node count on (0, ∞).

    Beyond R, u = A r^{l+1} + B r^{−l}; one more node lies out there when u(R) and A differ in
    sign.  Returns (r, u, nodes).  (The count in :func:`count_bound` decides the same question
    on the extrapolated eigenvalues, which is exact also right at a threshold.)"""
    l = quantum_number(l)
    problem = zero_energy_problem(pot, l)
    a = problem.arrays
    n = a.steps(1)
    w = nv.outward_solution(a.a[3], a.a[4], 1, n, a.step(1), 0.0)
    r = a.r[: n + 1]
    u = w * np.sqrt(np.sqrt(a.g2[: n + 1]))
    u /= np.max(np.abs(u))
    inside = int(np.count_nonzero(np.signbit(u[2:]) != np.signbit(u[1:-1])))
    # u'(R) from the last two points: A r^{l+1} + B r^{−l} has (2l+1)A R^l = u' + l u/R
    R = r[-1]
    du = (u[-1] - u[-2]) / (r[-1] - r[-2])
    A = (du + l * u[-1] / R) / ((2 * l + 1) * R**l)
    beyond = int(A != 0 and np.signbit(A) != np.signbit(u[-1]))
    return r, u, inside + beyond
