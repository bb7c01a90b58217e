"""The zero-energy problem: exact bound-state counts, and the eigenvalues critical parameters are
roots of.

Beyond the range R of a short-range potential the E = 0 solution is A r^{l+1} + B r^{−l}.
Closing the box at R with the condition of the decaying part alone, u'/u = −l/R, gives a
Sturm–Liouville problem whose k-th eigenvalue μ_k is negative exactly when the regular
zero-energy solution has more than k nodes on (0, ∞) — counting the node beyond R that
appears when A and u(R) differ in sign (Sturm oscillation theorem; e.g. Courant & Hilbert,
vol. 1, ch. VI).  So the number of bound states of that l is the number of negative μ_k, and
state k is lost where μ_k crosses zero (:mod:`.critical`).

On the discrete (Numerov) problem the number of μ_k below a value is a Sturm count, one pass
over the coarse grid; the count itself, with its marginal μ_k settled, is the compiled
:func:`.cell.zero_energy_count` that every cell runs.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ...checks import quantum_number
from ...errors import ConvergenceError, InputError
from ..limits import MAX_NODES, LimitError, check_l
from ..potentials.exterior import TAIL_FIXED
from ..richardson import FACTORS, extrapolate
from .cell import zero_energy_count
from .design import SAMPLES, GridArrays, arrays_for, design, samples
from .mapping import H_MAX, REFINE, THETA, MappedGrid, origin_radius
from .numerov import outward_solution
from .search import grid_parameters, solve_grid, sturm

__all__ = ["ZeroEnergyProblem", "zero_energy_problem", "count_bound", "zero_energy_solution", "too_many_states",
           "MARGIN", "THETA_CRITICAL"]

# Coarse-grid μ_k are within ~1e-7 of the scale of their extrapolated values on the test
# cells; a margin 100× wider decides which need extrapolating.
MARGIN = 1e-5
# Critical parameters are root searches on extrapolated μ_k: a finer design for them.
THETA_CRITICAL = 0.15


def _short_range(pot):
    if pot.tail != "short":
        raise InputError(
            f"family {pot.family!r} has a {pot.tail} tail: it binds infinitely many states, there is no finite count")


def _samples(pot, l, R):
    return samples(pot.info.kernel, *pot.kernel_inputs, float(pot.mass), int(l), origin_radius(pot, l), float(R),
                   SAMPLES)


@dataclass
class ZeroEnergyProblem:
    """The E = 0 problem for one potential and l on a design grid and its refinements."""

    pot: object
    l: int
    grid: MappedGrid
    _arrays: GridArrays | None = field(default=None, repr=False)
    _coarse: GridArrays | None = field(default=None, repr=False)
    _cache: dict = field(default_factory=dict, repr=False)

    def _params(self, arrays):
        return grid_parameters(float(self.pot.mass), int(self.l), TAIL_FIXED, -self.l / self.grid.r_max,
                               self.grid.r_max, arrays.g_end, arrays.gp_end, float(self.pot.energy_scale), False)

    @property
    def arrays(self) -> GridArrays:
        """The design grid refined REFINE times (built when an eigenvalue is asked for)."""
        if self._arrays is None:
            self._arrays = arrays_for(self.pot, self.l, self.grid)
        return self._arrays

    def coarse_count(self) -> int:
        """Number of μ_k below zero on the design grid alone (a count needs no refinement)."""
        if self._coarse is None:
            self._coarse = arrays_for(self.pot, self.l, self.grid, refine=1)
        a = self._coarse
        return int(sturm(a.a, self._params(a), 1, a.steps(1), a.step(1), 0.0))

    def eigenvalue(self, k: int, factor: int) -> float:
        """μ_k on the design grid refined by ``factor`` (1, 2 or 4; cached)."""
        key = (k, factor)
        if key not in self._cache:
            a = self.arrays
            stride = REFINE // factor
            n = a.steps(stride)
            coarser = [v for (kk, f), v in sorted(self._cache.items()) if kk == k and f < factor]
            start = coarser[-1] if coarser else 0.0
            out = solve_grid(a.a, self._params(a), stride, n, a.step(stride), k, start, start, np.empty(n + 2), False)
            if out[1] == 1:
                # deeper than this zero-energy grid resolves: the floor bounds it from above, and
                # only its sign matters (counts, critical brackets)
                out = (out[0], 0)
            if out[1] != 0:
                raise ConvergenceError(f"zero-energy eigenvalue k={k}, l={self.l} of {self.pot} did not "
                                       f"converge (status {out[1]})")
            self._cache[key] = float(out[0])
        return self._cache[key]

    def extrapolated(self, k: int) -> float:
        """μ_k extrapolated to h → 0 from the grids h, h/2, h/4."""
        return extrapolate([self.eigenvalue(k, f) for f in FACTORS])[0]


def zero_energy_problem(pot, l: int, theta: float = THETA, like: MappedGrid | None = None) -> ZeroEnergyProblem:
    """The E = 0 problem of ``pot`` and ``l`` on a grid designed at ``theta``, or on the map of
    ``like`` (its β, c, tc, start and steps) stretched to this potential's range: along a root
    search the grid then moves smoothly with the parameter."""
    _short_range(pot)
    R = float(pot.support)
    if like is not None:
        return ZeroEnergyProblem(pot, l, like.stretched_to(R))
    rs, veff, _, _ = _samples(pot, l, R)
    r_min = origin_radius(pot, l)
    beta, c, tc, t0, t1, n = design(rs, veff, float(pot.mass), int(l), 0.0, r_min, R, 0.1 * pot.length_scale,
                                    float(theta), H_MAX)
    if REFINE * n > MAX_NODES:
        raise LimitError(f"l={l}: the zero-energy problem of {pot.family} at strength {pot.strength:g}, screening "
                         f"length {pot.screening_length:g} needs {REFINE * n:.2g} grid nodes, beyond the engine's limit "
                         f"of {MAX_NODES:.0e} (~160 MB): it binds too many states to count")
    return ZeroEnergyProblem(pot, l, MappedGrid(r_min, R, beta, c, tc, t0, t1, int(n)))


def too_many_states(pot, l) -> LimitError:
    """The error for a potential whose bound states of ``l`` are too many to count on a grid within
    :data:`..limits.MAX_NODES`, with their number by Langer's WKB rule,
    N ≈ (1/π)∫√(2μ max(0, −V_L)) dr + ½ (an estimate, not a count)."""
    r, _, v_langer, dln = samples(pot.info.kernel, *pot.kernel_inputs, float(pot.mass), int(l), origin_radius(pot, l),
                                  float(pot.support), SAMPLES)
    phase = float(np.sum(np.sqrt(2.0 * pot.mass * np.maximum(-v_langer, 0.0)) * r) * dln)
    wkb = phase / math.pi + 0.5
    return LimitError(f"l={l}: counting the bound states of {pot.family} at strength {pot.strength:g}, screening length "
                      f"{pot.screening_length:g} bohr needs a grid beyond the engine's limit of {MAX_NODES:.0e} nodes "
                      f"(~160 MB): it binds about {wkb:.2g} of them (WKB estimate). A screening length this far beyond "
                      "the levels' size leaves the lowest levels at their unscreened values to ~Z/λ; use the unscreened "
                      "family, or a shorter screening length")


def count_bound(pot, l: int) -> int:
    """Exact number of bound states of angular momentum ``l`` (zero-energy node count).

    Returns -1 for potentials that bind infinitely many (Coulomb tail, confining).
    """
    l = check_l(quantum_number(l))
    if pot.tail != "short":
        return -1
    R = float(pot.support)
    rs, veff, _, _ = _samples(pot, l, R)
    count, status = zero_energy_count(pot.info.kernel, *pot.kernel_inputs, float(pot.mass), l, rs, veff,
                                      origin_radius(pot, l), R, 0.1 * pot.length_scale, float(pot.energy_scale),
                                      THETA, H_MAX, MARGIN, MAX_NODES)
    if status == 2:
        raise too_many_states(pot, l)
    if status:
        raise ConvergenceError(f"zero-energy eigenvalue of l={l} for {pot} near threshold did not converge")
    return int(count)


def zero_energy_solution(pot, l: int):
    """The regular zero-energy solution u(r) out to the end R of the potential's range, normalised
    to max |u| = 1, and its node count on (0, ∞).

    Beyond R, u = A r^{l+1} + B r^{−l}; one more node lies out there when u(R) and A differ in
    sign.  Returns (r, u, nodes).  (:func:`count_bound` decides the same question on the
    extrapolated eigenvalues, which is exact also right at a threshold.)"""
    l = quantum_number(l)
    a = zero_energy_problem(pot, l).arrays
    n = a.steps(1)
    w = outward_solution(a.a[3], a.a[4], 1, n, a.step(1), 0.0)
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
