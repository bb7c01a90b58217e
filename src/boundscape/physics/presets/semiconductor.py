"""The semiconductor preset: a hydrogenic donor, or a Wannier–Mott exciton, screened by free
carriers (Thomas–Fermi or Debye), read in effective atomic units (``units: effective``: lengths
in a*, energies in 2Ry*, mass 1) or true atomic units (``units: atomic``: strength Z/ε_r, mass μ*).
Both describe one problem (one-scale law); energies are shown in meV and lengths in nm."""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np
from scipy import constants as sc

from ...checks import positive
from ...errors import InputError
from ..units import ATOMIC, BOHR_M, ELECTRON_MASS_KG, UnitSystem, effective_atomic_units
from .base import ConditionAxes, EngineParameters, Unit
from .carriers import CarrierScreening

__all__ = ["Semiconductor"]


@dataclass(frozen=True)
class Semiconductor(CarrierScreening):
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
    units_choice : {"effective", "atomic"}
        How a cube's numbers are read (config key ``units``; see the module docstring).

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

    kind = "semiconductor"
    energy_unit = Unit("meV", sc.milli * sc.electron_volt)
    length_unit = Unit("nm", sc.nano)
    density_name = "carrier_density"
    config_names = {"units": "units_choice"}
    command_line = (("--effective-mass", "effective_mass", True), ("--hole-mass", "hole_mass", False),
                    ("--permittivity", "permittivity", True))
    mass_given_by = "μ* comes from --effective-mass (and --hole-mass for an exciton)"
    named_length_units = {"a*": "ε_r/μ* bohr"}

    def __post_init__(self):
        if self.screening not in ("thomas_fermi", "debye"):
            raise InputError(f"semiconductor screening must be 'thomas_fermi' or 'debye', got {self.screening!r}")
        if self.units_choice not in ("effective", "atomic"):
            raise InputError(f"semiconductor units must be 'effective' or 'atomic', got {self.units_choice!r}")
        for name in ("effective_mass", "permittivity", "temperature_K"):
            positive(f"semiconductor {name}", getattr(self, name))
        if self.hole_mass is not None:
            positive("semiconductor hole_mass", self.hole_mass)

    # -- the physics ------------------------------------------------------------------------
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

    @property
    def units(self) -> UnitSystem:
        return self.effective if self.units_choice == "effective" else ATOMIC

    def degenerate_density(self, temperature_K=None):
        """Carrier density (m⁻³) at which E_F = k_B T: Thomas–Fermi screening assumes n well above it.

        From E_F = ħ²(3π²n)^{2/3}/(2m_e*mₑ): n = (2m_e*mₑ k_B T)^{3/2}/(3π²ħ³)."""
        t = self.temperature_K if temperature_K is None else temperature_K
        return (2 * self.effective_mass * ELECTRON_MASS_KG * sc.k * t) ** 1.5 / (3 * math.pi ** 2 * sc.hbar ** 3)

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

    # -- what the cube, figures and command line ask ----------------------------------------
    def unit_system(self, cube_mass=1.0):
        if self.units_choice == "atomic" and not math.isclose(cube_mass, self.reduced_mass):
            raise InputError(f"preset semiconductor (units: atomic) needs potential.mass = μ* "
                             f"{self.reduced_mass:g}, the cube has mass {cube_mass:g}")
        if self.units_choice == "effective" and not math.isclose(cube_mass, 1.0):
            raise InputError(f"preset semiconductor (units: effective) needs potential.mass = 1 (μ* is the mass "
                             f"unit), the cube has mass {cube_mass:g}")
        return self.units

    def unit_names(self):
        if self.units_choice == "effective":
            return "effective Bohr radii a*", "effective hartrees 2Ry*"
        return super().unit_names()

    def sweep_mass(self, mass, section):
        if self.units_choice == "effective":
            if mass is not None and not math.isclose(mass, 1.0):
                raise InputError(f"config key potential.mass: in effective atomic units (preset semiconductor, "
                                 f"units: effective) μ* is the mass unit, so the mass is 1, got {mass:g}; μ* would "
                                 "count twice")
            return 1.0
        if mass is not None and not math.isclose(mass, self.reduced_mass):
            raise InputError(f"config key potential.mass: preset semiconductor (units: atomic) needs potential.mass "
                             f"= μ* = {self.reduced_mass:g}, got {mass:g}")
        return float(self.reduced_mass)

    @property
    def reference_temperature(self):
        return self.temperature_K

    @property
    def density_note(self):
        return f"({self.screening})"

    def screening_length_at(self, density_m3, temperature):
        return dataclasses.replace(self, temperature_K=temperature).screening_length(density_m3)

    def loss_density(self, screening_length_m, temperature=None):
        if self.screening != "debye" or temperature is None:
            return self.density_for(screening_length_m)
        return dataclasses.replace(self, temperature_K=temperature).density_for(screening_length_m)

    def strength_values(self, strength, cube_mass=1.0):
        return np.asarray(self.donor_charge(strength))

    def strength_label(self, attrs):
        return "charge number Z of the pair" if self.is_exciton else "donor charge Z"

    @property
    def strength_long_name(self):
        who = "charge number Z of the exciton's Coulomb attraction" if self.is_exciton else "donor charge number Z"
        return who if self.units_choice == "effective" else f"{who} divided by eps_r (true atomic units)"

    def physical_coordinates(self, strength, screening_length_m, cube_mass=1.0):
        coords = super().physical_coordinates(strength, screening_length_m, cube_mass)
        coords["carrier_density"] = ("screening_length", self.density_for(screening_length_m), {
            "long_name": f"carrier density giving this screening length ({self.screening})", "units": "m-3"})
        coords["donor_charge"] = ("strength", self.donor_charge(strength), {
            "long_name": "donor charge number", "units": "1"})
        return coords

    def unit_notes(self, units, cube_mass=1.0):
        a_nm, e_meV = units.length_m / sc.nano, units.energy_J / sc.electron_volt * 1e3
        return {"comment": f"effective atomic units of the semiconductor preset: energies in 2Ry* = {e_meV:.6g} meV, "
                           f"lengths in a* = {a_nm:.6g} nm, masses in mu* = {self.reduced_mass:.6g} electron "
                           "masses; each variable's energy_unit_in_J, energy_unit_in_eV or length_unit_in_m "
                           "gives its unit",
                "mass_units": f"mu* = {self.reduced_mass:.6g} electron masses (the mass unit)"}

    @property
    def condition_axes(self):
        # Debye screening depends on temperature (a density × temperature map); Thomas–Fermi
        # screening does not (one density axis, at the preset's temperature).
        two_d = self.screening == "debye"
        who = "pair charge Z" if self.is_exciton else "donor charge Z"
        if two_d:
            validity = "E_F = k_B T (non-degenerate Debye picture fails to the right)"
        else:
            validity = f"E_F < k_B T at {self.temperature_K:g} K: not degenerate, Thomas–Fermi fails"
        return ConditionAxes(
            density_label="carrier density n (cm⁻³)", charge_name=who, temperature_label="carrier temperature T (K)",
            temperature_key="temperature_K", temperature_default={"start": 4, "stop": 600, "num": 61},
            temperature_fixed=None if two_d else self.temperature_K,
            over="carrier density and temperature" if two_d else f"carrier density at {self.temperature_K:g} K",
            validity_label=validity, validity_gid="degenerate")

    def validity_density(self, temperature):
        # Thomas–Fermi screening needs a degenerate gas (E_F > k_B T), Debye screening a
        # non-degenerate one: the line E_F = k_B T bounds both.
        return self.degenerate_density(temperature)

    def command_line_reading(self):
        units = self.effective
        what = "exciton" if self.is_exciton else "donor"
        return {"units": units, "energy_unit": "meV", "energy_factor": units.energy_eV * 1e3, "length_unit": "nm",
                "length_factor": units.length_m / 1e-9,
                "description": f"{what}, μ* = {self.reduced_mass:.6g}, ε_r = {self.permittivity:g}: effective atomic "
                               f"units a* = {units.length_m / 1e-9:.6g} nm, 2Ry* = {units.energy_eV * 1e3:.6g} meV"}

    def strength_input(self, value):
        return float(value), f"{'strength' if self.is_exciton else 'donor charge'} {value:g}"

    def named_length_m(self, unit):
        return {"a*": self.effective.length_m}[unit]
