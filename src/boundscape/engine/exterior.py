"""The solution outside the range of the potential, where it is known in closed form.

Each tail form is a small class behind :func:`exterior_for`:

* :class:`ShortRange` (V = 0 beyond R): u = r·k_l(κr) ∝ r^{1/2} K_{l+½}(κr) for E < 0 and
  u = B·r^{−l} at E = 0 (Abramowitz & Stegun 10.2);
* :class:`CoulombTail` (−Z/r): u ~ r^{ν} e^{−κr}, ν = Zμ/κ, the leading term of the Whittaker
  function W_{ν,l+½}(2κr) (A&S 13.5.2); the box is chosen so far out that the neglected terms
  do not matter;
* :class:`OscillatorTail` (½μω²r²): u ~ r^{l+1} e^{−μωr²/2}.

They give the log-derivative u'/u at R that closes the box exactly, the norm and ⟨r⟩ carried by
the part of the level beyond R, and, for the two that bind infinitely many levels, the window
in which the lowest levels are surveyed.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np
from scipy.special import kve, roots_laguerre

__all__ = ["ShortRange", "CoulombTail", "OscillatorTail", "exterior_for"]


class ShortRange:
    """V = 0 beyond R: modified spherical Bessel functions of the third kind."""

    kind = "short"
    infinite_spectrum = False

    def __init__(self, l: int, mass: float):
        self.l, self.mass = l, mass

    def log_derivative(self, energy: float, R: float) -> float:
        """u'/u at r = R for the decaying exterior solution at ``energy`` ≤ 0."""
        l = self.l
        kappa = math.sqrt(2.0 * self.mass * max(-energy, 0.0))
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

    def tail_moments(self, energy: float, R: float) -> tuple[float, float]:
        """∫_R^∞ (u/u(R))² dr and ∫_R^∞ r (u/u(R))² dr."""
        if energy >= 0:
            return 0.0, 0.0
        l = self.l
        kappa = math.sqrt(2.0 * self.mass * -energy)
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


class CoulombTail:
    """V → −Z/r: the leading term of the decaying Whittaker function."""

    kind = "coulomb"
    infinite_spectrum = True

    def __init__(self, l: int, mass: float, charge: float):
        self.l, self.mass, self.charge = l, mass, charge

    def log_derivative(self, energy: float, R: float) -> float:
        kappa = math.sqrt(2.0 * self.mass * max(-energy, 0.0))
        if kappa == 0.0:
            return 0.0
        nu = self.charge * self.mass / kappa
        return -kappa + nu / R

    def tail_moments(self, energy: float, R: float) -> tuple[float, float]:
        return 0.0, 0.0  # the box reaches so far that this part is negligible

    def survey_window(self, keep: int, margin: float) -> tuple[float, float]:
        """(energy, radius) of a box that holds the lowest ``keep`` levels: the hydrogenic
        n = keep + l level and its turning point plus ``margin`` decay lengths."""
        n = keep + self.l
        zmu = self.charge * self.mass
        return -zmu * self.charge / (2.0 * n * n), (2.0 * n * n + margin * n) / zmu


class OscillatorTail:
    """V = ½μω²r²: every level is bound; u ~ r^{l+1} e^{−μωr²/2} far out."""

    kind = "confining"
    infinite_spectrum = True

    def __init__(self, l: int, mass: float, omega: float):
        self.l, self.mass, self.omega = l, mass, omega

    def log_derivative(self, energy: float, R: float) -> float:
        return -self.mass * self.omega * R + (self.l + 1) / R if self.omega > 0 else -1e300

    def tail_moments(self, energy: float, R: float) -> tuple[float, float]:
        return 0.0, 0.0  # the box reaches 8 oscillator lengths past the turning point

    def survey_window(self, keep: int, margin: float) -> tuple[float, float]:
        """(energy, radius) of a box holding the lowest ``keep`` levels (the oscillator's own)."""
        omega, mass = self.omega, self.mass
        e_top = omega * (2 * keep + self.l + 1.5)
        return e_top, math.sqrt(2 * e_top / (mass * omega**2)) + 8.0 / math.sqrt(mass * omega)

    def box(self, energy: float) -> float:
        """Outer radius for a level: its turning point plus 8 oscillator lengths."""
        omega, mass = self.omega, self.mass
        r_t = math.sqrt(max(2 * energy, 0.0) / (mass * omega**2)) + 1.0 / math.sqrt(mass * omega)
        return r_t + 8.0 / math.sqrt(mass * omega)


def exterior_for(kind: str, l: int, mass: float, charge: float = 0.0, omega: float = 0.0):
    """The exterior solution of a tail ``kind`` (``"short"``, ``"coulomb"``, ``"confining"``)."""
    if kind == "coulomb":
        return CoulombTail(l, mass, charge)
    if kind == "confining":
        return OscillatorTail(l, mass, omega)
    return ShortRange(l, mass)


@lru_cache(maxsize=1)
def _laguerre():
    return roots_laguerre(60)
