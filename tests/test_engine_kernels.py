"""The engine's compiled kernels against independent statements of what they compute.

* the compiled formula of every family against the formula as its docstring states it, written
  out here with NumPy (and a table against scipy's own evaluation of its cubic spline);
* the exterior log-derivative and the exterior's integrals against scipy.special's modified
  Bessel functions and scipy.integrate.quad;
* Richardson's weights against their defining equations (exact rational arithmetic);
* determinism: a cell's bits do not depend on what was solved before it, on the tile it is in
  or on how a sweep is cut into tiles;
* the per-level entry points (solve_level, level_on_grid) against bound_levels and against the
  normalisation ∫u² dr = 1 (Simpson's rule, checked against scipy.integrate.simpson).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import quad, simpson
from scipy.interpolate import CubicSpline
from scipy.special import kve

import boundscape as bs
from boundscape.engine.bound import levels
from boundscape.engine.bound.mapping import map_point
from boundscape.engine.potentials import exterior
from boundscape.engine.richardson import extrapolate, extrapolate_grids, rational_weights
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


# each family's formula as its docstring states it (atomic units), written out independently here
STATED = {
    "coulomb": lambda r, Z, lam, mu: -Z / r,
    "yukawa": lambda r, Z, lam, mu: -Z * np.exp(-r / lam) / r,
    "ecsc": lambda r, Z, lam, mu: -Z * np.exp(-r / lam) * np.cos(r / lam) / r,
    "hulthen": lambda r, Z, lam, mu: -(Z / lam) * np.exp(-r / lam) / (1.0 - np.exp(-r / lam)),
    "square_well": lambda r, Z, lam, mu: np.where(r <= lam, -Z, 0.0),
    "harmonic": lambda r, Z, lam, mu: 0.5 * mu * Z * Z * r * r,
}


@pytest.mark.parametrize("family, Z, lam", [("coulomb", 2.0, None), ("yukawa", 2.0, 3.0), ("ecsc", 1.5, 4.0),
                                            ("hulthen", 1.0, 2.0), ("square_well", 5.0, 1.5), ("harmonic", 0.5, None)])
def test_compiled_formulas_equal_the_stated_formulas(family, Z, lam):
    pot = bs.potential(family, Z, lam, mass=1.7)
    r = np.geomspace(1e-6, 30.0, 500)
    if family == "hulthen":  # 1 − e^{−x} as stated cancels at small x (test_potentials checks r → 0)
        r = r[r > 1e-3 * lam]
    assert np.allclose(pot(r), STATED[family](r, Z, lam, 1.7), rtol=1e-12, atol=0.0)
    if pot.info.analytic:  # the same formula at complex r, where the stated one continues
        z = r * np.exp(0.3j)
        assert np.allclose(pot.complex_values(z), STATED[family](z, Z, lam, 1.7), rtol=1e-12, atol=0.0)


# the families with their own parameters, as their docstrings state them (atomic units)
STATED_WITH_PARAMETERS = {
    "woods_saxon": (lambda r, Z, lam, mu, a: -Z / (1.0 + np.exp((r - lam) / a)), {"a": 0.45}, {"diffuseness": 0.45}),
    "two_yukawa": (lambda r, Z, lam, mu, c, rho: (-Z * np.exp(-r / lam) + c * Z * np.exp(-r / (rho * lam))) / r,
                   {"c": 2.3, "rho": 0.5}, {"core_strength": 2.3, "core_range": 0.5}),
    # the factored form (R − r)²(r + 2R)/(2rR³) of Z/r − Z(3 − r²/R²)/(2R): the sum as stated loses
    # its digits to cancellation near R
    "ion_sphere": (lambda r, Z, lam, mu: np.where(r < lam, -Z * (lam - r) ** 2 * (r + 2 * lam) / (2 * r * lam**3), 0.0),
                   {}, {}),
}


@pytest.mark.parametrize("family", sorted(STATED_WITH_PARAMETERS))
def test_compiled_formulas_of_the_families_with_parameters(family):
    stated, args, params = STATED_WITH_PARAMETERS[family]
    Z, lam = 1.9, 3.0
    pot = bs.potential(family, Z, lam, mass=1.7, **params)
    r = np.geomspace(1e-6, 60.0, 500)
    assert np.allclose(pot(r), stated(r, Z, lam, 1.7, **args), rtol=1e-12, atol=0.0)
    if pot.info.analytic:
        z = r * np.exp(0.3j)
        assert np.allclose(pot.complex_values(z), stated(z, Z, lam, 1.7, **args), rtol=1e-12, atol=0.0)


def test_compiled_table_equals_scipys_spline():
    pot = table_potential()
    table = pot.params["table"]
    spline = CubicSpline(table.r, table.r * table.v)  # scipy's own evaluation of the same spline
    r = np.geomspace(1e-5, 39.9, 700)
    inside = spline(np.maximum(r, table.r[0])) / r * np.exp(-r / 5.0)
    assert np.allclose(pot(r), inside, rtol=1e-13, atol=0.0)
    beyond = np.array([40.5, 55.0])  # the declared Coulomb tail, screened
    assert np.allclose(pot(beyond), -np.exp(-beyond / 5.0) / beyond, rtol=1e-14)


def bessel_log_derivative(l, kappa, R):
    """u'/u of u = √r K_{l+½}(κr) at R, from scipy.special.kve (A&S 10.2: r k_l(κr) ∝ √r K_{l+½})."""
    nu = l + 0.5
    z = kappa * R
    return 0.5 / R - kappa * (kve(nu - 1.0, z) / kve(nu, z) + nu / z)


