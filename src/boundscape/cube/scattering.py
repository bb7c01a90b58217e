"""The cube's scattering variables (``scattering: true`` or ``{energies: [...]}``).

Per cell and l (the cube's cell dimensions: (strength, screening_length, l), or a sweep's
conditions): ``scattering_length`` (a for l = 0, the generalised length a_l of
tan δ_l ≈ −(k a_l)^{2l+1} for l ≥ 1), ``inverse_scattering_length`` (1/a_l, smooth through a
threshold), ``effective_range`` (l = 0), each with its error estimate, and the flag
``scattering_status``.  With energies, per cell, l and ``scattering_energy`` (a dimension whose
coordinate is in the cube's energy unit, with the momentum k beside it): ``phase_shift`` (rad),
``cross_section`` and their errors, and the flag ``phase_shift_status``.

Units are the cube's own: every length in the unit of its ``critical_screening_length``, every
energy in that of its ``energy``, 1/a_l and k in the inverse of that length (``1/(L m)``), σ_l in
its square (``(L m)^2``); each says its size in SI (``length_unit_in_m``, ``energy_unit_in_J``,
``wavenumber_unit_in_per_m``, ``area_unit_in_m2``), which is what ``readable`` converts with.
Added after the preset has rewritten the cube's units, so they are taken from it as stored.

Collect adds the variables as placeholders, the flags' reasons gathered from the tiles
(:func:`add_scattering`), and streams the values in tile by tile with the levels.
"""

from __future__ import annotations

import json

import numpy as np

from ..sweep.scattering_tiles import (ENERGY_DIM, NOT_SOLVED, PHASE_FLAGS, PHASE_VARS, SCATTERING_FLAGS,
                                      SCATTERING_VARS, energies, variable_names)
from .model import flag_attrs, listing
from .resonances import inverse_length_attrs

__all__ = ["ENERGY_DIM", "fill_names", "add_scattering", "area_attrs"]

ENERGY_KEYS = ("units", "energy_unit_in_J", "energy_unit_in_eV")
LENGTH_KEYS = ("units", "length_unit_in_m")


def fill_names(plan) -> tuple[str, ...]:
    """The variables collect streams from the tiles into the cube (none if scattering is off)."""
    if plan.scattering is None:
        return ()
    return variable_names({"scattering": plan.scattering})


def area_attrs(length_attrs: dict) -> dict:
    """Units of an area in the square of a length whose attributes are ``length_attrs``."""
    size = float(length_attrs["length_unit_in_m"])
    return {"units": f"({length_attrs['units']})^2", "area_unit_in_m2": float(f"{size * size:.15g}")}


def _reasons(plan, tile_paths):
    """The flagged values' reasons, one line each, named by the engine cell's coordinates."""
    import netCDF4

    scattering, phases = [], []
    for tile, path in zip(plan.tiles, tile_paths):
        with netCDF4.Dataset(path) as nc:
            listed = json.loads(nc.getncattr("scattering_reasons_json"))
            listed_phases = json.loads(nc.getncattr("phase_shift_reasons_json"))
        for found, into in ((listed, scattering), (listed_phases, phases)):
            into += [f"strength={tile.strength[i]!r} screening_length={tile.screening_length[j]!r} "
                     f"l={int(plan.l[k])}: {text}" for i, j, k, text in found]
    return scattering, phases


