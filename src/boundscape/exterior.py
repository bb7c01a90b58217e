"""The solution outside the range of the potential, where it is known in closed form.

Short-range tail (V = 0 beyond R): u = r·k_l(κr) ∝ r^{1/2} K_{l+½}(κr) for E < 0 and
u = B·r^{−l} at E = 0 (Abramowitz & Stegun 10.2).  Coulomb tail (−Z/r): u ~ r^{ν} e^{−κr},
ν = Zμ/κ, the leading term of the Whittaker function W_{ν,l+½}(2κr) (A&S 13.5.2); the box
is chosen so far out that the neglected terms do not matter.  Confining tail (½μω²r²):
u ~ e^{−μωr²/2}.  These give the log-derivative u'/u at R that closes the box exactly, and
the norm and ⟨r⟩ carried by the part of the level beyond R.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np
from scipy.special import kve, roots_laguerre


def log_derivative(kind: str, l: int, energy: float, R: float, mass: float, charge: float = 0.0,
                   omega: float = 0.0) -> float:
    """u'/u at r = R for the decaying exterior solution at ``energy`` (≤ 0 for open tails)."""
    if kind == "confining":
        return -mass * omega * R + (l + 1) / R if omega > 0 else -1e300
    kappa = math.sqrt(2.0 * mass * max(-energy, 0.0))
    if kind == "coulomb":
        if kappa == 0.0:
            return 0.0
        nu = charge * mass / kappa
        return -kappa + nu / R
    # short range: modified spherical Bessel function of the third kind
    if kappa == 0.0:
        return -l / R
    if l == 0:
        return -kappa
    z = kappa * R
    nu = l + 0.5
    if z < 1e-6:
        # small-argument expansion of K_{ν-1}/K_ν (A&S 9.6.9); kve overflows there for large l
        return -l / R - kappa * kappa * R / (2 * l - 1)
    ratio = kve(nu - 1.0, z) / kve(nu, z)
    return 0.5 / R - kappa * (ratio + nu / z)


def tail_moments(kind: str, l: int, energy: float, R: float, mass: float) -> tuple[float, float]:
    """∫_R^∞ (u/u(R))² dr and ∫_R^∞ r (u/u(R))² dr for the short-range exterior solution.

    For Coulomb and confining tails the box is chosen so that this part is negligible (returns 0).
    """
    if kind != "short" or energy >= 0:
        return 0.0, 0.0
    kappa = math.sqrt(2.0 * mass * -energy)
    if l == 0:
        # u = e^{-κr}: closed form
        return 1.0 / (2 * kappa), R / (2 * kappa) + 1.0 / (4 * kappa * kappa)
    nu = l + 0.5
    z0 = kappa * R
    k0 = kve(nu, z0)

    def shape(t):  # (u/u(R))² at r = R + t/κ, with the exponential scaling kept finite
        r = R + t / kappa
        return (r / R) * (kve(nu, kappa * r) / k0) ** 2 * math.exp(-2.0 * t)

    if z0 >= 4.0:
        # the shape varies on t ~ 1 here: Gauss–Laguerre in s = 2t (A&S 25.4.45) is exact enough
        s, w = _laguerre()
        r = R + 0.5 * s / kappa
        f = (r / R) * (kve(nu, kappa * r) / k0) ** 2
        i0 = 0.5 * float(w @ f)
        i1 = 0.5 * float(w @ (r * f))
        return i0 / kappa, i1 / kappa
    from scipy.integrate import quad  # only near threshold; the import costs each job ~0.5 s

    i0, _ = quad(shape, 0.0, np.inf, limit=200, epsabs=0.0, epsrel=1e-12)
    i1, _ = quad(lambda t: (R + t / kappa) * shape(t), 0.0, np.inf, limit=200, epsabs=0.0, epsrel=1e-12)
    return i0 / kappa, i1 / kappa


@lru_cache(maxsize=1)
def _laguerre():
    return roots_laguerre(60)
