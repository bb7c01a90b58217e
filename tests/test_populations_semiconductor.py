"""Donor freeze-out and the exciton ⇄ electron–hole plasma balance
(physics/populations/semiconductor.py, balance.py) against textbook limits.

Sources: the freeze-out limit n ≈ √(N_c N_D/2) e^{−E_b/2kT} (Sze & Ng, Physics of Semiconductor
Devices, 3rd ed., §1.4; reference from memory for the section), N_c = 2(2π m* kT/h²)^{3/2} in SI
with scipy.constants; the mass-action law of excitons n_e n_h/n_X = (μ kT/2πħ²)^{3/2} e^{−E_b/kT}
(Saha's equation for excitons; Haug & Koch, reference from memory); charge neutrality and
conservation re-computed here from independent level sets; Mott's criterion (the fully ionized
state is self-consistent once its own screening binds nothing: Mott, Phil. Mag. 6, 287 (1961))
with the 1s critical screening length from the engine's critical_screening_length.
"""

import math

import numpy as np
import pytest
from scipy import constants as sc

import boundscape as bs
from boundscape.errors import InputError
from boundscape.physics.populations import (LevelSets, donor_balance, donor_freeze_out, effective_density_of_states,
                                            exciton_balance, exciton_ionization, free_carrier_debye_length)

GAAS = {"effective_mass": 0.067, "permittivity": 12.9}


@pytest.mark.parametrize("T, N_D", [(4.0, 1e15), (3.0, 1e14), (5.0, 3e15)])
def test_freeze_out_low_temperature_limit(T, N_D):
    # Sze: n ≈ √(N_c N_D/2) e^{−E_b/2kT} for n ≪ N_D, kT ≪ E_b, non-degenerate electrons; E_b the
    # donor's binding at the solution (this model's screened 1s), N_c in SI (scipy.constants)
    out = donor_freeze_out(N_D, T, **GAAS)
    kT_J = sc.k * T
    N_c = 2 * (2 * math.pi * GAAS["effective_mass"] * sc.m_e * kT_J / sc.h ** 2) ** 1.5 / 1e6  # cm⁻³
    E_b = out.binding_energy_meV * 1e-3 * sc.electron_volt
    sze = math.sqrt(N_c * N_D / 2) * math.exp(-E_b / (2 * kT_J))
    assert out.status == "ok", out.reason
    # the limit drops terms of relative order n/N_D (neutral donors ≈ N_D), n/N_c (Boltzmann for
    # Fermi–Dirac) and the excited levels' share of U (the 1s alone)
    b = out.balance
    excited = 1 - 2 * math.exp(b.ionization_energy / b.kT - b.log_partition_function)
    small = out.free_density_cm3 / N_D + out.free_density_cm3 / N_c + excited
    assert small < 1e-2
    assert out.free_density_cm3 == pytest.approx(sze, rel=small)
    assert out.effective_density_of_states_cm3 == pytest.approx(N_c, rel=1e-12)


def independent_bound_density(n, kT, N_c):
    """N_D⁰ at free density n with Boltzmann electrons: n·(n/N_c)·U, U summed here from a level
    set of the screened donor solved afresh (Debye screening by the free electrons)."""
    levels = bs.level_set(bs.potential("yukawa", 1.0, free_carrier_debye_length(n, kT)), max_levels=2000)
    assert levels.set_status in (0, 2)
    U = float(np.sum(2 * (2 * levels.l + 1) * np.exp(-levels.energy / kT))) if levels.energy.size else 0.0
    return n * (n / N_c) * U


@pytest.mark.parametrize("kT", [0.03, 0.1, 0.5])
def test_charge_neutrality_and_conservation_in_every_cell(kT):
    sets = LevelSets()
    N_c = effective_density_of_states(kT)
    for N_D in np.logspace(-5, -1, 5):
        b = donor_balance(N_D, kT, level_sets=sets, statistics="boltzmann")
        assert b.solutions and b.status in ("ok", "several_solutions"), (N_D, b.reason)
        # n = N_D⁺ (no compensation): the chosen free density is the ionized donors
        assert b.free_density == pytest.approx(b.ionized_fraction * N_D, rel=1e-15)
        for n in b.solutions:  # every self-consistent solution conserves the donors
            assert n + independent_bound_density(n, kT, N_c) == pytest.approx(N_D, rel=1e-9), (N_D, n)
        assert b.conservation_residual < 1e-9


def test_fermi_dirac_and_boltzmann_agree_when_non_degenerate():
    kT, N_D = 0.05, 1e-5
    fd, mb = donor_balance(N_D, kT), donor_balance(N_D, kT, statistics="boltzmann")
    ratio = fd.free_density / effective_density_of_states(kT)
    assert ratio < 1e-2
    # F_{1/2}(η) = e^η(1 − e^η/2^{3/2} + …): the two differ at order n/N_c only
    assert fd.free_density == pytest.approx(mb.free_density, rel=ratio)


