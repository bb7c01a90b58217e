"""The engine against exact solutions and published values.

Every reference below is computed from a closed formula or from scipy.special/scipy.optimize
inside the test, or is a published number; the source is named beside each check.
"""

import math

import numpy as np
import pytest
from scipy.optimize import brentq
from scipy.special import spherical_jn, spherical_kn

import boundscape as bs


def rel_err(value, reference):
    return np.abs(np.asarray(value, dtype=float) / np.asarray(reference, dtype=float) - 1.0)


# ---------------------------------------------------------------------------------------------
# Coulomb

@pytest.mark.parametrize("Z, mu", [(1.0, 1.0), (2.5, 0.5), (3.0, 207.0)])
def test_coulomb_energies_and_mean_radius_n_up_to_10(Z, mu):
    for l in range(10):
        res = bs.bound_levels(bs.potential("coulomb", Z, mass=mu), l, n_r_max=10 - l)
        n = res.n
        assert list(n) == list(range(l + 1, 11))
        # E = -Z²μ/(2n²), degenerate in l (Bethe & Salpeter 1957, eq. 2.11; any QM textbook).
        assert rel_err(res.energy, -Z * Z * mu / (2.0 * n**2)).max() <= 1e-10, (Z, mu, l, res.energy)
        # <r> = [3n² − l(l+1)]/(2Zμ) (Bethe & Salpeter 1957, eq. 3.20).
        r_exact = (3.0 * n**2 - l * (l + 1)) / (2.0 * Z * mu)
        assert rel_err(res.mean_radius, r_exact).max() <= 1e-8, (Z, mu, l, res.mean_radius)
        assert np.all(res.status == 0), res.reason


def test_coulomb_reach_every_level_n_up_to_20_l_up_to_19():
    # Reach requirement: ≤ 1e-9 on every level with |E| ≥ 1e-6 Z²μ, l ≤ 20, n ≤ 20
    # (n ≤ 20 allows l ≤ 19).  Exact reference: E = -Z²μ/(2n²) (Bethe & Salpeter 1957).
    Z, mu = 1.0, 1.0
    for l in range(20):
        res = bs.bound_levels(bs.potential("coulomb", Z, mass=mu), l, n_r_max=20 - l)
        assert len(res.energy) == 20 - l
        exact = -Z * Z * mu / (2.0 * res.n**2)
        checked = np.abs(exact) >= 1e-6 * Z * Z * mu
        assert checked.all()  # every level with n ≤ 20 is inside the reach band
        assert rel_err(res.energy[checked], exact[checked]).max() <= 1e-9, (l, res.energy)


# ---------------------------------------------------------------------------------------------
# Hulthén, l = 0 (Hulthén, Ark. Mat. Astron. Fys. 28A (1942); Flügge, Practical Quantum
# Mechanics, problem 67): E_n = -½(Z/n − n/(2λ))² for μ = 1, bound while n < sqrt(2Zλ),
# so the n-th s state appears at λ = n²/(2Z).

def hulthen_exact(Z, lam, n):
    return -0.5 * (Z / n - n / (2.0 * lam)) ** 2


def hulthen_count(Z, lam):
    return sum(1 for n in range(1, 1000) if n < math.sqrt(2.0 * Z * lam))


@pytest.mark.parametrize("Z, lam", [(1.0, 3.0), (1.0, 10.0), (1.0, 60.0), (2.0, 5.0), (2.0, 30.0)])
def test_hulthen_s_energies(Z, lam):
    res = bs.bound_levels(bs.potential("hulthen", Z, lam), 0)
    assert res.num_bound == len(res.energy) == hulthen_count(Z, lam)
    exact = hulthen_exact(Z, lam, res.n)
    # These cells have no level within 1e-4 Z² of threshold; there the formula's 1e-10 applies.
    assert np.abs(exact).min() >= 1e-4 * Z * Z
    assert rel_err(res.energy, exact).max() <= 1e-10, (Z, lam, res.energy, exact)


@pytest.mark.parametrize("Z, lam", [(1.0, 8.1), (1.0, 18.1), (1.0, 32.5), (1.0, 50.5), (1.0, 72.3),
                                    (2.0, 4.05), (2.0, 12.6), (2.0, 36.15)])
