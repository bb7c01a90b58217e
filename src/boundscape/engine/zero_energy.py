"""The zero-energy problem: exact bound-state counts.

Beyond the range R of a short-range potential the E = 0 solution is A r^{l+1} + B r^{−l}.
Closing the box at R with the condition of the decaying part alone, u'/u = −l/R, gives a
Sturm–Liouville problem whose k-th eigenvalue μ_k is negative exactly when the regular
zero-energy solution has more than k nodes on (0, ∞) — counting the node beyond R that
appears when A and u(R) differ in sign (Sturm oscillation theorem; e.g. Courant & Hilbert,
vol. 1, ch. VI).  So the number of bound states of that l is the number of negative μ_k, and
state k is lost where μ_k crosses zero (:mod:`.critical`).

The count in a cell and the critical lengths use the same extrapolated μ_k, so a cell just on
either side of a threshold is counted consistently with the critical length.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..checks import quantum_number
from ..errors import InputError
from . import grid as fd
from .effective import effective_potential, origin_radius
from .potential import Potential

__all__ = ["ZeroEnergyProblem", "zero_energy_problem", "count_bound", "zero_energy_solution", "FINE"]

# Refinements of the design grid for decisions at threshold: μ_k must be resolved against its
# slope in λ, which is small for extended states (measured on Hulthén n ≤ 7 against n²/2Z).
FINE = (3, 4, 5, 6, 7)


@dataclass
class ZeroEnergyProblem:
    """The E = 0 problem for one potential and l on a design grid and its refinements."""

    pot: Potential
    l: int
    grid: fd.MappedGrid
    _cache: dict = field(default_factory=dict, repr=False)

    def operator(self, factor: int):
        """The operator on the design grid refined by ``factor``, and its outer condition s."""
        g = self.grid.refined(factor)
        op = fd.build_operator(g, effective_potential(self.pot, self.l), self.pot.mass)
        return op, g.end_log_derivative_to_s(-self.l / g.r_max)

    def coarse_count(self) -> int:
        op, s = self.operator(1)
        return fd.count_below(op.diagonal(s), op.off, 0.0)

    def eigenvalue(self, k: int, factor: int) -> float:
        """μ_k on the design grid refined by ``factor`` (cached; coarser results start the search).

        Bisection locates it; the value is the Rayleigh quotient of its eigenvector, which is
        accurate to ~eps of the kinetic energy (bisection alone only to ~eps·‖T‖)."""
        key = (k, factor)
        if key not in self._cache:
            op, s = self.operator(factor)
            d = op.diagonal(s)
            known = [(f, v) for (kk, f), v in self._cache.items() if kk == k]
            if known:
                f0, guess = max(known)
                delta = 2.0 * abs(guess - self._cache.get((k, 1), guess)) + 1e-3 * abs(guess) + 1e-9 * self.scale
                w = fd.eigenvalue_near(d, op.off, k, guess, delta)[0][0]
            else:
                # located to 1e-10 of the scale; the Rayleigh quotient supplies the digits
                w = fd.eigenvalues_by_index(d, op.off, k, k, self.scale, 1e-10)[0][0]
            self._cache[key] = op.rayleigh(s, op.eigenvector(s, float(w), scale=self.scale))
        return self._cache[key]

    def eigenvalues(self, k: int, factors) -> np.ndarray:
        if (k, 1) not in self._cache:
            self.eigenvalue(k, 1)
        return np.array([self.eigenvalue(k, f) for f in factors])

    def extrapolated(self, k: int, factors=None) -> float:
        """μ_k extrapolated to h → 0 from the refinements ``factors``."""
        factors = factors or FINE
        return fd.richardson(self.eigenvalues(k, factors), factors)[0]

    def count(self) -> int:
        """The exact number of bound states: negative μ_k, the marginal ones settled.

        The coarse count can be off only for a state within discretisation error of threshold:
        the marginal μ decide, each on the cheapest extrapolation whose error is clearly smaller."""
        c = self.coarse_count()
        while c > 0 and self.settled(c - 1) >= 0.0:
            c -= 1
        while c < self.grid.m and self.settled(c) < 0.0:
            c += 1
        return c

    def settled(self, k: int) -> float:
        """μ_k, extrapolated on more and finer grids until its sign is beyond its error estimate;
        at worst on FINE, the refinements the critical parameters use."""
        for factors in ((1, 2, 3), (2, 3, 4, 5)):
            value, err = fd.richardson(self.eigenvalues(k, factors), factors)
            if abs(value) > 10.0 * err:
                return value
        return self.extrapolated(k)

    @property
    def scale(self) -> float:
        """An energy scale of the problem (hartree), for tolerances."""
        return self.pot.energy_scale


def zero_energy_problem(pot: Potential, l: int, m: int | None = None) -> ZeroEnergyProblem:
    if pot.tail != "short":
        raise InputError(
            f"family {pot.family!r} has a {pot.tail} tail: it binds infinitely many states, there is no finite count"
        )
    R = pot.support
    r_min = origin_radius(pot, l)
    g = fd.design_grid(effective_potential(pot, l), pot.mass, 0.0, r_min, R)
    if m is not None:
        g = g.with_steps(m)
    return ZeroEnergyProblem(pot, l, g)


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
    v_eff = effective_potential(pot, l)
    g = problem.grid.refined(4)
    r, gg, F = g.nodes()
    q = 2.0 * pot.mass * (gg * gg * v_eff(r)) + F
    # w'' = q w marched outward with the same three-point recurrence as the matrix (w_0 = 0).
    # A loop: numpy has no variable-coefficient recurrence, and this runs once per call.
    w = np.zeros(r.size + 1)
    w[1] = 1e-300
    h2 = g.h * g.h
    for i in range(1, r.size):
        w[i + 1] = (2.0 + h2 * q[i - 1]) * w[i] - w[i - 1]
        if abs(w[i + 1]) > 1e250:
            w[: i + 2] *= 1e-250
    u = w[1:] * np.sqrt(gg)
    u /= np.max(np.abs(u))
    inside = int(np.count_nonzero(np.signbit(u[1:]) != np.signbit(u[:-1])))
    # u'(R) from the last two points, converted back from x to r: du/dr = (du/dx)/g
    R = r[-1]
    du = (u[-1] - u[-2]) / (r[-1] - r[-2])
    A = (du + l * u[-1] / R) / ((2 * l + 1) * R**l)
    beyond = int(A != 0 and np.signbit(A) != np.signbit(u[-1]))
    return r, u, inside + beyond