@pytest.mark.parametrize("l", [0, 1, 3, 8, 20])
@pytest.mark.parametrize("kappa_R", [1e-4, 0.3, 2.0, 15.0, 80.0])
def test_compiled_exterior_equals_the_bessel_ratio(l, kappa_R):
    R, mass = 3.0, 1.0
    kappa = kappa_R / R
    energy = -kappa * kappa / (2 * mass)
    fast = exterior.log_derivative(exterior.TAIL_SHORT, l, mass, 0.0, energy, R)
    if kappa_R < 1e-3 and l >= 8:
        # kve overflows there: the small-argument expansion of K_{ν−1}/K_ν (A&S 9.6.9)
        reference = -l / R - kappa * kappa * R / (2 * l - 1)
    else:
        reference = bessel_log_derivative(l, kappa, R)
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
        g = np.array([map_point(gr.beta, gr.c, gr.tc, ti)[1] for ti in t])
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
    assert abs(extrapolate(energies)[0] / lo.energy - 1) <= 1e-9
    # eigenvectors of one Sturm-Liouville problem are orthogonal (to discretisation error)
    assert abs(extrapolate(overlap)[0]) <= 1e-8
    assert math.isfinite(lo.energy)


def bessel_tail(l_a, l_b, kappa_a, kappa_b, R, power):
    """∫_R^∞ r^power φ_a φ_b dr, φ = √(r/R) K_{l+½}(κr)/K_{l+½}(κR) (the short-range exterior,
    A&S 10.2), by scipy.integrate.quad on scipy.special.kve in t = (κ_a + κ_b)(r − R)."""
    k = kappa_a + kappa_b
    ea, eb = kve(l_a + 0.5, kappa_a * R), kve(l_b + 0.5, kappa_b * R)

    def f(t):
        r = R + t / k
        return r**power * (r / R) * kve(l_a + 0.5, kappa_a * r) / ea * kve(l_b + 0.5, kappa_b * r) / eb * math.exp(-t)

    return quad(f, 0.0, np.inf, limit=400, epsabs=0.0, epsrel=1e-12)[0] / k


@pytest.mark.parametrize("l", [0, 1, 2, 5])
@pytest.mark.parametrize("kappa_R", [1e-3, 0.05, 1.0, 6.0, 40.0])
def test_compiled_tail_integrals_equal_the_quadrature(l, kappa_R):
    R, mass = 2.0, 1.0
    kappa = kappa_R / R
    energy = -kappa * kappa / (2 * mass)
    fast = exterior.tail_integrals(l, l, mass, energy, energy, R, exterior.GAUSS_NODES, exterior.GAUSS_WEIGHTS,
                                   exterior.TAIL_PANELS)
    assert fast[0] == pytest.approx(bessel_tail(l, l, kappa, kappa, R, 0), rel=1e-9)
    # ⟨r⟩ of a p-wave tail diverges like ln(1/κR) near threshold: there quad's own accuracy
    # (about 1e-7 here) is the limit of the reference, not the compiled integrals
    assert fast[1] == pytest.approx(bessel_tail(l, l, kappa, kappa, R, 1), rel=1e-6 if (l == 1 and kappa_R < 0.01) else 1e-9)


@pytest.mark.parametrize("l_a, l_b, kappa_a_R, kappa_b_R", [(0, 1, 2.0, 0.7), (1, 2, 0.3, 5.0), (2, 3, 8.0, 1.5),
                                                            (0, 1, 0.05, 0.02)])
def test_compiled_tail_overlap_of_two_levels_equals_the_quadrature(l_a, l_b, kappa_a_R, kappa_b_R):
    R, mass = 1.5, 1.0
    ka, kb = kappa_a_R / R, kappa_b_R / R
    fast = exterior.tail_integrals(l_a, l_b, mass, -ka * ka / 2, -kb * kb / 2, R, exterior.GAUSS_NODES,
                                   exterior.GAUSS_WEIGHTS, exterior.TAIL_PANELS)
    assert fast[1] == pytest.approx(bessel_tail(l_a, l_b, ka, kb, R, 1), rel=1e-9)


def test_richardson_weights_solve_their_defining_equations():
    # Σ w_j = 1 and Σ w_j f_j^{-p} = 0 for each removed power (Richardson 1911), in exact arithmetic
    from fractions import Fraction

    for factors, powers in (((1, 2, 4), (4, 6)), ((2, 4), (4,)), ((2, 4, 8), (4, 6)), ((1, 2, 4, 8), (4, 6, 8))):
        numerators, denominator = rational_weights(factors, powers)
        w = [Fraction(n) / Fraction(denominator) for n in numerators]
        assert sum(w) == 1
        for p in powers[: len(factors) - 1]:
            assert sum(wj / Fraction(f) ** p for wj, f in zip(w, factors)) == 0
    # a series with exactly these powers is extrapolated exactly, in the kernel too
    exact, c4, c6 = 2.5, 0.3, -0.7
    values = [exact + c4 * (1.0 / f) ** 4 + c6 * (1.0 / f) ** 6 for f in (1, 2, 4)]
    assert extrapolate(values)[0] == pytest.approx(exact, rel=1e-14)
    assert extrapolate_grids(*values)[0] == extrapolate(values)[0]
