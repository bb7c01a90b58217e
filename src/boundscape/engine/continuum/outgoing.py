"""The outgoing-wave exterior: where a short-range potential ends, and the purely outgoing
solution beyond it, continued to complex momentum k.

Beyond the range of the potential the radial solution that carries flux only outwards is the
Riccati–Hankel function ĥ⁺_l(kr) = kr·h_l^{(1)}(kr) ∝ e^{ikr} (DLMF 10.49.6).  A pole of the
S matrix is an energy at which the regular solution is purely outgoing (Siegert 1939); for a
resonance k lies in the fourth quadrant and e^{ikr} grows along the real axis.  Two ways to
reach the exterior:

* **compact support** (V exactly zero beyond R, e.g. the square well): the condition
  u'/u = k·ĥ⁺_l'(kR)/ĥ⁺_l(kR) at R is exact;
* **analytic tail** (Yukawa, ECSC, Hulthén): the outgoing solution is carried inwards along a
  ray r = r_m + ρe^{iθ} on which e^{ikr} decays (arg k + θ > 0).  This is exterior complex
  scaling in its ODE form (Simon 1979): V continued to complex r, the rotated tail is
  negligible sooner and no exponentially growing wave has to be resolved;
* otherwise (a tabulated V, which has no continuation), the real axis out to where V is
  negligible, which resolves narrow resonances and loses digits for broad ones.

The log-derivative comes from the upward recurrence L_n = 1/(n/z − L_{n−1}) − n/z, L_0 = i
(from DLMF 10.51.2), stable because ĥ⁺ is the dominant solution of the recurrence, and free of
the cancellation that j_l + i·y_l suffers where Im z is large.

References
----------
A. J. F. Siegert, "On the derivation of the dispersion formula for nuclear reactions",
Phys. Rev. 56, 750 (1939).
B. Simon, "The definition of molecular resonance curves by the method of exterior complex
scaling", Phys. Lett. A 71, 211 (1979).
NIST Digital Library of Mathematical Functions (DLMF), §10.49, §10.51.
"""

from __future__ import annotations

import math

import numpy as np


__all__ = ["riccati_hankel_log_derivative", "outgoing_log_derivative", "analytic_potential", "is_compact",
           "exterior_cut", "TailCorrection", "CUT_TOLERANCE", "ROUNDOFF", "BORN_LIMIT"]

# The tail left out beyond the cut changes the exterior log-derivative by at most this, relative
# (a first-order, Born, estimate of the neglected part; common practice, no source).
CUT_TOLERANCE = 1e-15
ROUNDOFF = 1e-16  # relative round-off of one carried solution (double precision)
# A tail taken to second order (TailCorrection) may be at most this large, relative: its third
# order, the part left out, is then below its cube.
BORN_LIMIT = 1e-4


def riccati_hankel_log_derivative(l: int, z):
    """ĥ⁺_l'(z)/ĥ⁺_l(z) for complex z ≠ 0, by the upward recurrence from L_0 = i."""
    z = np.asarray(z, dtype=complex)
    value = np.full_like(z, 1j)
    for n in range(1, l + 1):
        value = 1.0 / (n / z - value) - n / z
    return value


def outgoing_log_derivative(l: int, k: complex, r) -> complex:
    """u'/u of the outgoing solution at radius r (complex allowed): k·ĥ⁺_l'(kr)/ĥ⁺_l(kr).

    At k = 0 it is the zero-energy decaying solution's −l/r."""
    if k == 0:
        return -l / r
    return k * riccati_hankel_log_derivative(l, k * r)


def analytic_potential(pot):
    """V(r) at complex r, if the family's formula continues analytically; otherwise None.

    Families declare it (``analytic``; a table or a potential that jumps does not), and the
    declaration is checked at complex points near the real axis: Im V(t + iε)/ε must equal
    dV/dt (Cauchy–Riemann) and Re V(t + iε) must equal V(t)."""
    if not pot.info.analytic:
        return None

    def v(r):
        return pot.complex_values(r)

    t = pot.length_scale * np.array([0.37, 1.1, 2.9, 7.3])
    eps = 1e-7 * t
    try:
        with np.errstate(all="ignore"):
            shifted = np.asarray(v(t + 1j * eps))
            slope = (pot(t + eps) - pot(t - eps)) / (2 * eps)
    except (TypeError, ValueError):
        return None
    if not np.iscomplexobj(shifted) or not np.all(np.isfinite(shifted)):
        return None
    scale = np.abs(pot(t)) + np.abs(slope) * t + 1e-300
    if np.max(np.abs(shifted.real - pot(t)) / scale) > 1e-6 or np.max(np.abs(shifted.imag / eps - slope) * t / scale) > 1e-4:
        return None
    return v


