"""Physical presets: plasma, semiconductor and nuclear conditions as engine parameters, and back.

Each preset says in which :class:`~boundscape.units.UnitSystem` a cube's numbers are read and how
its screening length follows from physical conditions (densities, temperatures).  The engine
itself only ever sees (strength, screening length, mass) in that system's units.

Choices stated once here:

* plasma -- atomic units; the strength is the ion charge Z; λ is the Debye length.
* semiconductor -- ``units: effective`` reads the cube in effective atomic units (strength = donor
  charge, mass 1, lengths in a*, energies in 2 Ry*); ``units: atomic`` reads it in true atomic
  units (strength = donor charge/ε_r, mass = μ*).  Both describe one problem (one-scale law).
* nuclear -- lengths in b fm, the engine's mass in multiples of μ/m (m = the cube's mass), so
  that the dimensionless product Z·m·λ equals μ g² λ/(ħc)², the one-scale variable.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np
from scipy import constants as sc

from ..checks import positive
from ..errors import InputError
from .units import (ATOMIC, BOHR_M, ELECTRON_MASS_KG, FM_M, HBAR_C_MEV_FM, MEV_J, UnitSystem,
                    effective_atomic_units, nuclear_units)

__all__ = ["Plasma", "Semiconductor", "Nuclear", "from_config", "cube_units", "screening_length_at", "loss_density",
           "PRESETS"]


@dataclass(frozen=True)
class EngineParameters:
    """Engine inputs (strength, screening length, mass) in the units of ``units``."""

    strength: float
    screening_length: float
    mass: float
    units: UnitSystem


@dataclass(frozen=True)
class Plasma:
    """Electrons screening an ion of charge Z: Debye–Hückel (Yukawa) potential.

    Parameters
    ----------
    species : {"electrons", "electrons_and_ions"}
        Who screens.  With ions, quasi-neutral ions of charge ``screening_ion_charge`` at
        temperature ``ion_temperature_ratio`` × T_e add Z_i² n_i/T_i = Z_i n_e/T_i to 1/λ_D².
    temperature_eV : float
        Reference electron temperature for the density coordinate added to a cube.
    reduced_mass : float
        Electron–ion reduced mass in electron masses (1 for an infinitely heavy ion).

    References
    ----------
    NRL Plasma Formulary (2019), p. 28: λ_D = 7.43×10² (T/eV)^{1/2} (n/cm⁻³)^{−1/2} cm;
    Chen, *Introduction to Plasma Physics*, §1.4.
    """

    species: str = "electrons"
    screening_ion_charge: float = 1.0
    ion_temperature_ratio: float = 1.0
    temperature_eV: float = 10.0
    reduced_mass: float = 1.0

    def __post_init__(self):
        if self.species not in ("electrons", "electrons_and_ions"):
            raise InputError(f"plasma species must be 'electrons' or 'electrons_and_ions', got {self.species!r}")
        for name in ("screening_ion_charge", "ion_temperature_ratio", "temperature_eV", "reduced_mass"):
            positive(f"plasma {name}", getattr(self, name))

    units = ATOMIC
    length_unit = "nm"

    def _inverse_kT(self, temperature_eV):
        # 1/(k T_e) [+ Z_i/(k T_i)], in 1/J: the per-electron weight of each screening species.
        kT = np.asarray(temperature_eV, dtype=float) * sc.electron_volt
        weight = 1.0 / kT
        if self.species == "electrons_and_ions":
            weight = weight + self.screening_ion_charge / (self.ion_temperature_ratio * kT)
        return weight

    def debye_length(self, electron_density, temperature_eV):
        """λ_D in metres for n_e in m⁻³ and T_e in eV: λ_D⁻² = (e² n_e/ε₀)·Σ weights."""
        n = positive("electron density", electron_density)
        positive("electron temperature", temperature_eV)
        return 1.0 / np.sqrt(sc.e ** 2 * n / sc.epsilon_0 * self._inverse_kT(temperature_eV))

    def density_for(self, debye_length_m, temperature_eV):
        """The electron density (m⁻³) at which λ_D equals ``debye_length_m`` at T_e (eV)."""
        lam = positive("Debye length", debye_length_m)
        return sc.epsilon_0 / (sc.e ** 2 * lam ** 2 * self._inverse_kT(temperature_eV))

    def to_engine(self, ion_charge, electron_density, temperature_eV) -> EngineParameters:
        """Engine inputs for ion charge Z in a plasma of n_e (m⁻³), T_e (eV)."""
        lam = self.debye_length(electron_density, temperature_eV) / BOHR_M
        return EngineParameters(float(positive("ion charge", ion_charge)), lam, self.reduced_mass, ATOMIC)


@dataclass(frozen=True)
class Semiconductor:
    """A hydrogenic donor, or a Wannier–Mott exciton, screened by free carriers of density n.

    Parameters
    ----------
    effective_mass, permittivity : float
        The electrons' (the screening carriers') effective mass m_e* (electron masses) and ε_r.
        For a donor the bound electron has this mass: μ* = m_e*.
    hole_mass : float, optional
        An exciton's hole mass m_h* (electron masses): the bound pair then has the two-body
        reduced mass μ* = m_e* m_h*/(m_e* + m_h*), which sets a* and Ry*; the carriers that
        screen are still electrons of mass m_e*.
    screening : {"thomas_fermi", "debye"}
        Degenerate carriers: Thomas–Fermi, q_TF² = 3e²n/(2εE_F), E_F = ħ²(3π²n)^{2/3}/(2m_e*mₑ)
        (Ashcroft & Mermin, *Solid State Physics*, ch. 17).  Non-degenerate carriers: Debye,
        λ² = ε k_B T/(n e²) (Yu & Cardona, §6.3).
    temperature_K : float
        Carrier temperature for Debye screening, and where Thomas–Fermi's degenerate-gas
        assumption (k_B T < E_F) holds.
    units : {"effective", "atomic"}
        How a cube's numbers are read (see the module docstring).

    References
    ----------
    Yu & Cardona, *Fundamentals of Semiconductors*, §4.2 (donors) and §6.3 (Wannier excitons,
    μ = m_e m_h/(m_e + m_h)).
    """

    effective_mass: float = 0.067
    permittivity: float = 12.9
    screening: str = "thomas_fermi"
    temperature_K: float = 300.0
    units_choice: str = "effective"
    hole_mass: float | None = None

    def __post_init__(self):
        if self.screening not in ("thomas_fermi", "debye"):
            raise InputError(f"semiconductor screening must be 'thomas_fermi' or 'debye', got {self.screening!r}")
        if self.units_choice not in ("effective", "atomic"):
            raise InputError(f"semiconductor units must be 'effective' or 'atomic', got {self.units_choice!r}")
        for name in ("effective_mass", "permittivity", "temperature_K"):
            positive(f"semiconductor {name}", getattr(self, name))
        if self.hole_mass is not None:
            positive("semiconductor hole_mass", self.hole_mass)

    length_unit = "nm"

    @property
    def is_exciton(self) -> bool:
        return self.hole_mass is not None

    @property
    def reduced_mass(self) -> float:
        """μ* of the bound problem: m_e* for a donor, m_e* m_h*/(m_e* + m_h*) for an exciton."""
        if self.hole_mass is None:
            return float(self.effective_mass)
        return self.effective_mass * self.hole_mass / (self.effective_mass + self.hole_mass)

    @property
    def effective(self) -> UnitSystem:
        return effective_atomic_units(self.reduced_mass, self.permittivity)

    def degenerate_density(self, temperature_K=None):
        """Carrier density (m⁻³) at which E_F = k_B T: Thomas–Fermi screening assumes n well above it.

        From E_F = ħ²(3π²n)^{2/3}/(2m_e*mₑ): n = (2m_e*mₑ k_B T)^{3/2}/(3π²ħ³)."""
        t = self.temperature_K if temperature_K is None else temperature_K
        return (2 * self.effective_mass * ELECTRON_MASS_KG * sc.k * t) ** 1.5 / (3 * math.pi ** 2 * sc.hbar ** 3)

    @property
    def units(self) -> UnitSystem:
        return self.effective if self.units_choice == "effective" else ATOMIC

    @property
    def _epsilon(self):
        return self.permittivity * sc.epsilon_0

    def screening_length(self, carrier_density):
        """Screening length (m) for a carrier density (m⁻³)."""
        n = positive("carrier density", carrier_density)
        if self.screening == "debye":
            return np.sqrt(self._epsilon * sc.k * self.temperature_K / (n * sc.e ** 2))
        fermi_energy = sc.hbar ** 2 * (3 * math.pi ** 2 * n) ** (2 / 3) / (2 * self.effective_mass * ELECTRON_MASS_KG)
        return 1.0 / np.sqrt(3 * sc.e ** 2 * n / (2 * self._epsilon * fermi_energy))

    def density_for(self, screening_length_m):
        """The carrier density (m⁻³) whose screening length is ``screening_length_m``."""
        lam = positive("screening length", screening_length_m)
        if self.screening == "debye":
            return self._epsilon * sc.k * self.temperature_K / (sc.e ** 2 * lam ** 2)
        # q² = 3 e² μ* mₑ n^{1/3} / (ε ħ² (3π²)^{2/3}), solved for n.
        cube_root = (3 * math.pi ** 2) ** (2 / 3) * self._epsilon * sc.hbar ** 2 / (
            3 * sc.e ** 2 * self.effective_mass * ELECTRON_MASS_KG * lam ** 2)
        return cube_root ** 3

    def to_engine(self, carrier_density, donor_charge=1.0, units=None) -> EngineParameters:
        """Engine inputs for a donor of charge ``donor_charge`` at a carrier density (m⁻³)."""
        units = units or self.units_choice
        lam_m = self.screening_length(carrier_density)
        if units == "effective":
            return EngineParameters(float(donor_charge), lam_m / self.effective.length_m, 1.0, self.effective)
        return EngineParameters(float(donor_charge) / self.permittivity, lam_m / BOHR_M, self.reduced_mass, ATOMIC)

    def donor_charge(self, strength):
        """The donor charge a cube's strength axis stands for."""
        return np.asarray(strength, dtype=float) * (1.0 if self.units_choice == "effective" else self.permittivity)


