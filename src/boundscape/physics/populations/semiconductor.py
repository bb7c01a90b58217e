"""Donor freeze-out and the exciton ⇄ electron–hole plasma balance, solved self-consistently:
the free carriers set the screening, the screening sets the levels (the engine's complete level
set of the screened donor or exciton), the levels set the free carriers (:mod:`.balance`).

Units: the effective atomic units of the bound problem (lengths a* = ε_r/μ* bohr, energies
μ*/ε_r² hartree, masses in μ*); :func:`donor_freeze_out` and :func:`exciton_ionization` take the
trade's (cm⁻³, K, electron masses) and give cm⁻³, meV and nm.

What the model leaves out: compensation (acceptors) and holes in the donor problem; valley
degeneracy, valley-orbit splitting and central-cell corrections (a hydrogenic donor in one
isotropic band); the donors' and excitons' own polarisability and any screening by bound
particles; ionized donors as scatterers; impurity bands and hopping; band-gap renormalisation
(the continuum edge stays at the band edge); excitons as a Boltzmann gas (no Bose statistics,
no biexcitons, no electron–hole liquid).  Free carriers are an ideal Fermi (or Boltzmann) gas.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy import constants as sc

from ...checks import positive
from ...errors import InputError
from ..units import effective_atomic_units
from .balance import Balance, solve_balance
from .level_sets import SEARCH_REACH, LevelSets
from .lowering import ionization_energy
from .partition import log_partition_function, omitted_partition_bound
from .saha import effective_density_of_states, reduced_chemical_potential

__all__ = ["donor_balance", "exciton_balance", "donor_freeze_out", "exciton_ionization", "SemiconductorBalance",
           "free_carrier_debye_length", "pair_debye_length"]


def free_carrier_debye_length(density, kT):
    """λ⁻² = 4π n/kT in effective atomic units (e²/(4πε₀ε_r) = 1): free electrons, classical
    Debye screening (Yu & Cardona, *Fundamentals of Semiconductors*, §6.3)."""
    return 1.0 / math.sqrt(4.0 * math.pi * density / kT)


def pair_debye_length(density, kT):
    """λ⁻² = 4π(n_e + n_h)/kT with n_e = n_h = n: electrons and holes both screen."""
    return 1.0 / math.sqrt(8.0 * math.pi * density / kT)


def _searching(level_sets):
    """The caller's level sets, or Yukawa Z = 1, μ = 1 ones that stop at :data:`SEARCH_REACH`."""
    return level_sets if level_sets is not None else LevelSets(max_screening_length=SEARCH_REACH)


def _levels_info(sets, lam, kT, spin_weight):
    levels = sets(lam)
    if levels is None:
        return math.nan, {"level_set_reason": f"screening length {lam:.3g} beyond the search's reach "
                                              f"{sets.max_screening_length:.3g}"}
    summable = levels.counts_known  # complete, or truncated with a bound on the rest
    log_u = log_partition_function(levels, kT, spin_weight=spin_weight) if summable else math.nan
    omitted = omitted_partition_bound(levels, kT, spin_weight=spin_weight)
    if omitted == 0:
        fraction = 0.0
    elif math.isfinite(log_u):
        fraction = math.exp(math.log(omitted) - log_u) if omitted < math.inf else math.inf
    else:
        fraction = math.inf
    binding = ionization_energy(levels)
    return log_u, {"screening_length": lam, "ionization_energy": binding,
                   "lowering": sets.strength ** 2 * sets.mass / 2.0 - binding, "log_partition_function": log_u,
                   "omitted_fraction": fraction, "level_set_status": int(levels.set_status),
                   "level_set_reason": levels.set_reason}


