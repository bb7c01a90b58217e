"""Partition functions (physics/populations/partition.py) against outside sums.

Sources: the engine's own levels re-summed per l until an l binds nothing (completeness);
mpmath.nsum of the Planck–Larkin series (Planck 1924, Larkin 1960) and its high-temperature
limit x₁² ζ(2) = x₁² π²/6 (the series' leading term, ζ(2) = π²/6 by Euler).
"""

import math

import mpmath
import numpy as np
import pytest

import boundscape as bs
from boundscape.engine.limits import MAX_L
from boundscape.physics.populations import (LevelSets, bound_state_count, log_partition_function,
                                            log_planck_larkin_partition_function, omitted_partition_bound,
                                            partition_function, plasma_populations, planck_larkin_partition_function)


def resummed(pot, kT):
    """U and Σ 2(2l+1) from bound_levels, l = 0, 1, … until an l binds nothing."""
    U, states = 0.0, 0
    for l in range(MAX_L + 1):
        res = bs.bound_levels(pot, l)
        if res.num_bound == 0:
            return U, states
        U += float(np.sum(2 * (2 * l + 1) * np.exp(-res.energy / kT)))
        states += 2 * (2 * l + 1) * res.num_bound
    raise AssertionError("no empty l")


@pytest.mark.parametrize("family, Z, lam, kT", [("yukawa", 1.0, 80.0, 0.05), ("yukawa", 2.0, 30.0, 1.0),
                                                ("hulthen", 1.0, 40.0, 0.2), ("square_well", 50.0, 1.5, 3.0)])
def test_partition_function_sums_exactly_the_states_the_counts_give(family, Z, lam, kT):
    pot = bs.potential(family, Z, lam)
    levels = bs.level_set(pot)
    U, states = resummed(pot, kT)
    assert levels.complete
    assert bound_state_count(levels) == states == levels.bound_state_count
    assert partition_function(levels, kT) == pytest.approx(U, rel=1e-13)
    assert omitted_partition_bound(levels, kT) == 0.0


def test_log_partition_function_does_not_overflow():
    levels = bs.level_set(bs.potential("yukawa", 1.0, 50.0))
    kT = 1e-4  # e^{0.49/1e-4} overflows a double
    log_u = log_partition_function(levels, kT)
    # the ground level dominates: ln U = ln 2 − E_1s/kT + (a relative e^{−(E_2 − E_1)/kT} correction)
    assert log_u == pytest.approx(math.log(2) - levels.energy[0] / kT, rel=1e-15)
    assert math.isinf(partition_function(levels, kT))
    temps = np.array([1e-4, 0.01, 1.0])
    assert np.allclose(log_partition_function(levels, temps), [log_partition_function(levels, t) for t in temps],
                       rtol=1e-15)


def test_truncated_set_brackets_the_complete_partition_function():
    pot = bs.potential("yukawa", 1.0, 300.0)
    full, cut = bs.level_set(pot), bs.level_set(pot, max_levels=40)
    assert cut.status_name == "truncated"
    for kT in (0.01, 0.1, 1.0):
        low, gap = partition_function(cut, kT), omitted_partition_bound(cut, kT)
        exact = partition_function(full, kT)
        assert low <= exact <= low + gap, (kT, low, exact, gap)
        if kT >= 0.1:  # (at kT = 0.01 the omitted levels are below the ground level's rounding)
            assert exact > low
    assert bound_state_count(cut) == bound_state_count(full)


def test_nothing_bound_and_infinitely_many():
    empty = bs.level_set(bs.potential("yukawa", 1.0, 0.5))  # below the 1s critical length, ~0.84 bohr
    assert empty.energy.size == 0 and log_partition_function(empty, 0.1) == -math.inf
    assert bound_state_count(empty) == 0
    coulomb = bs.level_set(bs.potential("coulomb", 1.0))
    assert math.isinf(omitted_partition_bound(coulomb, 0.1)) and bound_state_count(coulomb) == -1
    # a Coulomb tail's U diverges: the plasma record leaves it and the ionized fraction undefined
    record = plasma_populations(coulomb, nuclear_charge=1.0, electron_density=1e-6, kT=0.1)
    assert math.isnan(record.partition_function) and math.isnan(record.ionized_fraction)


@pytest.mark.parametrize("x1", [1e-3, 0.3, 5.0, 13.6, 100.0, 600.0])
def test_planck_larkin_against_its_series_summed_by_mpmath(x1):
    # Σ 2n²(e^{x_n} − 1 − x_n), x_n = x₁/n² (Planck 1924; Larkin 1960), summed by mpmath.nsum at 30 digits
    with mpmath.workdps(30):
        ref = mpmath.nsum(lambda n: 2 * n ** 2 * (mpmath.exp(x1 / n ** 2) - 1 - x1 / n ** 2), [1, mpmath.inf])
        log_ref = float(mpmath.log(ref))
    Z, mu = 2.0, 0.7
    kT = Z * Z * mu / 2 / x1
    assert log_planck_larkin_partition_function(Z, kT, mass=mu) == pytest.approx(log_ref, rel=1e-14, abs=1e-14)
    assert planck_larkin_partition_function(Z, kT, mass=mu) == pytest.approx(float(ref), rel=1e-12)


def test_planck_larkin_high_and_low_temperature_limits():
    # high T: 2n²·x_n²/2 summed gives x₁² ζ(2) = x₁² π²/6 (next term x₁³ζ(4)/3, relative ~x₁)
    for x1 in (1e-3, 1e-5):
        assert planck_larkin_partition_function(1.0, 0.5 / x1) == pytest.approx(x1 ** 2 * math.pi ** 2 / 6, rel=2 * x1)
    # low T: the ground level alone, 2e^{x₁}: ln U = x₁ + ln 2 (the others are e^{−3x₁/4} smaller)
    assert log_planck_larkin_partition_function(1.0, 0.5 / 2000.0) == pytest.approx(2000 + math.log(2), rel=1e-15)
    temps = np.array([0.01, 0.1, 1.0])
    assert np.shape(planck_larkin_partition_function(1.0, temps)) == (3,)


def test_level_sets_solve_each_screening_length_once():
    sets = LevelSets("yukawa", 1.0, 1.0)
    a = sets(20.0)
    b = sets(20.0)
    assert a is b and sets.solved == 1
    sets(21.0)
    assert sets.solved == 2