@dataclass(frozen=True)
class Nuclear:
    """V = −g² e^{−r/λ}/r with g² in MeV·fm, λ in fm, reduced mass μ in MeV/c².

    The engine's Z, λ, m read in :func:`~boundscape.units.nuclear_units` give
    g² = Z·(ħc)²·m/(μc²·b) and λ = λ_engine·b fm; the one-scale variable Z·m·λ is μ g² λ/(ħc)².
    """

    reduced_mass_MeV: float = 469.4591  # about half a nucleon mass, for a deuteron-like pair
    length_fm: float = 1.0

    def __post_init__(self):
        positive("nuclear reduced_mass_MeV", self.reduced_mass_MeV)
        positive("nuclear length_fm", self.length_fm)

    length_unit = "fm"

    def system(self, cube_mass: float = 1.0) -> UnitSystem:
        return nuclear_units(self.reduced_mass_MeV / cube_mass, self.length_fm)

    @property
    def units(self) -> UnitSystem:
        return self.system(1.0)

    def dimensionless(self, coupling_MeV_fm, range_fm):
        """μ g² λ/(ħc)²: the one-scale variable; 2× it is 2μg²λ/ħ²."""
        return self.reduced_mass_MeV * np.asarray(coupling_MeV_fm) * np.asarray(range_fm) / HBAR_C_MEV_FM ** 2

    def to_engine(self, coupling_MeV_fm, range_fm) -> EngineParameters:
        """Engine inputs (mass 1) for a coupling g² (MeV·fm) and range λ (fm)."""
        g2 = positive("coupling g²", coupling_MeV_fm)
        lam = positive("range λ", range_fm)
        units = self.units
        return EngineParameters(g2 * MEV_J * FM_M / units.coupling_J_m, lam * FM_M / units.length_m, 1.0, units)

    def strength_for(self, coupling_MeV_fm):
        """The engine strength (mass 1) of a coupling g² in MeV·fm: g²·μc²·b/(ħc)²."""
        g2 = positive("coupling g²", coupling_MeV_fm)
        return g2 * MEV_J * FM_M / self.units.coupling_J_m

    def coupling_MeV_fm(self, strength, cube_mass: float = 1.0):
        return np.asarray(strength, dtype=float) * self.system(cube_mass).coupling_J_m / (MEV_J * FM_M)


