"""The cube's populations (``populations: true``): partition functions, ionization energy,
continuum lowering (this model, Stewart–Pyatt, Ecker–Kröll) and the Saha ionized fraction over
(strength, electron_density, electron_temperature), in eV, with a flag for an incomplete level set.

The tiles hold each engine cell's complete level set summed at every temperature
(:mod:`boundscape.sweep.population_tiles`); here they are gathered (small arrays: no l, no n_r),
read onto the conditions and given their CF attributes.
"""

from __future__ import annotations

import json

import numpy as np

from ..sweep.population_tiles import HARTREE_EV, POPULATION_FLAGS, TILE_DIMS, condition_populations
from ..sweep.balance_tiles import KINDS as BALANCE_KINDS
from .balances import add_balances
from .model import flag_attrs
from .netcdf import read_part_variables

__all__ = ["POPULATION_VARS", "add_populations", "SAHA_CONVENTION", "PLANCK_LARKIN_SOURCE"]

SAHA_CONVENTION = ("hydrogen-like ion <-> bare nucleus: n_Z/n_{Z-1} = 2 (2 pi m_e k T_e/h^2)^{3/2} / (n_e U), "
                   "with the bare nucleus's partition function taken as 1 and the free electron's spin weight 2; "
                   "ionized_fraction = n_Z/(n_Z + n_{Z-1}) (M. N. Saha, Phil. Mag. 40, 472 (1920))")
PLANCK_LARKIN_SOURCE = ("U_PL = sum_n 2 n^2 (exp(x_n) - 1 - x_n), x_n = Z^2 mu/(2 n^2 k T), over the unscreened "
                        "hydrogen-like levels (M. Planck, Ann. Phys. 380, 673 (1924); A. I. Larkin, Sov. Phys. JETP "
                        "11, 1363 (1960)); for comparison, independent of the screening")
U_COMMENT = ("U = sum over every bound (n, l) of the screened ion of 2(2l + 1) exp(-E_nl/k T_e), E_nl < 0 from the "
             "screened continuum; the level set is complete (every l that binds, every bound n_r, from the exact "
             "zero-energy counts), or truncated with partition_function_omitted_bound bounding what it leaves out; "
             "NaN where level_set_status says U is unknown")

# name: (long_name, units, comment, energy in hartree to convert)
POPULATION_VARS = {
    "bound_state_count": ("number of bound states of the screened ion, sum of 2(2l + 1)", "1",
                          "every bound (n, l), spin included; -1 where the set could not be solved", False),
    "partition_function": ("partition function of the screened hydrogen-like ion", "1", U_COMMENT, False),
    "partition_function_omitted_bound": ("upper bound on the part of U a truncated level set leaves out", "1",
                                         "0 for a complete set", False),
    "planck_larkin_partition_function": ("Planck-Larkin partition function of the unscreened hydrogen-like ion",
                                         "1", PLANCK_LARKIN_SOURCE, False),
    "ionization_energy": ("ionization energy of the screened ion, I = -E_1s", "eV",
                          "0 where the 1s is no longer bound", True),
    "continuum_lowering": ("continuum lowering of this model, I_0 - I", "eV",
                           "I_0 = Z^2 mu/2 hartree, the unscreened hydrogen-like ion's ionization energy", True),
    "continuum_lowering_stewart_pyatt": ("continuum lowering of Stewart and Pyatt", "eV",
                                         "J. C. Stewart and K. D. Pyatt, Astrophys. J. 144, 1203 (1966); {plasma}",
                                         True),
    "continuum_lowering_ecker_kroll": ("continuum lowering of Ecker and Kroll", "eV",
                                       "G. Ecker and W. Kroll, Phys. Fluids 6, 62 (1963), constant C = 1; {plasma}",
                                       True),
    "ionized_fraction": ("ionized fraction of the hydrogen-like ion, n_Z/(n_Z + n_{Z-1})", "1", SAHA_CONVENTION,
                         False),
}


def _gather(plan, tile_paths) -> dict:
    """The tiles' set arrays over (strength, distinct screening length[, temperature])."""
    shape = (plan.strength.size, plan.screening_length.size)
    sets, reasons = {}, []
    for tile, path in zip(plan.tiles, tile_paths):
        arrays = read_part_variables(path, tuple(TILE_DIMS))
        where = (slice(*tile.strength_slice), list(tile.screening_length_index))
        for name, values in arrays.items():
            if name not in sets:
                sets[name] = np.zeros(shape + values.shape[2:], values.dtype)
            sets[name][where] = values
        import netCDF4

        with netCDF4.Dataset(path) as nc:
            for i, j, text in json.loads(nc.getncattr("population_reasons_json")):
                reasons.append(f"strength={tile.strength[i]!r} screening_length={tile.screening_length[j]!r}: {text}")
    return sets, reasons


def add_populations(ds, plan, tile_paths, layout, preset=None):
    """``ds`` with the population variables over (strength, *conditions)."""
    if plan.engine["populations"].get("kind") in BALANCE_KINDS:  # a semiconductor's (cube/balances.py)
        return add_balances(ds, plan, tile_paths, preset)
    sets, reasons = _gather(plan, tile_paths)
    grid = plan.conditions
    z_star = float(plan.engine["populations"].get("z_star", 0.0))
    values = condition_populations(plan.strength, grid.length_values[0], grid.length_values[1], layout.length_index,
                                   sets, mass=float(plan.engine["mass"]), z_star=z_star)
    plasma = (f"electrons and ions of charge {z_star:g} (z* = {z_star:g}, n_i = n_e/z*)" if z_star
              else "electrons alone (z* = 0)") + ", T_i = T_e, at the same n_e and T_e"
    dims = (layout.strength_dim, *layout.length_dims)
    out = ds.copy()
    for name, (long_name, units, comment, energy) in POPULATION_VARS.items():
        data = np.asarray(values[name], dtype=np.int64 if name == "bound_state_count" else np.float64)
        if energy:
            data = data * HARTREE_EV
        out[name] = (dims, np.ascontiguousarray(data), {"long_name": long_name, "units": units,
                                                          "comment": comment.replace("{plasma}", plasma),
                                                          "ancillary_variables": "level_set_status"})
    out["level_set_status"] = (dims, np.asarray(values["level_set_status"], np.int8), {
        "long_name": "completeness of the cell's bound level set", **flag_attrs(POPULATION_FLAGS),
        "comment": "complete: every bound level solved; truncated: the levels n <= n_cut solved, exact counts of "
                   "the rest; infinitely_many: a Coulomb tail (U diverges); beyond_engine_limits and not_solved: U "
                   "unknown. Why, per engine cell: attribute flagged_sets",
        "flagged_sets": "\n".join(reasons) or "none"})
    out.attrs["populations"] = np.int8(1)
    return out

