"""The engine's error estimate of a critical screening length (the loss table's error
column and the cube's ``critical_screening_length_error``), against exact critical lengths."""

from __future__ import annotations

import math

import pytest

import boundscape as bs


# Hulthén, l = 0 (Hulthén, Ark. Mat. Astron. Fys. 28A (1942); Flügge, Practical Quantum
# Mechanics, problem 67): the n-th s state appears at λ = n²/(2Zμ).
@pytest.mark.parametrize("Z, n", [(1.0, 1), (1.0, 2), (1.0, 3), (2.0, 1), (2.0, 4)])
def test_error_estimate_bounds_the_true_error_of_hulthen(Z, n):
    value, error = bs.critical_screening_length("hulthen", Z, 0, n - 1, full_output=True)
    exact = n * n / (2.0 * Z)
    assert value == bs.critical_screening_length("hulthen", Z, 0, n - 1)  # full_output changes nothing
    assert abs(value - exact) <= error  # the estimate is an upper bound here
    # and not a vacuous one: within a few hundred times the true error, and small
    assert error < 1e-9 * exact
    assert error <= 1000 * max(abs(value - exact), 1e-15 * exact)


def test_one_scale_error_scales_with_the_value():
    # λ_c(Z) = λ_c(1)/Z is exact for V = Z f(r/λ)/r: so is the error estimate's scaling.
    v1, e1 = bs.critical_screening_length("yukawa", 1.0, 1, 0, full_output=True)
    v3, e3 = bs.critical_screening_length("yukawa", 3.0, 1, 0, full_output=True)
    assert math.isclose(v3 * 3.0, v1, rel_tol=1e-14) and math.isclose(e3 * 3.0, e1, rel_tol=1e-14)
    # Yukawa 2p: λ_c ≈ 4.5410 bohr (Rogers, Graboske & Harwood, Phys. Rev. A 1, 1577 (1970); value from memory)
    assert abs(v1 - 4.5410) < 1e-3 and 0 < e1 < 1e-9 * v1

