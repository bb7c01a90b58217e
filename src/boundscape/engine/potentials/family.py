"""A potential family: one class that answers every question the engine asks about it.

A family states its formula once, as :meth:`Family.formula`, a function of one radius written
with NumPy's ufuncs so that it is at the same time

* the compiled kernel the solver calls at every node (numba compiles it, :attr:`Family.kernel`,
  on first use; it is cached on disk, see :mod:`..jitcache`), and
* for the families whose formula continues analytically (``analytic = True``), V at complex r
  (exterior complex scaling, :mod:`..continuum.outgoing`), evaluated by NumPy on complex arrays.

The formula's arguments are ``(r, p, x, c, continued)``: ``p`` the parameter vector of
:meth:`Family.kernel_inputs` (strength, λ, μ, then the family's own parameters), ``x`` and
``c`` a cubic spline's breakpoints and coefficients (tables; unused elsewhere) and
``continued`` whether V's interior formula is wanted past the support (where V jumps there).

Everything else the solver, the sweep and the command line ask of a family is a method here,
given the potential (or, before one exists, its parameters): whether it has a screening
length, its tail, support, scales, where critical searches start, what it becomes without
screening, and its own extra parameters (:class:`Parameter`).  Nothing outside the family
classes tests a family's name.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Callable

import numpy as np

from ...errors import InputError

__all__ = ["Family", "Parameter", "ParameterError", "FAMILIES", "family_info", "register", "TAIL_EXPONENT"]

# exp(-TAIL_EXPONENT) ~ 1e-22: beyond that many screening lengths the potential is
# negligible against any centrifugal or kinetic term we resolve (common practice, no source).
TAIL_EXPONENT = 50.0
_NO_SPLINE = (np.zeros(2), np.zeros((4, 1)))


class ParameterError(InputError):
    """A family's own parameter is unknown, missing or bad; ``parameter`` names it."""

    def __init__(self, parameter: str, message: str):
        super().__init__(message)
        self.parameter = parameter


@dataclass(frozen=True)
class Parameter:
    """A family's own parameter (beyond strength, screening length and mass).

    ``convert`` checks a value given by a user and returns it as the engine stores it (it raises
    :class:`~boundscape.InputError` naming the parameter); ``default`` is used when none is given
    (``None``: the parameter must be given).  ``numeric`` parameters enter the kernel's parameter
    vector in the order the family declares them."""

    name: str
    unit: str
    long_name: str
    default: Any = None
    convert: Callable[[str, Any], Any] | None = None
    numeric: bool = True