def donor_balance(donor_concentration, kT, *, screening_length=None, level_sets: LevelSets | None = None,
                  electron_mass=1.0, statistics="fermi_dirac", points_per_decade=4, branch="ionized") -> Balance:
    """Donor freeze-out: the free-electron density n and the ionized fraction N_D⁺/N_D of an
    n-type sample without compensation (charge neutrality n = N_D⁺), in effective atomic units.

    The balance: N_D⁰/N_D⁺ = e^η U, U = Σ 2(2l + 1) e^{−E_nl/kT} over the screened donor's bound
    levels (energies from the band edge), η = μ/kT of the free electrons (n = N_c F_{1/2}(η), or
    n = N_c e^η), N_c = 2(m kT/2π)^{3/2} — with Boltzmann statistics and the 1s alone, the textbook
    N_D⁺/N_D = 1/(1 + 2(n/N_c) e^{E_b/kT}) (Sze & Ng, *Physics of Semiconductor Devices*, 3rd ed.,
    §1.4, reference from memory).  Then n + N_D⁰(n) = N_D is solved by :func:`.balance.solve_balance`.

    Parameters
    ----------
    donor_concentration : float
        N_D (a*⁻³).
    kT : float
        Temperature (effective hartree, μ*/ε_r² hartree).
    screening_length : callable, optional
        λ(n, kT) in a* for a free-electron density n; default :func:`free_carrier_debye_length`.
    level_sets : LevelSets, optional
        The screened donor's level sets by λ, shared between calls (default Yukawa, Z = 1, μ = 1,
        up to λ = :data:`.level_sets.SEARCH_REACH` a*: the search stops there, flagged).
    electron_mass : float
        The free electrons' mass in units of the bound one's (1 for a donor).
    statistics : {"fermi_dirac", "boltzmann"}
        Of the free electrons.
    points_per_decade, branch :
        The scan's resolution, and which of several solutions to take (:func:`.balance.solve_balance`).
    """
    N_D = float(positive("donor_concentration", donor_concentration))
    kT = float(positive("kT", kT))
    screening = screening_length or free_carrier_debye_length
    sets = _searching(level_sets)

    def log_bound(n):
        log_u, info = _levels_info(sets, screening(n, kT), kT, 2)
        eta = reduced_chemical_potential(n, kT, electron_mass, statistics=statistics)
        return math.log(n) + eta + log_u, info

    return solve_balance(N_D, kT, log_bound, points_per_decade=points_per_decade, branch=branch)


def exciton_balance(pair_density, kT, *, mass_ratio, screening_length=None, level_sets: LevelSets | None = None,
                    statistics="fermi_dirac", points_per_decade=4, branch="ionized") -> Balance:
    """The exciton ⇄ electron–hole plasma balance of ``pair_density`` pairs (a*⁻³, effective
    atomic units of the exciton: μ = m_e m_h/(m_e + m_h) is the mass unit).

    n_X = g_e g_h (M kT/2π)^{3/2} U e^{η_e + η_h}, U = Σ (2l + 1) e^{−E_nl/kT} (the pair's 4 spin
    states are g_e g_h), M = m_e + m_h; with Boltzmann carriers this is the mass-action law
    n_e n_h/n_X = (μ kT/2π)^{3/2}/U (Saha's equation for excitons; e.g. Haug & Koch, *Quantum
    Theory of the Optical and Electronic Properties of Semiconductors*, ch. on the Mott
    transition, reference from memory).  n + n_X(n) = pair density is solved by
    :func:`.balance.solve_balance`; the ionized fraction is n/pair density.

    ``mass_ratio`` is m_e/m_h; ``screening_length`` a callable λ(n, kT) (default
    :func:`pair_debye_length`: electrons and holes); ``points_per_decade`` and ``branch`` as for
    :func:`donor_balance`.
    """
    total = float(positive("pair_density", pair_density))
    kT = float(positive("kT", kT))
    ratio = float(positive("mass_ratio", mass_ratio))
    m_e, m_h = 1.0 + ratio, 1.0 + 1.0 / ratio  # in units of μ: 1/m_e + 1/m_h = 1
    screening = screening_length or pair_debye_length
    sets = _searching(level_sets)
    log_states = math.log(4.0) + 1.5 * math.log((m_e + m_h) * kT / (2.0 * math.pi))

    def log_bound(n):
        log_u, info = _levels_info(sets, screening(n, kT), kT, 1)
        eta_e = reduced_chemical_potential(n, kT, m_e, statistics=statistics)
        eta_h = reduced_chemical_potential(n, kT, m_h, statistics=statistics)
        return log_states + log_u + eta_e + eta_h, info

    return solve_balance(total, kT, log_bound, points_per_decade=points_per_decade, branch=branch)


