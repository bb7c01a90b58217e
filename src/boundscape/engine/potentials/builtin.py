"""The built-in analytic families, each one class (see :mod:`.family`): its formula, stated once,
and the answers that differ from the screened-Coulomb defaults.

Formulas are written with NumPy's ufuncs on one radius: numba compiles them for the solver, and
NumPy evaluates the analytic ones at complex r (see :mod:`.family`).
"""

from __future__ import annotations

import math

import numpy as np

from .family import Family, register

__all__ = ["Coulomb", "Yukawa", "ExponentialCosineScreenedCoulomb", "Hulthen", "SquareWell", "Harmonic"]


class ScreenedCoulomb(Family):
    """The families whose λ → ∞ limit is −Z/r (V·r → −Z as r/λ → 0)."""

    def unscreened(self, pot):
        from .cell_potential import Potential

        return Potential("coulomb", pot.strength, math.inf, pot.mass)


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
class SquareWell(Family):
    name, formula_text = "square_well", "-Z for r<λ, 0 outside"
    display_name = "square well"
    strength_meaning, length_meaning = "depth (hartree)", "radius λ (bohr)"
    strength_long_name, strength_dimension, length_long_name = "well depth", "energy", "radius of the well"

    @staticmethod
    def formula(r, p, x, c, continued):
        # r = λ belongs to the inside: the box closes there with the exterior solution; past it
        # ``continued`` asks for the interior formula (the solver's ghost nodes)
        return 0.0 - p[0] * (continued | (r <= p[1]))

    def support(self, pot):
        return float(pot.screening_length)

    def jumps_at_support(self, pot):
        return True

    def energy_scale(self, pot):
        return pot.strength

    def length_scale(self, pot):
        return min(pot.screening_length, 1.0 / math.sqrt(2 * pot.mass * pot.strength))

    def critical_length_start(self, strength, mass, params):
        return 1.0 / math.sqrt(2 * mass * strength)

    def critical_strength_start(self, screening_length, mass, params):
        return 1.0 / (2 * mass * screening_length * screening_length)


@register
class Harmonic(Family):
    name, formula_text = "harmonic", "½ μ ω² r²"
    display_name = "harmonic oscillator"
    strength_meaning = "ω (hartree/ħ)"
    strength_long_name, strength_dimension = "oscillator angular frequency", "angular_frequency"

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
