"""The engine's fast paths give what its plain statements give.

* the compiled whole-cell solver (engine.cell) against the step-by-step Python path of
  engine.levels, on every built-in family (the same method, so agreement to ~1e-12);
* the compiled formulas of V(r) and of the exterior log-derivative against the Family classes
  and engine.exterior (whose Bessel ratio comes from scipy.special.kve);
* determinism: a cell's bits do not depend on what was solved before it, on the tile it is in
  or on how a sweep is cut into tiles;
* the per-level entry points (solve_level, level_on_grid) against bound_levels and against the
  normalisation ∫u² dr = 1 (Simpson's rule, checked against scipy.integrate.simpson).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import simpson

import boundscape as bs
from boundscape.engine import compiled_potentials, exterior, levels, numerov
from boundscape.sweep import solve_tile

CELLS = [("yukawa", 2.0, 3.0, 0), ("yukawa", 1.0, 40.0, 2), ("ecsc", 1.0, 20.0, 1), ("hulthen", 1.0, 12.6, 0),
         ("square_well", 40.0, 1.5, 1), ("coulomb", 1.0, None, 3), ("harmonic", 0.7, None, 2)]


def table_potential():
    # a Yukawa-like core tabulated on 400 points with a declared Coulomb tail (its own choice of
    # shape: common practice, no source)
    r = np.geomspace(1e-3, 40.0, 400)
    v = -(1.0 + 2.0 * np.exp(-r)) / r
    v[-1] = -1.0 / r[-1]
    return bs.potential("tabulated", 1.0, 5.0, table=(r, v), screened=True, coulomb_tail=1.0)


@pytest.mark.parametrize("family, Z, lam, l", CELLS)
def test_compiled_cell_agrees_with_the_python_path(family, Z, lam, l):
    pot = bs.potential(family, Z, lam)
    keep = -1 if pot.tail == "short" else 6
    count, fast = levels.compiled_cell(pot, l, keep)
    count_py, slow = levels._python_cell(pot, l, keep, levels.RTOL, False)
    assert count == count_py and len(fast) == len(slow) > 0
    for a, b in zip(fast, slow):
        assert a.status == b.status == 0, (a.reason, b.reason)
        assert abs(a.energy / b.energy - 1) <= 1e-12, (a.energy, b.energy)
        assert abs(a.mean_radius / b.mean_radius - 1) <= 1e-10


def test_compiled_cell_agrees_with_the_python_path_for_a_table():
    pot = table_potential()
    count, fast = levels.compiled_cell(pot, 1, -1)
    count_py, slow = levels._python_cell(pot, 1, -1, levels.RTOL, False)
    assert count == count_py >= 1
    for a, b in zip(fast, slow):
        assert abs(a.energy / b.energy - 1) <= 1e-12, (a.energy, b.energy)


@pytest.mark.parametrize("family, Z, lam", [("coulomb", 2.0, None), ("yukawa", 2.0, 3.0), ("ecsc", 1.5, 4.0),
                                            ("hulthen", 1.0, 2.0), ("square_well", 5.0, 1.5), ("harmonic", 0.5, None)])
def test_compiled_potentials_equal_the_family_formulas(family, Z, lam):
    pot = bs.potential(family, Z, lam, mass=1.7)
    code, params, x, c = compiled_potentials.kernel_of(pot)
    r = np.geomspace(1e-6, 30.0, 500)
    fast = np.array([compiled_potentials.potential_at(code, params, x, c, ri, False) for ri in r])
    assert np.allclose(fast, pot(r), rtol=1e-14, atol=0.0)


def test_compiled_table_equals_the_spline():
    pot = table_potential()
    code, params, x, c = compiled_potentials.kernel_of(pot)
    r = np.concatenate([np.geomspace(1e-5, 39.9, 700), [40.0, 55.0]])
    fast = np.array([compiled_potentials.potential_at(code, params, x, c, ri, False) for ri in r])
    assert np.allclose(fast, pot(r), rtol=1e-13, atol=0.0)


@pytest.mark.parametrize("l", [0, 1, 3, 8, 20])
@pytest.mark.parametrize("kappa_R", [1e-4, 0.3, 2.0, 15.0, 80.0])
def test_compiled_exterior_equals_the_bessel_ratio(l, kappa_R):
    # engine.exterior.ShortRange uses scipy.special.kve: u'/u of √r K_{l+½}(κr) (A&S 10.2)
    R, mass = 3.0, 1.0
    kappa = kappa_R / R
    energy = -kappa * kappa / (2 * mass)
    reference = exterior.ShortRange(l, mass).log_derivative(energy, R)
    fast = numerov.exterior_log_derivative(numerov.TAIL_SHORT, l, mass, 0.0, energy, R)
    assert fast == pytest.approx(reference, rel=1e-12, abs=1e-14 / R)


def test_a_cell_gives_the_same_bits_whatever_came_before():
    pot = bs.potential("yukawa", 1.3, 17.0)
    first = bs.bound_levels(pot, 1)
    for other in (("hulthen", 2.0, 9.0), ("square_well", 30.0, 2.0), ("yukawa", 1.3, 17.5)):
        bs.bound_levels(bs.potential(*other), 1)
    again = bs.bound_levels(pot, 1)
    for name in ("energy", "energy_error", "mean_radius"):
        assert np.array_equal(getattr(first, name), getattr(again, name))


def tile(strengths, lams):
    spec = {"family": "yukawa", "mass": 1.0, "n_r_max": 4, "strength": list(strengths),
            "screening_length": list(lams), "l": [0, 2]}
    return solve_tile(spec)


def test_two_tilings_give_identical_bits():
    strengths = [1.0, 2.5]
    lams = list(np.geomspace(0.5, 60.0, 6))
    whole = tile(strengths, lams)
    # the same cells cut another way: by strength, and the λ row dealt out in two
    for i, z in enumerate(strengths):
        for part in (lams[0::2], lams[1::2]):
            cut = tile([z], part)
            j = [lams.index(x) for x in part]
            for name in ("energy", "energy_error", "mean_radius", "num_bound", "status"):
                a = whole[name][i][j]
                b = cut[name][0]
                assert a.tobytes() == b.tobytes(), name
    assert np.isfinite(whole["energy"]).any()


def test_solve_level_gives_the_bits_of_bound_levels_and_a_normalised_u():
    pot = bs.potential("yukawa", 1.0, 25.0)
    res = bs.bound_levels(pot, 1, wavefunctions=True)
    for k in range(len(res.energy)):
        lv = levels.solve_level(pot, 1, k)
        assert lv.energy == res.energy[k] and lv.mean_radius == res.mean_radius[k]
        assert np.array_equal(lv.u, res.u[k])
        # the box reaches 20 decay lengths: the part beyond it is ~e^-40, so ∫₀^R u² dr = 1
        # (scipy.integrate.simpson on the nodes, in t: dr = g dt, g from the map's closed form)
        gr = lv.grid
        t = np.linspace(gr.t0, gr.t1, lv.u.size)
        g = np.array([numerov.map_point(gr.beta, gr.c, gr.tc, ti)[1] for ti in t])
        assert simpson(lv.u**2 * g, x=t) == pytest.approx(1.0, rel=1e-7)
        assert int(np.count_nonzero(np.diff(np.signbit(lv.u[1:])))) == k  # n_r nodes


def test_level_on_a_common_grid_reproduces_the_level():
    pot = bs.potential("yukawa", 1.0, 25.0)
    lo, hi = levels.solve_level(pot, 1, 0), levels.solve_level(pot, 1, 1)
    grid = hi.grid  # the larger box holds both
    energies, overlap = [], []
    for f in (1, 2, 4):
        e0, r, u0, w = levels.level_on_grid(pot, 1, 0, grid.refined(f), lo.energy)
        _, _, u1, _ = levels.level_on_grid(pot, 1, 1, grid.refined(f), hi.energy)
        energies.append(e0)
        overlap.append(float(np.sum(w * u0 * u1)))
        assert float(np.sum(w * u0 * u0)) == pytest.approx(1.0, rel=1e-9)
    from boundscape.engine.grid import richardson
    assert abs(richardson(energies)[0] / lo.energy - 1) <= 1e-9
    # eigenvectors of one Sturm-Liouville problem are orthogonal (to discretisation error)
    assert abs(richardson(overlap)[0]) <= 1e-8
    assert math.isfinite(lo.energy)


@pytest.mark.parametrize("l", [0, 1, 2, 5])
@pytest.mark.parametrize("kappa_R", [1e-3, 0.05, 1.0, 6.0, 40.0])
def test_compiled_tail_moments_equal_the_quadrature(l, kappa_R):
    # engine.exterior.ShortRange.tail_moments integrates scipy.special.kve with scipy.integrate.quad
    # (or Gauss-Laguerre far from threshold)
    R, mass = 2.0, 1.0
    kappa = kappa_R / R
    energy = -kappa * kappa / (2 * mass)
    reference = exterior.ShortRange(l, mass).tail_moments(energy, R)
    nodes, weights = np.polynomial.legendre.leggauss(16)
    fast = numerov.exterior_tail_moments(l, mass, energy, R, nodes, weights, levels.TAIL_PANELS)
    assert fast[0] == pytest.approx(reference[0], rel=1e-9)
    # ⟨r⟩ of a p-wave tail diverges like ln(1/κR) near threshold: there quad's own accuracy
    # (about 1e-7 here) is the limit of the reference, not the compiled moments
    assert fast[1] == pytest.approx(reference[1], rel=1e-6 if (l == 1 and kappa_R < 0.01) else 1e-9)
