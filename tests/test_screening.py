"""Screening by free carriers (boundscape.physics.screening, fermi_dirac) against outside sources:
mpmath's polylogarithm at 30 digits, the series of F_j in both limits, the NRL Plasma Formulary,
Ashcroft & Mermin, and the identities between Γ and N_D."""

from __future__ import annotations

import math

import mpmath
import numpy as np
import pytest
from scipy import constants as sc
from scipy.special import gamma

from boundscape.physics.fermi_dirac import eta_of_occupation, fermi_dirac, screening_ratio
from boundscape.physics.presets import Plasma, Semiconductor
from boundscape.physics.screening import VALIDITY_FLAGS, Carriers, Species

ELECTRONS = Carriers((Species("electrons", 1.0, sc.m_e),))
BOHR = sc.physical_constants["Bohr radius"][0]


def _mpmath_F(j, eta):
    # F_j(η) = -Li_{j+1}(-e^η) (the normalised complete Fermi–Dirac integral), 30 digits.
    with mpmath.workdps(30):
        return float(mpmath.re(-mpmath.polylog(j + 1, -mpmath.exp(mpmath.mpf(eta)))))


@pytest.mark.parametrize("j", [0.5, -0.5])
def test_fermi_dirac_integrals_against_mpmath(j):
    # mpmath.polylog at 30 significant digits, an independent evaluation (not double precision).
    for eta in np.concatenate([np.linspace(-40, 60, 201), [-1.0, 32.0, 100.0, 1e3]]):
        assert fermi_dirac(j, eta) == pytest.approx(_mpmath_F(j, eta), rel=2e-13), eta


@pytest.mark.parametrize("j", [0.5, -0.5])
def test_fermi_dirac_integrals_meet_both_series(j):
    # Non-degenerate: F_j(η) = e^η − e^{2η}/2^{j+1} + O(e^{3η}); degenerate (Sommerfeld):
    # F_j(η) = η^{j+1}/Γ(j+2)·[1 + (π²/6)(j+1)j η^{-2} + O(η^{-4})] (common practice, no source).
    for eta in (-30.0, -12.0, -6.0):
        z = math.exp(eta)
        assert fermi_dirac(j, eta) == pytest.approx(z - z * z / 2 ** (j + 1), rel=2 * z * z)
    for eta in (60.0, 200.0, 1e4):
        leading = eta ** (j + 1) / gamma(j + 2) * (1 + math.pi ** 2 / 6 * (j + 1) * j / eta ** 2)
        assert fermi_dirac(j, eta) == pytest.approx(leading, rel=5 / eta ** 4)
    # the derivative identity dF_{1/2}/dη = F_{-1/2}, by central differences across the pieces
    eta = np.linspace(-3, 40, 87)
    h = 1e-4
    np.testing.assert_allclose((fermi_dirac(0.5, eta + h) - fermi_dirac(0.5, eta - h)) / (2 * h),
                               fermi_dirac(-0.5, eta), rtol=1e-7)


def test_the_occupation_inverts_and_the_ratio_meets_both_limits():
    y = np.linspace(-50, 30, 401)
    eta = eta_of_occupation(y)
    np.testing.assert_allclose(np.log(fermi_dirac(0.5, eta)), y, atol=1e-13)
    ratio = screening_ratio(y)
    # less screening as the gas degenerates (to rounding where the ratio is 1 to double precision)
    assert np.all(np.diff(ratio) <= 4e-16) and np.all(ratio <= 1 + 4e-16)
    assert np.all(np.diff(ratio)[ratio[1:] < 1 - 1e-12] < 0)
    assert ratio[0] == pytest.approx(1.0, abs=1e-20)
    # degenerate: F_{-1/2}/F_{1/2} → (3/2)/η with η = (Γ(5/2) e^y)^{2/3} (Sommerfeld, leading order)
    assert ratio[-1] == pytest.approx(1.5 / (gamma(2.5) * math.exp(y[-1])) ** (2 / 3), rel=1e-7)


