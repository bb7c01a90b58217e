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
from . import resonances as past

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
    _describe_units(out, preset, units, mass)
    return out


_ENERGIES = ("energy", "energy_error", "line_energy", "line_shift") + past.ENERGY_VARS
_LENGTHS = ("screening_length", "mean_radius", "critical_screening_length") + past.LENGTH_VARS
_ATOMIC_ONLY = ("hartree_in_eV", "hartree_in_J", "bohr_in_m")


def _strength_name(preset, ds):
    if isinstance(preset, Plasma):
        return "nuclear charge Z of the hydrogen-like ion"
    if isinstance(preset, Semiconductor):
        who = "charge number Z of the exciton's Coulomb attraction" if preset.is_exciton else "donor charge number Z"
        return who if preset.units_choice == "effective" else f"{who} divided by eps_r (true atomic units)"
    if isinstance(preset, Nuclear):
        return "engine strength g^2 mu c^2 b/(hbar c)^2 (coordinate coupling gives g^2)"
    return ds["strength"].attrs.get("long_name", "strength")


def _describe_units(out, preset, units, mass):
    """Every unit attribute says what is stored under the preset: no stale hartree or bohr."""
    if "strength" in out.coords and out["strength"].attrs.get("units") == "1":
        out["strength"].attrs["long_name"] = _strength_name(preset, out)
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
    if isinstance(preset, Semiconductor):
        a_nm, e_meV = units.length_m / sc.nano, energy_eV * 1e3
        out.attrs["comment"] = (f"effective atomic units of the semiconductor preset: energies in 2Ry* = {e_meV:.6g} meV, "
                                f"lengths in a* = {a_nm:.6g} nm, masses in mu* = {preset.reduced_mass:.6g} electron "
                                "masses; each variable's energy_unit_in_J, energy_unit_in_eV or length_unit_in_m "
                                "gives its unit")
        out.attrs["mass_units"] = f"mu* = {preset.reduced_mass:.6g} electron masses (the mass unit)"
    elif isinstance(preset, Nuclear):
        out.attrs["comment"] = (f"nuclear units: energies in (hbar c)^2/(mu c^2 b^2) = {energy_eV / 1e6:.6g} MeV, "
                                f"lengths in b = {preset.length_fm:g} fm, masses in mu = {preset.reduced_mass_MeV:g} "
                                "MeV/c^2; each variable's energy_unit_in_J, energy_unit_in_eV or length_unit_in_m "
                                "gives its unit")
        out.attrs["mass_units"] = f"mu = {preset.reduced_mass_MeV / mass:g} MeV/c^2 (the mass unit)"
