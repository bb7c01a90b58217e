"""The physical reading of a cube's axes under a preset (plasma, semiconductor, nuclear).

The numbers stay in the engine's units; the preset adds physical coordinates beside them and,
where it reads the cube in other units (effective or nuclear), says so in their ``units``.
"""

from __future__ import annotations

import numpy as np
import yaml
from scipy import constants as sc

from ..physics.presets import NO_PRESET, from_config
from ..physics.units import ATOMIC
from . import resonances as past

__all__ = ["add_physical_coordinates", "preset_of"]


def preset_of(ds):
    """The preset named in the cube's stored config (:data:`~boundscape.physics.presets.NO_PRESET`
    if it names none), and its map settings."""
    config = yaml.safe_load(ds.attrs.get("config_yaml", "") or "{}") or {}
    return from_config(config.get("preset")), (config.get("preset") or {}).get("map", {})


def add_physical_coordinates(ds, preset=NO_PRESET, cube_mass=None):
    """Return ``ds`` with the preset's physical coordinates next to the atomic ones.

    The preset says which (:meth:`~boundscape.physics.presets.Preset.physical_coordinates`):
    ``screening_length_<unit>`` along ``screening_length`` and, per preset, the
    ``electron_density`` (plasma, at the reference temperature), ``carrier_density`` and
    ``donor_charge`` (semiconductor) or ``coupling`` g² (nuclear); each with CF units.  Where the
    preset reads the cube in units other than atomic ones, the ``units`` of the lengths and energies
    become that system's scaled units; no number changes.  Without a preset nothing is added.
    """
    mass = float(ds.attrs.get("mass", 1.0) if cube_mass is None else cube_mass)
    units = preset.unit_system(mass)
    lam_m = ds["screening_length"].values * units.length_m
    coords = preset.physical_coordinates(ds["strength"].values, lam_m, mass)
    out = ds.assign_coords({k: (d, np.asarray(v, dtype=float), a) for k, (d, v, a) in coords.items()})
    out.attrs.update(preset.cube_attributes(mass))
    _describe_units(out, preset, units, mass)
    return out


_ENERGIES = ("energy", "energy_error", "line_energy", "line_shift") + past.ENERGY_VARS
_LENGTHS = ("screening_length", "mean_radius", "critical_screening_length") + past.LENGTH_VARS
_ATOMIC_ONLY = ("hartree_in_eV", "hartree_in_J", "bohr_in_m")


def _describe_units(out, preset, units, mass):
    """Every unit attribute says what is stored under the preset: no stale hartree or bohr."""
    strength_name = preset.strength_long_name
    if strength_name is not None and "strength" in out.coords and out["strength"].attrs.get("units") == "1":
        out["strength"].attrs["long_name"] = strength_name
    if units is ATOMIC:
        return
    energy_eV = units.energy_J / sc.electron_volt
    for name in _ENERGIES + _LENGTHS + past.INVERSE_LENGTH_VARS:
        if name not in out.variables:
            continue
        attrs = out[name].attrs
        for key in _ATOMIC_ONLY:
            attrs.pop(key, None)
        if name in past.INVERSE_LENGTH_VARS:
            attrs.update(past.inverse_length_attrs(units.length_m))
        elif name in _LENGTHS:
            attrs.update(units=units.length_udunits(), length_unit_in_m=units.length_m)
        else:
            attrs.update(units=units.energy_udunits(), energy_unit_in_J=units.energy_J, energy_unit_in_eV=energy_eV)
    for key in ("hartree_energy_in_J", "hartree_energy_in_eV", "bohr_radius_in_m"):
        out.attrs.pop(key, None)
    out.attrs.update(energy_unit_in_J=units.energy_J, energy_unit_in_eV=energy_eV, length_unit_in_m=units.length_m)
    out.attrs.update(preset.unit_notes(units, mass))