def test_ionized_fraction_falls_with_concentration_at_fixed_levels():
    # dilute donors at low T: the levels barely move (λ ≫ a*), and Saha makes x fall as N_D rises
    kT = 0.025
    sets = LevelSets()
    balances = [donor_balance(N_D, kT, level_sets=sets) for N_D in np.logspace(-7, -4, 7)]
    fraction = [b.ionized_fraction for b in balances]
    assert np.all(np.diff(fraction) < 0)
    assert all(b.ionization_energy > 0.49 for b in balances)


def test_mott_transition_is_a_jump_at_the_density_where_full_ionization_binds_nothing():
    kT = 0.1
    lam_c = bs.critical_screening_length("yukawa", strength=1.0, l=0, n_r=0)
    # Debye screening by all N_D electrons reaches λ_c at N_D = kT/(4π λ_c²)
    n_mott = kT / (4 * math.pi * lam_c ** 2)
    sets = LevelSets()
    concentrations = np.logspace(-3, -1, 21)
    ionized = [donor_balance(N_D, kT, level_sets=sets) for N_D in concentrations]
    bound = [donor_balance(N_D, kT, level_sets=sets, branch="bound") for N_D in concentrations]
    x = np.array([b.ionized_fraction for b in ionized])
    k = int(np.argmax(np.diff(x)))
    assert x[k + 1] - x[k] > 0.5  # a jump, not a crossover
    assert concentrations[k] < n_mott <= concentrations[k + 1]
    assert np.all(x[k + 1:] == 1.0) and all(b.ionization_energy == 0.0 for b in ionized[k + 1:])
    assert all(b.ionization_energy > 0 for b in ionized[: k + 1])
    # beyond it the bound branch persists too (hysteresis); the loss of self-consistency of the
    # ionized state is reported as a jump at n_Mott
    assert any(len(b.solutions) > 1 for b in ionized[k + 1:])
    for b in ionized[k + 1:]:
        if b.jumps:
            assert min(b.jumps, key=lambda j: abs(j - n_mott)) == pytest.approx(n_mott, rel=1e-5)
    xb = np.array([b.ionized_fraction for b in bound])
    assert np.all(xb <= x) and xb[k + 1] < 0.5


def test_exciton_mass_action_law_at_low_density():
    # n_e n_h/n_X = (μ kT/2πħ²)^{3/2} e^{−E_b/kT} (ground state only) — the model's full U adds
    # the excited levels' share, which is small at 4 K; SI with scipy.constants
    m_e, m_h, eps, T = 0.067, 0.5, 12.9, 4.0
    out = exciton_ionization(1e12, T, electron_mass=m_e, hole_mass=m_h, permittivity=eps, statistics="boltzmann")
    mu = m_e * m_h / (m_e + m_h) * sc.m_e
    kT_J = sc.k * T
    E_b = out.binding_energy_meV * 1e-3 * sc.electron_volt
    textbook = (mu * kT_J / (2 * math.pi * sc.hbar ** 2)) ** 1.5 * math.exp(-E_b / kT_J) / 1e6  # cm⁻³
    n = out.free_density_cm3
    n_x = out.total_cm3 - n
    b = out.balance
    excited = 1 - math.exp(b.ionization_energy / b.kT - b.log_partition_function)
    assert 0 < excited < 2e-3
    assert n * n / n_x == pytest.approx(textbook, rel=excited + 1e-9)
    assert b.conservation_residual < 1e-9


def test_exciton_balance_jumps_to_the_plasma_at_high_density():
    sets = LevelSets()
    kT = 0.05
    x = [exciton_balance(P, kT, mass_ratio=0.134, level_sets=sets).ionized_fraction for P in np.logspace(-4, -1, 13)]
    steps = np.diff(x)
    assert x[-1] == 1.0 and steps.max() > 0.3 and x[0] < 1


def test_bad_input_is_one_line():
    with pytest.raises(InputError, match="branch"):
        donor_balance(1e-3, 0.1, branch="middle")
    with pytest.raises(InputError, match="donor_concentration"):
        donor_balance(-1.0, 0.1)
    with pytest.raises(InputError, match="screening_length_m"):
        donor_freeze_out(1e15, 4.0, screening_length_m=3.0, **GAAS)
    with pytest.raises(InputError, match="mass_ratio"):
        exciton_balance(1e-3, 0.1, mass_ratio=0.0)


def test_a_scan_that_cannot_reach_the_dilute_side_says_so():
    # kT = 0.025: at N_D = 0.01 the bound root lies at λ ≈ 156 a*, the ionized one at n = N_D
    capped = LevelSets(max_screening_length=100.0)
    b = donor_balance(0.01, 0.025, level_sets=capped)
    assert b.status == "incomplete_scan" and "beyond" in b.reason
    assert b.solutions == (0.01,) and b.ionized_fraction == 1.0
    full = donor_balance(0.01, 0.025, level_sets=LevelSets(), branch="bound")
    assert full.status == "several_solutions" and full.ionized_fraction < 1e-4 and len(full.solutions) == 2
    # a dilute sample whose only root lies beyond the cap has no solution to give
    none = donor_balance(1e-4, 0.025, level_sets=capped)
    assert none.status == "beyond_engine_limits" and math.isnan(none.free_density)