@pytest.mark.parametrize("T_eV, n_cm3", [(1.0, 1.0), (10.0, 1e18), (1e3, 1e22), (0.1, 1e12)])
def test_debye_length_matches_the_nrl_formulary(T_eV, n_cm3):
    # NRL Plasma Formulary (2019), p. 28: λ_D = 7.43e2 (T/eV)^{1/2} (n/cm⁻³)^{-1/2} cm, to its digits;
    # the finite-temperature model is the same where the electrons are classical (n λ_th³ ≪ 1).
    n, kT = n_cm3 * 1e6, T_eV * sc.e
    for model, rel in (("debye", 0.0), ("finite_temperature", 1e-4)):
        lam_cm = float(ELECTRONS.screening_length(n, kT, model)) * 100
        assert f"{lam_cm / math.sqrt(T_eV / n_cm3):.3g}" == "743"
        if rel:
            assert lam_cm / 100 == pytest.approx(float(ELECTRONS.debye_length(n, kT)), rel=rel)


def test_thomas_fermi_length_matches_ashcroft_and_mermin():
    # Ashcroft & Mermin, Solid State Physics, eq. 17.50: k_0² = (4/π) k_F/a₀, k_F = (3π² n)^{1/3};
    # the finite-temperature model tends to it in a degenerate gas (k_B T ≪ E_F).
    n = np.array([1e28, 1e29, 1e30, 1e31])
    k_F = (3 * math.pi ** 2 * n) ** (1 / 3)
    expected = 1 / np.sqrt(4 * k_F / (math.pi * BOHR))
    cold = 1e-3 * sc.e  # 1 meV against E_F of 0.2–20 eV
    np.testing.assert_allclose(ELECTRONS.screening_length(n, cold, "thomas_fermi"), expected, rtol=1e-12)
    np.testing.assert_allclose(ELECTRONS.screening_length(n, cold, "finite_temperature"), expected, rtol=1e-6)


def test_the_crossover_is_monotonic_and_meets_both_limits():
    kT = 10 * sc.e
    n = np.logspace(18, 34, 161)
    lam = ELECTRONS.screening_length(n, kT, "finite_temperature")
    debye = ELECTRONS.screening_length(n, kT, "debye")
    tf = ELECTRONS.screening_length(n, kT, "thomas_fermi")
    assert np.all(np.diff(lam) < 0)  # denser, shorter
    assert np.all(lam >= np.maximum(debye, tf) * (1 - 1e-12))  # a gas at T screens less than either limit
    to_debye, to_tf = lam / debye, lam / tf
    assert np.all(np.diff(to_debye) > 0) and np.all(np.diff(to_tf) < 0)
    assert to_debye[0] == pytest.approx(1.0, abs=1e-5) and to_tf[-1] == pytest.approx(1.0, abs=1e-4)


@pytest.mark.parametrize("model", ["debye", "thomas_fermi", "finite_temperature"])
def test_density_at_inverts_the_screening_length(model):
    carriers = Carriers((Species("electrons", 1.0, 0.067 * sc.m_e), Species("holes", 1.0, 0.5 * sc.m_e)), 12.9)
    n = np.logspace(12, 26, 8)
    for kT in (4.2 * sc.k, 300 * sc.k):
        np.testing.assert_allclose(carriers.density_at(carriers.screening_length(n, kT, model), kT, model), n,
                                   rtol=1e-11)


def test_every_species_adds_its_share():
    # λ⁻² = Σ_s q_s² n_s/(ε k T_s) (Chen, Introduction to Plasma Physics, §1.4): electrons and holes of
    # equal density and temperature halve λ², and classical ions of charge Z_i = 2 (n_i = n_e/2) at
    # T_i = T_e/2 add 4 times the electrons' term.
    n, kT = 1e20, 300 * sc.k
    pair = Carriers((Species("electrons", 1.0, 0.067 * sc.m_e), Species("holes", 1.0, 0.5 * sc.m_e)), 12.9)
    alone = Carriers((Species("electrons", 1.0, 0.067 * sc.m_e),), 12.9)
    assert float(pair.screening_length(n, kT, "debye")) == pytest.approx(
        float(alone.screening_length(n, kT, "debye")) / math.sqrt(2), rel=1e-14)
    plasma = Plasma(species="electrons_and_ions", screening_ion_charge=2.0, ion_temperature_ratio=0.5,
                    screening="debye")
    assert float(plasma.screening_length_at(1e24, 5.0)) == pytest.approx(
        float(Plasma(screening="debye").screening_length_at(1e24, 5.0)) / math.sqrt(5), rel=1e-12)
    exciton = Semiconductor(effective_mass=0.067, permittivity=12.9, hole_mass=0.5, screening="debye")
    assert exciton.screening_species == "electrons_and_holes"
    assert float(exciton.screening_length_at(1e20, 300.0)) == pytest.approx(
        float(pair.screening_length(n, kT, "debye")), rel=1e-12)


