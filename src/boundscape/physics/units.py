"""Atomic units and the physical units of each trade, from :mod:`scipy.constants` only.

The engine works in atomic units (hartree, bohr, electron masses).  A *unit system* here is a
choice of a length unit and a mass unit; its energy unit is then ħ²/(m·L²), so the radial
equation keeps the same form in every system and numbers computed in one can be read in another:

* atomic units: L = a₀, m = mₑ, energy unit = hartree;
* effective atomic units of a semiconductor: L = a* = (ε_r/μ*) a₀, m = μ* mₑ,
  energy unit = (μ*/ε_r²) hartree = 2 Ry*;
* nuclear units: L = b fm, m = μ (MeV/c²), energy unit = (ħc)²/(μc² b²).

A Coulomb-like coupling V = −Z·(energy unit)·(length unit)/r carries the strength Z, so
``coupling_unit`` = energy unit × length unit (e²/4πε₀ in atomic units).
"""

from __future__ import annotations

from dataclasses import dataclass

from scipy import constants as sc
from scipy.constants import physical_constants as _pc

from ..checks import positive
from ..errors import InputError

__all__ = [
    "HARTREE_J", "HARTREE_EV", "BOHR_M", "ELECTRON_MASS_KG", "HBAR_C_MEV_FM",
    "HARTREE_UDUNITS", "BOHR_UDUNITS", "UNITS", "convert", "quantity_of", "udunits_scaled",
    "UnitSystem", "ATOMIC", "effective_atomic_units", "nuclear_units",
]

HARTREE_J = _pc["Hartree energy"][0]
HARTREE_EV = _pc["Hartree energy in eV"][0]
BOHR_M = _pc["Bohr radius"][0]
ELECTRON_MASS_KG = sc.m_e
HBAR_C_MEV_FM = _pc["reduced Planck constant times c in MeV fm"][0]
MEV_J = sc.mega * sc.electron_volt
FM_M = sc.femto


def udunits_scaled(factor: float, base: str) -> str:
    """A UDUNITS-2 scaled unit string such as ``"5.29177210544e-11 m"`` (repr keeps every digit)."""
    return f"{factor!r} {base}"


HARTREE_UDUNITS = udunits_scaled(HARTREE_J, "J")
BOHR_UDUNITS = udunits_scaled(BOHR_M, "m")

# name -> (quantity, factor to SI, UDUNITS-2 string of the unit)
UNITS: dict[str, tuple[str, float, str]] = {
    # energy (J)
    "hartree": ("energy", HARTREE_J, HARTREE_UDUNITS),
    "Ry": ("energy", _pc["Rydberg constant times hc in J"][0], udunits_scaled(_pc["Rydberg constant times hc in J"][0], "J")),
    "eV": ("energy", sc.electron_volt, "eV"),
    "meV": ("energy", sc.milli * sc.electron_volt, "meV"),
    "keV": ("energy", sc.kilo * sc.electron_volt, "keV"),
    "MeV": ("energy", MEV_J, "MeV"),
    "J": ("energy", 1.0, "J"),
    # length (m)
    "bohr": ("length", BOHR_M, BOHR_UDUNITS),
    "m": ("length", 1.0, "m"),
    "cm": ("length", sc.centi, "cm"),
    "um": ("length", sc.micro, "um"),
    "nm": ("length", sc.nano, "nm"),
    "angstrom": ("length", sc.angstrom, udunits_scaled(sc.angstrom, "m")),
    "fm": ("length", FM_M, udunits_scaled(FM_M, "m")),
    # number density (m^-3)
    "m-3": ("density", 1.0, "m-3"),
    "cm-3": ("density", sc.centi ** -3, "cm-3"),
    "bohr-3": ("density", BOHR_M ** -3, udunits_scaled(BOHR_M ** -3, "m-3")),
    # temperature (K); eV as k_B T
    "K": ("temperature", 1.0, "K"),
    "eV_temperature": ("temperature", sc.electron_volt / sc.k, udunits_scaled(sc.electron_volt / sc.k, "K")),
    # mass (kg); MeV as MeV/c²
    "me": ("mass", ELECTRON_MASS_KG, udunits_scaled(ELECTRON_MASS_KG, "kg")),
    "kg": ("mass", 1.0, "kg"),
    "u": ("mass", _pc["atomic mass constant"][0], udunits_scaled(_pc["atomic mass constant"][0], "kg")),
    "MeV/c2": ("mass", MEV_J / sc.c ** 2, udunits_scaled(MEV_J / sc.c ** 2, "kg")),
}

