"""The nuclear preset: a Yukawa well V = −g² e^{−r/λ}/r with g² in MeV fm and λ in fm.

Lengths are read in b fm and the engine's mass in multiples of μ/m (m = the cube's mass), so that
the dimensionless product Z·m·λ equals μ g² λ/(ħc)², the one-scale variable; energies are shown
in MeV and lengths in fm."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import ClassVar

import numpy as np
from scipy import constants as sc

from ...checks import positive
from ...errors import InputError
from ..units import FM_M, HBAR_C_MEV_FM, MEV_J, UnitSystem, nuclear_units
from .base import ConditionGrid, EngineParameters, Preset, Unit
from .strengths import StrengthReading

__all__ = ["Nuclear"]


@dataclass(frozen=True)
class Nuclear(Preset):
    """V = −g² e^{−r/λ}/r with g² in MeV·fm, λ in fm, reduced mass μ in MeV/c².

    The engine's Z, λ, m read in :func:`~boundscape.physics.units.nuclear_units` give
    g² = Z·(ħc)²·m/(μc²·b) and λ = λ_engine·b fm; the one-scale variable Z·m·λ is μ g² λ/(ħc)².
    """

    reduced_mass_MeV: float = 469.4591  # about half a nucleon mass, for a deuteron-like pair
    length_fm: float = 1.0

    kind = "nuclear"
    energy_unit = Unit("MeV", sc.mega * sc.electron_volt)
    length_unit = Unit("fm", FM_M)
    grid_axes = ("coupling_MeV_fm",)
    condition_labels = {"coupling": "coupling $g^2$ (MeV fm)", "range": "range $\\lambda$ (fm)"}
    condition_keys = ("coupling", "range")
    condition_strength_key = "coupling"
    command_line = (("--reduced-mass", "reduced_mass_MeV", True),)
    length_flag = ("--range", "nuclear: range λ of -g² exp(-r/λ)/r, fm, instead of --screening-length")
    line_units = ("MeV",)
    strength_flag = "--coupling"
    strength_meaning = "g², MeV fm"
    mass_given_by = "the reduced mass is --reduced-mass (MeV/c²)"
    # The variants for families whose strength is not a coupling, by strength_dimension; each
    # registers itself from its own module (.nuclear_depth: a depth V0 in MeV).
    strength_variants: ClassVar[dict] = {}

    def __post_init__(self):
        positive("nuclear reduced_mass_MeV", self.reduced_mass_MeV)
        positive("nuclear length_fm", self.length_fm)

    # -- the physics ------------------------------------------------------------------------
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

    # -- what the cube, figures and command line ask ----------------------------------------
    def unit_system(self, cube_mass=1.0):
        return self.system(cube_mass)

    def unit_names(self):
        if self.length_fm == 1.0:
            return "fm", "(ħc)²/(μc² fm²)"
        return f"b = {self.length_fm:g} fm", "(ħc)²/(μc² b²)"

    def sweep_mass(self, mass, section):
        if mass is not None and not math.isclose(mass, 1.0):
            raise InputError(f"config key potential.mass: the nuclear preset's reduced mass is "
                             f"preset.reduced_mass_MeV; leave potential.mass at 1, got {mass:g}")
        return 1.0

    def strength_values(self, strength, cube_mass=1.0):
        return np.asarray(self.coupling_MeV_fm(strength, cube_mass))

    def strength_label(self, attrs):
        return "coupling g² (MeV fm)"

    def strength_text(self, value, attrs):
        return f"g² = {value:.4g} MeV fm"

    @property
    def strength_long_name(self):
        return "engine strength g^2 mu c^2 b/(hbar c)^2 (coordinate coupling gives g^2)"

    def physical_coordinates(self, strength, screening_length_m, cube_mass=1.0, dims=("screening_length",)):
        if dims != ("screening_length",):  # a sweep over (coupling, range): both are its axes
            return {}
        coupling = {"coupling": (("strength",), self.coupling_MeV_fm(strength, cube_mass),
                                 {"long_name": "coupling g² of V = -g² exp(-r/λ)/r", "units": "MeV fm"})}
        return {**coupling, **super().physical_coordinates(strength, screening_length_m, cube_mass, dims)}

    # -- sweeps over (coupling, range) ------------------------------------------------------
    def condition_attributes(self):
        return {"coupling": {"long_name": "coupling g^2 of V = -g^2 exp(-r/range)/r", "units": "MeV fm"},
                "range": {"long_name": "range of the Yukawa well", "units": "fm"}}

    def condition_grid(self, strength, axes, cube_mass=1.0):
        coupling = np.asarray(axes["coupling"], dtype=float)
        range_fm = np.asarray(axes["range"], dtype=float)
        return ConditionGrid("coupling", coupling, np.asarray(self.strength_for(coupling), dtype=float), ("range",),
                             (range_fm,), range_fm * FM_M / self.system(cube_mass).length_m, self.condition_attributes())

    @property
    def critical_strengths_wanted(self):
        return True

    def critical_strength_variable(self):
        return "critical_coupling", {
            "long_name": "critical coupling g^2 below which the state is not bound at this range", "units": "MeV fm",
            "comment": "g^2_c of V = -g^2 exp(-r/range)/r, from the zero-energy solution by root finding; inf where "
                       "the state is never bound"}

    def unit_notes(self, units, cube_mass=1.0):
        energy_eV = units.energy_J / sc.electron_volt
        return {"comment": f"nuclear units: energies in (hbar c)^2/(mu c^2 b^2) = {energy_eV / 1e6:.6g} MeV, "
                           f"lengths in b = {self.length_fm:g} fm, masses in mu = {self.reduced_mass_MeV:g} "
                           "MeV/c^2; each variable's energy_unit_in_J, energy_unit_in_eV or length_unit_in_m "
                           "gives its unit",
                "mass_units": f"mu = {self.reduced_mass_MeV / cube_mass:g} MeV/c^2 (the mass unit)"}

    def table_strength(self, strength, cube_mass=1.0):
        return "coupling_MeV_fm", float(self.coupling_MeV_fm(strength, cube_mass))

    def critical_length_columns(self, strength, critical_length, cube_mass=1.0):
        columns = super().critical_length_columns(strength, critical_length, cube_mass)
        g2 = float(self.coupling_MeV_fm(strength, cube_mass))
        # 2μg²λ_c/ħ²: the one-scale threshold, 2/1.19061 for the Yukawa ground state.
        _, to_fm = self.shown_length_unit(cube_mass)
        columns["two_mu_g2_lambda_over_hbar2"] = 2 * float(self.dimensionless(g2, critical_length * to_fm))
        return columns

    def command_line_reading(self):
        units = self.units
        return {"units": units, "energy_unit": "MeV", "energy_factor": units.energy_J / MEV_J, "length_unit": "fm",
                "length_factor": units.length_m / 1e-15,
                "description": f"nuclear, μ = {self.reduced_mass_MeV:g} MeV/c²"}

    def command_line_length(self, value, units):
        return float(positive("--range", value)) * FM_M / units.length_m

    def command_line_conditions(self, value):
        return {"range_fm": float(value)}

    def strength_input(self, value):
        return float(self.strength_for(value)), f"g² = {value:g} MeV fm"

    def for_family(self, info):
        variant = self.strength_variants.get(info.strength_dimension)
        return self if variant is None else variant(self.reduced_mass_MeV, self.length_fm)

    def grid_strength(self, values):
        """Engine strengths of the grid's own strength axis (``coupling_MeV_fm``: g² in MeV fm)."""
        return self.strength_for(values)

    def length_reading(self, info, charge=None):
        return self  # --range is a length in fm, whatever the family's length is

    def coupling_reading(self, info):
        # a charge-like strength is a coupling, energy × length: Yukawa's g², two-Yukawa's g
        symbol = info.coupling_symbol
        return StrengthReading("--coupling", f"{symbol}, MeV fm", "coupling", "MeV fm", float(self.strength_for(1.0)),
                               f"{symbol} = {{value:g}} MeV fm")
