"""Exact bound-state counts on either side of each threshold.

A cell just past a threshold holds a level so shallow that it spreads over 1e6 bohr; one just
short of it holds none.  The count must step by exactly one at λ_c, equal the number of levels
returned, and show no shallow pseudo-level from a discretised continuum.
"""

import math

import numpy as np
import pytest

import boundscape as bs

SIDES = (-1e-3, -1e-6, 1e-6, 1e-3)  # relative offsets of λ from λ_c


def check_levels(res, expected):
    """The invariants of a returned level set, with its expected exact count."""
    assert res.num_bound == expected, (res.num_bound, expected)
    assert len(res.energy) == expected, res.energy
    assert np.all(res.energy < 0), res.energy
    assert np.all(np.diff(res.energy) > 0), res.energy
    assert list(res.n_r) == list(range(expected))
    assert list(res.n) == [k + res.l + 1 for k in range(expected)]


@pytest.mark.parametrize("family", ["yukawa", "hulthen"])
@pytest.mark.parametrize("l", [0, 1, 2])
def test_count_steps_by_one_across_each_critical_length(family, l):
    Z = 1.0
    lam_c = [bs.critical_screening_length(family, Z, l, n_r) for n_r in range(3)]
    # Sturm ordering: each further node needs a longer screening length (Courant & Hilbert,
    # vol. 1, ch. VI, comparison theorem: V decreases pointwise as λ grows for these families).
    assert all(a < b for a, b in zip(lam_c, lam_c[1:])), lam_c
    for n_r, lc in enumerate(lam_c):
        newest = {}
        for eps in SIDES:
            pot = bs.potential(family, Z, lc * (1 + eps))
            expected = n_r + (1 if eps > 0 else 0)
            res = bs.bound_levels(pot, l)
            check_levels(res, expected)
            assert bs.count_bound(pot, l) == expected
            if eps > 0:
                newest[eps] = res.energy[-1]
        # Threshold law: the new level's energy vanishes like (λ−λ_c)² for l = 0 and like
        # (λ−λ_c) for l ≥ 1 (Newton, Scattering Theory of Waves and Particles, ch. 12).  Going
        # from 1e-3 to 1e-6 must shrink it by 1e-6 or 1e-3, to within a factor 2 for the
        # higher-order terms (factor: common practice, no source).
        expected_ratio = (1e-6 / 1e-3) ** (2 if l == 0 else 1)
        ratio = newest[1e-6] / newest[1e-3]
        assert 0.5 * expected_ratio <= ratio <= 2.0 * expected_ratio, (family, l, n_r, newest)


@pytest.mark.parametrize("Z, n", [(1.0, 1), (1.0, 2), (1.0, 3), (1.0, 8), (2.0, 1), (2.0, 5)])
def test_hulthen_s_count_is_the_exact_formula_at_threshold(Z, n):
    # Hulthén l = 0: bound states are exactly n < sqrt(2Zλ) (Hulthén 1942; Flügge, Practical
    # Quantum Mechanics, problem 67), so the n-th appears at λ = n²/(2Z) -- taken from the
    # formula here, not from the engine.
    lam_exact = n * n / (2.0 * Z)
    for eps in SIDES:
        lam = lam_exact * (1 + eps)
        expected = sum(1 for k in range(1, 100) if k < math.sqrt(2.0 * Z * lam))
        assert expected == (n if eps > 0 else n - 1)
        res = bs.bound_levels(bs.potential("hulthen", Z, lam), 0)
        check_levels(res, expected)


def test_shallow_level_energy_against_hulthen_formula():
    # Just past threshold the level's energy still follows E_n = -½(Z/n − n/(2λ))²
    # (Hulthén 1942): at λ = λ_c(1 + 1e-3), |E_3| ≈ 6e-8 hartree and 1/κ ≈ 3000 bohr.
    # Issue 2 sets 1e-9 only for |E| ≥ 1e-6·Z²; below that band we ask 1e-8 relative (our own
    # figure: common practice, no source).
    Z, n = 1.0, 3
    lam = n * n / (2.0 * Z) * (1 + 1e-3)
    res = bs.bound_levels(bs.potential("hulthen", Z, lam), 0)
    exact = -0.5 * (Z / n - n / (2.0 * lam)) ** 2
    assert res.energy[-1] < 0
    assert abs(res.energy[-1] / exact - 1) <= 1e-8, (res.energy[-1], exact)


@pytest.mark.parametrize("family, Z, lam", [("yukawa", 1.0, 10.0), ("yukawa", 1.0, 50.0), ("hulthen", 1.0, 32.5),
                                            ("ecsc", 1.0, 20.0), ("square_well", 40.0, 1.5), ("square_well", 10.0, 1.0)])
@pytest.mark.parametrize("l", [0, 1, 3])
def test_zero_energy_nodes_equal_the_count(family, Z, lam, l):
    # Sturm oscillation: the number of nodes of the regular E = 0 solution on (0, ∞) is the
    # number of bound states of that l (Courant & Hilbert, vol. 1, ch. VI; Newton, ch. 12).
    pot = bs.potential(family, Z, lam)
    r, u, nodes = bs.zero_energy_solution(pot, l)
    count = bs.count_bound(pot, l)
    assert nodes == count, (family, lam, l, nodes, count)
    assert bs.bound_levels(pot, l).num_bound == count
    # the returned solution is the regular one, normalised to max |u| = 1
    assert np.max(np.abs(u)) == pytest.approx(1.0, rel=1e-12)
    assert np.all(np.diff(r) > 0)


@pytest.mark.parametrize("family", ["yukawa", "hulthen"])
@pytest.mark.parametrize("l", [0, 1, 2])
@pytest.mark.parametrize("eps", [1e-6, 1e-3])
def test_zero_energy_nodes_just_past_threshold(family, l, eps):
    # Just past λ_c the new node of the E = 0 solution lies far out, beyond the range of the
    # potential, where u = A r^{l+1} + B r^{-l} with A small; it still counts (Sturm oscillation,
    # Courant & Hilbert vol. 1 ch. VI).
    pot = bs.potential(family, 1.0, bs.critical_screening_length(family, 1.0, l, 0) * (1 + eps))
    assert bs.count_bound(pot, l) == 1
    assert bs.zero_energy_solution(pot, l)[2] == 1


def test_square_well_zero_energy_nodes_against_bessel_zeros():
    # For the square well the count is also known in closed form: l = 1 states appear where
    # sqrt(2μZ)a passes the zeros of j_0, i.e. multiples of π (Schiff, Quantum Mechanics, §15).
    depth, a = 40.0, 1.5
    x = math.sqrt(2.0 * depth) * a
    expected = int(x // math.pi)
    pot = bs.potential("square_well", depth, a)
    assert bs.count_bound(pot, 1) == expected
    assert bs.zero_energy_solution(pot, 1)[2] == expected