class Family:
    """Base class: a screened-Coulomb-like family V = Z·f(r, λ) in atomic units.

    Subclasses set the class attributes, write :meth:`formula` and override whichever of the
    questions below differ from the screened-Coulomb defaults.  ``pot`` arguments are
    :class:`~.potential.Potential`; ``params`` are a family's own parameters by name.
    """

    name = ""
    display_name = ""  # as figures and titles name it
    formula_text = ""
    one_scale = False  # E(Z, λ, μ) = Z²μ·E(1, Zμλ, 1) exactly: V = Z·f(r/λ)/r
    analytic = False  # the formula continues analytically to complex r (NumPy on complex arrays)
    parameters: tuple[Parameter, ...] = ()
    default_strength: float | None = None  # a strength the command line may assume
    strength_meaning = "Z (charge number, atomic units)"
    length_meaning = "screening length λ (bohr)"
    # How a cube names the axes: long names, and the strength's dimension ("1", "energy",
    # "angular_frequency").
    strength_long_name = "charge number Z of the screened Coulomb potential"
    strength_dimension = "1"
    # How a formula names the strength (Z, V0, g), and how it is named read as a coupling
    # (energy × length, a nuclear g² of the Yukawa form -g² e^{-r/λ}/r) where its dimension is "1".
    strength_symbol = "Z"
    coupling_symbol = "g²"
    length_long_name = "screening length"
    # What the length is: "screening_length" (what a medium's density and temperature set),
    # "well_radius" (a well's size) or "ion_sphere_radius" (what a plasma's density sets).
    length_kind = "screening_length"

    # --- the formula ------------------------------------------------------------------------
    @staticmethod
    def formula(r, p, x, c, continued):
        """V(r) in hartree; ``p`` = (strength, λ, μ, own parameters...)."""
        raise NotImplementedError

    @property
    def kernel(self):
        """The compiled formula (numba ``cfunc`` of one explicit signature), built on first use."""
        compiled = self.__dict__.get("_kernel")
        if compiled is None:
            from .kernels import compile_formula  # numba only when a solver needs it

            compiled = self.__dict__["_kernel"] = compile_formula(type(self).formula)
        return compiled

    def kernel_inputs(self, pot) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(p, x, c) of ``pot`` for :meth:`formula`: C-contiguous float64 arrays."""
        lam = pot.screening_length if math.isfinite(pot.screening_length) else 1e300
        own = [float(pot.params[q.name]) for q in self.parameters if q.numeric]
        x, c = _NO_SPLINE
        return np.array([pot.strength, lam, pot.mass, *own], dtype=float), x, c

    # --- parameters -------------------------------------------------------------------------
    def prepare(self, params: dict, where: str = "") -> dict:
        """The family's own parameters checked, defaults filled in (raises InputError)."""
        known = {q.name: q for q in self.parameters}
        unknown = sorted(set(params) - set(known))
        if unknown:
            raise self.unknown(unknown[0], where)
        out = {}
        for q in self.parameters:
            value = params.get(q.name, q.default)
            if value is None and q.default is None and q.numeric:
                raise ParameterError(q.name, f"parameter {q.name!r} ({q.long_name}, {q.unit}) is required"
                                             f"{where or f' for family {self.name!r}'}")
            try:
                out[q.name] = q.convert(q.name, value) if (q.convert is not None and value is not None) else value
            except InputError as exc:
                raise ParameterError(q.name, f"{exc}{where}") from None
        return out

    def unknown(self, name: str, where: str = "") -> ParameterError:
        """The error for a parameter this family does not take."""
        known = [q.name for q in self.parameters]
        takes = ", ".join(known) if known else "no parameters of its own"
        return ParameterError(name, f"family {self.name!r} has no parameter {name!r}{where}; it takes {takes}")

    def uses_screening_length(self, params: dict) -> bool:
        """Whether λ is a parameter at all for these parameters."""
        return True

    def screened_parameters(self, params: dict) -> dict:
        """The parameters under which λ screens (a critical screening length needs that)."""
        return params

    # --- the solver's questions -------------------------------------------------------------
    def tail(self, pot) -> str:
        """``"short"`` (faster than 1/r²), ``"coulomb"`` (−Z/r) or ``"confining"``."""
        return "short"

    def coulomb_charge(self, pot) -> float:
        """Z of a −Z/r tail (0 if the potential is short-ranged)."""
        return pot.strength if self.tail(pot) == "coulomb" else 0.0

    def tail_parameter(self, pot) -> float:
        """The exterior solution's parameter: the Coulomb charge, ω, or 0."""
        return self.coulomb_charge(pot)

    def support(self, pot) -> float:
        """A radius beyond which V is zero or below ~e⁻⁵⁰ of its scale (inf for long tails)."""
        return TAIL_EXPONENT * pot.screening_length

    def jumps_at_support(self, pot) -> bool:
        """Whether V or V″ jumps at the support: a level's box then always ends there, where
        the exterior solution closes it exactly (no Richardson error series across the jump)."""
        return False

    def energy_scale(self, pot) -> float:
        """A typical binding energy (hartree), for tolerances: Z²μ."""
        return pot.strength**2 * pot.mass

    def length_scale(self, pot) -> float:
        """A radius that characterises the bound states (bohr): sets where the grid starts."""
        return 1.0 / (pot.mass * pot.strength)

    def critical_length_start(self, strength: float, mass: float, params: dict) -> float:
        """Where the search for a critical screening length starts (bohr)."""
        return 1.0 / (strength * mass)

    def critical_strength_start(self, screening_length: float, mass: float, params: dict) -> float:
        """Where the search for a critical strength starts."""
        return 1.0 / (screening_length * mass)

    def unscreened(self, pot):
        """The potential without screening (λ → ∞), against which a line's shift is measured;
        ``pot`` itself if it has no screening length; None where the limit binds nothing."""
        return None


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