def test_hulthen_s_reach_near_threshold(Z, lam):
    # λ just above n²/(2Z): the top level is close to threshold (|E| down to 1e-8 Z²).
    res = bs.bound_levels(bs.potential("hulthen", Z, lam), 0)
    N = hulthen_count(Z, lam)
    assert res.num_bound == len(res.energy) == N
    assert np.all(res.energy < 0) and np.all(np.diff(res.energy) > 0)
    exact = hulthen_exact(Z, lam, res.n)
    inside = np.abs(exact) >= 1e-6 * Z * Z
    assert inside.sum() >= N - 1  # the band covers all but at most the top level
    assert rel_err(res.energy[inside], exact[inside]).max() <= 1e-9, (Z, lam, res.energy, exact)


@pytest.mark.parametrize("Z, mu", [(1.0, 1.0), (2.0, 1.0), (1.5, 0.7)])
def test_hulthen_s_critical_screening_length_and_strength(Z, mu):
    for n in range(1, 9):
        # λ_c = n²/(2Z) for μ = 1 (Hulthén 1942; Flügge problem 67); with a reduced mass μ the
        # radial equation depends on Zμ and μλ only, so λ_c = n²/(2Zμ).
        lam_c = bs.critical_screening_length("hulthen", Z, 0, n - 1, mass=mu)
        assert rel_err(lam_c, n * n / (2.0 * Z * mu)) <= 1e-10, (Z, mu, n, lam_c)
        # Along the strength axis at λ = 3 bohr: Z_c = n²/(2μλ), same formula solved for Z.
        z_c = bs.critical_strength("hulthen", 3.0, 0, n - 1, mass=mu)
        assert rel_err(z_c, n * n / (2.0 * mu * 3.0)) <= 1e-10, (mu, n, z_c)


# ---------------------------------------------------------------------------------------------
# Isotropic harmonic oscillator: E = ω(2n_r + l + 3/2), independent of μ once V = ½μω²r²
# (any QM textbook, e.g. Messiah, Quantum Mechanics, vol. 1, ch. XII).

@pytest.mark.parametrize("omega, mu", [(1.0, 1.0), (0.3, 2.0), (5.0, 0.5)])
def test_isotropic_oscillator(omega, mu):
    for l in (0, 1, 2, 5, 10):
        res = bs.bound_levels(bs.potential("harmonic", omega, mass=mu), l)
        assert len(res.energy) == 20 and res.num_bound == -1
        exact = omega * (2 * res.n_r + l + 1.5)
        assert rel_err(res.energy, exact).max() <= 1e-10, (omega, mu, l, res.energy)


# ---------------------------------------------------------------------------------------------
# Square well of depth Z and radius a = λ.  With x = sqrt(2μZ)·a, a new state of angular
# momentum l appears when x passes a zero of j_{l-1} (l ≥ 1) or (2k−1)π/2 (l = 0)
# (Schiff, Quantum Mechanics, §15; the l = 0 case is the odd states of the 1-d well).
# The zeros are found here with scipy.special.spherical_jn and scipy.optimize.brentq.

def threshold_arguments(l, count):
    if l == 0:
        return [(2 * k + 1) * math.pi / 2 for k in range(count)]
    x = np.linspace(1e-3, (count + l + 2) * math.pi, 20001)
    f = spherical_jn(l - 1, x)
    idx = np.nonzero(np.signbit(f[1:]) != np.signbit(f[:-1]))[0][:count]
    assert len(idx) == count
    return [brentq(lambda t: spherical_jn(l - 1, t), x[i], x[i + 1], xtol=1e-15, rtol=1e-15) for i in idx]


@pytest.mark.parametrize("a, mu", [(1.0, 1.0), (2.0, 0.5), (0.7, 3.0)])
def test_square_well_critical_depths_and_radii(a, mu):
    depth = 40.0  # for the critical-radius direction
    for l in range(4):
        for n_r, x in enumerate(threshold_arguments(l, 3)):
            z_c = bs.critical_strength("square_well", screening_length=a, l=l, n_r=n_r, mass=mu)
            assert rel_err(z_c, x * x / (2.0 * mu * a * a)) <= 1e-9, (a, mu, l, n_r, z_c)
            a_c = bs.critical_screening_length("square_well", strength=depth, l=l, n_r=n_r, mass=mu)
            assert rel_err(a_c, x / math.sqrt(2.0 * mu * depth)) <= 1e-9, (depth, mu, l, n_r, a_c)


