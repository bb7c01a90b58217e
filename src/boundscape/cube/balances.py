"""The cube's self-consistent semiconductor balances (``populations: true``): the donor freeze-out
over (strength, donor_concentration, temperature), or the exciton ⇄ electron–hole plasma balance
over (strength, carrier_density, temperature), in cm⁻³, meV and nm, with the balance's flag.
The tiles solve each condition once (:mod:`boundscape.sweep.balance_tiles`); here they are
gathered (no l, no n_r: small arrays) and given their CF attributes."""

from __future__ import annotations

import json

import numpy as np

from ..sweep.balance_tiles import BALANCE_FLAGS, BALANCE_VARS, KINDS, gather
from .model import flag_attrs
from .netcdf import read_part_variables

__all__ = ["add_balances", "FREE_DENSITY_NAME", "balance_attrs"]

# The cube's name of the tiles' free density, per kind.
FREE_DENSITY_NAME = {"donors": "free_electron_density", "excitons": "free_pair_density"}
WHO = {"donors": "donor", "excitons": "exciton"}
SAHA = {"donors": "N_D0/N_D+ = exp(eta) U with n = N_D+ (charge neutrality, no compensation; Sze & Ng, Physics of "
                  "Semiconductor Devices, 3rd ed., section 1.4, reference from memory)",
        "excitons": "n_X = 4 (M kT/2 pi hbar^2)^{3/2} U exp(eta_e + eta_h), n + n_X = the pair density (Saha's law "
                    "for excitons; Haug & Koch, reference from memory)"}


def balance_attrs(kind: str) -> dict:
    """name: (long_name, units, comment) of a kind's variables."""
    who = WHO[kind]
    free = ("free electron density of the self-consistent donor freeze-out" if kind == "donors"
            else "density of free electron-hole pairs (n_e = n_h) of the self-consistent exciton balance")
    fraction = "ionized donor fraction N_D+/N_D" if kind == "donors" else "ionized fraction of the pairs, n/n_pairs"
    return {
        FREE_DENSITY_NAME[kind]: (free, "cm-3", f"the free carriers screen the {who}s in the preset's model"),
        "ionized_fraction": (fraction, "1", f"self-consistent: n sets the screening, the screening the {who}'s "
                             f"complete level set, the levels the bound density: {SAHA[kind]}; the ionized branch "
                             "where several solutions exist (Mott)"),
        "ionization_energy": (f"ionization energy of the screened {who} at the self-consistent screening", "meV",
                              "I = -E_1s from the band edge; 0 where the 1s is no longer bound"),
        "continuum_lowering": (f"continuum lowering of the {who} at the self-consistent screening, I_0 - I", "meV",
                               "I_0 = Z^2 Ry mu*/eps_r^2, the unscreened hydrogenic level"),
        "partition_function": (f"partition function of the screened {who}", "1",
                               f"sum over every bound (n, l) of {'2' if kind == 'donors' else ''}(2l + 1) "
                               "exp(-E_nl/kT), energies from the band edge, at the self-consistent screening"),
        "self_consistent_screening_length": ("screening length of the self-consistent free carriers", "nm", ""),
        "balance_solutions": ("number of self-consistent solutions", "1",
                              "more than one: the balance is hysteretic near the Mott transition"),
    }


def add_balances(ds, plan, tile_paths, preset):
    """``ds`` with the balance of every condition over (strength, *the kind's axes)."""
    kind = plan.engine["populations"]["kind"]
    merged = gather(plan, ((tile, read_part_variables(path, BALANCE_VARS)) for tile, path in zip(plan.tiles, tile_paths)))
    merged[FREE_DENSITY_NAME[kind]] = merged.pop("free_density")
    z = np.asarray(plan.strength, float)[:, None, None]
    merged["continuum_lowering"] = z ** 2 * preset.effective.energy_eV * 1e3 / 2.0 - merged["ionization_energy"]
    dims = ("strength", *KINDS[kind])
    out = ds.copy()
    for name, (long_name, units, comment) in balance_attrs(kind).items():
        attrs = {"long_name": long_name, "units": units, "ancillary_variables": "balance_status"}
        if comment:
            attrs["comment"] = comment
        out[name] = (dims, np.asarray(merged[name], np.int16 if name == "balance_solutions" else np.float64), attrs)
    reasons = []
    import netCDF4

    totals, temperatures = plan.conditions.length_values
    for tile, path in zip(plan.tiles, tile_paths):
        with netCDF4.Dataset(path) as nc:
            reasons += [f"strength={tile.strength[i]!r} {dims[1]}={totals[a]!r} temperature={temperatures[b]!r}: {text}"
                        for i, a, b, text in json.loads(nc.getncattr("population_reasons_json"))]
    out["balance_status"] = (dims, merged["balance_status"], {
        "long_name": f"status of the self-consistent {WHO[kind]} balance", **flag_attrs(BALANCE_FLAGS),
        "comment": "several_solutions: hysteretic, the ionized branch taken; incomplete_scan or beyond_engine_limits: "
                   "the search stopped at its reach. Why, per cell: attribute flagged_cells",
        "flagged_cells": "\n".join(reasons) or "none"})
    out.attrs["populations"] = np.int8(1)
    return out