# Spellings people type at a prompt.
_ALIASES = {"Ha": "hartree", "Eh": "hartree", "a0": "bohr", "A": "angstrom", "Å": "angstrom",
            "m^-3": "m-3", "cm^-3": "cm-3", "MeV/c^2": "MeV/c2", "m_e": "me", "µm": "um", "μm": "um"}


def _lookup(unit: str) -> tuple[str, float, str]:
    name = _ALIASES.get(unit, unit)
    try:
        return UNITS[name]
    except KeyError:
        raise InputError(f"unknown unit {unit!r}; known units: {', '.join(UNITS)}") from None


def quantity_of(unit: str) -> str:
    """The physical quantity (energy, length, density, temperature, mass) a unit measures."""
    return _lookup(unit)[0]


def convert(value, from_unit: str, to_unit: str):
    """Convert ``value`` (scalar or array) between two units of the same quantity.

    Parameters
    ----------
    value : float or array_like
    from_unit, to_unit : str
        Names from :data:`UNITS` (``hartree, eV, MeV, bohr, nm, fm, cm-3, K, me, MeV/c2`` …).
        Temperatures in energy units are spelled ``eV_temperature`` (T = E/k_B).

    Returns
    -------
    float or ndarray
    """
    q_from, f_from, _ = _lookup(from_unit)
    q_to, f_to, _ = _lookup(to_unit)
    if q_from != q_to:
        raise InputError(f"cannot convert {q_from} ({from_unit}) to {q_to} ({to_unit})")
    return value * (f_from / f_to)


@dataclass(frozen=True)
class UnitSystem:
    """Units in which the engine's dimensionless radial equation is read.

    Attributes
    ----------
    name : str
    length_m : float
        Length unit in metres.
    mass_kg : float
        Mass unit in kilograms (the engine's ``mass`` is in multiples of it).
    """

    name: str
    length_m: float
    mass_kg: float

    @property
    def _scale(self) -> float:
        # ħ²/(m L²) = E_h (m_e/m)(a₀/L)²: scaled from the one CODATA hartree, so that atomic
        # units give E_h to the last digit (ħ²/(m_e a₀²) computed afresh differs in the 12th)
        return (ELECTRON_MASS_KG / self.mass_kg) * (BOHR_M / self.length_m) ** 2

    @property
    def energy_J(self) -> float:
        """Energy unit ħ²/(m L²) in joules, as E_h (m_e/m)(a₀/L)²."""
        return HARTREE_J * self._scale

    @property
    def energy_eV(self) -> float:
        """Energy unit ħ²/(m L²) in eV, as E_h[eV] (m_e/m)(a₀/L)²."""
        return HARTREE_EV * self._scale

    @property
    def coupling_J_m(self) -> float:
        """Unit of a Coulomb-like coupling Z (V = −Z·coupling/r), in J·m."""
        return self.energy_J * self.length_m

    def length_udunits(self) -> str:
        return udunits_scaled(self.length_m, "m")

    def energy_udunits(self) -> str:
        return udunits_scaled(self.energy_J, "J")


ATOMIC = UnitSystem("atomic", BOHR_M, ELECTRON_MASS_KG)


def effective_atomic_units(effective_mass: float, permittivity: float) -> UnitSystem:
    """Effective atomic units of a hydrogenic donor: a* = (ε_r/μ*) a₀, energy unit (μ*/ε_r²) hartree.

    Parameters
    ----------
    effective_mass : float
        μ*, in electron masses.
    permittivity : float
        Relative static permittivity ε_r.

    References
    ----------
    Yu & Cardona, *Fundamentals of Semiconductors*, §4.2 (hydrogenic donors).
    """
    positive("effective_mass", effective_mass)
    positive("permittivity", permittivity)
    return UnitSystem("effective atomic", BOHR_M * permittivity / effective_mass, ELECTRON_MASS_KG * effective_mass)


def nuclear_units(reduced_mass_MeV: float, length_fm: float = 1.0) -> UnitSystem:
    """Nuclear units: lengths in ``length_fm`` fm, masses in multiples of μ (MeV/c²).

    The energy unit is (ħc)²/(μc² b²) and the coupling unit (ħc)²/(μc² b), in MeV·fm when
    converted with :func:`convert`.
    """
    positive("reduced_mass_MeV", reduced_mass_MeV)
    positive("length_fm", length_fm)
    return UnitSystem("nuclear", length_fm * FM_M, reduced_mass_MeV * MEV_J / sc.c ** 2)
