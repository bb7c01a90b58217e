"""Zero-energy scattering: the scattering length (l = 0), the generalised length a_l (l ≥ 1),
its inverse, and the effective range, from the regular zero-energy solution.

Definitions
-----------
Beyond the range R of a short-range potential the regular zero-energy solution is
u = A r^{l+1} + B r^{−l}.  Matched to the free solutions at small k, u ∝ ĵ_l(kr) − tan δ_l ŷ_l(kr)
with ĵ_l(z) ≈ z^{l+1}/(2l+1)!!, ŷ_l(z) ≈ −(2l−1)!! z^{−l} (DLMF 10.52.1), so

    tan δ_l ≈ −(k a_l)^{2l+1},     a_l^{2l+1} = −(B/A) / [(2l+1)!! (2l−1)!!],

with (−1)!! = 1: for l = 0, a = −B/A, the node of the straight line u ∝ r − a (Bethe 1949).
a_l is the real (2l+1)-th root (a_1³ is the p-wave scattering volume).  At a threshold A passes
through zero and a_l through ±∞: 1/a_l passes through zero, continuously.

The effective range (l = 0) is Bethe's integral

    r_e = 2 ∫₀^∞ (v₀² − u₀²) dr,     v₀ = 1 − r/a,  u₀ the solution with u₀ = v₀ beyond R,

(H. A. Bethe, Phys. Rev. 76, 38 (1949), eq. (9)), so that k cot δ₀ = −1/a + r_e k²/2 + O(k⁴).

Method
------
The regular solution on the engine's zero-energy grid (:mod:`.regular`).  A = (l u + R u')/
((2l+1) R^{l+1}) at R, where the r^{l+1} part dominates; B, which is small against it wherever
|a_l| ≪ R, is read from its own integral instead, B = −(2μ/(2l+1)) ∫₀^R r^{l+1} V u dr (variation
of constants: B' = −r^{l+1}·2μV u/(2l+1)), which loses no digits to that cancellation (the Born
limit a → 2μ∫V r² dr comes out exact).  Bethe's integral is taken in the same spirit: with
f = 2μVu and v − u = ∫_r^R (r − r′) f(r′) dr′ (l = 0), ∫(v² − u²) dr = −∫ f (A r³/3 + B r²) dr
− ∫ (v − u)² dr, which never subtracts u from v where both are large and equal.  What is extrapolated over the grids h, h/2, h/4 is
the angle θ = arctan(a_l^{2l+1}/L^{2l+1}) (L the potential's length scale), smooth through
both a threshold (a = ±∞) and a = 0, and r_e; the error estimate is the change against the
two-grid extrapolation, as for levels.  The grid's step is halved (up to three times) while
an estimate misses the tolerance.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ...checks import quantum_number
from ...errors import InputError
from ..bound.zero_energy import count_bound
from ..richardson import extrapolate
from ..status import NOT_CONVERGED, OK
from .regular import REFINEMENTS, STRIDES, zero_energy_grid

__all__ = ["Scattering", "scattering", "double_factorials", "reference_length", "check_scattering_input", "MAX_L",
           "RTOL"]

MAX_L = 50  # past this the centrifugal barrier leaves nothing to compute: δ_l ~ (kR)^{2l+1}
RTOL = 1e-9  # on the angle θ (rad) and on r_e relative to max(|r_e|, L)
ROUNDOFF = 1e-14  # floor of an error estimate, relative


@dataclass
class Scattering:
    """Zero-energy scattering of one l (atomic units: bohr, bohr⁻¹).

    ``length`` is the scattering length a (l = 0) or the generalised length a_l (l ≥ 1) of
    tan δ_l ≈ −(k a_l)^{2l+1}; ``inverse_length`` is 1/a_l (zero where a state is at threshold);
    ``effective_range`` is r_e (l = 0; NaN for l ≥ 1); each has its error estimate.
    ``num_bound`` is the exact count of bound states of this l; ``status`` 0 (ok) or 1
    (not converged: an error estimate misses ``rtol``, the ``reason`` says which)."""

    l: int
    length: float
    inverse_length: float
    effective_range: float
    length_error: float
    inverse_length_error: float
    effective_range_error: float
    num_bound: int
    status: int
    reason: str = ""


def double_factorials(l: int) -> float:
    """(2l+1)!! (2l−1)!!, with (−1)!! = 1."""
    return float(math.prod(range(2 * l + 1, 0, -2)) * math.prod(range(2 * l - 1, 0, -2)))


def reference_length(pot) -> float:
    """The length L the angle arctan(a_l^{2l+1}/L^{2l+1}) is formed with: the screening length
    (or the well's radius) where there is one, else the potential's length scale."""
    lam = pot.screening_length
    return float(lam) if math.isfinite(lam) else float(pot.length_scale)


def check_scattering_input(pot, l, what: str = "scattering") -> int:
    """``l`` as an int if ``pot`` and ``l`` are something scattering can be computed for;
    raises :class:`~boundscape.InputError` in one line otherwise."""
    l = quantum_number(l)
    if l > MAX_L:
        raise InputError(f"l = {l} is above {MAX_L}, the largest l {what} computes (δ_l falls like (kR)^{{2l+1}})")
    if pot.tail != "short":
        raise InputError(f"family {pot.family!r} has a {pot.tail} tail: {what} needs a short-range potential "
                         "(a Coulomb tail needs Coulomb functions and phase shifts relative to them)")
    return l


def _grid_parts(cg, l, mass):
    """(A, B, ∫(v² − u²) dr or NaN) on each of the grids h, h/2, h/4."""
    out = []
    for stride in STRIDES:
        sol = cg.solve(stride, 0.0)
        R = sol.r[-1]
        A = (l * sol.u_end + R * sol.du_end) / ((2 * l + 1) * R ** (l + 1))
        r, w = sol.r, sol.weights
        f = 2.0 * mass * cg.potential[::stride] * sol.u  # u'' − l(l+1)u/r² at E = 0
        B = -float(np.sum(w * r ** (l + 1) * f)) / (2 * l + 1)
        excess = math.nan
        if l == 0:
            # ∫(v² − u²) = 2∫v(v − u) − ∫(v − u)², and with v − u = ∫_r^R (r − r′) f(r′) dr′ the
            # first part is −∫ f (A r³/3 + B r²) dr: no difference of the large v and u beyond
            # the potential, where u = v (a difference that leaves ~1e-9 of r_e to rounding)
            d = A * r + B - sol.u
            excess = -float(np.sum(w * f * (A * r**3 / 3.0 + B * r * r))) - float(np.sum(w * d * d))
        out.append((A, B, excess))
    return out


def _angles(parts, l, L):
    """θ = arctan(a_l^{2l+1}/L^{2l+1}) on each grid, unwrapped against the first (mod π)."""
    scale = double_factorials(l) * L ** (2 * l + 1)
    thetas = []
    for A, B, _ in parts:
        theta = math.atan(-B / (A * scale)) if A != 0.0 else math.copysign(math.pi / 2, -B)
        if thetas:
            theta += math.pi * round((thetas[0] - theta) / math.pi)
        thetas.append(theta)
    return thetas


def _solve(pot, l, L, refine):
    parts = _grid_parts(zero_energy_grid(pot, l, refine=refine), l, float(pot.mass))
    angle, angle_error = extrapolate(_angles(parts, l, L))
    r_e = r_e_error = math.nan
    if l == 0:
        r_e, r_e_error = extrapolate([2.0 * excess / (B * B) for _, B, excess in parts])
    return angle, abs(angle_error), r_e, abs(r_e_error)


def scattering(pot, l: int = 0, *, rtol: float = RTOL, num_bound: int | None = None) -> Scattering:
    """Scattering length (l = 0), generalised length a_l (l ≥ 1), 1/a_l and the effective range.

    Parameters
    ----------
    pot : Potential
        A short-range potential (:func:`boundscape.potential`).
    l : int
        Angular momentum, 0 ≤ l ≤ :data:`MAX_L`.
    rtol : float
        Tolerance on the angle arctan(a_l^{2l+1}/L^{2l+1}) (rad; L the screening length or
        radius) and on r_e relative to max(|r_e|, L); the grid's step is halved while an
        estimate misses it (up to 3 times), and the status is ``not_converged`` if it still does.
    num_bound : int, optional
        The exact count of bound states of this l if known (``bound_levels(...).num_bound``);
        default :func:`boundscape.count_bound`.

    Returns
    -------
    Scattering
        a_l is defined by tan δ_l ≈ −(k a_l)^{2l+1} as k → 0; for l = 0 it is the scattering
        length a, the node of the zero-energy solution's exterior line u ∝ r − a.

    Notes
    -----
    Beyond the range R the zero-energy solution is A r^{l+1} + B r^{−l} and
    a_l^{2l+1} = −(B/A)/[(2l+1)!!(2l−1)!!].  r_e = 2∫₀^∞(v₀² − u₀²) dr with v₀ = 1 − r/a
    (Bethe, Phys. Rev. 76, 38 (1949)); near a threshold a → ±∞ and r_e stays finite, near
    a = 0 r_e diverges like 1/a².  The module docstring gives the method.

    Raises
    ------
    InputError
        For a Coulomb or confining tail, l out of range, or a bad rtol.
    """
    l = check_scattering_input(pot, l)
    if not (isinstance(rtol, (int, float)) and rtol > 0):
        raise InputError(f"rtol must be a positive number, got {rtol!r}")
    L = reference_length(pot)
    for refine in REFINEMENTS:
        try:
            angle, angle_error, r_e, r_e_error = _solve(pot, l, L, refine)
        except ValueError as exc:  # finer than MAX_STEPS: keep what the last grid gave
            if refine == REFINEMENTS[0]:
                raise InputError(f"{pot} is too large a problem for l = {l}: {exc} (its zero-energy solution has "
                                 "that many oscillations)") from None
            break
        angle_error = max(angle_error, ROUNDOFF * max(abs(angle), 1.0))
        r_e_error = max(r_e_error, ROUNDOFF * abs(r_e))
        if angle_error <= rtol and (l > 0 or r_e_error <= rtol * max(abs(r_e), L)):
            break
    # a_l^{2l+1} = L^{2l+1} tan θ; a_l its real root, and the errors carried through
    p = 2 * l + 1
    t = math.tan(angle)
    volume = L**p * t
    length = math.copysign(abs(volume) ** (1.0 / p), volume)
    cot = math.cos(angle) / math.sin(angle) if angle != 0.0 else math.inf
    inverse = math.copysign(abs(cot) ** (1.0 / p), cot) / L if math.isfinite(cot) else math.copysign(math.inf, angle or 1.0)
    # d(a_l)/dθ = a_l (1 + t²)/(p t) and d(1/a_l)/dθ = −(1/a_l)(1 + cot²)/(p cot)
    length_error = abs(length) * (1.0 + t * t) / (p * abs(t)) * angle_error if t != 0.0 else L * angle_error
    inverse_error = (abs(inverse) * (1.0 + cot * cot) / (p * abs(cot)) * angle_error
                     if math.isfinite(cot) and cot != 0.0 else angle_error / L)
    reason = ""
    if angle_error > rtol:
        reason = f"error estimate of arctan(a^{p}/L^{p}) {angle_error:.2e} rad exceeds rtol {rtol:g}"
    elif l == 0 and r_e_error > rtol * max(abs(r_e), L):
        reason = f"error estimate of the effective range {r_e_error:.2e} bohr exceeds rtol {rtol:g}·max(|r_e|, L)"
    if num_bound is None:
        num_bound = count_bound(pot, l)
    return Scattering(l, length, inverse, r_e, length_error, inverse_error, r_e_error, int(num_bound),
                      NOT_CONVERGED if reason else OK, reason)

