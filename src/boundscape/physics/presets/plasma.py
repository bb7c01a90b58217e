"""The plasma preset: an ion of nuclear charge Z screened by a plasma's electrons (and ions),
Debye–Hückel (Yukawa) screening, read in atomic units with energies in eV and lengths in nm."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy import constants as sc

from ...checks import positive
from ...errors import InputError
from ..units import ATOMIC, BOHR_M, convert
from .base import ConditionAxes, EngineParameters, Unit
from .carriers import CarrierScreening

__all__ = ["Plasma"]


@dataclass(frozen=True)
class Plasma(CarrierScreening):
    """Electrons screening an ion of charge Z: Debye–Hückel (Yukawa) potential.

    The cube is read in atomic units; the strength is the ion's nuclear charge Z and λ the Debye
    length.

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

    kind = "plasma"
    energy_unit = Unit("eV", sc.electron_volt)
    length_unit = Unit("nm", sc.nano)
    density_name = "electron_density"
    units = ATOMIC

    def __post_init__(self):
        if self.species not in ("electrons", "electrons_and_ions"):
            raise InputError(f"plasma species must be 'electrons' or 'electrons_and_ions', got {self.species!r}")
        for name in ("screening_ion_charge", "ion_temperature_ratio", "temperature_eV", "reduced_mass"):
            positive(f"plasma {name}", getattr(self, name))

    # -- the physics ------------------------------------------------------------------------
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

    def debye_number(self, electron_density, debye_length_m):
        """N_D = (4π/3) n_e λ_D³, the electrons in a Debye sphere: Debye–Hückel screening needs
        N_D ≫ 1 (NRL Plasma Formulary, p. 28)."""
        return 4 * math.pi / 3 * electron_density * debye_length_m ** 3

    def to_engine(self, ion_charge, electron_density, temperature_eV) -> EngineParameters:
        """Engine inputs for ion charge Z in a plasma of n_e (m⁻³), T_e (eV)."""
        lam = self.debye_length(electron_density, temperature_eV) / BOHR_M
        return EngineParameters(float(positive("ion charge", ion_charge)), lam, self.reduced_mass, ATOMIC)

    # -- what the cube, figures and command line ask ----------------------------------------
    @property
    def reference_temperature(self) -> float:
        return self.temperature_eV

    @property
    def density_note(self) -> str:
        return f"at T_e = {self.temperature_eV:g} eV"

    def screening_length_at(self, density_m3, temperature):
        return self.debye_length(density_m3, temperature)

    def loss_density(self, screening_length_m, temperature=None):
        return self.density_for(screening_length_m, self.temperature_eV if temperature is None else temperature)

    def sweep_mass(self, mass, section):
        if "reduced_mass" not in section:
            return super().sweep_mass(mass, section)
        if mass is not None and not math.isclose(mass, self.reduced_mass):
            raise InputError(f"config key potential.mass: {mass:g} differs from preset.reduced_mass "
                             f"{self.reduced_mass:g}; give the reduced mass once")
        return float(self.reduced_mass)

    def strength_label(self, attrs):
        return "nuclear charge Z of the ion"

    @property
    def strength_long_name(self):
        return "nuclear charge Z of the hydrogen-like ion"

    def physical_coordinates(self, strength, screening_length_m, cube_mass=1.0):
        coords = super().physical_coordinates(strength, screening_length_m, cube_mass)
        coords["electron_density"] = ("screening_length", self.loss_density(screening_length_m), {
            "long_name": f"electron density giving this Debye length at T_e = {self.temperature_eV:g} eV",
            "units": "m-3"})
        return coords

    @property
    def condition_axes(self):
        return ConditionAxes(
            density_label="electron density n_e (cm⁻³)", charge_name="nuclear charge Z",
            temperature_label="electron temperature T_e (eV)", temperature_key="temperature_eV",
            temperature_default={"start": 0.1, "stop": 1e4, "num": 81}, temperature_fixed=None,
            over="electron density and temperature", validity_label="N_D = 1 (Debye picture fails to the right)")

    def validity_field(self, density_m3, screening_length_m):
        # density_m3 runs along the last axis of screening_length_m (temperature × density).
        return self.debye_number(density_m3[None, :], screening_length_m)

    def command_line_reading(self):
        return {"units": ATOMIC, "energy_unit": "eV", "energy_factor": convert(1.0, "hartree", "eV"),
                "length_unit": "nm", "length_factor": BOHR_M / 1e-9, "description": "atomic units, plasma preset"}
