"""The nuclear preset read for a family whose strength is a depth (``square_well``,
``woods_saxon``: ``strength_dimension = "energy"``): V₀ in MeV, the radius (and a Woods–Saxon
diffuseness) in fm.

The engine runs in the nuclear preset's units (lengths in b fm, energies in (ħc)²/(μc² b²)), so a
depth V₀ in MeV is the engine strength V₀·μc²·b²/(ħc)²; a sweep gives the depths as
``grid.depth_MeV`` (or engine strengths as ``grid.strength``), and the cube carries them as the
coordinate ``depth`` (MeV) beside its ``strength`` axis, its critical strengths as
``critical_depth`` (MeV) at each radius.  Nothing here is a Yukawa coupling: the preset's
couplings g² (``grid.coupling_MeV_fm``, ``--coupling``) apply to the charge-like families only.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ...checks import positive
from ..units import MEV_J
from .base import Preset
from .nuclear import Nuclear

__all__ = ["NuclearDepth"]


@dataclass(frozen=True)
class NuclearDepth(Nuclear):
    """The nuclear preset for a depth family: V₀ in MeV over radii in fm."""

    grid_axes = ("depth_MeV",)
    strength_flag = "--strength"
    strength_meaning = "well depth V0, MeV"

    def depth_MeV(self, strength, cube_mass: float = 1.0):
        """The depth V₀ (MeV) of engine strengths (the engine's energy unit, mass ``cube_mass``)."""
        return np.asarray(strength, dtype=float) * self.system(cube_mass).energy_J / MEV_J

    def grid_strength(self, values):
        """Engine strengths (mass 1) of depths V₀ in MeV: V₀·μc²·b²/(ħc)²."""
        return positive("depth V0", values) * MEV_J / self.units.energy_J

    # -- what the cube and figures ask ------------------------------------------------------
    def strength_values(self, strength, cube_mass=1.0):
        return self.depth_MeV(strength, cube_mass)

    def strength_label(self, attrs):
        return "well depth V0 (MeV)"

    def strength_text(self, value, attrs):
        return f"V0 = {value:.4g} MeV"

    @property
    def strength_long_name(self):
        return "engine well depth V0 mu c^2 b^2/(hbar c)^2 (coordinate depth gives V0 in MeV)"

    def physical_coordinates(self, strength, screening_length_m, cube_mass=1.0, dims=("screening_length",)):
        depth = {"depth": (("strength",), self.depth_MeV(strength, cube_mass),
                           {"long_name": "well depth V0", "units": "MeV"})}
        return {**depth, **Preset.physical_coordinates(self, strength, screening_length_m, cube_mass, dims)}

    def critical_strength_variable(self):
        return "critical_depth", {
            "long_name": "critical well depth V0 below which the state is not bound at this radius", "units": "MeV",
            "comment": "from the zero-energy solution by root finding; inf where the state is never bound"}

    def table_strength(self, strength, cube_mass=1.0):
        return "depth_MeV", float(self.depth_MeV(strength, cube_mass))

    def critical_length_columns(self, strength, critical_length, cube_mass=1.0):
        # the radius in fm; the Yukawa's one-scale number 2μg²λ/ħ² has no meaning for a well
        return Preset.critical_length_columns(self, strength, critical_length, cube_mass)


Nuclear.strength_variants["energy"] = NuclearDepth
