"""Central-potential families: each a small class that owns its behaviour, in one registry.

A family knows its formula and the facts the solver needs about it:

* ``uses_screening_length`` -- whether λ is a parameter at all;
* ``one_scale`` -- whether E(Z, λ, μ) = Z²μ·E(1, Zμλ, 1) holds exactly
  (true for potentials of the form Z·f(r/λ)/r, i.e. Coulomb times a function of r/λ);
* its tail (``"short"``: falls faster than 1/r²; ``"coulomb"``: −Z/r; ``"confining"``) and
  from it the exterior solution that closes a box (:mod:`.exterior`);
* ``support`` -- a radius beyond which V is negligible against the centrifugal term (or
  exactly zero); the zero-energy solution is matched to A r^{l+1} + B r^{-l} there;
* ``breakpoints`` -- radii where V is not smooth (only the support may be one: the solver's box
  then ends there, and ``continued`` gives V's interior formula just past it);
* its energy and length scales (tolerances, where a grid starts) and the starting points of
  the critical-parameter searches.

Adding a family is one subclass here, a :func:`register` call and its tests.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InputError
from .exterior import exterior_for

__all__ = ["Family", "FAMILIES", "family_info", "register", "TAIL_EXPONENT"]

# exp(-TAIL_EXPONENT) ~ 1e-22: beyond that many screening lengths the potential is
# negligible against any centrifugal or kinetic term we resolve (common practice, no source).
TAIL_EXPONENT = 50.0


class Family:
    """Base class: a screened-Coulomb-like family V = Z·f(r, λ) in atomic units.

    Subclasses set the class attributes and override :meth:`evaluate` and whichever of the
    scale, support and search methods differ.  ``pot`` arguments are :class:`~.potential.Potential`.
    """

    name = ""
    formula = ""
    uses_screening_length = True
    one_scale = False
    tail = "short"
    strength_meaning = "Z (charge number, atomic units)"
    length_meaning = "screening length λ (bohr)"
    # How a cube names the axes: long names, and the strength's dimension ("1", "energy",
    # "angular_frequency").
    strength_long_name = "charge number Z of the screened Coulomb potential"
    strength_dimension = "1"
    length_long_name = "screening length"

    def evaluate(self, r, Z, lam):
        """V(r) in hartree at unit mass."""
        raise NotImplementedError

    def value(self, pot, r):
        """V(r) in hartree of the potential ``pot``."""
        return self.evaluate(r, pot.strength, pot.screening_length)

    def continued(self, pot, r):
        """V's interior formula continued past the support (hartree): where the solver needs V
        just beyond the box it closes at the support.  Equal to :meth:`value` unless V jumps there."""
        return self.value(pot, r)

    def tail_of(self, pot) -> str:
        return self.tail

    def coulomb_charge(self, pot) -> float:
        """Z of a −Z/r tail (0 if the potential is short-ranged)."""
        return pot.strength if self.tail_of(pot) == "coulomb" else 0.0

    def support(self, pot) -> float:
        return TAIL_EXPONENT * pot.screening_length

    def breakpoints(self, pot) -> tuple[float, ...]:
        return ()

    def energy_scale(self, pot) -> float:
        """A typical binding energy (hartree), for tolerances: Z²μ."""
        return pot.strength**2 * pot.mass

    def length_scale(self, pot) -> float:
        """A radius that characterises the bound states (bohr): sets where the grid starts."""
        return 1.0 / (pot.mass * pot.strength)

    def exterior(self, pot, l: int):
        """The closed-form solution beyond the box, for angular momentum ``l``."""
        return exterior_for(self.tail_of(pot), l, pot.mass, self.coulomb_charge(pot), pot.strength)

    def critical_length_start(self, strength: float, mass: float) -> float:
        """Where the search for a critical screening length starts (bohr)."""
        return 1.0 / (strength * mass)

    def critical_strength_start(self, screening_length: float, mass: float) -> float:
        """Where the search for a critical strength starts."""
        return 1.0 / (screening_length * mass)


FAMILIES: dict[str, Family] = {}


def register(cls: type[Family]) -> type[Family]:
    """Class decorator: put one instance of the family into :data:`FAMILIES`."""
    FAMILIES[cls.name] = cls()
    return cls


def family_info(name: str) -> Family:
    try:
        return FAMILIES[name]
    except KeyError:
        known = ", ".join(sorted(FAMILIES))
        raise InputError(f"unknown potential family {name!r}; known families: {known}") from None


@register
class Coulomb(Family):
    name, formula = "coulomb", "-Z/r"
    uses_screening_length, one_scale, tail = False, True, "coulomb"

    def evaluate(self, r, Z, lam):
        return -Z / r

    def support(self, pot):
        return math.inf


@register
class Yukawa(Family):
    name, formula, one_scale = "yukawa", "-Z exp(-r/λ)/r", True

    def evaluate(self, r, Z, lam):
        return -Z * np.exp(-r / lam) / r


@register
class ExponentialCosineScreenedCoulomb(Family):
    name, formula, one_scale = "ecsc", "-Z exp(-r/λ) cos(r/λ)/r", True

    def evaluate(self, r, Z, lam):
        x = r / lam
        return -Z * np.exp(-x) * np.cos(x) / r


@register
class Hulthen(Family):
    name, formula, one_scale = "hulthen", "-(Z/λ) exp(-r/λ)/(1-exp(-r/λ))", True

    def evaluate(self, r, Z, lam):
        x = r / lam
        # -expm1(-x) keeps 1 - e^{-x} accurate at small r, where V -> -Z/r.
        return -(Z / lam) * np.exp(-x) / (-np.expm1(-x))


@register
class SquareWell(Family):
    name, formula = "square_well", "-Z for r<λ, 0 outside"
    strength_meaning, length_meaning = "depth (hartree)", "radius λ (bohr)"
    strength_long_name, strength_dimension, length_long_name = "well depth", "energy", "radius of the well"

    def evaluate(self, r, Z, lam):
        # r = λ belongs to the inside: the box closes there with the exterior solution.
        return np.where(r <= lam, -Z, 0.0)

    def continued(self, pot, r):
        return np.full_like(np.asarray(r, dtype=float), -pot.strength)

    def support(self, pot):
        return float(pot.screening_length)

    def breakpoints(self, pot):
        return (pot.screening_length,)

    def energy_scale(self, pot):
        return pot.strength

    def length_scale(self, pot):
        return min(pot.screening_length, 1.0 / math.sqrt(2 * pot.mass * pot.strength))

    def critical_length_start(self, strength, mass):
        return 1.0 / math.sqrt(2 * mass * strength)

    def critical_strength_start(self, screening_length, mass):
        return 1.0 / (2 * mass * screening_length * screening_length)


@register
class Harmonic(Family):
    name, formula = "harmonic", "½ μ ω² r²"
    uses_screening_length, tail = False, "confining"
    strength_meaning = "ω (hartree/ħ)"
    strength_long_name, strength_dimension = "oscillator angular frequency", "angular_frequency"

    def evaluate(self, r, Z, lam):
        # strength = ω; the mass enters as ½ μ ω² r², so it is applied in value().
        return 0.5 * Z * Z * r * r

    def value(self, pot, r):
        return pot.mass * self.evaluate(r, pot.strength, pot.screening_length)

    def support(self, pot):
        return math.inf

    def energy_scale(self, pot):
        return pot.strength

    def length_scale(self, pot):
        return 1.0 / math.sqrt(pot.mass * pot.strength)


@register
class Tabulated(Family):
    """strength × V_table(r), optionally screened by exp(−r/λ); the table is the potential's."""

    name, formula = "tabulated", "strength × V_table(r) [× exp(-r/λ)]"
    strength_meaning = "scale factor on the table"
    length_meaning = "screening length λ (bohr), if screened"
    strength_long_name = "scale factor on the tabulated potential"

    def value(self, pot, r):
        v = pot.strength * pot.table(r)
        if pot.screened:
            v = v * np.exp(-r / pot.screening_length)
        return v

    def tail_of(self, pot):
        return "coulomb" if (pot.table.coulomb_charge > 0 and not pot.screened) else "short"

    def coulomb_charge(self, pot):
        return pot.strength * pot.table.coulomb_charge if self.tail_of(pot) == "coulomb" else 0.0

    def support(self, pot):
        end = float(pot.table.r[-1])
        if self.tail_of(pot) == "coulomb":
            return math.inf
        if pot.screened:
            if pot.table.coulomb_charge > 0:  # a screened Coulomb tail runs past the table
                return TAIL_EXPONENT * pot.screening_length
            return min(end, TAIL_EXPONENT * pot.screening_length)
        return end

    def energy_scale(self, pot):
        return max(abs(pot.strength) * pot.mass, 1e-300)