def test_coupling_parameter_and_debye_number_formulas():
    # N_D = (4π/3) n λ_D³ = 1.72e9 T^{3/2} n^{-1/2} (NRL Plasma Formulary, p. 28; T in eV, n in cm⁻³);
    # Γ = e²/(4πε₀ a k_B T), a = (3/4πn)^{1/3} (Ichimaru, Rev. Mod. Phys. 54, 1017 (1982); value from
    # memory), so that Γ = N_D^{-2/3}/3 for one classical species (common practice, no source);
    # k_B T/E_F with E_F = ħ²(3π²n)^{2/3}/2m (Ashcroft & Mermin, ch. 2).
    for T_eV, n_cm3 in [(1.0, 1e12), (100.0, 1e20), (10.0, 1e23)]:
        n, kT = n_cm3 * 1e6, T_eV * sc.e
        valid = ELECTRONS.validity(n, kT, "debye")
        assert f"{float(valid.debye_number) / (T_eV ** 1.5 / math.sqrt(n_cm3)):.3g}" == "1.72e+09"
        a = (3 / (4 * math.pi * n)) ** (1 / 3)
        gamma_ = sc.e ** 2 / (4 * math.pi * sc.epsilon_0 * a * kT)
        assert float(valid.coupling_parameter) == pytest.approx(gamma_, rel=1e-12)
        assert float(valid.coupling_parameter) == pytest.approx(float(valid.debye_number) ** (-2 / 3) / 3, rel=1e-12)
        fermi = sc.hbar ** 2 * (3 * math.pi ** 2 * n) ** (2 / 3) / (2 * sc.m_e)
        assert float(valid.degeneracy) == pytest.approx(kT / fermi, rel=1e-12)


def test_each_validity_flag_and_its_reason():
    flags = {name: VALIDITY_FLAGS.index(name) for name in VALIDITY_FLAGS}
    kT = 10 * sc.e
    assert int(ELECTRONS.validity(1e22, kT, "finite_temperature").flag) == flags["ok"]
    # Γ ≈ 2.3 at n = 1e27 m⁻³, T = 1 eV, with E_F ≈ 0.4 eV below the Coulomb energy: strongly coupled
    assert int(ELECTRONS.validity(1e27, 1 * sc.e, "finite_temperature").flag) == flags["strongly_coupled"]
    # classical, Γ ≈ 0.5 (< 1) but (4π/3) n λ_D³ ≈ 0.5: an empty screening sphere
    assert int(ELECTRONS.validity(1e28, 10 * sc.e, "debye").flag) == flags["few_carriers_in_screening_sphere"]
    # a dense cold gas, r_s ≈ 0.25: E_F ≈ 0.8 keV above the Coulomb energy ≈ 0.1 keV, k_B T = 0.1 eV,
    # λ_TF ≈ 1.3 a (Ashcroft & Mermin ch. 17): weakly coupled, and far from classical
    assert int(ELECTRONS.validity(1e32, 0.1 * sc.e, "debye").flag) == flags["debye_model_on_degenerate_gas"]
    assert int(ELECTRONS.validity(1e32, 0.1 * sc.e, "finite_temperature").flag) == flags["ok"]
    # at r_s ≈ 1.2 (1e30 m⁻³) the Thomas–Fermi sphere holds 0.2 electrons: not weakly coupled
    assert int(ELECTRONS.validity(1e30, 0.1 * sc.e, "finite_temperature").flag) == \
        flags["few_carriers_in_screening_sphere"]
    assert int(ELECTRONS.validity(1e22, kT, "thomas_fermi").flag) == flags["thomas_fermi_model_on_classical_gas"]