def square_well_levels(depth, a, l, mu):
    """Roots of k j_l'(ka) k_l(κa) − κ k_l'(κa) j_l(ka) = 0, the matching of the interior
    j_l(kr) to the exterior k_l(κr) (Schiff, §15), with scipy.special and brentq."""
    def matching(E):
        E = np.asarray(E, dtype=float)
        k = np.sqrt(2.0 * mu * (depth + E))
        kappa = np.sqrt(-2.0 * mu * E)
        f = (k * spherical_jn(l, k * a, derivative=True) * spherical_kn(l, kappa * a)
             - kappa * spherical_kn(l, kappa * a, derivative=True) * spherical_jn(l, k * a))
        return f * np.exp(kappa * a)  # k_l falls like e^{-κa}; scaling keeps f of order one

    s = np.linspace(0.0, 1.0, 20001)[1:-1]
    E = -depth * (1.0 - s) ** 2  # dense near threshold, where levels crowd in E
    f = matching(E)
    idx = np.nonzero(np.signbit(f[1:]) != np.signbit(f[:-1]))[0]
    return np.array([brentq(lambda e: float(matching(e)), E[i], E[i + 1], xtol=1e-15 * depth, rtol=1e-15)
                     for i in idx])


@pytest.mark.parametrize("depth, a, mu", [(40.0, 1.5, 1.0), (10.0, 1.0, 1.0), (3.0, 2.0, 0.5), (50.0, 0.5, 2.0)])
def test_square_well_energies(depth, a, mu):
    x = math.sqrt(2.0 * mu * depth) * a
    total = 0
    for l in range(4):
        exact = square_well_levels(depth, a, l, mu)
        # the reference scan misses nothing: its count is the number of thresholds below x
        assert len(exact) == sum(1 for t in threshold_arguments(l, 12) if t < x)
        res = bs.bound_levels(bs.potential("square_well", depth, a, mass=mu), l)
        assert res.num_bound == len(res.energy) == len(exact), (l, res.energy, exact)
        if len(exact):
            assert rel_err(res.energy, exact).max() <= 1e-9, (depth, a, mu, l, res.energy, exact)
        total += len(exact)
    assert total > 0


# ---------------------------------------------------------------------------------------------
# Yukawa: Rogers, Graboske & Harwood, Phys. Rev. A 1, 1577 (1970).  "Match every digit given":
# the engine's value rounded to the digits printed there must equal the printed value.

@pytest.mark.parametrize("Z", [1.0, 2.0])
def test_yukawa_ground_state_critical_inverse_screening_length(Z):
    # δ_c = 1/λ_c = 1.19061 Z for the 1s state (Rogers, Graboske & Harwood 1970, table I).
    lam_c = bs.critical_screening_length("yukawa", Z, 0, 0)
    assert round(1.0 / lam_c / Z, 5) == 1.19061, 1.0 / lam_c


def test_yukawa_ground_state_energy_at_lambda_10():
    # E_1s = -0.407058 hartree at Z = 1, λ = 10 bohr (Rogers, Graboske & Harwood 1970; value from memory).
    res = bs.bound_levels(bs.potential("yukawa", 1.0, 10.0), 0)
    assert round(float(res.energy[0]), 6) == -0.407058, res.energy[0]
    assert res.n[0] == 1 and res.status[0] == 0


# ---------------------------------------------------------------------------------------------
# One-scale law.  For V = Z f(r/λ)/r the substitution r = ρ/(Zμ) turns the radial equation into
# the one for Z = μ = 1 and screening length Zμλ, with energies in units of Z²μ (dimensional
# analysis, common practice, no source).  Both sides come from the engine computed directly.

