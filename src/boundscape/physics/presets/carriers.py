"""Presets whose screening length follows from a density of free carriers at a temperature
(plasma electrons, a semiconductor's carriers): what reading a length as a density adds."""

from __future__ import annotations

import math

from ..units import convert
from .base import Preset

__all__ = ["CarrierScreening"]


class CarrierScreening(Preset):
    """A preset whose screening length λ(n, T) is set by a carrier density n at a temperature T.

    A subclass names its density (:attr:`density_name`), its reference temperature
    (:attr:`reference_temperature`, in the preset's temperature unit) and gives
    :meth:`screening_length_at` and :meth:`loss_density`.
    """

    @property
    def reference_temperature(self) -> float:
        """The temperature a cube's density coordinate, the loss table and the line chart assume."""
        raise NotImplementedError

    @property
    def density_note(self) -> str:
        """Under which conditions a density is read from a length ("at T_e = 10 eV")."""
        raise NotImplementedError

    def screening_length_at(self, density_m3, temperature):
        """The screening length (m) at a carrier density (m⁻³) and a temperature (the preset's unit)."""
        raise NotImplementedError

    def loss_density(self, screening_length_m, temperature=None):
        """The density (m⁻³) at which the screening length equals ``screening_length_m`` (m), at
        ``temperature`` (default :attr:`reference_temperature`): a state of that critical length
        is lost above it."""
        raise NotImplementedError

    def strength_text(self, value: float, attrs: dict) -> str:
        return f"Z = {value:g}"

    def critical_length_columns(self, strength, critical_length: float, cube_mass: float = 1.0) -> dict:
        columns = super().critical_length_columns(strength, critical_length, cube_mass)
        length_m = self.unit_system(cube_mass).length_m
        density = float(self.loss_density(critical_length * length_m)) \
            if math.isfinite(critical_length) and critical_length > 0 else math.nan
        columns[f"loss_{self.density_name}_cm-3"] = convert(density, "m-3", "cm-3")
        return columns