def is_compact(pot) -> bool:
    """Whether V is exactly zero beyond its support (so the Hankel condition there is exact)."""
    R = pot.support
    if not math.isfinite(R):
        return False
    beyond = R * np.array([1.0 + 1e-9, 1.01, 1.5, 3.0, 10.0])
    return bool(np.all(pot(beyond) == 0.0))


def exterior_cut(v_abs, t, r_abs, mass: float, k: complex, angle: float, t_ref: float | None = None,
                 tolerance: float = CUT_TOLERANCE, corrected: bool = False):
    """Where along a path the potential may be left out, and what that costs.

    ``v_abs`` is |gV| sampled at path parameters ``t`` (ascending, from the matching point) with
    |r| = ``r_abs``.  The outgoing wave's squared modulus changes along the path as
    e^{−σ(t'−t)}, σ = 2 Im(k e^{iθ}); the neglected tail changes the exterior log-derivative by

        δ(t) ≈ ∫_t^∞ 2μ|V| min(|r'|, 1/|k|) e^{−σ(t'−t)} dt'        (first Born term:
                                                                    the free Green's function),

    Where the outgoing wave grows along the path (σ < 0: a virtual state, or a resonance on the
    real axis) W is its small recessive partner's coefficient, so both that error and round-off
    ε are amplified, relative to W, by G(t) = e^{−σ(t − t_ref)} (t_ref, default the first sample:
    where the potential stops holding the solution).  The cut is the first sample with
    δ ≤ ``tolerance`` if G is 1 there, else the one that minimises (max(δ, tolerance) + ε)·G.
    With ``corrected`` the tail beyond the cut is taken to second order (:class:`TailCorrection`):
    what is left out is of order δ³, so δ³ takes δ's place (and δ ≤ BORN_LIMIT).

    Returns (index of the cut, or None if the tail is not negligible anywhere on the sample;
    G there; (δ + ε)·G there, an estimate of the relative error the exterior leaves in W)."""
    sigma = 2.0 * (k * complex(math.cos(angle), math.sin(angle))).imag
    t = np.asarray(t, dtype=float)
    f = 2.0 * mass * np.asarray(v_abs, dtype=float) * np.minimum(np.asarray(r_abs), 1.0 / abs(k) if k else np.inf)
    # ∫_{t_j}^{∞} f e^{−σ(t'−t_j)} dt' for every j: a reversed cumulative sum on the sample
    # (trapezoid weights), summed in logarithms so that e^{±σt} cannot overflow; the last
    # sample must already be negligible
    w = np.gradient(t)
    with np.errstate(divide="ignore"):
        terms = np.log(w * f) - sigma * t
    tail = np.exp(np.logaddexp.accumulate(terms[::-1])[::-1] + sigma * t)
    # past the sample the integrand must keep falling: if it peaks at the sample's end the
    # potential decays no faster than the outgoing wave grows (an e^{−βr} tail with 2|Im k| > β)
    end = t >= t[0] + 0.9 * (t[-1] - t[0])
    if not np.max(terms[end]) < np.max(terms) - 20.0:
        return None, math.inf, math.inf
    delta = tail
    log_growth = np.minimum(max(0.0, -sigma) * np.maximum(t - (t[0] if t_ref is None else t_ref), 0.0), 700.0)
    growth = np.exp(log_growth)
    left_out = delta**3 if corrected else delta
    cost = (np.maximum(left_out, tolerance) + ROUNDOFF) * growth
    if corrected:
        cost = np.where(delta <= BORN_LIMIT, cost, np.inf)
    j = int(np.argmin(cost[:-1]))
    if not (delta[j] < 1e-3 and math.isfinite(cost[j])):
        return None, math.inf, math.inf
    return j, float(growth[j]), float((left_out[j] + ROUNDOFF) * growth[j])