PRESETS = {"plasma": Plasma, "semiconductor": Semiconductor, "nuclear": Nuclear}


def from_config(section: dict | None):
    """A preset object from the config's ``preset`` mapping (``None`` if absent)."""
    if not section:
        return None
    section = dict(section)
    kind = section.pop("kind", None)
    if kind not in PRESETS:
        raise InputError(f"preset.kind must be one of {', '.join(PRESETS)}, got {kind!r}")
    section.pop("map", None)  # plotting ranges, read by the figures
    if kind == "semiconductor" and "units" in section:
        section["units_choice"] = section.pop("units")
    try:
        return PRESETS[kind](**section)
    except TypeError as exc:
        raise InputError(f"preset {kind}: {exc}") from None


def cube_units(preset, cube_mass: float = 1.0) -> UnitSystem:
    """The unit system in which a cube of engine mass ``cube_mass`` is read under ``preset``."""
    if preset is None:
        return ATOMIC
    if isinstance(preset, Nuclear):
        return preset.system(cube_mass)
    if isinstance(preset, Semiconductor) and preset.units_choice == "atomic" and not math.isclose(
            cube_mass, preset.reduced_mass):
        raise InputError(f"preset semiconductor (units: atomic) needs potential.mass = μ* "
                         f"{preset.reduced_mass:g}, the cube has mass {cube_mass:g}")
    if isinstance(preset, Semiconductor) and preset.units_choice == "effective" and not math.isclose(cube_mass, 1.0):
        raise InputError(f"preset semiconductor (units: effective) needs potential.mass = 1 (μ* is the mass unit), "
                         f"the cube has mass {cube_mass:g}")
    return preset.units


def screening_length_at(preset, density_m3, temperature):
    """The preset's screening length (m) at a carrier density (m⁻³) and temperature (the
    preset's unit: eV for a plasma, K for a semiconductor)."""
    if isinstance(preset, Plasma):
        return preset.debye_length(density_m3, temperature)
    return dataclasses.replace(preset, temperature_K=temperature).screening_length(density_m3)


def loss_density(preset, lam_m, temperature):
    """Density (m⁻³) at which the preset's screening length equals ``lam_m`` (m) at ``temperature``."""
    if isinstance(preset, Plasma):
        return preset.density_for(lam_m, temperature)
    return dataclasses.replace(preset, temperature_K=temperature).density_for(lam_m) \
        if preset.screening == "debye" else preset.density_for(lam_m)
