"""Populations from complete level sets: partition functions, continuum lowering, Saha balance,
donor freeze-out and the exciton ⇄ electron–hole plasma balance (atomic or effective atomic
units; trade units in :func:`donor_freeze_out` and :func:`exciton_ionization`).

* :mod:`.partition` — U over a level set, its omitted part's bound, the bound-state count, and
  Planck–Larkin's U over unscreened hydrogen-like levels;
* :mod:`.lowering` — I = −E_1s, ΔI = I₀ − I, Debye–Hückel, ion-sphere, Stewart–Pyatt, Ecker–Kröll;
* :mod:`.saha` — Saha's balance, effective densities of states, Fermi–Dirac free carriers;
* :mod:`.level_sets` — level sets by screening length, each solved once;
* :mod:`.plasma` — every populations quantity of a plasma cell, named as the cube will name them;
* :mod:`.balance` — a self-consistent free ⇄ bound balance (scan and brentq; every root);
* :mod:`.semiconductor` — donors and excitons on it.
"""

from .balance import BALANCE_STATUS, Balance, solve_balance
from .level_sets import LevelSets
from .lowering import (continuum_lowering, debye_huckel_lowering, debye_length, ecker_kroll_critical_density,
                       ecker_kroll_lowering, ion_sphere_lowering, ion_sphere_radius, ionization_energy,
                       stewart_pyatt_lowering, unscreened_ionization_energy)
from .partition import (bound_state_count, log_partition_function, log_planck_larkin_partition_function,
                        omitted_partition_bound, partition_function, planck_larkin_partition_function)
from .plasma import PlasmaPopulations, plasma_cell, plasma_populations
from .saha import (effective_density_of_states, fermi_dirac_half, ionized_fraction, log_saha_ratio,
                   reduced_chemical_potential, saha_ratio)
from .semiconductor import (SemiconductorBalance, donor_balance, donor_freeze_out, exciton_balance,
                            exciton_ionization, free_carrier_debye_length, pair_debye_length)

__all__ = [
    "partition_function", "log_partition_function", "omitted_partition_bound", "bound_state_count",
    "planck_larkin_partition_function", "log_planck_larkin_partition_function", "ionization_energy",
    "unscreened_ionization_energy", "continuum_lowering", "debye_length", "debye_huckel_lowering",
    "ion_sphere_radius", "ion_sphere_lowering", "stewart_pyatt_lowering", "ecker_kroll_lowering",
    "ecker_kroll_critical_density", "effective_density_of_states", "log_saha_ratio", "saha_ratio",
    "ionized_fraction", "fermi_dirac_half", "reduced_chemical_potential", "LevelSets", "PlasmaPopulations",
    "plasma_populations", "plasma_cell", "Balance", "BALANCE_STATUS", "solve_balance", "donor_balance",
    "exciton_balance", "donor_freeze_out", "exciton_ionization", "SemiconductorBalance",
    "free_carrier_debye_length", "pair_debye_length",
]
