"""Presets whose screening length follows from a density of free carriers at a temperature
(plasma electrons, a semiconductor's carriers): what reading a length as a density adds, and the
sweeps over the trade's own conditions (density × temperature)."""

from __future__ import annotations

import numpy as np
from scipy import constants as sc

from ...errors import InputError
from ..screening import MODEL_DESCRIPTIONS, MODELS, VALIDITY_FLAGS, VALIDITY_REASONS, Carriers, Validity
from ..units import convert
from .base import ConditionGrid, Preset

__all__ = ["CarrierScreening"]


class CarrierScreening(Preset):
    """A preset whose screening length λ(n, T) is set by a carrier density n at a temperature T.

    A subclass is a dataclass with a ``screening`` field (one of
    :data:`~boundscape.physics.screening.MODELS`) and gives :attr:`carriers`, :attr:`density_name`,
    :attr:`temperature_name` and :attr:`temperature_unit` (``"eV"`` or ``"K"``), the reference
    temperature of a sweep over screening lengths (:attr:`reference_temperature`), and the
    engine's length unit (:meth:`unit_system`).  Densities are in m⁻³ inside, cm⁻³ in the cube.
    """

    temperature_name: str = "temperature"
    temperature_unit: str = "K"

    def _check_screening(self):
        if self.screening not in MODELS:
            raise InputError(f"{self.kind} screening must be one of {', '.join(MODELS)}, got {self.screening!r}")

    @property
    def carriers(self) -> Carriers:
        raise NotImplementedError

    @property
    def screening_model(self) -> str:
        return self.screening

    @property
    def reference_temperature(self) -> float:
        """The temperature a cube's density coordinate, the loss table and the line chart assume
        in a sweep over screening lengths."""
        raise NotImplementedError

    @property
    def density_note(self) -> str:
        """Under which conditions a density is read from a length ("at T_e = 10 eV, debye")."""
        return f"at {self.temperature_symbol} = {self.reference_temperature:g} {self.temperature_unit}, {self.screening}"

    @property
    def temperature_symbol(self) -> str:
        return "T"

    def kT(self, temperature):
        """k_B T in J of a temperature in :attr:`temperature_unit`."""
        if self.temperature_unit == "eV":
            return convert(np.asarray(temperature, dtype=float), "eV", "J")
        return np.asarray(temperature, dtype=float) * sc.k

    # -- the physics ------------------------------------------------------------------------
    def screening_length_at(self, density_m3, temperature):
        """The screening length (m) at a carrier density (m⁻³) and a temperature (the preset's
        unit), in the preset's model."""
        return self.carriers.screening_length(density_m3, self.kT(temperature), self.screening)

    def loss_density(self, screening_length_m, temperature=None):
        """The density (m⁻³) at which the screening length equals ``screening_length_m`` (m), at
        ``temperature`` (default :attr:`reference_temperature`): a state of that critical length
        is lost above it."""
        temperature = self.reference_temperature if temperature is None else temperature
        return self.carriers.density_at(screening_length_m, self.kT(temperature), self.screening)

    def validity(self, density_m3, temperature) -> Validity:
        return self.carriers.validity(density_m3, self.kT(temperature), self.screening)

    @property
    def validity_flags(self):
        return VALIDITY_FLAGS, VALIDITY_REASONS

    # -- sweeps over conditions ----------------------------------------------------------------
    def condition_attributes(self) -> dict:
        density = self.density_name
        return {density: {"long_name": density.replace("_", " "), "units": "cm-3"},
                self.temperature_name: {"long_name": self.temperature_name.replace("_", " "),
                                        "units": self.temperature_unit}}

    def condition_grid(self, strength, axes: dict, cube_mass: float = 1.0) -> ConditionGrid:
        density, temperature = (np.asarray(axes[name], dtype=float) for name in self.condition_keys)
        length_m = self.screening_length_at(convert(density, "cm-3", "m-3")[:, None], temperature[None, :])
        return ConditionGrid("strength", np.asarray(strength, dtype=float), np.asarray(strength, dtype=float),
                             tuple(self.condition_keys), (density, temperature),
                             length_m / self.unit_system(cube_mass).length_m, self.condition_attributes())

    def length_conditions(self, screening_length_m):
        """(density m⁻³, temperature) that a sweep over screening lengths reads each length as:
        the density at the reference temperature."""
        lam = np.asarray(screening_length_m, dtype=float)
        density = np.full(lam.shape, np.nan)
        finite = np.isfinite(lam) & (lam > 0)
        density[finite] = self.loss_density(lam[finite])
        return density, self.reference_temperature

    def trade_criticals(self, critical_length_m, grid: ConditionGrid | None, strength_dim: str = "strength") -> dict:
        """The loss density of every stored state (cm⁻³): per temperature of a condition sweep,
        at the reference temperature otherwise.  ``critical_length_m`` is (strength, l, n_r);
        returns ``{name: (dims, values, attributes)}``."""
        lam = np.asarray(critical_length_m, dtype=float)
        temperatures = (np.asarray(grid.length_values[1]) if grid is not None
                        else np.array([self.reference_temperature]))
        finite = np.isfinite(lam) & (lam > 0)
        loss = np.full(lam.shape + (temperatures.size,), np.nan)
        for k, t in enumerate(temperatures):
            values = np.full(lam.shape, np.nan)
            values[finite] = self.loss_density(lam[finite], t)
            loss[..., k] = convert(values, "m-3", "cm-3")
        # The model's validity where each state is lost (NaN densities: flagged ok, never read).
        flag = self.validity(np.nan_to_num(convert(loss, "cm-3", "m-3"), nan=1.0), temperatures).flag
        name = f"loss_{self.density_name}"
        attrs = {"long_name": f"{self.density_name.replace('_', ' ')} above which the state is not bound",
                 "units": "cm-3", "ancillary_variables": f"{name}_validity",
                 "comment": f"where the {self.screening} screening length equals the state's critical screening "
                            f"length; NaN where the state is never bound"}
        flag_attrs = {"long_name": f"whether the {self.screening} screening model holds at {name}",
                      "flags": VALIDITY_FLAGS,
                      "comment": "; ".join(f"{key}: {why}" for key, why in VALIDITY_REASONS.items())}
        if grid is None:
            attrs["comment"] += f"; at the reference temperature {self.reference_temperature:g} {self.temperature_unit}"
            dims = (strength_dim, "l", "n_r")
            return {name: (dims, loss[..., 0], attrs), f"{name}_validity": (dims, flag[..., 0], flag_attrs)}
        dims = (strength_dim, "l", "n_r", self.temperature_name)
        return {name: (dims, loss, attrs), f"{name}_validity": (dims, flag, flag_attrs)}

    # -- what the cube, figures and command line ask ----------------------------------------
    def cube_attributes(self, cube_mass: float = 1.0) -> dict:
        return {**super().cube_attributes(cube_mass), "screening_model": self.screening,
                "screening_model_description": MODEL_DESCRIPTIONS[self.screening],
                "screening_species": ", ".join(s.name for s in self.carriers.species)}

    # -- the command line ---------------------------------------------------------------------
    def command_line_length(self, value, units):
        return float(self.screening_length_at(convert(value, "cm-3", "m-3"), self.reference_temperature)) / units.length_m

    def command_line_conditions(self, value):
        n = convert(value, "cm-3", "m-3")
        t = self.reference_temperature
        valid = self.validity(n, t)
        flag = VALIDITY_FLAGS[int(valid.flag)]
        return {f"{self.density_name}_cm-3": float(value),
                f"{self.temperature_name}_{self.temperature_unit}": float(t),
                "screening_model": self.screening, "screening_species": [s.name for s in self.carriers.species],
                "screening_length_nm": float(self.screening_length_at(n, t)) / 1e-9,
                "debye_length_nm": float(self.carriers.debye_length(n, self.kT(t))) / 1e-9,
                "coupling_parameter": float(valid.coupling_parameter), "debye_number": float(valid.debye_number),
                "degeneracy": float(valid.degeneracy), "screening_validity": flag,
                "screening_validity_reason": VALIDITY_REASONS[flag]}

    def critical_columns(self, critical_length_m):
        if not (np.isfinite(critical_length_m) and critical_length_m > 0):
            return {f"loss_{self.density_name}_cm-3": float("nan"), "screening_validity": ""}
        n = float(self.loss_density(critical_length_m))
        flag = VALIDITY_FLAGS[int(self.validity(n, self.reference_temperature).flag)]
        return {f"loss_{self.density_name}_cm-3": float(convert(n, "m-3", "cm-3")), "screening_validity": flag}

    def strength_text(self, value: float, attrs: dict) -> str:
        return f"Z = {value:g}"
