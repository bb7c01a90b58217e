"""Critical parameters: the screening length or strength at which a state is lost.

State k is lost where the k-th zero-energy eigenvalue μ_k (:mod:`.zero_energy`) crosses zero:
a root in λ (or in the strength) found with ``scipy.optimize.brentq`` on the
Richardson-extrapolated μ_k, not by interpolating energies.
"""

from __future__ import annotations

import math
from functools import lru_cache

from scipy.optimize import brentq

from ...checks import quantum_number
from ...errors import InputError
from ..limits import MAX_CRITICAL_STATES, check_count, check_l
from ..potentials import family_info, potential
from ..richardson import FACTORS, extrapolate
from .zero_energy import THETA_CRITICAL, zero_energy_problem

__all__ = ["critical_screening_length", "critical_strength"]

_WHY = "a root search per state, costing ~n_r² per l"


def _screened(family, strength, lam, mass, own):
    # Critical lengths need the screening on (a table is screened here); ``own`` is the family's
    # own parameters as sorted (name, value) pairs, already prepared (a table read once).
    return potential(family, strength, lam, mass, **dict(own))


def _prepared(family, mass, params):
    """The family's own parameters, checked and screened, as a hashable tuple (cache keys)."""
    info = family_info(family)
    return tuple(sorted(info.screened_parameters(info.prepare(params, f" for family {family!r}")).items()))


def _root_on(make, l: int, k: int, start: float, scale_up=2.0, span=1e12):
    """Find the parameter p at which state k appears, μ_k(p) = 0, μ_k decreasing in p; returns
    (p, error estimate of p).

    ``make(p)`` returns a Potential.  A bracket is grown geometrically from ``start`` on the
    coarse count; the grid is then frozen (its map and size from the bracket's upper end, only
    stretched to each potential's range) so that μ_k(p) is a smooth function of p for brentq.
    The error estimate is Richardson's change of μ_k at the root (against the two-grid value)
    over the slope dμ_k/dp there: the discretisation error of μ_k carried to p."""
    def bound(p):
        return zero_energy_problem(make(p), l).coarse_count() > k

    lo, hi = start, 2.0 * start
    while not bound(hi):
        lo, hi = hi, hi * scale_up
        if hi > span * start:
            return math.inf, math.nan
    while bound(lo):
        hi, lo = lo, lo / scale_up
        if lo < start / span:
            return 0.0, math.nan
    like = zero_energy_problem(make(hi), l, theta=THETA_CRITICAL).grid
    changes = {}

    def mu(p):
        problem = zero_energy_problem(make(p), l, like=like)
        best, changes[p] = extrapolate([problem.eigenvalue(k, f) for f in FACTORS])
        return best

    # the coarse bracket may be off by discretisation error: widen it on the extrapolated μ
    while mu(lo) < 0:
        lo /= scale_up
    while mu(hi) > 0:
        hi *= scale_up
    root = brentq(mu, lo, hi, xtol=1e-15 * hi, rtol=1e-15, maxiter=200)
    near = min(changes, key=lambda p: abs(p - root))
    step = 1e-6 * root  # μ_k is smooth on the frozen grid; its rounding is ~1e-16 of its scale
    slope = (mu(root + step) - mu(root)) / step
    change = max(abs(changes[near]), abs(changes[root + step]))
    return root, change / abs(slope) if slope != 0 else math.inf


@lru_cache(maxsize=4096)
def _critical_lambda(family, strength, l, n_r, mass, own):
    start = family_info(family).critical_length_start(strength, mass, dict(own))
    return _root_on(lambda lam: _screened(family, strength, lam, mass, own), l, n_r, start)


def critical_screening_length(family: str, strength: float, l: int, n_r: int, mass: float = 1.0,
                              full_output: bool = False, **params):
    """Screening length λ_c (bohr) below which the state (n_r, l) is not bound.

    Parameters
    ----------
    family : str
        A family that has a screening length (yukawa, ecsc, hulthen, square_well, tabulated, ...).
    strength, mass : float
        Z (or depth) and reduced mass μ (electron masses).
    l, n_r : int
        Angular momentum and radial node count of the state.
    full_output : bool
        Also return the error estimate of λ_c (as scipy's root finders' ``full_output``).
    **params
        The family's own parameters (for ``tabulated``: ``table`` and ``coulomb_tail``; a critical
        length always means the table is multiplied by exp(−r/λ)).

    Returns
    -------
    float
        λ_c in bohr; ``math.inf`` if the state is never bound.
    float
        With ``full_output``: the absolute error estimate of λ_c, bohr (Richardson's change of the
        zero-energy eigenvalue at the root over its slope in λ; NaN where λ_c is 0 or inf).

    Notes
    -----
    For one-scale families λ_c(Z, μ) = λ_c(1, 1)/(Zμ), which is exact for V = Z f(r/λ)/r, so the
    dimensionless root is computed once per (family, parameters, l, n_r) and cached.
    """
    l = check_l(quantum_number(l))
    n_r = check_count(quantum_number(n_r, "n_r"), "n_r", MAX_CRITICAL_STATES - 1, _WHY)
    info = family_info(family)
    own = _prepared(family, mass, params)
    if not info.uses_screening_length(dict(own)):
        raise InputError(f"family {family!r} has no screening length; critical lengths need a screened family")
    probe = _screened(family, strength, 1.0, mass, own)  # validates the parameters
    if info.one_scale:
        value, error = (x / (probe.strength * probe.mass) for x in _critical_lambda(family, 1.0, l, n_r, 1.0, own))
    else:
        value, error = _critical_lambda(family, probe.strength, l, n_r, probe.mass, own)
    return (value, error) if full_output else value


@lru_cache(maxsize=4096)
def _critical_z(family, lam, l, n_r, mass, own):
    start = family_info(family).critical_strength_start(lam, mass, dict(own))
    return _root_on(lambda z: _screened(family, z, lam, mass, own), l, n_r, start)[0]


def critical_strength(family: str, screening_length: float, l: int, n_r: int, mass: float = 1.0, **params) -> float:
    """Strength Z_c (or depth, hartree, for the square well) below which (n_r, l) is not bound.

    For one-scale families Z_c = λ_c(1, 1)/(μλ).  Returns ``math.inf`` if never bound.
    """
    l = check_l(quantum_number(l))
    n_r = check_count(quantum_number(n_r, "n_r"), "n_r", MAX_CRITICAL_STATES - 1, _WHY)
    info = family_info(family)
    own = _prepared(family, mass, params)
    if not info.uses_screening_length(dict(own)):
        raise InputError(f"family {family!r} binds at any strength; critical strengths need a screened family")
    probe = _screened(family, 1.0, screening_length, mass, own)
    if info.one_scale:
        return _critical_lambda(family, 1.0, l, n_r, 1.0, own)[0] / (probe.mass * probe.screening_length)
    return _critical_z(family, probe.screening_length, l, n_r, probe.mass, own)
