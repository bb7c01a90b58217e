"""Self-consistent balances in a semiconductor sweep (``populations: true``): the donor freeze-out
over ``donor_concentration`` × ``temperature``, or, for an exciton (``preset.hole_mass``), the
exciton ⇄ electron–hole plasma balance over ``carrier_density`` (the pair density) ×
``temperature``.  Each condition is solved in the tile that holds its engine cell (the screening
length of the total density, every donor or pair ionized), so each is solved once.

The balances (:func:`boundscape.physics.populations.donor_freeze_out`,
:func:`~boundscape.physics.populations.exciton_ionization`) solve for the free density n: n sets
the screening in the preset's model, the screening sets the complete level set of the donor or
exciton, the levels set the bound density through Saha's law.
"""

from __future__ import annotations

import math

import numpy as np

from ..physics.populations import BALANCE_STATUS, LevelSets, donor_freeze_out, exciton_ionization
from ..physics.populations.level_sets import SEARCH_REACH
from ..physics.presets import from_config

__all__ = ["BALANCE_VARS", "BALANCE_FLAGS", "NOT_SOLVED", "KINDS", "settings", "tile_dims", "empty_arrays",
           "solve_cell", "gather"]

# kind: its condition axes (grid keys, the total density first)
KINDS = {"donors": ("donor_concentration", "temperature"), "excitons": ("carrier_density", "temperature")}
BALANCE_VARS = ("free_density", "ionized_fraction", "ionization_energy", "partition_function",
                "self_consistent_screening_length", "balance_solutions", "balance_status")
# The balance's codes (BALANCE_STATUS), then a condition this tile does not hold.
BALANCE_FLAGS = tuple(BALANCE_STATUS) + ("not_solved",)
NOT_SOLVED = BALANCE_FLAGS.index("not_solved")


def settings(config: dict, conditions, length_index, kind: str) -> dict:
    """The tile spec's ``populations`` entry: the kind, the preset, the family and the condition grid."""
    section = {key: value for key, value in config["preset"].items() if key != "map"}
    return {"kind": kind, "preset": section, "family": config["potential"]["family"],
            "total_cm3": np.asarray(conditions.length_values[0], float).tolist(),
            "temperature_K": np.asarray(conditions.length_values[1], float).tolist(),
            "length_index": np.asarray(length_index).tolist()}


def tile_dims(spec: dict) -> dict:
    return dict.fromkeys(BALANCE_VARS, ("strength", *KINDS[spec["populations"]["kind"]]))


def empty_arrays(spec: dict, num_strength: int) -> dict:
    given = spec["populations"]
    shape = (num_strength, len(given["total_cm3"]), len(given["temperature_K"]))
    out = {name: np.full(shape, np.nan) for name in BALANCE_VARS[:-2]}
    out["balance_solutions"] = np.zeros(shape, np.int16)
    out["balance_status"] = np.full(shape, NOT_SOLVED, np.int8)
    out["population_reasons"] = []
    out["population_seconds"] = 0.0
    out["level_sets"] = {}  # per strength, shared by the tile's balances (not written)
    return out


def _solve(preset, kind, total, temperature, sets):
    if kind == "donors":
        return donor_freeze_out(total, temperature, effective_mass=preset.effective_mass,
                                permittivity=preset.permittivity, screening_length_m=preset.screening_length_at,
                                level_sets=sets)
    return exciton_ionization(total, temperature, electron_mass=preset.effective_mass, hole_mass=preset.hole_mass,
                              permittivity=preset.permittivity, screening_length_m=preset.screening_length_at,
                              level_sets=sets)


def solve_cell(out: dict, cell, pot, spec: dict) -> None:
    """Every condition whose engine cell is ``cell`` (tile-local strength, screening length)."""
    i, j = cell
    given = spec["populations"]
    kind = given["kind"]
    axes = KINDS[kind]
    preset = from_config(given["preset"], {axes[0]: given["total_cm3"], axes[1]: given["temperature_K"]})
    mine = np.argwhere(np.asarray(given["length_index"]) == spec["screening_length_index"][j])
    z = float(spec["strength"][i])
    sets = out["level_sets"].setdefault(i, LevelSets(given["family"], z, 1.0, max_screening_length=SEARCH_REACH))
    for a, b in mine:
        result = _solve(preset, kind, given["total_cm3"][a], given["temperature_K"][b], sets)
        where = (i, a, b)
        out["free_density"][where] = result.free_density_cm3
        out["ionized_fraction"][where] = result.ionized_fraction
        out["ionization_energy"][where] = result.binding_energy_meV
        out["partition_function"][where] = math.exp(result.balance.log_partition_function)
        out["self_consistent_screening_length"][where] = result.screening_length_nm
        out["balance_solutions"][where] = len(result.solutions_cm3)
        out["balance_status"][where] = BALANCE_STATUS.index(result.status)
        if result.reason:
            out["population_reasons"].append((i, int(a), int(b), result.reason))


def gather(plan, tiles_arrays) -> dict:
    """The tiles' balance arrays merged over (strength, total, T): each condition from the tile
    that solved it. ``tiles_arrays`` yields (tile, arrays) in the plan's order."""
    merged = None
    for tile, arrays in tiles_arrays:
        if merged is None:
            shape = (plan.strength.size,) + arrays["balance_status"].shape[1:]
            merged = {name: np.full(shape, np.nan) for name in BALANCE_VARS[:-2]}
            merged["balance_solutions"] = np.zeros(shape, np.int16)
            merged["balance_status"] = np.full(shape, NOT_SOLVED, np.int8)
        s0, s1 = tile.strength_slice
        solved = arrays["balance_status"] != NOT_SOLVED
        for name in BALANCE_VARS:
            merged[name][s0:s1][solved] = arrays[name][solved]
    return merged
