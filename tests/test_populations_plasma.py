"""Continuum lowering and Saha balance of a plasma (physics/populations/lowering.py, saha.py,
plasma.py) against handbook formulas evaluated in SI with scipy.constants.

Sources: the Debye length (NRL Plasma Formulary 2019, p. 28; Chen, Introduction to Plasma
Physics, §1.4: λ_D² = ε₀kT/(n e²)); the Debye–Hückel lowering Z e²/(4πε₀λ_D) (common practice);
the ion-sphere limit (3/2) Z e²/(4πε₀ a_Z), a_Z = (3Z/4πn_e)^{1/3} (Stewart & Pyatt 1966); the
textbook Saha equation n_p n_e/n_H = (2π m_e kT/h²)^{3/2} e^{−I/kT} (Saha 1920; any statistical
mechanics text); the complete Fermi–Dirac integral F_{1/2}(η) = −Li_{3/2}(−e^η) (mpmath.polylog).
"""

import math

import mpmath
import numpy as np
import pytest
from scipy import constants as sc

import boundscape as bs
from boundscape.errors import InputError
from boundscape.physics.populations import (LevelSets, continuum_lowering, debye_length, ecker_kroll_critical_density,
                                            ecker_kroll_lowering, effective_density_of_states, fermi_dirac_half,
                                            ionization_energy, ionized_fraction, log_partition_function,
                                            omitted_partition_bound, plasma_cell, plasma_populations,
                                            reduced_chemical_potential, saha_ratio, stewart_pyatt_lowering)
from boundscape.physics.units import BOHR_M, HARTREE_EV, convert

EV = sc.electron_volt
COULOMB_EV_M = sc.e / (4 * math.pi * sc.epsilon_0)  # e²/(4πε₀) in eV·m


def si_debye_length(n_cm3, T_eV, z_star=0.0):
    """λ_D in m: λ_D⁻² = e² n_e (1 + z*)/(ε₀ kT) (Chen §1.4)."""
    return math.sqrt(sc.epsilon_0 * T_eV * EV / (sc.e ** 2 * n_cm3 * 1e6 * (1 + z_star)))


def au(n_cm3, T_eV):
    return convert(n_cm3, "cm-3", "bohr-3"), T_eV / HARTREE_EV


@pytest.mark.parametrize("n_cm3, T_eV", [(1e14, 1.0), (1e20, 100.0), (1e23, 3.0)])
def test_debye_length_against_the_nrl_formulary(n_cm3, T_eV):
    # NRL Plasma Formulary (2019), p. 28: λ_D = 7.43×10² (T/eV)^{1/2} (n/cm⁻³)^{−1/2} cm (3 digits)
    nrl_m = 7.43e2 * math.sqrt(T_eV / n_cm3) * 1e-2
    lam = debye_length(*au(n_cm3, T_eV)) * BOHR_M
    assert lam == pytest.approx(nrl_m, rel=1e-3)
    assert lam == pytest.approx(si_debye_length(n_cm3, T_eV), rel=1e-12)
    assert debye_length(*au(n_cm3, T_eV), z_star=2.0) * BOHR_M == pytest.approx(si_debye_length(n_cm3, T_eV, 2.0),
                                                                               rel=1e-12)


@pytest.mark.parametrize("Z", [1.0, 2.0])
def test_model_lowering_tends_to_debye_huckel_at_low_density(Z):
    # ΔI → Z e²/(4πε₀λ_D) as λ_D ≫ the ion (common practice); first-order perturbation theory of
    # e^{−r/λ}/r = 1/r − 1/λ + r/2λ² … leaves a relative −3/(4Zλ) (⟨r⟩_1s = 3/(2Z) bohr)
    T_eV = 10.0
    deviations = []
    for n_cm3 in (1e20, 1e18, 1e16):
        n, kT = au(n_cm3, T_eV)
        cell = plasma_cell(Z, n, kT)
        lam_m = si_debye_length(n_cm3, T_eV)
        dh_eV = Z * COULOMB_EV_M / lam_m
        ratio = cell.continuum_lowering * HARTREE_EV / dh_eV
        lam = lam_m / BOHR_M
        assert abs(ratio - 1) <= 1.0 / (Z * lam), (n_cm3, ratio, lam)
        deviations.append(abs(ratio - 1))
    assert deviations[0] > deviations[1] > deviations[2]


def test_stewart_pyatt_tends_to_debye_huckel_at_low_density():
    T_eV, Z = 10.0, 2.0
    for z_star in (0.0, 1.0):
        devs = []
        for n_cm3 in (1e18, 1e16, 1e14, 1e12):
            sp_eV = stewart_pyatt_lowering(Z, *au(n_cm3, T_eV), z_star=z_star) * HARTREE_EV
            dh_eV = Z * COULOMB_EV_M / si_debye_length(n_cm3, T_eV, z_star)
            devs.append(abs(sp_eV / dh_eV - 1))
        assert np.all(np.diff(devs) < 0) and devs[-1] < 1e-4, devs


