"""The complete level set (engine/bound/level_set.py) against exact counts and energies.

Sources are named beside each check: the square well's zero-energy thresholds (Schiff, Quantum
Mechanics, §15, zeros from scipy.special.spherical_jn and brentq), Hulthén's s levels (Flügge,
Practical Quantum Mechanics, problem 67), the Bohr levels (Bethe & Salpeter 1957, eq. 2.11) and
the isotropic oscillator (Messiah, vol. 1, ch. XII).
"""

import math

import numpy as np
import pytest
from scipy.optimize import brentq
from scipy.special import spherical_jn

import boundscape as bs
from boundscape.engine.bound.level_set import (BEYOND_ENGINE_LIMITS, COMPLETE, INFINITELY_MANY, LEVEL_SET_STATUS,
                                               MAX_LEVELS_PER_SET, TRUNCATED)
from boundscape.engine.limits import MAX_L, LimitError
from boundscape.errors import InputError


def square_well_count(x, l):
    """Bound states of angular momentum l in a square well with x = sqrt(2μV₀)·a: one per
    threshold below x, the thresholds being (2k−1)π/2 for l = 0 and the zeros of j_{l−1} for
    l ≥ 1 (Schiff, §15)."""
    if l == 0:
        return int(math.floor(x / math.pi + 0.5))
    grid = np.linspace(1e-3, x, 20001)
    f = spherical_jn(l - 1, grid)
    crossings = np.nonzero(np.signbit(f[1:]) != np.signbit(f[:-1]))[0]
    roots = [brentq(lambda t: spherical_jn(l - 1, t), grid[i], grid[i + 1]) for i in crossings]
    return sum(1 for r in roots if r < x)


def resum_by_l(pot):
    """The levels of every l from bound_levels, l = 0, 1, … until an l binds nothing."""
    levels = []
    for l in range(MAX_L + 1):
        res = bs.bound_levels(pot, l)
        if res.num_bound == 0:
            return levels
        levels.extend((l, int(k), float(e)) for k, e in zip(res.n_r, res.energy))
    raise AssertionError("no l without bound states")


@pytest.mark.parametrize("depth, a, mu", [(200.0, 1.0, 1.0), (30.0, 2.0, 0.5)])
def test_square_well_set_has_every_state_the_threshold_count_gives(depth, a, mu):
    pot = bs.potential("square_well", depth, a, mass=mu)
    s = bs.level_set(pot)
    x = math.sqrt(2.0 * mu * depth) * a
    exact = [square_well_count(x, l) for l in range(s.counts.size)]
    assert s.set_status == COMPLETE, s.set_reason
    assert exact[-1] == 0 and s.counts.tolist() == exact  # (Schiff §15) the counting stops at the first empty l
    assert np.count_nonzero(s.l == 0) == exact[0] and len(s.energy) == sum(exact)
    # Σ 2(2l+1) over the exact threshold counts
    assert s.bound_state_count == sum(2 * (2 * l + 1) * n for l, n in enumerate(exact))
    assert s.bound_state_count == int(np.sum(s.degeneracy))


@pytest.mark.parametrize("family, Z, lam", [("yukawa", 1.0, 60.0), ("ecsc", 2.0, 40.0), ("hulthen", 1.0, 40.0)])
def test_set_is_bound_levels_per_l_until_an_l_binds_nothing(family, Z, lam):
    pot = bs.potential(family, Z, lam)
    s = bs.level_set(pot)
    assert s.complete and s.set_status in (COMPLETE,), s.set_reason
    ref = sorted(resum_by_l(pot), key=lambda t: (t[0], t[1]))
    got = sorted(zip(s.l.tolist(), s.n_r.tolist(), s.energy.tolist()))
    assert [(l, k) for l, k, _ in got] == [(l, k) for l, k, _ in ref]
    np.testing.assert_array_equal([e for *_, e in got], [e for *_, e in ref])  # the same cells, the same bits
    assert np.all(np.diff(s.energy) >= 0)  # ascending


def test_counts_and_energies_rise_with_l():
    # Sturm comparison: V_eff grows with l pointwise, so N_l cannot grow and E(n_r, l) rises with l
    # (Courant & Hilbert, vol. 1, ch. VI)
    s = bs.level_set(bs.potential("yukawa", 1.0, 200.0))
    assert np.all(np.diff(s.counts) <= 0) and s.counts[-1] == 0
    for k in range(int(s.counts[0])):
        e = [s.energy[(s.l == l) & (s.n_r == k)][0] for l in range(s.counts.size) if s.counts[l] > k]
        assert np.all(np.diff(e) > 0), k


