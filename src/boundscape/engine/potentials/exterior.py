"""The solution outside the range of the potential, where it is known in closed form, and the
one home of everything computed from it: the log-derivative u'/u that closes a box exactly, the
integrals of a level's (or two levels') exterior parts, and the window in which the lowest
levels of an infinite spectrum are surveyed.

Tails, by code (:func:`tail_code`):

* short range (V = 0 beyond R): u = r·k_l(κr) ∝ e^{−z} z^{−l} Σ_j a_j z^{l−j}, z = κr,
  a_j = (l+j)!/(j!(l−j)! 2^j) (Abramowitz & Stegun 10.2.15), and u ∝ r^{−l} at E = 0;
* Coulomb (−Z/r): u ~ r^{ν} e^{−κr}, ν = Zμ/κ, the leading term of the Whittaker function
  W_{ν,l+½}(2κr) (A&S 13.5.2); the box reaches so far that the neglected terms do not matter;
* confining (½μω²r²): u ~ r^{l+1} e^{−μωr²/2};
* fixed: a given u'/u (the zero-energy problem's −l/R).

The kernels are compiled (numba); scipy's modified Bessel functions and quadrature check them in
the tests.
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit, types

from .. import jitcache

_saved_cache_dir = jitcache.enter()  # this module's kernels are cached by jitcache's rule

__all__ = ["TAIL_SHORT", "TAIL_COULOMB", "TAIL_CONFINING", "TAIL_FIXED", "tail_code", "log_derivative",
           "tail_integrals", "survey_window", "GAUSS_NODES", "GAUSS_WEIGHTS", "TAIL_PANELS"]

f8, i8 = types.float64, types.int64
A1 = types.float64[::1]

TAIL_SHORT, TAIL_COULOMB, TAIL_CONFINING, TAIL_FIXED = 0, 1, 2, 3
_KINDS = {"short": TAIL_SHORT, "coulomb": TAIL_COULOMB, "confining": TAIL_CONFINING}
# Gauss–Legendre panels for the exterior's integrals (16 nodes each: relative error < 1e-12)
TAIL_PANELS = 24
GAUSS_NODES, GAUSS_WEIGHTS = np.polynomial.legendre.leggauss(16)


def tail_code(pot) -> tuple[int, float]:
    """(kind, parameter) of ``pot``'s exterior for the kernels: the Coulomb charge, ω, or 0."""
    return _KINDS[pot.tail], float(pot.info.tail_parameter(pot))


@njit([(i8, i8, f8, f8, f8, f8,)], cache=True)
def log_derivative(kind, l, mass, p, energy, R):
    """u'/u at R of the exterior solution: short range e^{−z} Σ_j a_j z^{−j}
    (A&S 10.2.15, written as Σ_j a_j z^{l−j} so that small z cannot overflow); Coulomb
    −κ + Zμ/(κR) (p = Z); oscillator −μωR + (l+1)/R (p = ω); fixed: p itself."""
    if kind == TAIL_FIXED:
        return p
    if kind == TAIL_CONFINING:
        return -mass * p * R + (l + 1.0) / R
    kappa = math.sqrt(2.0 * mass * max(-energy, 0.0))
    if kind == TAIL_COULOMB:
        if kappa == 0.0:
            return 0.0
        return -kappa + p * mass / (kappa * R)
    if kappa == 0.0:
        return -l / R
    z = kappa * R
    a = 1.0
    poly = 0.0
    dpoly = 0.0
    for j in range(l + 1):
        poly += a * z ** (l - j)
        if l - j > 0:
            dpoly += a * (l - j) * z ** (l - j - 1)
        a *= (l + j + 1.0) * (l - j) / (2.0 * (j + 1.0))
    return kappa * (-1.0 - l / z + dpoly / poly)


@njit([(i8, f8)], cache=True)
def _series(l, z):
    # Σ_j a_j z^{l−j} of A&S 10.2.15
    a = 1.0
    total = 0.0
    for j in range(l + 1):
        total += a * z ** (l - j)
        a *= (l + j + 1.0) * (l - j) / (2.0 * (j + 1.0))
    return total


@njit([(i8, i8, f8, f8, f8, f8, A1, A1, i8,)], cache=True)
def tail_integrals(l_a, l_b, mass, e_a, e_b, R, nodes, weights, panels):
    """∫_R^∞ φ_a φ_b dr and ∫_R^∞ r φ_a φ_b dr, φ = u/u(R) the short-range exterior solution of
    each level (angular momentum l, energy e < 0); with a = b the norm and ⟨r⟩ a level carries
    beyond its box, with a ≠ b the exterior part of a radial integral between two levels.

    Gauss–Legendre (``nodes``, ``weights`` on [−1, 1]) on ``panels`` equal panels in v, where
    K(r − R) = ε(eᵛ − 1), K = κ_a + κ_b, out to K(r − R) = 70 (φ_aφ_b < e^{−70} there): the
    decay e^{−K(r−R)} and, near threshold (ε = KR), the power-law shape (R/r)^{l_a+l_b} both
    vary on a scale of order one in v."""
    ka = math.sqrt(2.0 * mass * max(-e_a, 0.0))
    kb = math.sqrt(2.0 * mass * max(-e_b, 0.0))
    if ka == 0.0 or kb == 0.0:
        return 0.0, 0.0
    K = ka + kb
    za, zb = ka * R, kb * R
    eps = min(1.0, K * R)
    v_max = math.log1p(70.0 / eps)
    width = v_max / panels
    pa, pb = _series(l_a, za), _series(l_b, zb)
    fa, fb = ka / K, kb / K
    t0 = 0.0
    t1 = 0.0
    for panel in range(panels):
        mid = (panel + 0.5) * width
        for q in range(nodes.size):
            v = mid + 0.5 * width * nodes[q]
            ev = math.exp(v)
            sv = eps * (ev - 1.0)
            r = R + sv / K
            ra = math.exp(-fa * sv) * (za / (ka * r)) ** l_a * _series(l_a, ka * r) / pa
            rb = math.exp(-fb * sv) * (zb / (kb * r)) ** l_b * _series(l_b, kb * r) / pb
            f = ra * rb * eps * ev / K * 0.5 * width * weights[q]  # dr = ε eᵛ dv / K
            t0 += f
            t1 += f * r
    return t0, t1


def survey_window(kind: int, l: int, mass: float, p: float, keep: int, margin: float) -> tuple[float, float]:
    """(energy, radius) of a box that holds the lowest ``keep`` levels of an infinite spectrum:
    Coulomb (p = Z), the hydrogenic n = keep + l level and its turning point plus ``margin``
    decay lengths; oscillator (p = ω), its own levels and turning point plus 8 oscillator lengths."""
    if kind == TAIL_COULOMB:
        n = keep + l
        zmu = p * mass
        return -zmu * p / (2.0 * n * n), (2.0 * n * n + margin * n) / zmu
    if kind == TAIL_CONFINING:
        e_top = p * (2 * keep + l + 1.5)
        return e_top, math.sqrt(2 * e_top / (mass * p**2)) + 8.0 / math.sqrt(mass * p)
    raise ValueError("a short-range tail has a finite spectrum: no survey window")


jitcache.leave(_saved_cache_dir)
