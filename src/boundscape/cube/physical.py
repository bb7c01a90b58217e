"""The physical reading of a cube's axes under a preset (plasma, semiconductor, nuclear).

The numbers stay in the engine's units; the preset adds physical coordinates beside them and,
where it reads the cube in other units (effective or nuclear), says so in their ``units``.
"""

from __future__ import annotations

import numpy as np
import yaml

from ..physics.presets import NO_PRESET, from_config
from ..physics.units import ATOMIC, convert
from ..sweep.tiles import CRITICAL_FLAGS
from .resonances import inverse_length_attrs
from .model import flag_attrs, listing

__all__ = ["add_physical_coordinates", "add_trade_variables", "preset_of"]


def preset_of(ds):
    """The preset named in the cube's stored config (:data:`~boundscape.physics.presets.NO_PRESET`
    if it names none), and its map settings."""
    config = yaml.safe_load(ds.attrs.get("config_yaml", "") or "{}") or {}
    family = (config.get("potential") or {}).get("family")
    return from_config(config.get("preset"), config.get("grid") or {}, family), (config.get("preset") or {}).get("map", {})


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
    coords = preset.physical_coordinates(ds["strength"].values, lam_m, mass, ds["screening_length"].dims)
    out = ds.assign_coords({k: (d, np.asarray(v, dtype=float), a) for k, (d, v, a) in coords.items()})
    out.attrs.update(preset.cube_attributes(mass))
    _describe_units(out, preset, units, mass)
    return out


_ATOMIC_ONLY = ("hartree_in_eV", "hartree_in_J", "bohr_in_m")


def _describe_units(out, preset, units, mass):
    """Every unit attribute says what is stored under the preset: no stale hartree or bohr.  An
    energy, length or wavenumber in the engine's units is known by its ``energy_unit_in_J``,
    ``length_unit_in_m`` or ``wavenumber_unit_in_per_m``."""
    strength_name = preset.strength_long_name
    if strength_name is not None and "strength" in out.coords and out["strength"].attrs.get("units") == "1":
        out["strength"].attrs["long_name"] = strength_name
    if units is ATOMIC:
        return
    energy_eV = units.energy_eV
    for name in out.variables:
        attrs = out[name].attrs
        if not {"energy_unit_in_J", "length_unit_in_m", "wavenumber_unit_in_per_m"} & set(attrs):
            continue
        for key in _ATOMIC_ONLY:
            attrs.pop(key, None)
        if "wavenumber_unit_in_per_m" in attrs:
            attrs.update(inverse_length_attrs(units.length_m))
        elif "length_unit_in_m" in attrs:
            attrs.update(units=units.length_udunits(), length_unit_in_m=units.length_m)
        else:
            attrs.update(units=units.energy_udunits(), energy_unit_in_J=units.energy_J, energy_unit_in_eV=energy_eV)
    for key in ("hartree_energy_in_J", "hartree_energy_in_eV", "bohr_radius_in_m"):
        out.attrs.pop(key, None)
    out.attrs.update(energy_unit_in_J=units.energy_J, energy_unit_in_eV=energy_eV, length_unit_in_m=units.length_m)
    out.attrs.update(preset.unit_notes(units, mass))


def add_trade_variables(ds, preset, plan, criticals):
    """``ds`` with what the preset reads in the trade's terms: the screening model's validity in
    every cell (``coupling_parameter``, ``debye_number``, ``degeneracy``, ``screening_validity``),
    the loss density of every state (and the model's validity there), and the critical strength
    at each screening length where the preset asks for it (the nuclear ``critical_coupling``)."""
    mass = float(ds.attrs.get("mass", 1.0))
    units = preset.unit_system(mass)
    grid = plan.conditions
    out = ds
    flags = preset.validity_flags
    lam = ds["screening_length"]
    if flags is not None and np.isfinite(lam.values).all():
        if grid is not None:
            density = convert(grid.length_values[0], "cm-3", "m-3")[:, None]
            temperature = np.asarray(grid.length_values[1])[None, :]
        else:
            density, temperature = preset.length_conditions(lam.values * units.length_m)
        out = out.assign(_validity_variables(preset.validity(density, temperature), lam.dims, flags))
    lam_c = ds["critical_screening_length"].values * units.length_m
    for name, (dims, values, attrs) in preset.trade_criticals(lam_c, grid, ds["energy"].dims[0]).items():
        attrs = dict(attrs)
        if "flags" in attrs:  # a validity flag of the preset's: CF flag attributes
            attrs.update(flag_attrs(attrs.pop("flags")))
            values = np.asarray(values, np.int8)
        out = out.assign({name: (dims, values, attrs)})
    if "critical_strength" in criticals:
        name, attrs = preset.critical_strength_variable()
        along = lam.dims[0] if grid is not None else "screening_length"
        dims = (along, "l", "n_r")
        engine = criticals["critical_strength"]
        values = np.asarray(preset.strength_values(engine, mass), dtype=float)
        # where the critical strength lies against the sweep's strengths (as for the lengths)
        flag = criticals["critical_strength_flag"].copy()
        finite = np.isfinite(engine) & (flag == 0)
        flag[finite & (engine < plan.strength.min())] = CRITICAL_FLAGS.index("below_grid")
        flag[finite & (engine > plan.strength.max())] = CRITICAL_FLAGS.index("above_grid")
        criticals = {**criticals, "critical_strength_flag": flag}
        out = out.assign({
            name: (dims, values, {**attrs, "ancillary_variables": f"{name}_flag"}),
            f"{name}_flag": (dims, criticals["critical_strength_flag"].astype(np.int8), {
                "long_name": f"why {name.replace('_', ' ')} is or is not given", **flag_attrs(CRITICAL_FLAGS),
                "comment": "within_grid, below_grid, above_grid: against the sweep's strengths (below_grid: bound at "
                           "every strength of the sweep at that length); never_bound: not bound at any strength; "
                           "not_converged: see flagged_states",
                "flagged_states": listing(criticals.get("critical_strength_reasons", []))})})
    return out


def _validity_variables(validity, dims, flags):
    names, reasons = flags
    comment = "; ".join(f"{name}: {reasons[name]}" for name in names)
    return {
        "coupling_parameter": (dims, validity.coupling_parameter, {
            "long_name": "coupling parameter Gamma of the screening carriers", "units": "1",
            "comment": "Gamma = e^2/(4 pi eps a k_B T), a = (3/(4 pi n))^(1/3) the carriers' mean spacing; "
                       "Gamma << 1: weakly coupled"}),
        "debye_number": (dims, validity.debye_number, {
            "long_name": "carriers in a Debye sphere N_D", "units": "1",
            "comment": "N_D = (4 pi/3) n lambda_D^3 with the classical Debye length of all screening species; "
                       "Debye-Hueckel screening needs N_D >> 1 (NRL Plasma Formulary)"}),
        "degeneracy": (dims, validity.degeneracy, {
            "long_name": "degeneracy k_B T/E_F of the screening electrons", "units": "1",
            "comment": "k_B T/E_F >> 1: a classical gas (Debye); << 1: degenerate (Thomas-Fermi)"}),
        "screening_validity": (dims, np.asarray(validity.flag, np.int8), {
            "long_name": "where the screening model holds", **flag_attrs(names), "comment": comment}),
    }