# -- in the trade's units ------------------------------------------------------------------------

@dataclass
class SemiconductorBalance:
    """A balance in the trade's units: densities in cm⁻³, energies in meV, lengths in nm; the
    ``balance`` itself in effective atomic units."""

    total_cm3: float
    temperature_K: float
    free_density_cm3: float
    ionized_fraction: float
    solutions_cm3: tuple
    jumps_cm3: tuple
    binding_energy_meV: float
    screening_length_nm: float
    effective_density_of_states_cm3: float
    status: str
    reason: str
    balance: Balance


def _trade(balance, units, temperature_K, electron_mass):
    per_cm3 = 1.0 / (units.length_m / sc.centi) ** 3
    kT = balance.kT
    return SemiconductorBalance(
        total_cm3=balance.total * per_cm3, temperature_K=temperature_K,
        free_density_cm3=balance.free_density * per_cm3, ionized_fraction=balance.ionized_fraction,
        solutions_cm3=tuple(s * per_cm3 for s in balance.solutions), jumps_cm3=tuple(j * per_cm3 for j in balance.jumps),
        binding_energy_meV=balance.ionization_energy * units.energy_eV * 1e3,
        screening_length_nm=balance.screening_length * units.length_m / sc.nano,
        effective_density_of_states_cm3=effective_density_of_states(kT, electron_mass) * per_cm3,
        status=balance.status, reason=balance.reason, balance=balance)


def _screening_in(units, screening_length_m, temperature_K):
    """A λ(n, kT) in effective units from a λ(n [m⁻³], T [K]) in metres."""
    if screening_length_m is None:
        return None
    if not callable(screening_length_m):
        raise InputError("screening_length_m must be a callable λ(density_m3, temperature_K) in metres")
    per_m3 = 1.0 / units.length_m ** 3
    return lambda n, kT: float(screening_length_m(n * per_m3, temperature_K)) / units.length_m


def donor_freeze_out(donor_concentration, temperature_K, *, effective_mass, permittivity, screening_length_m=None,
                     statistics="fermi_dirac", branch="ionized",
                     level_sets: LevelSets | None = None) -> SemiconductorBalance:
    """:func:`donor_balance` in the trade's units: N_D in cm⁻³, T in K, m* (electron masses) and
    ε_r; ``screening_length_m`` a callable λ(n [m⁻³], T [K]) in metres (default: the free
    electrons' Debye length)."""
    units = effective_atomic_units(effective_mass, permittivity)
    N_D = positive("donor_concentration", donor_concentration) * 1e6 * units.length_m ** 3
    T = positive("temperature_K", temperature_K)
    kT = sc.k * T / units.energy_J
    balance = donor_balance(N_D, kT, screening_length=_screening_in(units, screening_length_m, T),
                            level_sets=level_sets, statistics=statistics, branch=branch)
    return _trade(balance, units, T, 1.0)


def exciton_ionization(pair_density, temperature_K, *, electron_mass, hole_mass, permittivity,
                       screening_length_m=None, statistics="fermi_dirac", branch="ionized",
                       level_sets: LevelSets | None = None) -> SemiconductorBalance:
    """:func:`exciton_balance` in the trade's units: the pair density in cm⁻³, T in K, the
    electron and hole effective masses (electron masses) and ε_r."""
    m_e, m_h = positive("electron_mass", electron_mass), positive("hole_mass", hole_mass)
    units = effective_atomic_units(m_e * m_h / (m_e + m_h), permittivity)
    total = positive("pair_density", pair_density) * 1e6 * units.length_m ** 3
    T = positive("temperature_K", temperature_K)
    kT = sc.k * T / units.energy_J
    balance = exciton_balance(total, kT, mass_ratio=m_e / m_h, screening_length=_screening_in(units, screening_length_m, T),
                              level_sets=level_sets, statistics=statistics, branch=branch)
    return _trade(balance, units, T, 1.0 + m_e / m_h)
