"""Populations in a sweep (``populations: true``): each engine cell's complete level set, summed at
every temperature of the sweep, and each condition's populations from them.

A tile solves, per engine cell (strength Z, screening length λ), the complete bound level set
(:func:`boundscape.level_set`: every l that binds, every bound n_r, stopped by the exact
zero-energy counts whatever ``grid.l`` and ``n_r_max`` say) and keeps what depends on the set
alone — the bound-state count, I = −E_1s, the set's status — and ln U at every temperature of the
sweep's temperature axis (a set is solved once per distinct λ; cells that share it differ in T).
:func:`condition_populations` then reads each condition (Z, n_e, T_e) off its engine cell and adds
what needs n_e: the Saha balance and the published lowering models.  Atomic units throughout
(hartree, bohr⁻³); the cube converts to the preset's units.
"""

from __future__ import annotations

import time

import numpy as np
from scipy import constants as sc

from .. import engine
from ..engine.status import LEVEL_SET_STATUS
from ..errors import ConvergenceError, InputError
from ..physics.populations import (bound_state_count, ecker_kroll_lowering, ionization_energy, ionized_fraction,
                                   log_partition_function, log_planck_larkin_partition_function,
                                   omitted_partition_bound, stewart_pyatt_lowering, unscreened_ionization_energy)
from ..physics.populations.level_sets import DEFAULT_MAX_LEVELS
from . import balance_tiles

__all__ = ["wanted", "settings", "check_config", "is_balance", "tile_dims", "empty_arrays", "solve_cell", "TILE_DIMS",
           "POPULATION_FLAGS", "NOT_SOLVED", "condition_populations", "PLASMA_AXES"]

# The set's completeness: the engine's codes (boundscape.engine.status.LEVEL_SET_STATUS), then
# a cell whose set could not be solved at all.
POPULATION_FLAGS = tuple(LEVEL_SET_STATUS) + ("not_solved",)
NOT_SOLVED = POPULATION_FLAGS.index("not_solved")

CELL = ("strength", "screening_length")
TILE_DIMS = {"set_bound_state_count": CELL, "set_ionization_energy": CELL, "set_status": CELL,
             "set_log_partition_function": CELL + ("population_temperature",),
             "set_omitted_partition_bound": CELL + ("population_temperature",)}
PLASMA_AXES = ("electron_density", "electron_temperature")
HARTREE_EV = sc.physical_constants["Hartree energy in eV"][0]
BOHR_CM = sc.physical_constants["Bohr radius"][0] / sc.centi


def wanted(spec: dict) -> bool:
    """Whether a tile spec asks for populations."""
    return bool(spec.get("populations"))


def check_config(config: dict, preset) -> None:
    """One-line error unless ``populations: true`` sits on a plasma sweep over (n_e, T_e), a
    donor sweep over (N_D, T), or an exciton sweep over (pair density, T), the last two in
    effective atomic units."""
    if not config.get("populations"):
        return
    keys, grid = tuple(getattr(preset, "condition_keys", ())), config["grid"]
    if preset.kind == "plasma" and keys == PLASMA_AXES and keys[0] in grid:
        return
    if preset.kind == "semiconductor" and keys[0] in grid and keys in balance_tiles.KINDS.values():
        if keys == balance_tiles.KINDS["donors"] and preset.is_exciton:
            raise InputError("config key populations: the donor sweep's freeze-out is for a donor; remove "
                             "preset.hole_mass, or sweep an exciton over carrier_density (the pair density)")
        if keys == balance_tiles.KINDS["excitons"] and not preset.is_exciton:
            raise InputError("config key populations: over carrier_density it is the exciton balance and needs "
                             "preset.hole_mass; for donors sweep grid.donor_concentration")
        if preset.units_choice != "effective":
            raise InputError("config key populations: the self-consistent balance needs preset.units: effective, "
                             f"got {preset.units_choice}")
        return
    axes = ", ".join(k for k in grid if k not in ("l", "n_r_max"))
    raise InputError("config key populations: needs preset.kind plasma with grid axes electron_density and "
                     "electron_temperature, or preset.kind semiconductor with donor_concentration (or, for an "
                     f"exciton, carrier_density) and temperature; got preset {preset.kind or 'none'} over {axes}")


def settings(config: dict, conditions, length_index) -> dict:
    """The tile spec's ``populations`` entry: for a plasma the temperatures (hartree) each set
    is summed at; for a semiconductor :func:`.balance_tiles.settings`."""
    for kind, axes in balance_tiles.KINDS.items():
        if tuple(conditions.length_dims) == axes:
            return balance_tiles.settings(config, conditions, length_index, kind)
    temperature_eV = np.asarray(conditions.length_values[1], dtype=float)
    section = config.get("preset") or {}
    # Stewart–Pyatt and Ecker–Kröll see the plasma the engine's screening sees: electrons alone
    # (z* = 0), or with quasi-neutral ions of charge Z_i (z* = Z_i, n_i = n_e/Z_i).
    z_star = float(section.get("screening_ion_charge", 1.0)) if section.get("species") == "electrons_and_ions" else 0.0
    return {"kT_hartree": (temperature_eV / HARTREE_EV).tolist(), "z_star": z_star}


