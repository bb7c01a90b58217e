"""The zero-energy problem: exact bound-state counts and critical parameters.

Beyond the range R of a short-range potential the E = 0 solution is A r^{l+1} + B r^{−l}.
Closing the box at R with the condition of the decaying part alone, u'/u = −l/R, gives a
Sturm–Liouville problem whose k-th eigenvalue μ_k is negative exactly when the regular
zero-energy solution has more than k nodes on (0, ∞) — counting the node beyond R that
appears when A and u(R) differ in sign (Sturm oscillation theorem; e.g. Courant & Hilbert,
vol. 1, ch. VI).  So

* the number of bound states of that l is the number of negative μ_k, and
* state k is lost where μ_k crosses zero: a root in λ (or in the strength) found with
  ``scipy.optimize.brentq`` on the Richardson-extrapolated μ_k, not by interpolating energies.

The count in a cell and the critical lengths use the same extrapolated μ_k, so a cell just on
either side of a threshold is counted consistently with the critical length.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np
from scipy.optimize import brentq

from . import grid as fd
from .errors import InputError
from .potentials import Potential, family_info, potential as make_potential

# Dirichlet at r_min perturbs a level by ~ (r_min/a)^{2l+1}; keep that below 1e-14 (common practice, no source).
ORIGIN_TOLERANCE = 1e-14
# Refinements of the design grid for decisions at threshold: μ_k must be resolved against its
# slope in λ, which is small for extended states (measured on Hulthén n ≤ 7 against n²/2Z).
FINE = (3, 4, 5, 6, 7)


def check_l(l, name: str = "l") -> int:
    """A non-negative integer quantum number (``name`` says which, for the message)."""
    if isinstance(l, bool) or not isinstance(l, (int, np.integer)):
        if isinstance(l, float) and l.is_integer():
            l = int(l)
        else:
            raise InputError(f"{name} must be a non-negative integer, got {l!r}")
    if l < 0:
        raise InputError(f"{name} must be a non-negative integer, got {l}")
    return int(l)


def effective_potential(pot: Potential, l: int):
    c = l * (l + 1) / (2.0 * pot.mass)
    return lambda r: pot(r) + c / (r * r)


def origin_radius(pot: Potential, l: int) -> float:
    return pot.length_scale * ORIGIN_TOLERANCE ** (1.0 / (2 * l + 1))


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
    l = check_l(l)
    if pot.tail != "short":
        return -1
    return _count(zero_energy_problem(pot, l))


def _count(problem: ZeroEnergyProblem) -> int:
    c = problem.coarse_count()
    # The coarse count can be off only for a state within discretisation error of threshold:
    # the marginal μ decide, each on the cheapest extrapolation whose error is clearly smaller.
    while c > 0 and _settled(problem, c - 1) >= 0.0:
        c -= 1
    while c < problem.grid.m and _settled(problem, c) < 0.0:
        c += 1
    return c


def _settled(problem: ZeroEnergyProblem, k: int) -> float:
    """μ_k, extrapolated on more and finer grids until its sign is beyond its error estimate;
    at worst on FINE, the refinements the critical parameters use."""
    for factors in ((1, 2, 3), (2, 3, 4, 5)):
        value, err = fd.richardson(problem.eigenvalues(k, factors), factors)
        if abs(value) > 10.0 * err:
            return value
    return problem.extrapolated(k)


def zero_energy_solution(pot: Potential, l: int):
    """The regular zero-energy solution u(r) out to the end R of the potential's range, normalised
    to max |u| = 1, and its node count on (0, ∞).

    Beyond R, u = A r^{l+1} + B r^{−l}; one more node lies out there when u(R) and A differ in
    sign.  Returns (r, u, nodes).  (The count in :func:`count_bound` decides the same question
    on the extrapolated eigenvalues, which is exact also right at a threshold.)"""
    l = check_l(l)
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


# ---------------------------------------------------------------------------------------
# Critical parameters

def _build(family, strength, lam, mass, table, coulomb_tail=None):
    # Critical lengths need the screening on: a table is always screened here.  ``table`` is a
    # path or pair for the first (validating) build, then the Table it produced, which keeps
    # its declared Coulomb tail.
    if family == "tabulated":
        return make_potential(family, strength, lam, mass, table=table, screened=True,
                              coulomb_tail=coulomb_tail)
    return make_potential(family, strength, lam, mass)


def _root_on(make, l: int, k: int, start: float, scale_up=2.0, span=1e12):
    """Find the parameter p at which state k appears, μ_k(p) = 0, μ_k decreasing in p.

    ``make(p)`` returns a Potential.  A bracket is grown geometrically from ``start`` on the
    coarse count; the grid is then frozen (its size fixed at the bracket's upper end) so that
    μ_k(p) is a smooth function of p for brentq."""
    def bound(p):
        return zero_energy_problem(make(p), l).coarse_count() > k

    lo, hi = start, 2.0 * start
    while not bound(hi):
        lo, hi = hi, hi * scale_up
        if hi > span * start:
            return math.inf
    while bound(lo):
        hi, lo = lo, lo / scale_up
        if lo < start / span:
            return 0.0
    m = zero_energy_problem(make(hi), l).grid.m

    def mu(p):
        return zero_energy_problem(make(p), l, m).extrapolated(k)

    # the coarse bracket may be off by discretisation error: widen it on the extrapolated μ
    while mu(lo) < 0:
        lo /= scale_up
    while mu(hi) > 0:
        hi *= scale_up
    return brentq(mu, lo, hi, xtol=1e-15 * hi, rtol=1e-15, maxiter=200)


@lru_cache(maxsize=4096)
def _critical_lambda(family, strength, l, n_r, mass, table):
    start = 1.0 / (strength * mass)
    if family == "square_well":
        start = 1.0 / math.sqrt(2 * mass * strength)
    return _root_on(lambda lam: _build(family, strength, lam, mass, table), l, n_r, start)


def critical_screening_length(family: str, strength: float, l: int, n_r: int, mass: float = 1.0,
                              table=None, screened: bool = True, coulomb_tail: float | None = None) -> float:
    """Screening length λ_c (bohr) below which the state (n_r, l) is not bound.

    Parameters
    ----------
    family : str
        A family that has a screening length (yukawa, ecsc, hulthen, square_well, tabulated).
    strength, mass : float
        Z (or depth) and reduced mass μ (electron masses).
    l, n_r : int
        Angular momentum and radial node count of the state.
    table, coulomb_tail : optional
        For ``tabulated``: the table (path or (r, V) pair) and a declared −Z/r tail beyond it.
    screened : bool
        Kept for symmetry with :func:`boundscape.potential`; a critical length always means the
        table is multiplied by exp(−r/λ).

    Returns
    -------
    float
        λ_c in bohr; ``math.inf`` if the state is never bound.

    Notes
    -----
    For one-scale families λ_c(Z, μ) = λ_c(1, 1)/(Zμ), which is exact for V = Z f(r/λ)/r, so the
    dimensionless root is computed once per (family, l, n_r) and cached.
    """
    l = check_l(l)
    n_r = check_l(n_r, "n_r")
    if family != "tabulated":
        info = family_info(family)
        if not info.uses_screening_length:
            raise InputError(f"family {family!r} has no screening length; critical lengths need a screened family")
    probe = _build(family, strength, 1.0, mass, table, coulomb_tail)  # validates the parameters
    table = probe.table if family == "tabulated" else None
    if family != "tabulated" and family_info(family).one_scale:
        return _critical_lambda(family, 1.0, l, n_r, 1.0, None) / (probe.strength * probe.mass)
    return _critical_lambda(family, probe.strength, l, n_r, probe.mass, table)


@lru_cache(maxsize=4096)
def _critical_z(family, lam, l, n_r, mass, table):
    start = 1.0 / (lam * mass)
    if family == "square_well":
        start = 1.0 / (2 * mass * lam * lam)
    return _root_on(lambda z: _build(family, z, lam, mass, table), l, n_r, start)


def critical_strength(family: str, screening_length: float, l: int, n_r: int, mass: float = 1.0,
                      table=None, screened: bool = True, coulomb_tail: float | None = None) -> float:
    """Strength Z_c (or depth, hartree, for the square well) below which (n_r, l) is not bound.

    For one-scale families Z_c = λ_c(1, 1)/(μλ).  Returns ``math.inf`` if never bound.
    """
    l = check_l(l)
    n_r = check_l(n_r, "n_r")
    if family != "tabulated" and not family_info(family).uses_screening_length:
        raise InputError(f"family {family!r} binds at any strength; critical strengths need a screened family")
    probe = _build(family, 1.0, screening_length, mass, table, coulomb_tail)
    table = probe.table if family == "tabulated" else None
    if family != "tabulated" and family_info(family).one_scale:
        return _critical_lambda(family, 1.0, l, n_r, 1.0, None) / (probe.mass * probe.screening_length)
    return _critical_z(family, probe.screening_length, l, n_r, probe.mass, table)
