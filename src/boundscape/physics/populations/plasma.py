"""Everything the populations of one plasma cell need, from one level set: partition functions,
ionization energy and continuum lowering (this model, Stewart–Pyatt, Ecker–Kröll) and the Saha
ionized fraction, with the names the cube will carry.  Atomic units in and out."""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass

import numpy as np

from ...checks import positive
from .level_sets import LevelSets
from .lowering import (continuum_lowering, debye_length, ecker_kroll_lowering, ionization_energy,
                       stewart_pyatt_lowering)
from .partition import (bound_state_count, log_partition_function, log_planck_larkin_partition_function,
                        omitted_partition_bound)
from .saha import ionized_fraction

__all__ = ["PlasmaPopulations", "plasma_populations", "plasma_cell"]

@dataclass
class PlasmaPopulations:
    """One level set's populations at the given densities and temperatures (broadcast arrays;
    hartree and bohr⁻³).

    ``partition_function`` sums the set's levels (a lower bound if the set is truncated, by at
    most ``partition_function_omitted_bound``); NaN, with ``ionized_fraction``, where the set's
    status leaves U unknown (a Coulomb tail: U diverges; beyond the engine's limits).
    ``ionization_energy`` and ``continuum_lowering`` are the set's (one number each);
    ``level_set_status``/``level_set_reason`` its :data:`boundscape.engine.status.LEVEL_SET_STATUS`
    code and why.
    """

    bound_state_count: int
    partition_function: np.ndarray
    log_partition_function: np.ndarray
    partition_function_omitted_bound: np.ndarray
    planck_larkin_partition_function: np.ndarray
    ionization_energy: float
    continuum_lowering: float
    continuum_lowering_stewart_pyatt: np.ndarray
    continuum_lowering_ecker_kroll: np.ndarray
    ionized_fraction: np.ndarray
    level_set_status: int
    level_set_reason: str

    def as_dict(self) -> dict:
        return asdict(self)


def plasma_populations(levels, *, nuclear_charge, electron_density, kT, mass=1.0, electron_mass=1.0, z_star=0.0,
                       ion_density=None) -> PlasmaPopulations:
    """Populations of a hydrogen-like ion ⇄ bare nucleus from the ion's level set.

    Parameters
    ----------
    levels : LevelSet
        :func:`boundscape.level_set` of the screened ion at these conditions (the cells given
        share its screening length).
    nuclear_charge : float
        Z.
    electron_density, kT : float or array_like
        n_e (bohr⁻³) and the temperature (hartree), broadcast together.
    mass : float
        The bound electron's reduced mass μ (electron masses): I₀ = Z²μ/2.
    electron_mass : float
        The free electron's mass in Saha's balance (1).
    z_star, ion_density :
        The plasma's ions, for Stewart–Pyatt and Ecker–Kröll (:mod:`.lowering`): z* = 0 compares
        with electron screening alone; n_i defaults to n_e.

    Returns
    -------
    PlasmaPopulations
    """
    Z = positive("nuclear_charge", nuclear_charge)
    n_e, kT = np.broadcast_arrays(positive("electron_density", electron_density), positive("kT", kT))
    n_e, kT = np.array(n_e, dtype=float), np.array(kT, dtype=float)
    flat = kT.ravel()
    summable = levels.counts_known  # complete, or truncated with a bound on the rest
    log_u = log_partition_function(levels, flat).reshape(kT.shape)
    omitted = omitted_partition_bound(levels, flat).reshape(kT.shape)
    if not summable:
        log_u = np.full(kT.shape, math.nan)
    with np.errstate(over="ignore"):  # inf where kT ≪ I: the logs carry those cells
        u = np.exp(log_u)
        planck_larkin = np.exp(log_planck_larkin_partition_function(Z, flat, mass=mass)).reshape(kT.shape)
    fraction = ionized_fraction(log_u, n_e, kT, electron_mass=electron_mass) if summable else np.full(kT.shape, math.nan)
    return PlasmaPopulations(
        bound_state_count=bound_state_count(levels),
        partition_function=u[()],
        log_partition_function=log_u[()],
        partition_function_omitted_bound=np.asarray(omitted)[()],
        planck_larkin_partition_function=planck_larkin[()],
        ionization_energy=ionization_energy(levels),
        continuum_lowering=continuum_lowering(levels, Z, mass),
        continuum_lowering_stewart_pyatt=np.asarray(stewart_pyatt_lowering(Z, n_e, kT, z_star=z_star))[()],
        continuum_lowering_ecker_kroll=np.asarray(ecker_kroll_lowering(Z, n_e, kT, ion_density=ion_density,
                                                                       z_star=z_star))[()],
        ionized_fraction=np.asarray(fraction)[()],
        level_set_status=int(levels.set_status),
        level_set_reason=levels.set_reason,
    )


def plasma_cell(nuclear_charge, electron_density, kT, *, screening_length=None, mass=1.0, family="yukawa",
                level_sets: LevelSets | None = None, z_star=0.0, ion_density=None) -> PlasmaPopulations:
    """:func:`plasma_populations` of one cell, its level set solved (or taken from ``level_sets``).

    ``screening_length`` is λ in bohr, or a callable λ(n_e, kT) (the screening model; the
    conditions' finite-temperature screening plugs in here); default the electrons' Debye length
    (:func:`.lowering.debye_length`, z* = 0)."""
    Z = positive("nuclear_charge", nuclear_charge)
    n_e, kT = float(positive("electron_density", electron_density)), float(positive("kT", kT))
    if screening_length is None:
        lam = debye_length(n_e, kT)
    elif callable(screening_length):
        lam = screening_length(n_e, kT)
    else:
        lam = screening_length
    sets = level_sets or LevelSets(family, Z, mass)
    if (sets.family, sets.strength, sets.mass) != (family, Z, float(mass)):
        from ...errors import InputError

        raise InputError(f"level_sets hold {sets.family} at strength {sets.strength:g}, mass {sets.mass:g}; this cell "
                         f"asks for {family} at Z = {Z:g}, μ = {float(mass):g}")
    return plasma_populations(sets(positive("screening_length", lam)), nuclear_charge=Z, electron_density=n_e, kT=kT,
                              mass=mass, z_star=z_star, ion_density=ion_density)