@pytest.mark.parametrize("family, reduced_lengths", [("coulomb", [1.0]), ("yukawa", [3.0, 10.0, 40.0]),
                                                     ("ecsc", [5.0, 20.0]), ("hulthen", [4.0, 25.0]),
                                                     ("ion_sphere", [6.0, 30.0]), ("two_yukawa", [10.0, 40.0])])
def test_one_scale_law_for_energies(family, reduced_lengths):
    assert bs.FAMILIES[family].one_scale
    checked = 0
    for Z, mu in [(2.0, 0.5), (0.5, 3.0), (3.0, 1.0)]:
        for zml in reduced_lengths:
            lam = zml / (Z * mu)
            for l in (0, 1, 2):
                # Coulomb binds infinitely many: compare its lowest 8 (keeps the test short)
                scaled = bs.bound_levels(bs.potential(family, Z, lam, mass=mu), l, n_r_max=8)
                unit = bs.bound_levels(bs.potential(family, 1.0, Z * mu * lam, mass=1.0), l, n_r_max=8)
                assert len(scaled.energy) == len(unit.energy), (family, Z, lam, mu, l)
                assert scaled.num_bound == unit.num_bound
                band = np.abs(unit.energy) >= 1e-6
                # tolerance: the promised relative accuracy, 1e-9, on the ratio of the two sides
                assert rel_err(scaled.energy[band], Z * Z * mu * unit.energy[band]).max(initial=0) <= 1e-9
                checked += band.sum()
    assert checked > 0


@pytest.mark.parametrize("family", ["yukawa", "ecsc", "hulthen", "two_yukawa"])
def test_one_scale_law_for_critical_lengths(family):
    # λ_c(Z, μ) = λ_c(1, 1)/(Zμ).  The engine may use this law itself, so the check is made on
    # cells computed directly at (Z, μ): the count steps by one across λ_c(1, 1)/(Zμ).
    lam_unit = bs.critical_screening_length(family, 1.0, 1, 0, mass=1.0)
    for Z, mu in [(2.0, 0.5), (0.5, 3.0), (3.0, 1.0)]:
        lam_c = bs.critical_screening_length(family, Z, 1, 0, mass=mu)
        assert rel_err(lam_c, lam_unit / (Z * mu)) <= 1e-12
        below = bs.count_bound(bs.potential(family, Z, lam_c * (1 - 1e-6), mass=mu), 1)
        above = bs.count_bound(bs.potential(family, Z, lam_c * (1 + 1e-6), mass=mu), 1)
        assert (below, above) == (0, 1), (family, Z, mu, below, above)


def test_one_scale_law_not_claimed_where_it_fails():
    # The square well, the oscillator and the Woods–Saxon well are not of the form Z f(r/λ)/r.
    assert not bs.FAMILIES["square_well"].one_scale
    assert not bs.FAMILIES["harmonic"].one_scale
    assert not bs.FAMILIES["woods_saxon"].one_scale
    Z, lam, mu = 10.0, 1.0, 1.0
    # Square well: the law would give E(10, 1, 1) = 100·E(1, 10, 1); it is far off ...
    left = bs.bound_levels(bs.potential("square_well", Z, lam, mass=mu), 0).energy[0]
    right = Z * Z * mu * bs.bound_levels(bs.potential("square_well", 1.0, Z * mu * lam, mass=1.0), 0).energy[0]
    assert rel_err(left, right) > 0.1, (left, right)
    # ... while the well's own scaling holds: E/Z depends only on 2μZa² (Schiff §15).
    other = Z * bs.bound_levels(bs.potential("square_well", 1.0, lam * math.sqrt(Z * mu), mass=1.0), 0).energy[0]
    assert rel_err(left, other) <= 1e-9, (left, other)
    # Oscillator: E = ω(2n_r + l + 3/2) is linear in ω, not Z²μ times the ω = 1 value.
    omega, mu = 3.0, 2.0
    e = bs.bound_levels(bs.potential("harmonic", omega, mass=mu), 0, n_r_max=1).energy[0]
    e_unit = bs.bound_levels(bs.potential("harmonic", 1.0, mass=1.0), 0, n_r_max=1).energy[0]
    assert rel_err(e, omega * omega * mu * e_unit) > 0.5
    assert rel_err(e, omega * e_unit) <= 1e-10