def test_hulthen_s_levels_of_the_set_are_exact():
    # E_n = −½(Z/n − n/(2λ))², bound while n² < 2Zλ (Flügge, problem 67)
    Z, lam = 1.0, 40.0
    s = bs.level_set(bs.potential("hulthen", Z, lam))
    s_levels = s.energy[s.l == 0]
    n = np.arange(1, s_levels.size + 1)
    assert s_levels.size == max(k for k in range(1, 20) if k * k < 2 * Z * lam)
    np.testing.assert_allclose(s_levels, -0.5 * (Z / n - n / (2 * lam)) ** 2, rtol=1e-9)


def test_coulomb_tail_gives_the_levels_up_to_the_cut_and_says_so():
    s = bs.level_set(bs.potential("coulomb", 2.0), principal_cut=6)
    assert s.set_status == INFINITELY_MANY and not s.complete and "infinitely many" in s.set_reason
    assert s.bound_state_count == -1 and s.principal_cut == 6
    # every (n, l) with n ≤ 6 once; E = −Z²/(2n²) (Bethe & Salpeter 1957, eq. 2.11)
    assert sorted(zip(s.n.tolist(), s.l.tolist())) == [(n, l) for n in range(1, 7) for l in range(n)]
    np.testing.assert_allclose(s.energy, -4.0 / (2.0 * s.n ** 2), rtol=1e-10)
    assert s.counts.tolist() == [-1] * 6


def test_confining_potential_is_flagged():
    s = bs.level_set(bs.potential("harmonic", 1.0), principal_cut=4)
    assert s.set_status == INFINITELY_MANY and "confining" in s.set_reason
    # E = ω(2n_r + l + 3/2) (Messiah, vol. 1, ch. XII)
    np.testing.assert_allclose(s.energy, 2 * s.n_r + s.l + 1.5, rtol=1e-10)


def test_truncated_set_keeps_exact_counts_and_a_floor_under_what_it_omits():
    pot = bs.potential("yukawa", 1.0, 100.0)
    full = bs.level_set(pot)
    cut = bs.level_set(pot, max_levels=20)
    assert full.set_status == COMPLETE and cut.set_status == TRUNCATED, cut.set_reason
    assert len(cut.energy) <= 20 and cut.principal_cut is not None
    assert np.all(cut.n <= cut.principal_cut)
    assert cut.counts.tolist() == full.counts.tolist() and cut.bound_state_count == full.bound_state_count
    solved = set(zip(cut.l.tolist(), cut.n_r.tolist()))
    omitted = [(l, k, e) for l, k, e in zip(full.l.tolist(), full.n_r.tolist(), full.energy.tolist())
               if (l, k) not in solved]
    assert len(omitted) == full.level_count - len(cut.energy) > 0
    for l, k, e in omitted:
        assert e >= cut.omitted_floor[l], (l, k, e, cut.omitted_floor[l])
    # and the solved ones are the complete set's (same cells, same bits)
    for l, k, e in zip(cut.l.tolist(), cut.n_r.tolist(), cut.energy.tolist()):
        assert e == full.energy[(full.l == l) & (full.n_r == k)][0]


def test_principal_cut_on_a_short_range_potential():
    s = bs.level_set(bs.potential("yukawa", 1.0, 100.0), principal_cut=3)
    assert s.set_status == TRUNCATED and sorted(set(s.n.tolist())) == [1, 2, 3]


def test_count_beyond_the_grid_limit_is_flagged_in_one_line():
    s = bs.level_set(bs.potential("yukawa", 1.0, 1e9))
    assert s.set_status == BEYOND_ENGINE_LIMITS and not s.complete
    assert "limit" in s.set_reason and "\n" not in s.set_reason
    assert s.bound_state_count == -1 and s.counts.tolist() == [-1] and s.energy.size == 0


def test_l_beyond_the_engine_limit_is_flagged_with_the_lowest_levels():
    s = bs.level_set(bs.potential("yukawa", 1.0, 3e6), max_levels=50)
    assert s.set_status == BEYOND_ENGINE_LIMITS and f"l ≤ {MAX_L}" in s.set_reason
    assert 0 < len(s.energy) <= 50
    # the lowest levels are near the Bohr values −1/(2n²), shifted up by about Z/λ (first order)
    ground = s.energy[0]
    assert abs(ground - (-0.5 + 1 / 3e6)) < 1e-9


def test_bad_arguments_are_one_line_errors():
    pot = bs.potential("yukawa", 1.0, 10.0)
    with pytest.raises(InputError, match="max_levels"):
        bs.level_set(pot, max_levels=0)
    with pytest.raises(LimitError, match="max_levels"):
        bs.level_set(pot, max_levels=MAX_LEVELS_PER_SET + 1)
    with pytest.raises(InputError, match="principal_cut"):
        bs.level_set(pot, principal_cut=1.5)


def test_status_names_are_cf_flag_meanings():
    assert all(" " not in name for name in LEVEL_SET_STATUS)
    assert LEVEL_SET_STATUS[COMPLETE] == "complete"