def test_stewart_pyatt_tends_to_the_ion_sphere_at_high_density():
    # Stewart & Pyatt (1966): ΔI → (3/2) Z e²/(4πε₀ a_Z), a_Z = (3Z/(4π n_e))^{1/3}
    T_eV, Z = 10.0, 3.0
    for z_star in (0.0, 3.0):
        devs = []
        for n_cm3 in (1e25, 1e27, 1e29):
            a_m = (3 * Z / (4 * math.pi * n_cm3 * 1e6)) ** (1 / 3)
            ion_sphere_eV = 1.5 * Z * COULOMB_EV_M / a_m
            sp_eV = stewart_pyatt_lowering(Z, *au(n_cm3, T_eV), z_star=z_star) * HARTREE_EV
            devs.append(abs(sp_eV / ion_sphere_eV - 1))
        assert devs[0] > devs[1] > devs[2] and devs[2] < 2e-3, devs


def test_ecker_kroll_branches():
    # Ecker & Kröll (1963), as recalled (reference from memory): Debye–Hückel below n_crit, the
    # interparticle distance of all free particles above it
    Z, T_eV = 1.0, 5.0
    kT = T_eV / HARTREE_EV
    n_crit = ecker_kroll_critical_density(Z, kT)
    below, above = 0.1 * n_crit, 10 * n_crit
    assert ecker_kroll_lowering(Z, below, kT) == pytest.approx(Z / debye_length(below, kT), rel=1e-14)
    n_cm3 = convert(above, "bohr-3", "cm-3")
    r_m = (3 / (4 * math.pi * 2 * n_cm3 * 1e6)) ** (1 / 3)  # n_e + n_i, n_i = n_e
    assert ecker_kroll_lowering(Z, above, kT) * HARTREE_EV == pytest.approx(Z * COULOMB_EV_M / r_m, rel=1e-10)
    # n_crit: where the mean distance (3/4πn)^{1/3} equals Z² e²/(4πε₀ kT)
    assert (3 / (4 * math.pi * n_crit)) ** (1 / 3) == pytest.approx(Z ** 2 / kT, rel=1e-14)


def test_ionization_energy_is_zero_once_the_1s_is_lost():
    lam_c = bs.critical_screening_length("yukawa", strength=1.0, l=0, n_r=0)
    assert 0.83 < lam_c < 0.85  # 0.8399 bohr (value from memory)
    lost = bs.level_set(bs.potential("yukawa", 1.0, 0.98 * lam_c))
    kept = bs.level_set(bs.potential("yukawa", 1.0, 1.02 * lam_c))
    assert ionization_energy(lost) == 0.0 and continuum_lowering(lost, 1.0) == 0.5
    assert 0 < ionization_energy(kept) < 1e-2
    coulomb = bs.level_set(bs.potential("coulomb", 1.0))
    assert abs(continuum_lowering(coulomb, 1.0)) < 1e-12  # E_1s = −Z²/2 (Bohr)


def test_effective_density_of_states_in_si():
    # 2(2π m_e kT/h²)^{3/2} with scipy.constants, in m⁻³
    T_eV = 2.0
    si = 2 * (2 * math.pi * sc.m_e * T_eV * EV / sc.h ** 2) ** 1.5
    got = effective_density_of_states(T_eV / HARTREE_EV) / BOHR_M ** 3
    assert got == pytest.approx(si, rel=1e-12)


@pytest.mark.parametrize("T_eV", [0.4, 0.5])
def test_saha_tends_to_the_textbook_equation_when_the_lowering_is_negligible(T_eV):
    # Textbook Saha for hydrogen, ground level only (g_H = 2, g_p = 1, electron spin 2):
    # n_p/n_H = (2π m_e kT/h²)^{3/2} e^{−I/kT}/n_e, I = Ry·(reduced mass) — here the infinite-mass
    # I₀ = hartree/2, in SI with scipy.constants.  The model differs by its lowering, e^{ΔI/kT},
    # and by the excited levels' share of U (~Σ2n²/2e^{I/kT} ≲ 1e-6 at T ≤ 0.5 eV; at 0.8 eV it is
    # already ~3e-3 at λ_D = 1e5 bohr, which is why the textbook form is a low-temperature one).
    Z = 1.0
    devs = []
    sets = LevelSets("yukawa", Z, 1.0, max_levels=2000)
    for n_cm3 in (1e14, 1e12):
        n, kT = au(n_cm3, T_eV)
        lam = debye_length(n, kT)
        levels = sets(lam)
        log_u = log_partition_function(levels, kT)
        model = saha_ratio(log_u, n, kT)
        I_J = sc.physical_constants["Hartree energy"][0] / 2
        kT_J = T_eV * EV
        textbook = (2 * math.pi * sc.m_e * kT_J / sc.h ** 2) ** 1.5 * math.exp(-I_J / kT_J) / (n_cm3 * 1e6)
        lowering_over_kT = continuum_lowering(levels, Z) / kT
        omitted = omitted_partition_bound(levels, kT) / math.exp(log_u)
        excited = 1 - 2 * math.exp(-levels.energy[0] / kT - log_u)
        dev = abs(model / textbook - 1)
        assert excited < 1e-5
        assert dev <= 1.5 * lowering_over_kT + excited + omitted, (n_cm3, dev, lowering_over_kT, excited, omitted)
        devs.append(dev)
    assert devs[1] < devs[0] and devs[1] < 2e-3