def is_balance(spec: dict) -> bool:
    """Whether a spec's populations are a semiconductor's self-consistent balances."""
    return spec.get("populations", {}).get("kind") in balance_tiles.KINDS


def tile_dims(spec: dict) -> dict:
    """The dimensions of a tile's population variables."""
    return balance_tiles.tile_dims(spec) if is_balance(spec) else dict(TILE_DIMS)


def empty_arrays(spec: dict, num_strength: int, num_length: int) -> dict:
    if is_balance(spec):
        return balance_tiles.empty_arrays(spec, num_strength)
    num_temperature = len(spec["populations"]["kT_hartree"])
    shape = (num_strength, num_length)
    return {"set_bound_state_count": np.full(shape, -1, np.int64),
            "set_ionization_energy": np.full(shape, np.nan),
            "set_status": np.full(shape, NOT_SOLVED, np.int8),
            "set_log_partition_function": np.full(shape + (num_temperature,), np.nan),
            "set_omitted_partition_bound": np.full(shape + (num_temperature,), np.nan),
            "population_reasons": [], "population_seconds": 0.0}


def solve_cell(out: dict, cell, pot, spec: dict) -> None:
    """The complete level set of one engine cell and its sums at the sweep's temperatures (a
    semiconductor: the balance of every condition on this engine cell)."""
    start = time.perf_counter()
    if is_balance(spec):
        balance_tiles.solve_cell(out, cell, pot, spec)
        out["population_seconds"] += time.perf_counter() - start
        return
    kT = np.asarray(spec["populations"]["kT_hartree"], dtype=float)
    try:
        levels = engine.level_set(pot, max_levels=DEFAULT_MAX_LEVELS)
    except (ConvergenceError, InputError) as exc:
        out["population_reasons"].append((*cell, f"{type(exc).__name__}: {str(exc).splitlines()[0]}"))
        out["population_seconds"] += time.perf_counter() - start
        return
    out["set_bound_state_count"][cell] = bound_state_count(levels)
    out["set_ionization_energy"][cell] = ionization_energy(levels)
    out["set_status"][cell] = int(levels.set_status)
    if levels.counts_known:  # complete, or truncated with a bound on what it leaves out
        out["set_log_partition_function"][cell] = log_partition_function(levels, kT)
        out["set_omitted_partition_bound"][cell] = omitted_partition_bound(levels, kT)
    if levels.set_reason:
        out["population_reasons"].append((*cell, levels.set_reason))
    out["population_seconds"] += time.perf_counter() - start


def condition_populations(strength, electron_density_cm3, temperature_eV, length_index, sets: dict,
                          mass: float = 1.0, z_star: float = 0.0) -> dict:
    """Every population quantity over (strength, n_e, T_e), in hartree where an energy.

    ``sets`` holds the tiles' arrays gathered over (strength, distinct λ[, T]); ``length_index``
    (n_e, T_e) → distinct λ, as the plan gives it.  Stewart–Pyatt and Ecker–Kröll see the same
    screening species: electrons alone (z* = 0), or with ions of charge z* (n_i = n_e/z*)."""
    Z = np.asarray(strength, float)[:, None, None]
    n_e = (np.asarray(electron_density_cm3, float) * BOHR_CM ** 3)[None, :, None]
    kT = (np.asarray(temperature_eV, float) / HARTREE_EV)[None, None, :]
    t_index = np.broadcast_to(np.arange(kT.size)[None, :], length_index.shape)
    log_u = sets["set_log_partition_function"][:, length_index, t_index]
    shape = log_u.shape
    with np.errstate(over="ignore"):
        u = np.exp(log_u)
        planck_larkin = np.exp(np.stack([log_planck_larkin_partition_function(z, kT.ravel(), mass=mass)
                                         for z in np.ravel(Z)])[:, None, :])
    fraction = ionized_fraction(log_u, n_e, kT)  # NaN where U is unknown, 1 where nothing is bound
    i_set = sets["set_ionization_energy"][:, length_index]
    i_0 = np.array([unscreened_ionization_energy(z, mass) for z in np.ravel(Z)])[:, None, None]
    return {
        "bound_state_count": sets["set_bound_state_count"][:, length_index],
        "partition_function": u,
        "partition_function_omitted_bound": sets["set_omitted_partition_bound"][:, length_index, t_index],
        "planck_larkin_partition_function": np.broadcast_to(planck_larkin, shape),
        "ionization_energy": i_set,
        "continuum_lowering": i_0 - i_set,
        "continuum_lowering_stewart_pyatt": np.broadcast_to(stewart_pyatt_lowering(Z, n_e, kT, z_star=z_star), shape),
        "continuum_lowering_ecker_kroll": np.broadcast_to(
            ecker_kroll_lowering(Z, n_e, kT, z_star=z_star, ion_density=n_e / z_star if z_star else None), shape),
        "ionized_fraction": fraction,
        "level_set_status": sets["set_status"][:, length_index],
    }
