"""The semiconductor preset: a hydrogenic donor, or a Wannier–Mott exciton, screened by free
carriers (an ideal Fermi gas at T, or its Debye and Thomas–Fermi limits), read in effective atomic units (``units: effective``: lengths
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
from ..screening import Carriers, Species
from ..units import ATOMIC, BOHR_M, ELECTRON_MASS_KG, UnitSystem, convert, effective_atomic_units
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
        reduced mass μ* = m_e* m_h*/(m_e* + m_h*), which sets a* and Ry*.
    screening : {"finite_temperature", "debye", "thomas_fermi"}
        The carriers' model (:mod:`boundscape.physics.screening`): the ideal Fermi gas at T,
        non-degenerate (Debye, λ² = ε k_B T/(n e²); Yu & Cardona §6.3), or degenerate
        (Thomas–Fermi, q_TF² = 3e²n/(2εE_F); Ashcroft & Mermin ch. 17).  A sweep over
        ``screening_length`` that names none keeps ``thomas_fermi``.
    species : {"electrons", "electrons_and_holes"}, optional
        Who screens: free electrons (a donor in an n-type crystal), or the electrons and holes of
        an electron–hole plasma of pair density n (excitons; the default with ``hole_mass``).
    electron_degeneracy, hole_degeneracy : float
        Spin × valley degeneracy of each carrier (2: spin only).
    temperature_K : float
        Reference carrier temperature of a sweep over screening lengths.
    units_choice : {"effective", "atomic"}
        How a cube's numbers are read (config key ``units``; see the module docstring).

    References
    ----------
    Yu & Cardona, *Fundamentals of Semiconductors*, §4.2 (donors) and §6.3 (Wannier excitons,
    μ = m_e m_h/(m_e + m_h)).
    """

    effective_mass: float = 0.067
    permittivity: float = 12.9
    screening: str = "finite_temperature"
    temperature_K: float = 300.0
    units_choice: str = "effective"
    hole_mass: float | None = None
    species: str | None = None
    electron_degeneracy: float = 2.0
    hole_degeneracy: float = 2.0

    kind = "semiconductor"
    energy_unit = Unit("meV", sc.milli * sc.electron_volt)
    length_unit = Unit("nm", sc.nano)
    density_name = "carrier_density"
    temperature_name = "temperature"
    temperature_unit = "K"
    condition_labels = {"strength": "charge $Z$", "carrier_density": "carrier density $n$ (cm$^{-3}$)",
                        "temperature": "carrier temperature $T$ (K)"}
    condition_keys = ("carrier_density", "temperature")
    reference_key = "temperature_K"
    legacy_defaults = {"screening": "thomas_fermi", "species": "electrons"}
    config_names = {"units": "units_choice"}
    command_line = (("--effective-mass", "effective_mass", True), ("--hole-mass", "hole_mass", False),
                    ("--permittivity", "permittivity", True), ("--temperature-K", "temperature_K", False),
                    ("--screening", "screening", False), ("--species", "species", False))
    length_flag = ("--carrier-density", "semiconductor: free-carrier (or pair) density, cm-3 (with --temperature-K), "
                                        "instead of --screening-length: the carriers' screening length")
    temperature_flag = "--temperature-K"
    line_units = ("meV", "cm-1", "THz")
    mass_given_by = "μ* comes from --effective-mass (and --hole-mass for an exciton)"
    named_length_units = {"a*": "ε_r/μ* bohr"}

    def __post_init__(self):
        self._check_screening()
        if self.units_choice not in ("effective", "atomic"):
            raise InputError(f"semiconductor units must be 'effective' or 'atomic', got {self.units_choice!r}")
        for name in ("effective_mass", "permittivity", "temperature_K", "electron_degeneracy", "hole_degeneracy"):
            positive(f"semiconductor {name}", getattr(self, name))
        if self.hole_mass is not None:
            positive("semiconductor hole_mass", self.hole_mass)
        if self.species not in (None, "electrons", "electrons_and_holes"):
            raise InputError(f"semiconductor species must be 'electrons' or 'electrons_and_holes', got {self.species!r}")
        if self.species == "electrons_and_holes" and self.hole_mass is None:
            raise InputError("semiconductor species electrons_and_holes needs hole_mass (the holes' effective mass)")

    # -- the physics ------------------------------------------------------------------------
    @property
    def is_exciton(self) -> bool:
        return self.hole_mass is not None

    @property
    def screening_species(self) -> str:
        """Who screens: the configured species, else electrons and holes for an exciton."""
        if self.species is not None:
            return self.species
        return "electrons_and_holes" if self.is_exciton else "electrons"

    @property
    def carriers(self) -> Carriers:
        species = [Species("electrons", 1.0, self.effective_mass * ELECTRON_MASS_KG, self.electron_degeneracy)]
        if self.screening_species == "electrons_and_holes":
            species.append(Species("holes", 1.0, self.hole_mass * ELECTRON_MASS_KG, self.hole_degeneracy))
        return Carriers(tuple(species), self.permittivity)

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
        """Electron density (m⁻³) at which E_F = k_B T: the gas is degenerate above it.

        From E_F = ħ²(6π²n/g)^{2/3}/(2m_e*mₑ): n = g(2m_e*mₑ k_B T)^{3/2}/(6π²ħ³)."""
        t = self.temperature_K if temperature_K is None else temperature_K
        return self.electron_degeneracy * (2 * self.effective_mass * ELECTRON_MASS_KG * sc.k * np.asarray(t)) ** 1.5 / (
            6 * math.pi ** 2 * sc.hbar ** 3)

    def screening_length(self, carrier_density):
        """Screening length (m) for a carrier density (m⁻³) at the reference temperature."""
        return self.screening_length_at(positive("carrier density", carrier_density), self.temperature_K)

    def density_for(self, screening_length_m):
        """The carrier density (m⁻³) whose screening length is ``screening_length_m`` at the reference temperature."""
        return self.loss_density(positive("screening length", screening_length_m))

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

    def condition_attributes(self):
        who = "charge number Z of the exciton's Coulomb attraction" if self.is_exciton else "donor charge number Z"
        return {"strength": {"long_name": who, "units": "1"},
                "carrier_density": {"long_name": "pair density" if self.screening_species == "electrons_and_holes"
                                    else "free electron density", "units": "cm-3"},
                "temperature": {"long_name": "carrier temperature", "units": "K"}}

    def trade_criticals(self, critical_length_m, grid, strength_dim="strength"):
        out = super().trade_criticals(critical_length_m, grid, strength_dim)
        dims, loss, _ = out["loss_carrier_density"]
        # n_c^{1/3} a*: Mott's criterion puts the metal–insulator transition of a doped crystal at 0.25.
        out["mott_parameter"] = (dims, np.cbrt(loss * 1e6) * self.effective.length_m, {
            "long_name": "cube root of the loss density times the effective Bohr radius, n_c^(1/3) a*",
            "units": "1",
            "comment": f"a* = {self.effective.length_m / sc.nano:.6g} nm; Mott's criterion of the metal-insulator "
                       "transition is 0.25 (Mott 1961; Edwards & Sienko 1978: 0.26, value from memory), set by "
                       "Thomas-Fermi screening length = a*; this model loses the bound state where the screening "
                       "length reaches its critical length 0.84 a* (1s, Yukawa), at a higher density, and counts "
                       "the screening at the temperature; NaN where the state is never bound"})
        return out

    def strength_values(self, strength, cube_mass=1.0):
        return np.asarray(self.donor_charge(strength))

    def table_strength(self, strength, cube_mass=1.0):
        return "donor_charge", float(self.donor_charge(strength))

    def strength_label(self, attrs):
        return "charge number Z of the pair" if self.is_exciton else "donor charge Z"

    @property
    def strength_long_name(self):
        who = "charge number Z of the exciton's Coulomb attraction" if self.is_exciton else "donor charge number Z"
        return who if self.units_choice == "effective" else f"{who} divided by eps_r (true atomic units)"

    def physical_coordinates(self, strength, screening_length_m, cube_mass=1.0, dims=("screening_length",)):
        coords = super().physical_coordinates(strength, screening_length_m, cube_mass, dims)
        if dims == ("screening_length",):
            density, _ = self.length_conditions(screening_length_m)
            coords["carrier_density"] = (dims, convert(density, "m-3", "cm-3"), {
                "long_name": f"carrier density giving this screening length at T = {self.temperature_K:g} K "
                             f"({self.screening})", "units": "cm-3"})
        coords["donor_charge"] = (("strength",), self.donor_charge(strength), {
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
        # Thomas–Fermi screening does not depend on temperature (a density axis at the preset's
        # temperature); the other models do (a density × temperature map).
        two_d = self.screening != "thomas_fermi"
        who = "pair charge Z" if self.is_exciton else "donor charge Z"
        return ConditionAxes(
            density_label="carrier density $n$ (cm$^{-3}$)", charge_name=who, temperature_label="carrier temperature $T$ (K)",
            temperature_key="temperature_K", temperature_default={"start": 4, "stop": 600, "num": 61},
            temperature_fixed=None if two_d else self.temperature_K,
            over="carrier density and temperature" if two_d else f"carrier density at {self.temperature_K:g} K",
            validity_label=f"{self.screening} screening fails (hatched)", validity_gid="invalid")

    def command_line_reading(self):
        units = self.effective
        what = "exciton" if self.is_exciton else "donor"
        return {"units": units, "energy_unit": "meV", "energy_factor": units.energy_eV * 1e3, "length_unit": "nm",
                "length_factor": units.length_m / 1e-9,
                "description": f"{what}, μ* = {self.reduced_mass:.6g}, ε_r = {self.permittivity:g}: effective atomic "
                               f"units a* = {units.length_m / 1e-9:.6g} nm, 2Ry* = {units.energy_eV * 1e3:.6g} meV"}

    def critical_columns(self, critical_length_m):
        columns = super().critical_columns(critical_length_m)
        n = columns[f"loss_{self.density_name}_cm-3"]
        columns["mott_parameter"] = float(np.cbrt(n * 1e6) * self.effective.length_m) if np.isfinite(n) else float("nan")
        return columns

    def strength_input(self, value):
        return float(value), f"{'strength' if self.is_exciton else 'donor charge'} {value:g}"

    def named_length_m(self, unit):
        return {"a*": self.effective.length_m}[unit]
