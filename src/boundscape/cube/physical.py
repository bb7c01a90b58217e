"""The physical reading of a cube's axes under a preset (plasma, semiconductor, nuclear).

The numbers stay in the engine's units; the preset adds physical coordinates beside them and,
where it reads the cube in other units (effective or nuclear), says so in their ``units``.
"""

from __future__ import annotations

import numpy as np
import yaml
from scipy import constants as sc

from ..physics.presets import Nuclear, Plasma, Semiconductor, cube_units, from_config
from ..physics.units import ATOMIC, FM_M

__all__ = ["add_physical_coordinates", "preset_of"]


def preset_of(ds):
    """The preset named in the cube's stored config (``None`` if it names none), and its map settings."""
    config = yaml.safe_load(ds.attrs.get("config_yaml", "") or "{}") or {}
    return from_config(config.get("preset")), (config.get("preset") or {}).get("map", {})


def add_physical_coordinates(ds, preset, cube_mass=None):
    """Return ``ds`` with the preset's physical coordinates next to the atomic ones.

    Adds ``screening_length_<unit>`` along ``screening_length`` and, per preset, the
    ``electron_density`` (plasma, at the reference temperature), ``carrier_density`` and
    ``donor_charge`` (semiconductor) or ``coupling`` g² (nuclear); each with CF units.  Where the
    preset reads the cube in units other than atomic ones, the ``units`` of the lengths and energies
    become that system's scaled units; no number changes.
    """
    if preset is None:
        return ds
    mass = float(ds.attrs.get("mass", 1.0) if cube_mass is None else cube_mass)
    lam = ds["screening_length"].values
    coords = {}
    kind = type(preset).__name__.lower()
    units = cube_units(preset, mass)
    if isinstance(preset, Nuclear):
        coords["coupling"] = ("strength", preset.coupling_MeV_fm(ds["strength"].values, mass),
                              {"long_name": "coupling g² of V = -g² exp(-r/λ)/r", "units": "MeV fm"})
    lam_m = lam * units.length_m
    unit = preset.length_unit
    scale = {"nm": sc.nano, "fm": FM_M}[unit]
    coords[f"screening_length_{unit}"] = ("screening_length", lam_m / scale, {
        "long_name": f"screening length in {unit} ({kind} preset)", "units": unit})
    if isinstance(preset, Plasma):
        coords["electron_density"] = ("screening_length", preset.density_for(lam_m, preset.temperature_eV), {
            "long_name": f"electron density giving this Debye length at T_e = {preset.temperature_eV:g} eV",
            "units": "m-3"})
    if isinstance(preset, Semiconductor):
        coords["carrier_density"] = ("screening_length", preset.density_for(lam_m), {
            "long_name": f"carrier density giving this screening length ({preset.screening})", "units": "m-3"})
        coords["donor_charge"] = ("strength", preset.donor_charge(ds["strength"].values), {
            "long_name": "donor charge number", "units": "1"})
    out = ds.assign_coords({k: (d, np.asarray(v, dtype=float), a) for k, (d, v, a) in coords.items()})
    out.attrs["preset"] = kind
    out.attrs["preset_energy_unit_J"] = units.energy_J
    out.attrs["preset_length_unit_m"] = units.length_m
    if units is not ATOMIC:
        # The numbers are in the preset's units (a*, 2Ry*; b, ħ²/μb²): say so, so the file stays true.
        lengths = ("screening_length", "mean_radius", "critical_screening_length")
        for name in lengths + ("energy", "energy_error"):
            if name in out.variables:
                out[name].attrs["units"] = units.length_udunits() if name in lengths else units.energy_udunits()
    return out