def add_scattering(ds, plan, tile_paths, layout):
    """``ds`` with the scattering variables as placeholders (NaN, flags ``not_solved``) over
    ``layout``'s cell dimensions, for collect to fill from the tiles; their reasons listed."""
    length = {key: ds["critical_screening_length"].attrs[key] for key in LENGTH_KEYS
              if key in ds["critical_screening_length"].attrs}
    energy = {key: ds["energy"].attrs[key] for key in ENERGY_KEYS if key in ds["energy"].attrs}
    wavenumber = inverse_length_attrs(float(length["length_unit_in_m"]))
    dims = layout.cell_dims
    shape = tuple(ds.sizes[d] for d in dims)
    scattering_reasons, phase_reasons = _reasons(plan, tile_paths)
    nan = np.broadcast_to(np.float64(np.nan), shape)
    gone = "NaN where scattering_status is not ok"
    variables = {
        "scattering_length": (dims, nan, {
            "long_name": "scattering length a (l = 0) or generalised scattering length a_l (l >= 1)", **length,
            "ancillary_variables": "scattering_length_error scattering_status",
            "comment": "l = 0: a, the node of the zero-energy solution's exterior line u ~ r - a (k cot delta_0 -> "
                       "-1/a); l >= 1: a_l defined by tan delta_l ~ -(k a_l)^(2l+1) as k -> 0, the real root "
                       "(a_1^3 is the p-wave scattering volume); +-inf at a threshold, where a bound state of this "
                       f"l is lost; {gone}"}),
        "inverse_scattering_length": (dims, nan, {
            "long_name": "inverse scattering length 1/a_l", **wavenumber,
            "ancillary_variables": "inverse_scattering_length_error scattering_status",
            "comment": "1/a (l = 0), 1/a_l (l >= 1): passes through zero, from negative to positive as the "
                       "potential binds more, exactly where a state of this l is lost (critical_screening_length); "
                       f"jumps from +inf to -inf where a_l passes through zero; {gone}"}),
        "effective_range": (dims, nan, {
            "long_name": "effective range r_e", **length,
            "ancillary_variables": "effective_range_error scattering_status",
            "comment": "l = 0 only (NaN for l >= 1): k cot delta_0 = -1/a + r_e k^2/2 + O(k^4), "
                       f"r_e = 2 int (v0^2 - u0^2) dr (Bethe, Phys. Rev. 76, 38 (1949)); {gone}"}),
        "scattering_status": (dims, np.broadcast_to(np.int8(NOT_SOLVED), shape), {
            "long_name": "status of the zero-energy scattering values of the cell",
            **flag_attrs(SCATTERING_FLAGS),
            "comment": "not_converged: an error estimate above the engine's tolerance (1e-9 on "
                       "arctan(a_l^(2l+1)/L^(2l+1)), L the screening length, and on r_e relative to max(|r_e|, L)); "
                       "input_rejected: a problem beyond the engine's grid; not_solved: the cell's bound states "
                       "were not solved (see status)",
            "flagged_values": listing(scattering_reasons)}),
    }
    for name, source in (("scattering_length", length), ("inverse_scattering_length", wavenumber),
                         ("effective_range", length)):
        variables[f"{name}_error"] = (dims, nan, {
            "long_name": f"error estimate of {variables[name][2]['long_name'].split(' (')[0]}", **source,
            "comment": "absolute: the change of the Richardson extrapolation over grids h, h/2, h/4 against the "
                       "two-grid one, carried through from the angle arctan(a_l^(2l+1)/L^(2l+1))"})
    coords = {}
    values = energies({"scattering": plan.scattering})
    if values:
        e = np.asarray(values, dtype=np.float64)
        mass = float(plan.engine["mass"])
        coords[ENERGY_DIM] = (ENERGY_DIM, e, {
            "long_name": "collision energy E in the centre-of-mass frame", **energy,
            "comment": "E = (hbar k)^2/(2 mu) above threshold: the configured scattering.energies, given in the "
                       "preset's energy unit (hartree without a preset), stored in the cube's energy unit"})
        coords["scattering_momentum"] = (ENERGY_DIM, np.sqrt(2.0 * mass * e), {
            "long_name": "relative momentum k of the collision energy", **wavenumber,
            "comment": "k = sqrt(2 mu E)/hbar"})
        pdims = dims + (ENERGY_DIM,)
        pnan = np.broadcast_to(np.float64(np.nan), shape + (e.size,))
        area = area_attrs(length)
        gone = "NaN where phase_shift_status is not ok"
        variables.update({
            "phase_shift": (pdims, pnan, {
                "long_name": "phase shift delta_l", "units": "rad",
                "ancillary_variables": "phase_shift_error phase_shift_status",
                "comment": "on the continuous branch with delta_l -> 0 as E -> inf, so that delta_l(0+) = N_b pi "
                           "(Levinson's theorem; N_b = num_bound; (N_b + 1/2) pi for l = 0 with a state exactly "
                           f"at threshold); {gone}"}),
            "phase_shift_error": (pdims, pnan, {
                "long_name": "error estimate of the phase shift", "units": "rad",
                "comment": "absolute: Richardson over grids h, h/2, h/4 against the two-grid extrapolation"}),
            "cross_section": (pdims, pnan, {
                "long_name": "partial cross section sigma_l", **area,
                "ancillary_variables": "cross_section_error phase_shift_status",
                "comment": "sigma_l = 4 pi (2l + 1) sin^2(delta_l)/k^2, the partial-wave share of the elastic "
                           f"cross section; {gone}"}),
            "cross_section_error": (pdims, pnan, {
                "long_name": "error estimate of the partial cross section", **area,
                "comment": "absolute, from the phase shift's"}),
            "phase_shift_status": (pdims, np.broadcast_to(np.int8(NOT_SOLVED), shape + (e.size,)), {
                "long_name": "status of the phase shift at each energy",
                **flag_attrs(PHASE_FLAGS),
                "comment": "not_converged: error estimate above 1e-9 of |delta_l mod pi|; energy_too_high: the grid "
                           "that resolves k there would exceed the engine's size limit; not_solved: the cell's "
                           "bound states were not solved (see status)",
                "flagged_values": listing(phase_reasons)}),
        })
    out = ds.assign_coords(coords).assign(variables)
    out.attrs["source"] = out.attrs.get("source", "").rstrip(")") + ", scattering" + \
        (", phase_shifts)" if values else ")")
    return out


def _check_names():
    # Every variable a tile stores is one this module describes.
    described = set(SCATTERING_VARS) | {"scattering_status"} | set(PHASE_VARS) | {"phase_shift_status"}
    assert set(variable_names({"scattering": {"energies": [1.0]}})) == described


_check_names()