def test_ionized_fraction_falls_with_density_at_fixed_levels():
    # Saha: n_Z/n_{Z−1} ∝ 1/n_e at fixed U
    levels = bs.level_set(bs.potential("yukawa", 1.0, 200.0))
    kT = 1.0 / HARTREE_EV
    log_u = log_partition_function(levels, kT)
    densities = np.logspace(-8, -2, 13)
    fraction = ionized_fraction(log_u, densities, kT)
    assert np.all(np.diff(fraction) < 0)
    assert np.allclose(saha_ratio(log_u, densities, kT) * densities, saha_ratio(log_u, 1.0, kT), rtol=1e-12)


def test_pressure_ionization_raises_the_fraction_once_levels_are_lost():
    # hydrogen at 2 eV, Debye screening: the fraction first falls (Saha), then rises as the
    # screening strips the levels, and is 1 where nothing is bound (λ_D below 1s's 0.84 bohr)
    T_eV = 2.0
    densities_cm3 = np.logspace(16, 24, 17)
    cells = [plasma_cell(1.0, *au(n, T_eV)) for n in densities_cm3]
    fraction = np.array([c.ionized_fraction for c in cells])
    lowering = np.array([c.continuum_lowering for c in cells])
    low = int(np.argmin(fraction))
    assert 0 < low < len(cells) - 1
    assert np.all(np.diff(fraction[: low + 1]) < 0)
    rising = fraction[low:]
    assert np.all(np.diff(rising[rising < 1]) > 0) and np.all(np.diff(rising) >= 0)  # pressure ionization
    # the 1s rises toward the continuum all along, until ΔI = I₀ where it is lost
    assert np.all(np.diff(lowering[lowering < 0.5]) > 0) and np.all(np.diff(lowering) >= 0)
    assert cells[-1].bound_state_count == 0 and fraction[-1] == 1.0
    counts = [c.bound_state_count for c in cells]
    last_bound = max(i for i, c in enumerate(counts) if c > 0)
    assert low < last_bound and counts[low] > counts[last_bound] > 0  # levels were lost on the way up


def test_plasma_populations_broadcasts_and_names_the_cube_variables():
    levels = bs.level_set(bs.potential("yukawa", 2.0, 100.0))
    n = np.array([[1e-6], [1e-4]])
    kT = np.array([0.1, 1.0, 10.0])
    record = plasma_populations(levels, nuclear_charge=2.0, electron_density=n, kT=kT)
    names = set(record.as_dict())
    assert {"bound_state_count", "partition_function", "planck_larkin_partition_function", "ionization_energy",
            "continuum_lowering", "continuum_lowering_stewart_pyatt", "continuum_lowering_ecker_kroll",
            "ionized_fraction"} <= names
    assert record.ionized_fraction.shape == (2, 3) and record.partition_function.shape == (2, 3)
    assert record.ionized_fraction[0, 0] > record.ionized_fraction[1, 0]


@pytest.mark.parametrize("eta", [-60.0, -5.0, -0.3, 0.0, 4.0, 40.0])
def test_fermi_dirac_half_against_mpmath(eta):
    # F_{1/2}(η) = −Li_{3/2}(−e^η) (common practice; mpmath.polylog)
    ref = float(-mpmath.polylog(1.5, -mpmath.exp(eta)).real)
    assert fermi_dirac_half(eta) == pytest.approx(ref, rel=1e-11)


@pytest.mark.parametrize("ratio", [1e-30, 1e-3, 0.5, 3.0, 1e3])
def test_reduced_chemical_potential_inverts_the_density(ratio):
    kT, mass = 0.01, 0.3
    n = ratio * effective_density_of_states(kT, mass)
    eta = reduced_chemical_potential(n, kT, mass)
    ref = float(-mpmath.polylog(1.5, -mpmath.exp(eta)).real)  # mpmath, not this package's F_{1/2}
    assert ref == pytest.approx(ratio, rel=1e-10)
    assert reduced_chemical_potential(n, kT, mass, statistics="boltzmann") == pytest.approx(math.log(ratio), rel=1e-15)
    with pytest.raises(InputError, match="statistics"):
        reduced_chemical_potential(n, kT, mass, statistics="bose")
