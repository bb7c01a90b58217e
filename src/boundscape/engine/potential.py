"""One potential: a family with its parameters, and the one function that builds it from input."""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..checks import positive
from ..errors import InputError
from .families import Family, family_info
from .tables import Table, load_table, validate_table

__all__ = ["Potential", "potential", "potential_from_spec"]


@dataclass(frozen=True)
class Potential:
    """One potential: family, parameters (atomic units) and the reduced mass μ (electron masses).

    Everything that depends on the family is the family's (:attr:`info`)."""

    family: str
    strength: float
    screening_length: float
    mass: float = 1.0
    table: Table | None = field(default=None, compare=False, repr=False)
    screened: bool = False

    @property
    def info(self) -> Family:
        return family_info(self.family)

    def __call__(self, r):
        """V(r) in hartree."""
        return self.info.value(self, np.asarray(r, dtype=float))

    @property
    def tail(self) -> str:
        return self.info.tail_of(self)

    @property
    def coulomb_charge(self) -> float:
        """Z of a −Z/r tail (0 if the potential is short-ranged)."""
        return self.info.coulomb_charge(self)

    @property
    def support(self) -> float:
        """Radius beyond which V is zero or negligible (inf for Coulomb and harmonic tails)."""
        return self.info.support(self)

    @property
    def breakpoints(self) -> tuple[float, ...]:
        return tuple(self.info.breakpoints(self))

    @property
    def energy_scale(self) -> float:
        """A typical binding energy (hartree), for tolerances: Z²μ, the depth, or ω."""
        return self.info.energy_scale(self)

    @property
    def length_scale(self) -> float:
        """A radius that characterises the bound states (bohr): sets where the grid starts."""
        return self.info.length_scale(self)

    def exterior(self, l: int):
        """The closed-form solution beyond the box (see :mod:`.exterior`)."""
        return self.info.exterior(self, l)


def potential(family: str, strength: float = 1.0, screening_length: float | None = None, mass: float = 1.0,
              *, table=None, screened: bool = False, coulomb_tail: float | None = None) -> Potential:
    """Build a :class:`Potential`, checking its parameters.

    Parameters
    ----------
    family : str
        One of ``coulomb, yukawa, ecsc, hulthen, square_well, harmonic, tabulated``.
    strength : float
        Z (charge number), the depth (square well, hartree) or ω (harmonic); for a table a scale factor.
    screening_length : float
        λ in bohr (the radius for the square well); not used by ``coulomb`` and ``harmonic``.
    mass : float
        Reduced mass μ in electron masses.
    table : path, (r, V) pair or Table, optional
        For ``tabulated``: a CSV/NetCDF path or a pair of arrays (bohr, hartree).
    screened : bool
        For ``tabulated``: multiply the table by exp(−r/λ).
    coulomb_tail : float, optional
        For ``tabulated``: declare a −Z/r tail beyond the table.
    """
    where = f" for family {family!r}"
    mass = positive("mass", mass, where=where)
    if family == "tabulated":
        if table is None:
            raise InputError("family 'tabulated' needs a table (a CSV/NetCDF path or an (r, V) pair)")
        if isinstance(table, Table):
            tab = table
        elif isinstance(table, (str, Path)):
            tab = load_table(table, coulomb_tail=coulomb_tail)
        else:
            r, v = table
            tab = validate_table(r, v, coulomb_tail=coulomb_tail)
        strength = positive("strength", strength, where=where)
        lam = positive("screening_length", screening_length, where=where) if screened else (
            float(screening_length) if screening_length is not None else math.inf)
        return Potential("tabulated", strength, lam, mass, tab, bool(screened))
    info = family_info(family)
    strength = positive("strength", strength, where=where)
    if info.uses_screening_length:
        if screening_length is None:
            raise InputError(f"family {family!r} needs a screening_length (bohr)")
        lam = positive("screening_length", screening_length, where=where)
    else:
        lam = math.inf
    return Potential(family, strength, lam, mass)


def potential_from_spec(spec: dict, strength: float, screening_length: float | None) -> Potential:
    """The potential of one cell: ``spec`` holds ``family``, ``mass`` and, for a table,
    ``table``, ``screened`` and ``coulomb_tail`` (as a sweep's engine settings do)."""
    extra = {}
    if spec["family"] == "tabulated":
        extra = {"table": spec["table"], "screened": bool(spec.get("screened", False)),
                 "coulomb_tail": spec.get("coulomb_tail")}
    return potential(spec["family"], strength, screening_length, spec.get("mass", 1.0), **extra)
