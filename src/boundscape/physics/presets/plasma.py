"""The plasma preset: an ion of nuclear charge Z screened by a plasma's electrons (and ions), read
in atomic units with energies in eV and lengths in nm."""

from __future__ import annotations

import math
from dataclasses import dataclass, fields
from typing import ClassVar

import numpy as np
from scipy import constants as sc

from ...checks import positive
from ...errors import InputError
from ..screening import Carriers, Species
from ..units import ATOMIC, BOHR_M, convert
from .base import ConditionAxes, EngineParameters, Unit
from .carriers import CarrierScreening

__all__ = ["Plasma"]


@dataclass(frozen=True)
class Plasma(CarrierScreening):
    """Electrons (and ions) screening an ion of nuclear charge Z: a Yukawa potential.

    The cube is read in atomic units; the strength is the ion's nuclear charge Z and λ the
    screening length of the plasma at (n_e, T_e).

    Parameters
    ----------
    species : {"electrons", "electrons_and_ions"}
        Who screens.  With ions, quasi-neutral ions of charge ``screening_ion_charge`` (density
        n_e/Z_i) at temperature ``ion_temperature_ratio`` × T_e add Z_i² n_i/(ε₀ k T_i) =
        Z_i n_e/(ε₀ k T_i) to 1/λ² (classical in every model: their thermal wavelength is at least
        43 times the electrons').
    screening : {"finite_temperature", "debye", "thomas_fermi"}
        The electrons' model (:mod:`boundscape.physics.screening`).  A sweep over
        ``screening_length`` that names none keeps ``debye``.
    temperature_eV : float
        Reference electron temperature of a sweep over screening lengths (its density coordinate).
    ion_sphere_charge : float or None
        Family ``ion_sphere``: the charge Z_i of the ions whose Wigner–Seitz radius
        (3Z_i/(4π n_e))^{1/3} is the ion-sphere radius (:mod:`.ion_sphere`); ``None``: the ion's
        own nuclear charge Z.
    reduced_mass : float
        Electron–ion reduced mass of the bound problem, electron masses (1 for an infinitely heavy
        ion); the screening electrons have the electron mass.

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
    screening: str = "finite_temperature"
    ion_sphere_charge: float | None = None

    kind = "plasma"
    energy_unit = Unit("eV", sc.electron_volt)
    length_unit = Unit("nm", sc.nano)
    density_name = "electron_density"
    temperature_name = "electron_temperature"
    temperature_unit = "eV"
    condition_labels = {"strength": "nuclear charge $Z$", "electron_density": "electron density $n_e$ (cm$^{-3}$)",
                        "electron_temperature": "electron temperature $T_e$ (eV)"}
    condition_keys = ("electron_density", "electron_temperature")
    reference_key = "temperature_eV"
    legacy_defaults = {"screening": "debye"}
    command_line = (("--temperature", "temperature_eV", False), ("--screening", "screening", False),
                    ("--species", "species", False), ("--screening-ion-charge", "screening_ion_charge", False),
                    ("--ion-temperature-ratio", "ion_temperature_ratio", False),
                    ("--ion-sphere-charge", "ion_sphere_charge", False))
    length_flag = ("--density", "plasma: electron density n_e, cm-3 (with --temperature), instead of "
                                "--screening-length: the screening length of the plasma")
    temperature_flag = "--temperature"
    line_units = ("eV", "nm")
    strength_flag = "--nuclear-charge"
    strength_meaning = "Z, the nuclear charge of the hydrogen-like ion"
    units = ATOMIC
    # The variants that read a family's length other than as a screening length, by the family's
    # length_kind; each registers itself from its own module (.ion_sphere: the ion-sphere radius).
    length_variants: ClassVar[dict] = {}

    def __post_init__(self):
        if self.species not in ("electrons", "electrons_and_ions"):
            raise InputError(f"plasma species must be 'electrons' or 'electrons_and_ions', got {self.species!r}")
        self._check_screening()
        for name in ("screening_ion_charge", "ion_temperature_ratio", "temperature_eV", "reduced_mass"):
            positive(f"plasma {name}", getattr(self, name))
        if self.ion_sphere_charge is not None:
            positive("plasma ion_sphere_charge", self.ion_sphere_charge)

    # -- the physics ------------------------------------------------------------------------
    @property
    def carriers(self) -> Carriers:
        species = [Species("electrons", 1.0, sc.m_e)]
        if self.species == "electrons_and_ions":
            species.append(Species("ions", self.screening_ion_charge, sc.m_p, density_ratio=1 / self.screening_ion_charge,
                                   temperature_ratio=self.ion_temperature_ratio, classical=True))
        return Carriers(tuple(species))

    def debye_length(self, electron_density, temperature_eV):
        """The classical Debye length (m) for n_e in m⁻³ and T_e in eV, whatever the model:
        λ_D⁻² = Σ_s q_s² n_s/(ε₀ k T_s)."""
        n = positive("electron density", electron_density)
        positive("electron temperature", temperature_eV)
        return self.carriers.debye_length(n, self.kT(temperature_eV))

    def density_for(self, screening_length_m, temperature_eV):
        """The electron density (m⁻³) at which the model's screening length is ``screening_length_m`` at T_e (eV)."""
        return self.loss_density(positive("screening length", screening_length_m), temperature_eV)

    def debye_number(self, electron_density, debye_length_m):
        """N_D = (4π/3) n_e λ_D³, the electrons in a Debye sphere: Debye–Hückel screening needs
        N_D ≫ 1 (NRL Plasma Formulary, p. 28)."""
        return 4 * math.pi / 3 * electron_density * debye_length_m ** 3

    def to_engine(self, ion_charge, electron_density, temperature_eV) -> EngineParameters:
        """Engine inputs for nuclear charge Z in a plasma of n_e (m⁻³), T_e (eV)."""
        n = positive("electron density", electron_density)
        positive("electron temperature", temperature_eV)
        lam = float(self.screening_length_at(n, temperature_eV)) / BOHR_M
        return EngineParameters(float(positive("ion charge", ion_charge)), lam, self.reduced_mass, ATOMIC)

    # -- what the cube, figures and command line ask ----------------------------------------
    @property
    def reference_temperature(self) -> float:
        return self.temperature_eV

    @property
    def temperature_symbol(self) -> str:
        return "$T_e$"

    def condition_attributes(self):
        return {"strength": {"long_name": "nuclear charge Z of the hydrogen-like ion", "units": "1"},
                "electron_density": {"long_name": "electron density", "units": "cm-3"},
                "electron_temperature": {"long_name": "electron temperature", "units": "eV"}}

    def sweep_mass(self, mass, section):
        if "reduced_mass" not in section:
            return super().sweep_mass(mass, section)
        if mass is not None and not math.isclose(mass, self.reduced_mass):
            raise InputError(f"config key potential.mass: {mass:g} differs from preset.reduced_mass "
                             f"{self.reduced_mass:g}; give the reduced mass once")
        return float(self.reduced_mass)

    def table_strength(self, strength, cube_mass=1.0):
        return "nuclear_charge", float(strength)

    def strength_label(self, attrs):
        return "nuclear charge Z of the ion"

    @property
    def strength_long_name(self):
        return "nuclear charge Z of the hydrogen-like ion"

    def physical_coordinates(self, strength, screening_length_m, cube_mass=1.0, dims=("screening_length",)):
        coords = super().physical_coordinates(strength, screening_length_m, cube_mass, dims)
        if dims == ("screening_length",):
            density, _ = self.length_conditions(screening_length_m)
            coords["electron_density"] = (dims, convert(density, "m-3", "cm-3"), {
                "long_name": f"electron density giving this screening length at T_e = {self.temperature_eV:g} eV "
                             f"({self.screening})", "units": "cm-3"})
        return coords

    @property
    def condition_axes(self):
        return ConditionAxes(
            density_label="electron density $n_e$ (cm$^{-3}$)", charge_name="nuclear charge Z",
            temperature_label="electron temperature $T_e$ (eV)", temperature_key="temperature_eV",
            temperature_default={"start": 0.1, "stop": 1e4, "num": 81}, temperature_fixed=None,
            over="electron density and temperature",
            validity_label=f"{self.screening} screening fails (hatched)")

    def command_line_reading(self):
        return {"units": ATOMIC, "energy_unit": "eV", "energy_factor": convert(1.0, "hartree", "eV"),
                "length_unit": "nm", "length_factor": BOHR_M / 1e-9, "description": "atomic units, plasma preset"}

    def strength_input(self, value):
        return float(positive("--nuclear-charge", value)), f"nuclear charge Z = {value:g}"

    def length_reading(self, info, charge=None):
        """Family ``ion_sphere``: R from n_e, the ions' Wigner–Seitz radius, Z_i = ``charge`` (the
        nuclear charge given) unless :attr:`ion_sphere_charge` (:mod:`.ion_sphere`)."""
        if info.length_kind != "ion_sphere_radius":
            if self.ion_sphere_charge is not None:
                raise InputError(f"--ion-sphere-charge applies to family ion_sphere only (family {info.name}'s "
                                 f"length is its {info.length_long_name})")
            return super().length_reading(info, charge)
        ion_charge = self.ion_sphere_charge if self.ion_sphere_charge is not None else charge
        if ion_charge is None:
            raise InputError("--density sets the ion-sphere radius (3 Z_i/(4 pi n_e))^(1/3) from the ions' charge "
                             "Z_i, the nuclear charge by default, which is varied here: give --ion-sphere-charge")
        variant = self.length_variants["ion_sphere_radius"]
        return variant(**{**_fields(self), "ion_sphere_charge": float(ion_charge)}, nuclear_charge=charge)

    def for_family(self, info):
        if info.length_kind != "ion_sphere_radius":
            if self.ion_sphere_charge is not None:
                raise InputError(f"preset.ion_sphere_charge applies to family ion_sphere only, not {info.name}")
            return self
        if self.ion_sphere_charge is None:
            raise InputError("a plasma sweep of family ion_sphere needs preset.ion_sphere_charge, the charge Z_i of "
                             "the plasma's ions, whose Wigner-Seitz radius (3 Z_i/(4 pi n_e))^(1/3) is the ion-sphere "
                             "radius (the swept ion's nuclear charge, for a plasma of such nuclei)")
        return self.length_variants["ion_sphere_radius"](**_fields(self))

    def condition_sets_length(self, info):
        return info.length_kind in ("screening_length", "ion_sphere_radius")


def _fields(preset) -> dict:
    # A plasma preset's own settings (the dataclass fields of Plasma), to rebuild it as a variant.
    return {f.name: getattr(preset, f.name) for f in fields(Plasma)}