class TailCorrection:
    """The outgoing s-wave solution at the cut R with the potential's tail beyond R taken to second
    order, for l = 0 (the virtual states, whose wave grows across the tail).

    With q = ik and U = 2μgV, u'' = (q² + U)u has the outgoing solution
    u(r) = e^{qr} + ∫_r^∞ K(r, r′) U(r′) u(r′) dr′, K = sinh(q(r′ − r))/q (variation of parameters;
    e.g. Newton, *Scattering Theory of Waves and Particles*, 2nd ed., §12.1), and
    u′(r) = q e^{qr} − ∫_r^∞ cosh(q(r′ − r)) U u dr′.  Iterated twice from u₀ = e^{qr} (the Born
    series, converging like δ^n with δ the tail's relative size at R): with s = r′ − R and
    everything scaled by e^{−qR},

        u₁(s) = [e^{−qs} C₁(s) − e^{qs} C₀(s)]/(2q),   C₁ = ∫_s^∞ e^{2qs′}U ds′,  C₀ = ∫_s^∞ U ds′,
        u(R)  = 1 + u₁(0) + ∫₀^∞ sinh(qs)/q · U u₁ ds,
        u′(R) = q − ½ ∫₀^∞ (e^{2qs} + 1) U ds − ∫₀^∞ cosh(qs) U u₁ ds.

    The first-order integrals are Simpson sums on a uniform grid in s (error ~h⁴ of a term ≤ δ);
    the second order, itself of order δ², by trapezoidal cumulative sums.  The integrals converge
    where Re 2q is below the tail's decay rate (a virtual state short of the branch point); the
    grid ends where the integrands have fallen by e^{−60}, or where e^{qs} would near overflow."""

    NODES = 4097  # odd, for Simpson's rule

    def __init__(self, pot, mass: float, R: float, span: float):
        self.s = np.linspace(0.0, span, self.NODES)
        self.h = self.s[1] - self.s[0]
        self.u = 2.0 * mass * np.asarray(pot(R + self.s), dtype=float)
        w = np.full(self.NODES, 2.0)
        w[1::2] = 4.0
        w[0] = w[-1] = 1.0
        self.simpson = w * self.h / 3.0

    def _tail_sum(self, f):
        # ∫_s^∞ f ds′ at every node, trapezoidal, from the far end
        inner = 0.5 * self.h * (f[1:] + f[:-1])
        out = np.zeros_like(f)
        out[:-1] = np.cumsum(inner[::-1])[::-1]
        return out

    def outgoing(self, k: complex, g: float) -> np.ndarray:
        """(u, u′) at R of the outgoing solution for coupling g, scaled by e^{−qR} (q = ik)."""
        q = 1j * complex(k)
        s, U = self.s, g * self.u
        with np.errstate(over="ignore", invalid="ignore"):
            e_plus, e_minus = np.exp(q * s), np.exp(-q * s)
            grow = e_plus * e_plus
            if q != 0:
                sinhc = (e_plus - e_minus) / (2.0 * q)  # sinh(qs)/q
                c1, c0 = self._tail_sum(grow * U), self._tail_sum(U.astype(complex))
                u1 = (e_minus * c1 - e_plus * c0) / (2.0 * q)
            else:
                sinhc = s.astype(complex)
                u1 = self._tail_sum(s * U) - s * self._tail_sum(U)  # the q → 0 limit
                u1 = u1.astype(complex)
            first_u = np.sum(self.simpson * sinhc * e_plus * U)
            first_du = -0.5 * np.sum(self.simpson * (grow + 1.0) * U)
            second_u = np.sum(self.simpson * sinhc * U * u1)
            second_du = -np.sum(self.simpson * 0.5 * (e_plus + e_minus) * U * u1)
        out = np.array([1.0 + first_u + second_u, q + first_du + second_du], dtype=complex)
        if not np.all(np.isfinite(out)):
            raise ArithmeticError("the tail beyond the exterior cut could not be summed at this k")
        return out
