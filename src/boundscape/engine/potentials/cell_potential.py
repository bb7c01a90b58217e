"""One potential: a family with its parameters, and the one function that builds it from input."""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from ...checks import positive
from .family import Family, family_info

__all__ = ["Potential", "potential", "potential_from_spec", "SPEC_KEYS"]

# Keys of a sweep's engine settings that are not a family's own parameters.
SPEC_KEYS = ("family", "mass", "engine", "resonances")


@dataclass(frozen=True)
class Potential:
    """One potential: family, strength and screening length (atomic units), the reduced mass μ
    (electron masses) and the family's own parameters as sorted (name, value) pairs.

    Every question about it is its family's (:attr:`info`); build one with :func:`potential`."""

    family: str
    strength: float
    screening_length: float
    mass: float = 1.0
    own: tuple = ()

    @property
    def info(self) -> Family:
        return family_info(self.family)

    @cached_property
    def params(self) -> dict:
        """The family's own parameters by name."""
        return dict(self.own)

    @cached_property
    def kernel_inputs(self):
        """(p, x, c) of the family's compiled formula for this potential."""
        return self.info.kernel_inputs(self)

    def __call__(self, r):
        """V(r) in hartree: the family's formula, evaluated by NumPy where it is one expression
        (the analytic families), else through its compiled kernel."""
        r = np.asarray(r, dtype=float)
        if self.info.analytic:
            return self.info.formula(r, *self.kernel_inputs, False)
        from .kernels import evaluate

        values = evaluate(self.info.kernel, np.ascontiguousarray(r.ravel()), *self.kernel_inputs, False)
        return values.reshape(r.shape) if r.ndim else float(values[0])

    def complex_values(self, r):
        """V at complex r, for a family whose formula continues analytically; else None."""
        if not self.info.analytic:
            return None
        with np.errstate(all="ignore"):
            return np.asarray(self.info.formula(np.asarray(r), *self.kernel_inputs, False))

    @property
    def uses_screening_length(self) -> bool:
        return self.info.uses_screening_length(self.params)

    @property
    def tail(self) -> str:
        return self.info.tail(self)

    @property
    def coulomb_charge(self) -> float:
        """Z of a −Z/r tail (0 if the potential is short-ranged)."""
        return self.info.coulomb_charge(self)

    @property
    def support(self) -> float:
        """Radius beyond which V is zero or negligible (inf for Coulomb and harmonic tails)."""
        return self.info.support(self)

    @property
    def jumps_at_support(self) -> bool:
        return self.info.jumps_at_support(self) and math.isfinite(self.support)

    def reaches_support(self, R: float) -> bool:
        """Whether a box ending at R reaches the end of the potential's range, where the exterior
        solution closes it exactly (and the part beyond R counts)."""
        return math.isfinite(self.support) and R >= self.support * (1 - 1e-12)

    @property
    def energy_scale(self) -> float:
        """A typical binding energy (hartree), for tolerances: Z²μ, the depth, or ω."""
        return self.info.energy_scale(self)

    @property
    def length_scale(self) -> float:
        """A radius that characterises the bound states (bohr): sets where the grid starts."""
        return self.info.length_scale(self)

    def unscreened(self) -> "Potential | None":
        """The potential without screening (see :meth:`.family.Family.unscreened`)."""
        return self.info.unscreened(self)

    def with_(self, **changes) -> "Potential":
        """The same potential with other strength, screening length or mass."""
        fields = {"strength": self.strength, "screening_length": self.screening_length, "mass": self.mass, **changes}
        return Potential(self.family, float(fields["strength"]), float(fields["screening_length"]),
                         float(fields["mass"]), self.own)


def potential(family: str, strength: float | None = None, screening_length: float | None = None,
              mass: float = 1.0, **params) -> Potential:
    """Build a :class:`Potential`, checking its parameters.

    Parameters
    ----------
    family : str
        One of :data:`boundscape.FAMILIES` (``coulomb, yukawa, ecsc, hulthen, square_well,
        harmonic, tabulated``, …).
    strength : float
        Z (charge number), the depth (square well, hartree) or ω (harmonic); for a table a scale
        factor (default 1 for a table, required otherwise).
    screening_length : float
        λ in bohr (the radius for the square well); ignored by families without one (``coulomb``,
        ``harmonic``, an unscreened table).
    mass : float
        Reduced mass μ in electron masses.
    **params
        The family's own parameters (``bs.family_parameters(family)`` lists them), e.g. for
        ``tabulated``: ``table`` (a CSV/NetCDF path or an (r, V) pair, bohr and hartree),
        ``screened`` (multiply the table by exp(−r/λ)) and ``coulomb_tail`` (a declared −Z/r
        tail beyond the table).
    """
    info = family_info(family)
    where = f" for family {family!r}"
    mass = positive("mass", mass, where=where)
    own = info.prepare(params, where)
    if strength is None:
        if info.default_strength is None:
            positive("strength", strength, where=where)  # raises: the strength is required
        strength = info.default_strength
    strength = positive("strength", strength, where=where)
    if info.uses_screening_length(own):
        if screening_length is None:
            from ...errors import InputError

            raise InputError(f"family {family!r} needs a screening_length (bohr)")
        lam = positive("screening_length", screening_length, where=where)
    else:
        lam = math.inf
    return _representable(Potential(family, strength, lam, mass, tuple(sorted(own.items()))))


# Scales a double can carry through the solver (squares, exponentials of ratios): far beyond any
# physical problem in any unit system, and far inside what overflows (common practice, no source).
_SCALE_RANGE = (1e-100, 1e100)


def _representable(pot: Potential) -> Potential:
    """``pot`` if its energy and length scales (and range) are numbers the solver can carry."""
    from ...errors import InputError

    lo, hi = _SCALE_RANGE
    try:
        scales = {"energy scale": pot.energy_scale, "length scale": pot.length_scale}
        support = pot.support
    except (OverflowError, ZeroDivisionError):
        scales, support = {"energy scale": math.inf}, math.inf
    for name, value in scales.items():
        if not (lo <= abs(value) <= hi):
            raise InputError(f"{pot.family} at strength {pot.strength:g}, screening length {pot.screening_length:g}, "
                             f"mass {pot.mass:g}: its {name} ({value:.3g}) is beyond what double precision carries "
                             f"through the solver ({lo:g} to {hi:g}); state the problem in units where its numbers "
                             "are of order one")
    if pot.tail == "short" and not (math.isfinite(support) and support <= hi):
        raise InputError(f"{pot.family} at screening length {pot.screening_length:g}: its range ({support:.3g} bohr) is "
                         "beyond what the solver can grid; use a shorter screening length or the unscreened family")
    return pot


def potential_from_spec(spec: dict, strength: float, screening_length: float | None) -> Potential:
    """The potential of one cell: ``spec`` holds ``family``, ``mass`` and the family's own
    parameters (as a sweep's engine settings do; other keys of :data:`SPEC_KEYS` are ignored)."""
    params = {key: value for key, value in spec.items() if key in {q.name for q in family_info(spec["family"]).parameters}}
    return potential(spec["family"], strength, screening_length, spec.get("mass", 1.0), **params)
