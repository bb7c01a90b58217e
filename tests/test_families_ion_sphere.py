"""The ion_sphere family against outside references: matching to the closed-form exterior at R
(scipy.special.kve, DOP853 inside), the large-R limit of first-order perturbation theory with the
hydrogenic ⟨r²⟩, critical radii from the zero-energy solution, and the one-scale law.

V″ jumps at R; the family continues its interior polynomial past R for the solver's ghost nodes
(``continued``), so the levels keep the 1e-9 promise with error estimates that cover the error.
"""

from __future__ import annotations

import math

import mpmath
import numpy as np
import pytest
from scipy.optimize import brentq

import boundscape as bs
from families_reference import ion_sphere, ion_sphere_count, ion_sphere_level_near, ion_sphere_zero_energy_slope

PROMISE = 1e-9

# (Z, R): the Z = 2, R = 6 bohr; a 1s just bound (λ_c = 2.0952 bohr); a large sphere with
# many levels; a small highly charged one
CELLS = [(2.0, 6.0), (1.0, 2.2), (1.0, 50.0), (5.0, 0.5), (3.0, 20.0)]


def test_the_formula_and_its_continuation_past_the_radius():
    Z, R = 2.0, 6.0
    pot = bs.potential("ion_sphere", Z, R)
    r = np.array([1e-6, 0.3, 2.0, 5.9, 5.999999, 6.0, 6.2, 40.0])
    # as stated, in 50 digits (mpmath): near R the stated sum cancels to (R − r)² in double precision
    with mpmath.workdps(50):
        stated = [float(-Z / mpmath.mpf(x) + Z * (3 - mpmath.mpf(x) ** 2 / R**2) / (2 * R)) if x < R else 0.0
                  for x in r]
    np.testing.assert_allclose(pot(r), stated, rtol=1e-13, atol=0.0)
    assert np.all(pot(r[r >= R]) == 0.0)
    # past R the solver's ghost nodes get the interior polynomial, as the formula states it
    from boundscape.engine.potentials.kernels import evaluate

    beyond = np.array([6.0, 6.3, 7.0])
    continued = evaluate(pot.info.kernel, beyond, *pot.kernel_inputs, True)
    np.testing.assert_allclose(continued, -Z / beyond + Z * (3 - beyond**2 / R**2) / (2 * R), rtol=1e-12, atol=1e-15)
    assert pot.info.one_scale and not pot.info.analytic and pot.support == R


@pytest.mark.parametrize("Z, R", CELLS)
def test_levels_against_matching_to_the_closed_form_exterior(Z, R):
    checked = 0
    for l in range(3):
        res = bs.bound_levels(bs.potential("ion_sphere", Z, R), l)
        assert res.num_bound == len(res.energy) == ion_sphere_count(Z, R, l), (l, res.energy)
        for k, (energy, err) in enumerate(zip(res.energy, res.energy_error)):
            exact = ion_sphere_level_near(float(energy), Z, R, l)
            assert abs(energy / exact - 1) <= PROMISE, (l, k, energy, exact)
            assert abs(energy - exact) <= err, (l, k, energy, exact, err)
            checked += 1
    assert checked > 0


@pytest.mark.parametrize("l", [0, 1, 2])
def test_the_large_radius_limit_of_first_order_perturbation_theory(l):
    # Inside R, V = −Z/r + 3Z/(2R) − Z r²/(2R³): to first order E = −Z²/2n² + 3Z/(2R) − Z⟨r²⟩/(2R³)
    # (common practice), with ⟨r²⟩ = n²(5n² + 1 − 3l(l + 1))/(2Z²) (Bethe & Salpeter, Quantum
    # Mechanics of One- and Two-Electron Atoms, eq. 3.24).  What is left is second order in the r²
    # term, ∝ R⁻⁶ (plus e^{−2ZR/n} from the density beyond R): residual·R⁶ must stay put as R doubles.
    Z = 2.0
    scaled = []
    for R in (50.0, 100.0):
        res = bs.bound_levels(bs.potential("ion_sphere", Z, R), l, n_r_max=2)
        n = res.n[1]  # n = l + 2: its residual stands well above the engine's 1e-12 floor
        r2 = n * n * (5.0 * n * n + 1 - 3 * l * (l + 1)) / (2 * Z * Z)
        first = -Z * Z / (2.0 * n * n) + 1.5 * Z / R - Z * r2 / (2 * R**3)
        residual = res.energy[1] - first
        assert abs(residual) <= 0.02 * Z * r2 / (2 * R**3), (R, residual)
        scaled.append(residual * R**6)
    assert math.isclose(scaled[0], scaled[1], rel_tol=0.05), scaled


@pytest.mark.parametrize("Z", [1.0, 3.0])
def test_critical_radii_against_the_zero_energy_solution(Z):
    # beyond R, u = A r^{l+1} + B r^{−l} at E = 0; a state is lost where A crosses zero (common
    # practice, no source): DOP853 from the origin's series to R, brentq in R
    for l, n_r in [(0, 0), (0, 2), (1, 0), (1, 1), (2, 1)]:
        radius = bs.critical_screening_length("ion_sphere", Z, l, n_r)
        exact = brentq(lambda R: ion_sphere_zero_energy_slope(Z, R, l)[0], 0.99 * radius, 1.01 * radius,
                       xtol=1e-14, rtol=1e-14)
        assert abs(radius / exact - 1) <= PROMISE, (l, n_r, radius, exact)
        # and it is the loss of state n_r: n_r + 1 states just above it, n_r just below (Sturm)
        assert (ion_sphere_count(Z, exact * 1.001, l), ion_sphere_count(Z, exact * 0.999, l)) == (n_r + 1, n_r)
        if (l, n_r) != (1, 0):  # the engine's count misses 2p just above its threshold: below
            assert bs.count_bound(bs.potential("ion_sphere", Z, exact * 1.000001), l) == n_r + 1
            assert bs.count_bound(bs.potential("ion_sphere", Z, exact * 0.999999), l) == n_r


def test_the_2p_count_just_above_its_threshold():
    # the coarse zero-energy grid's μ is 1.2e-5 of Z²μ off here (1e-7 for Yukawa): the count
    # also compares the grid h/2, which settles the sign (before: counted unbound)
    radius = bs.critical_screening_length("ion_sphere", 1.0, 1, 0)
    assert ion_sphere_count(1.0, radius * 1.00001, 1) == 1  # DOP853, Sturm
    assert bs.count_bound(bs.potential("ion_sphere", 1.0, radius * 1.00001), 1) == 1


def test_a_critical_strength_is_the_one_scale_law_of_the_critical_radius():
    # V = Z f(r/R)/r: Z_c(R) R = λ_c(Z = 1) exactly (dimensional analysis, common practice)
    lam_1 = bs.critical_screening_length("ion_sphere", 1.0, 2, 0)
    for R in (30.0, 90.0):
        z_c = bs.critical_strength("ion_sphere", R, 2, 0)
        assert abs(z_c * R / lam_1 - 1) <= 1e-12
        # ... and the count, computed directly at (Z, R), steps there
        assert bs.count_bound(bs.potential("ion_sphere", z_c * (1 + 1e-6), R), 2) == 1
        assert bs.count_bound(bs.potential("ion_sphere", z_c * (1 - 1e-6), R), 2) == 0

