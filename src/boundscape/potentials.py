"""Central-potential families, as small pure functions of r in atomic units.

Each family is registered with the facts the solver needs about it:

* ``uses_screening_length`` -- whether λ is a parameter at all;
* ``one_scale`` -- whether E(Z, λ, μ) = Z²μ·E(1, Zμλ, 1) holds exactly
  (true for potentials of the form Z·f(r/λ)/r, i.e. Coulomb times a function of r/λ);
* ``breakpoints`` -- radii where V is not smooth (the solver puts a grid node there);
* ``support`` -- a radius beyond which V is negligible against the centrifugal term
  (or exactly zero); the zero-energy solution is matched to A r^{l+1} + B r^{-l} there;
* ``tail`` -- ``"short"`` (falls faster than 1/r²), ``"coulomb"`` (−Z/r) or
  ``"confining"`` (harmonic).

Adding a family is one function in this module plus a :func:`register` call and its tests.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

import numpy as np

from .errors import InputError

__all__ = ["Potential", "potential", "FAMILIES", "family_info", "register", "load_table"]

# exp(-TAIL_EXPONENT) ~ 1e-22: beyond that many screening lengths the potential is
# negligible against any centrifugal or kinetic term we resolve (common practice, no source).
TAIL_EXPONENT = 50.0


@dataclass(frozen=True)
class Family:
    name: str
    formula: str
    evaluate: Callable[[np.ndarray, float, float], np.ndarray]
    uses_screening_length: bool
    one_scale: bool
    tail: str  # "short", "coulomb", "confining"
    support: Callable[[float, float], float] | None  # (Z, λ) -> radius, None = infinite
    breakpoints: Callable[[float, float], tuple[float, ...]] = lambda Z, lam: ()
    strength_meaning: str = "Z (charge number, atomic units)"
    length_meaning: str = "screening length λ (bohr)"


FAMILIES: dict[str, Family] = {}


def register(family: Family) -> Family:
    FAMILIES[family.name] = family
    return family


def family_info(name: str) -> Family:
    try:
        return FAMILIES[name]
    except KeyError:
        known = ", ".join(sorted([*FAMILIES, "tabulated"]))
        raise InputError(f"unknown potential family {name!r}; known families: {known}") from None


def _coulomb(r, Z, lam):
    return -Z / r


def _yukawa(r, Z, lam):
    return -Z * np.exp(-r / lam) / r


def _ecsc(r, Z, lam):
    x = r / lam
    return -Z * np.exp(-x) * np.cos(x) / r


def _hulthen(r, Z, lam):
    x = r / lam
    # -expm1(-x) keeps 1 - e^{-x} accurate at small r, where V -> -Z/r.
    return -(Z / lam) * np.exp(-x) / (-np.expm1(-x))


def _square_well(r, Z, lam):
    # r = λ belongs to the inside: the box closes there with the exterior solution.
    return np.where(r <= lam, -Z, 0.0)


def _harmonic(r, Z, lam):
    # strength = ω; the mass enters as ½ μ ω² r², so it is applied by the Potential.
    return 0.5 * Z * Z * r * r


def _exp_support(Z, lam):
    return TAIL_EXPONENT * lam


register(Family("coulomb", "-Z/r", _coulomb, False, True, "coulomb", None))
register(Family("yukawa", "-Z exp(-r/λ)/r", _yukawa, True, True, "short", _exp_support))
register(Family("ecsc", "-Z exp(-r/λ) cos(r/λ)/r", _ecsc, True, True, "short", _exp_support))
register(Family("hulthen", "-(Z/λ) exp(-r/λ)/(1-exp(-r/λ))", _hulthen, True, True, "short", _exp_support))
register(
    Family(
        "square_well", "-Z for r<λ, 0 outside", _square_well, True, False, "short",
        lambda Z, lam: lam, breakpoints=lambda Z, lam: (lam,),
        strength_meaning="depth (hartree)", length_meaning="radius λ (bohr)",
    )
)
register(
    Family(
        "harmonic", "½ μ ω² r²", _harmonic, False, False, "confining", None,
        strength_meaning="ω (hartree/ħ)",
    )
)


@dataclass(frozen=True, eq=False)  # hashed by identity: the critical-length cache keys on it
class Table:
    """A tabulated V(r), interpolated by a cubic spline in r·V(r) (smooth where V ~ 1/r)."""

    r: np.ndarray
    v: np.ndarray
    coulomb_charge: float  # Z of a declared -Z/r tail, 0 for a short-range table
    source: str

    def __post_init__(self):
        from scipy.interpolate import CubicSpline

        object.__setattr__(self, "_spline", CubicSpline(self.r, self.r * self.v))

    def __call__(self, r):
        r = np.asarray(r, dtype=float)
        inside = r <= self.r[-1]
        out = np.empty_like(r)
        ri = np.maximum(r[inside], self.r[0])
        # Below the first point r·V is held at its first value: V ~ c/r at the origin.
        out[inside] = self._spline(ri) / r[inside]
        out[~inside] = -self.coulomb_charge / r[~inside]
        return out


def load_table(path, *, coulomb_tail: float | None = None) -> Table:
    """Read r, V(r) (bohr, hartree) from a two-column CSV or a NetCDF file with variables r and V.

    ``coulomb_tail`` declares a −Z/r tail beyond the last point (Z > 0); otherwise the table
    must fall off faster than 1/r² and is taken as zero beyond its last point.
    """
    path = Path(path)
    if not path.exists():
        raise InputError(f"potential table {str(path)!r} does not exist")
    if path.suffix in (".nc", ".nc4", ".cdf"):
        import xarray as xr

        with xr.open_dataset(path) as ds:
            if "r" not in ds or "V" not in ds:
                raise InputError(f"potential table {path}: NetCDF file needs variables 'r' and 'V'")
            r = np.asarray(ds["r"].values, dtype=float)
            v = np.asarray(ds["V"].values, dtype=float)
    else:
        try:
            data = np.loadtxt(path, delimiter=",", comments="#", ndmin=2)
        except ValueError:
            try:
                data = np.loadtxt(path, delimiter=",", comments="#", skiprows=1, ndmin=2)
            except ValueError as exc:
                raise InputError(f"potential table {path}: cannot read two numeric columns r,V ({exc})") from None
        if data.shape[1] != 2:
            raise InputError(f"potential table {path}: expected two columns r,V, found {data.shape[1]}")
        r, v = data[:, 0], data[:, 1]
    return validate_table(r, v, coulomb_tail=coulomb_tail, source=str(path))


def validate_table(r, v, *, coulomb_tail=None, source="<array>") -> Table:
    r = np.asarray(r, dtype=float)
    v = np.asarray(v, dtype=float)
    where = f"potential table {source}"
    if r.ndim != 1 or r.shape != v.shape:
        raise InputError(f"{where}: r and V must be 1-d arrays of equal length")
    if r.size < 8:
        raise InputError(f"{where}: too few points ({r.size}); at least 8 are needed")
    if not (np.all(np.isfinite(r)) and np.all(np.isfinite(v))):
        raise InputError(f"{where}: contains NaN or infinite values")
    if np.any(r <= 0):
        raise InputError(f"{where}: radii must be positive")
    dr = np.diff(r)
    if np.any(dr == 0):
        raise InputError(f"{where}: repeated radius r = {r[1:][dr == 0][0]:g}")
    if np.any(dr < 0):
        raise InputError(f"{where}: radii are not sorted ascending")
    if coulomb_tail is not None:
        if not coulomb_tail > 0:
            raise InputError(f"{where}: a declared Coulomb tail needs a positive charge")
        # The table must join the declared tail: r·V -> -Z at the last point, to 1e-3.
        end = r[-1] * v[-1]
        if abs(end + coulomb_tail) > 1e-3 * coulomb_tail:
            raise InputError(
                f"{where}: r·V at the last point is {end:g}, not the declared Coulomb tail -{coulomb_tail:g}"
            )
        charge = float(coulomb_tail)
    else:
        # A short-range table must be negligible at its end: |V| r² small against l(l+1) ~ 1.
        tail = np.abs(v[-max(3, r.size // 10):] * r[-max(3, r.size // 10):] ** 2)
        if tail[-1] > 1e-6 or not np.all(np.diff(tail) <= 1e-12 + 1e-9 * tail[:-1]) and tail[-1] > 1e-8:
            raise InputError(
                f"{where}: the tail does not fall off faster than 1/r² (|V|·r² = {tail[-1]:.3g} at the last point); "
                "extend the table or declare a Coulomb tail"
            )
        charge = 0.0
    return Table(r=r, v=v, coulomb_charge=charge, source=source)


def _positive(name, value, family):
    try:
        value = float(value)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be a number, got {value!r}") from None
    if not math.isfinite(value) or value <= 0:
        raise InputError(f"{name} must be positive and finite for family {family!r}, got {value:g}")
    return value


@dataclass(frozen=True)
class Potential:
    """One potential: family, parameters (atomic units) and the reduced mass μ (electron masses)."""

    family: str
    strength: float
    screening_length: float
    mass: float = 1.0
    table: Table | None = field(default=None, compare=False, repr=False)
    screened: bool = False

    @property
    def info(self) -> Family:
        return family_info(self.family) if self.family != "tabulated" else _TABULATED

    def __call__(self, r):
        """V(r) in hartree."""
        r = np.asarray(r, dtype=float)
        if self.family == "tabulated":
            v = self.strength * self.table(r)
            if self.screened:
                v = v * np.exp(-r / self.screening_length)
            return v
        v = self.info.evaluate(r, self.strength, self.screening_length)
        if self.family == "harmonic":
            v = self.mass * v
        return v

    @property
    def tail(self) -> str:
        if self.family == "tabulated":
            return "coulomb" if (self.table.coulomb_charge > 0 and not self.screened) else "short"
        return self.info.tail

    @property
    def coulomb_charge(self) -> float:
        """Z of a −Z/r tail (0 if the potential is short-ranged)."""
        if self.tail != "coulomb":
            return 0.0
        if self.family == "tabulated":
            return self.strength * self.table.coulomb_charge
        return self.strength

    @property
    def support(self) -> float:
        """Radius beyond which V is zero or negligible (inf for Coulomb and harmonic tails)."""
        if self.family == "tabulated":
            end = float(self.table.r[-1])
            if self.tail == "coulomb":
                return math.inf
            if self.screened:
                if self.table.coulomb_charge > 0:  # a screened Coulomb tail runs past the table
                    return TAIL_EXPONENT * self.screening_length
                return min(end, TAIL_EXPONENT * self.screening_length)
            return end
        s = self.info.support
        return math.inf if s is None else float(s(self.strength, self.screening_length))

    @property
    def breakpoints(self) -> tuple[float, ...]:
        if self.family == "tabulated":
            return ()
        return tuple(self.info.breakpoints(self.strength, self.screening_length))

    @property
    def energy_scale(self) -> float:
        """A typical binding energy (hartree), for tolerances: Z²μ, the depth, or ω."""
        if self.family == "harmonic":
            return self.strength
        if self.family == "square_well":
            return self.strength
        if self.family == "tabulated":
            return max(abs(self.strength) * self.mass, 1e-300)
        return self.strength**2 * self.mass

    @property
    def length_scale(self) -> float:
        """A radius that characterises the bound states (bohr): sets where the grid starts."""
        if self.family == "harmonic":
            return 1.0 / math.sqrt(self.mass * self.strength)
        if self.family == "square_well":
            return min(self.screening_length, 1.0 / math.sqrt(2 * self.mass * self.strength))
        if self.family == "tabulated":
            return 1.0 / (self.mass * self.strength)
        return 1.0 / (self.mass * self.strength)


_TABULATED = Family(
    "tabulated", "strength × V_table(r) [× exp(-r/λ)]", lambda r, Z, lam: None, True, False, "short", None,
    strength_meaning="scale factor on the table", length_meaning="screening length λ (bohr), if screened",
)


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
    table : path or (r, V) pair, optional
        For ``tabulated``: a CSV/NetCDF path or a pair of arrays (bohr, hartree).
    screened : bool
        For ``tabulated``: multiply the table by exp(−r/λ).
    coulomb_tail : float, optional
        For ``tabulated``: declare a −Z/r tail beyond the table.
    """
    mass = _positive("mass", mass, family)
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
        strength = _positive("strength", strength, family)
        lam = _positive("screening_length", screening_length, family) if screened else (
            float(screening_length) if screening_length is not None else math.inf)
        return Potential("tabulated", strength, lam, mass, tab, bool(screened))
    info = family_info(family)
    strength = _positive("strength", strength, family)
    if info.uses_screening_length:
        if screening_length is None:
            raise InputError(f"family {family!r} needs a screening_length (bohr)")
        lam = _positive("screening_length", screening_length, family)
    else:
        lam = math.inf
    return Potential(family, strength, lam, mass)
