"""The built-in analytic families, each one class (see :mod:`.family`): its formula, stated once,
and the answers that differ from the screened-Coulomb defaults.

Formulas are written with NumPy's ufuncs on one radius: numba compiles them for the solver, and
NumPy evaluates the analytic ones at complex r (see :mod:`.family`).
"""

from __future__ import annotations

import math

import numpy as np

from .family import Family, register

__all__ = ["Coulomb", "Yukawa", "ExponentialCosineScreenedCoulomb", "Hulthen", "IonSphere", "SquareWell", "Harmonic"]


class ScreenedCoulomb(Family):
    """The families whose λ → ∞ limit is −Z/r (V·r → −Z as r/λ → 0)."""

    def unscreened(self, pot):
        from .cell_potential import Potential

        return Potential("coulomb", pot.strength, math.inf, pot.mass)


class DepthWell(Family):
    """The wells of depth V0 (strength) and radius R (the length): their scales are the depth and
    the smaller of R and the decay length 1/√(2μV0) of a level at the well's bottom."""

    def energy_scale(self, pot):
        return pot.strength

    def length_scale(self, pot):
        return min(pot.screening_length, 1.0 / math.sqrt(2 * pot.mass * pot.strength))

    def critical_length_start(self, strength, mass, params):
        return 1.0 / math.sqrt(2 * mass * strength)


@register
class Coulomb(Family):
    name, formula_text = "coulomb", "-Z/r"
    display_name = "Coulomb"
    one_scale, analytic = True, True

    @staticmethod
    def formula(r, p, x, c, continued):
        return -p[0] / r

    def uses_screening_length(self, params):
        return False

    def tail(self, pot):
        return "coulomb"

    def support(self, pot):
        return math.inf

    def unscreened(self, pot):
        return pot


@register
class Yukawa(ScreenedCoulomb):
    name, formula_text = "yukawa", "-Z exp(-r/λ)/r"
    display_name = "Yukawa"
    one_scale, analytic = True, True

    @staticmethod
    def formula(r, p, x, c, continued):
        return -p[0] * np.exp(-r / p[1]) / r


@register
class ExponentialCosineScreenedCoulomb(ScreenedCoulomb):
    name, formula_text = "ecsc", "-Z exp(-r/λ) cos(r/λ)/r"
    display_name = "exponential-cosine-screened Coulomb"
    one_scale, analytic = True, True

    @staticmethod
    def formula(r, p, x, c, continued):
        t = r / p[1]
        return -p[0] * np.exp(-t) * np.cos(t) / r


@register
class Hulthen(ScreenedCoulomb):
    name, formula_text = "hulthen", "-(Z/λ) exp(-r/λ)/(1-exp(-r/λ))"
    display_name = "Hulthén"
    one_scale, analytic = True, True

    @staticmethod
    def formula(r, p, x, c, continued):
        t = r / p[1]
        # -expm1(-t) keeps 1 - e^{-t} accurate at small r, where V -> -Z/r.
        return -(p[0] / p[1]) * np.exp(-t) / (-np.expm1(-t))


@register
class IonSphere(ScreenedCoulomb):
    """A nucleus of charge Z neutralised by a uniform cloud of Z electrons inside the ion-sphere
    radius R (the ion-sphere model of dense plasmas; Salpeter, Aust. J. Phys. 7, 373 (1954),
    reference from memory):

        V(r) = −Z/r + Z(3 − r²/R²)/(2R) = −Z (R − r)²(r + 2R)/(2rR³)   for r < R,   0 beyond

    (the second term is the potential inside a uniformly charged sphere, from Gauss's law:
    common practice).  strength = Z, screening_length = R.  One-scale, V = Z·f(r/R)/r.  V and V′
    vanish at R and V″ jumps there, from −3Z/R³ to 0; the factored form keeps V's digits near R.

    Past R, ``continued`` (the solver's ghost nodes beyond a box that ends at R) gives the
    interior polynomial: V is then smooth across the box's end, as the Richardson error series
    assumes, while the exterior solution closes the box exactly at R.  So no box has to end at R
    (``jumps_at_support`` stays false: a deep level's box ends well inside).
    """

    name, formula_text = "ion_sphere", "-Z/r + Z(3 - r²/R²)/(2R) for r<R, 0 outside"
    display_name = "ion sphere"
    one_scale = True
    strength_meaning, length_meaning = "Z (nuclear charge number)", "ion-sphere radius R (bohr)"
    strength_long_name = "charge number Z of the nucleus in its ion sphere"
    length_long_name = "ion-sphere radius"
    length_kind = "ion_sphere_radius"

    @staticmethod
    def formula(r, p, x, c, continued):
        # p = (Z, R, μ)
        R = p[1]
        d = R - r
        return 0.0 - p[0] * d * d * (r + 2.0 * R) / (2.0 * r * R * R * R) * (continued | (r < R))

    def support(self, pot):
        return float(pot.screening_length)


@register
class SquareWell(DepthWell):
    name, formula_text = "square_well", "-Z for r<λ, 0 outside"
    display_name = "square well"
    strength_meaning, length_meaning = "depth (hartree)", "radius λ (bohr)"
    strength_long_name, strength_dimension, length_long_name = "well depth", "energy", "radius of the well"
    strength_symbol = "V0"
    length_kind = "well_radius"

    @staticmethod
    def formula(r, p, x, c, continued):
        # r = λ belongs to the inside: the box closes there with the exterior solution; past it
        # ``continued`` asks for the interior formula (the solver's ghost nodes)
        return 0.0 - p[0] * (continued | (r <= p[1]))

    def support(self, pot):
        return float(pot.screening_length)

    def jumps_at_support(self, pot):
        return True

    def critical_strength_start(self, screening_length, mass, params):
        return 1.0 / (2 * mass * screening_length * screening_length)


@register
class Harmonic(Family):
    name, formula_text = "harmonic", "½ μ ω² r²"
    display_name = "harmonic oscillator"
    strength_meaning = "ω (hartree/ħ)"
    strength_long_name, strength_dimension = "oscillator angular frequency", "angular_frequency"
    strength_symbol = "ω"

    @staticmethod
    def formula(r, p, x, c, continued):
        # strength = ω; the mass enters as ½ μ ω² r²
        return p[2] * 0.5 * p[0] * p[0] * r * r

    def uses_screening_length(self, params):
        return False

    def tail(self, pot):
        return "confining"

    def tail_parameter(self, pot):
        return pot.strength

    def support(self, pot):
        return math.inf

    def energy_scale(self, pot):
        return pot.strength

    def length_scale(self, pot):
        return 1.0 / math.sqrt(pot.mass * pot.strength)

    def unscreened(self, pot):
        return pot
