"""States past their threshold: shape resonances (l ≥ 1) and virtual states (l = 0), each
checked against something outside the engine (named beside the check)."""

from __future__ import annotations

import cmath
import json
import math
import subprocess
import sys

import mpmath
import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.optimize import brentq
from scipy.special import spherical_jn, spherical_yn

import boundscape as bs
from boundscape.engine import DISSOLVED, NOT_CONVERGED, OK, RESONANCE_STATUS


def pole(res, i=0):
    """E_r − iΓ/2 of entry i."""
    return complex(res.energy[i], -0.5 * res.width[i])


# ---------------------------------------------------------------------------------------------
# Square well, depth V0, radius a, mass μ: inside u = ĵ_l(qr), q² = 2μ(E + V0); outside the
# outgoing Riccati–Hankel function ĥ⁺_l(kr), k² = 2μE.  An S-matrix pole is where the two
# log-derivatives agree at r = a (e.g. Newton, Scattering Theory of Waves and Particles, §12.1;
# Nussenzveig, Nucl. Phys. 11, 499 (1959)):  q j_l'(qa)/j_l(qa) = k h_l'(ka)/h_l(ka),
# h_l = j_l + i y_l.  The functions are scipy.special's (complex argument); the root is found by
# mpmath.findroot (secant), started 5 % away from the engine's value.

def square_well_condition(l, V0, a, mu):
    def F(E):
        E = complex(E)
        q, k = cmath.sqrt(2 * mu * (E + V0)), cmath.sqrt(2 * mu * E)
        inner = q * spherical_jn(l, q * a, derivative=True) / spherical_jn(l, q * a)
        h = spherical_jn(l, k * a) + 1j * spherical_yn(l, k * a)
        dh = spherical_jn(l, k * a, derivative=True) + 1j * spherical_yn(l, k * a, derivative=True)
        return mpmath.mpc(inner - k * dh / h)
    return F


@pytest.mark.parametrize("l, V0, a, mu, status", [
    (1, 4.6, 1.0, 1.0, OK),        # g = μa²V0 = 4.6 just below the 2p threshold π²/2
    (2, 9.0, 1.0, 1.0, OK),
    (2, 4.5, 2.0, 0.5, OK),        # the same dimensionless well, other units: E scales as 1/(μa²)
    (1, 4.0, 1.0, 1.0, DISSOLVED),  # Γ > E_r: still a pole, reported with its values
])
def test_square_well_resonance_poles_are_exact(l, V0, a, mu, status):
    res = bs.resonances(bs.potential("square_well", V0, a, mu), l, n_r_max=1)
    assert res.kind == "resonance" and res.n_r.tolist() == [0]
    assert res.status[0] == status, res.reason[0]
    engine = pole(res)
    exact = complex(mpmath.findroot(square_well_condition(l, V0, a, mu), mpmath.mpc(engine * 1.05)))
    assert abs(engine - exact) <= 1e-8 * abs(exact), (engine, exact)
    assert abs(res.energy[0] - exact.real) <= 1e-8 * abs(exact.real)
    assert abs(res.width[0] + 2 * exact.imag) <= 1e-8 * abs(exact.imag)
    assert res.energy_error[0] <= 1e-9 * abs(exact)


def square_well_virtual(V0, a, mu):
    """κ_v of the s-wave virtual state nearest threshold.

    A virtual state is the pole at k = −iκ_v, κ_v > 0 (lower half plane).  There the outgoing
    wave e^{ikr} = e^{+κ_v r} has log-derivative +κ_v; inside, u = sin(qr) with
    q² = 2μ(V0 + E) = 2μV0 − κ_v² (E = k²/2μ = −κ_v²/2μ), log-derivative q cot(qr).  Matching
    at r = a:  q cot(qa) = κ_v.  (A bound state, k = +iκ, e^{−κr}, gives q cot(qa) = −κ.)
    Root by scipy.optimize.brentq on the first sign change from κ_v = 0."""
    def f(kv):
        q = math.sqrt(2 * mu * V0 - kv * kv)
        return q / math.tan(q * a) - kv

    grid = np.linspace(1e-9, 0.999 * math.sqrt(2 * mu * V0), 4001)
    values = np.array([f(x) for x in grid])
    i = int(np.nonzero(np.sign(values[1:]) != np.sign(values[:-1]))[0][0])
    return brentq(f, grid[i], grid[i + 1], xtol=1e-15, rtol=1e-15)


@pytest.mark.parametrize("V0, a, mu", [(1.1, 1.0, 1.0), (0.8, 1.0, 1.0), (1.8, 0.7, 1.3)])  # g = μa²V0 < π²/8)
def test_square_well_virtual_state_is_exact(V0, a, mu):
    res = bs.resonances(bs.potential("square_well", V0, a, mu), 0, n_r_max=1)
    assert res.kind == "virtual" and res.status[0] == OK, res.reason
    exact = square_well_virtual(V0, a, mu)
    assert abs(res.kappa[0] - exact) <= 1e-8 * exact
    assert abs(res.energy[0] + exact**2 / (2 * mu)) <= 1e-8 * exact**2 / (2 * mu)  # E_v = −κ_v²/2μ
    assert math.isnan(res.width[0]) and res.momentum[0] == pytest.approx(-1j * exact, rel=1e-8)


def test_square_well_virtual_state_meets_a_second_pole():
    # The 2s virtual state of the square well meets a second virtual pole and the pair leaves
    # the imaginary axis (Nussenzveig 1959).  The exact condition q cot qa = κ_v (above) has two
    # roots near κ_v ≈ 1 at g = μa²V0 = 0.96·g_c and none there at 0.95·g_c.
    g_c = (1.5 * math.pi) ** 2 / 2  # 2s threshold: qa = 3π/2 at E = 0

    def roots(g):
        kv = np.linspace(0.01, 2.0, 20001)
        f = np.sqrt(2 * g - kv**2) / np.tan(np.sqrt(2 * g - kv**2)) - kv
        return int(np.count_nonzero(np.sign(f[1:]) != np.sign(f[:-1])))

    assert roots(0.96 * g_c) == 2 and roots(0.95 * g_c) == 0
    res = bs.resonances(bs.potential("square_well", 0.95 * g_c, 1.0), 0, n_r_max=2)
    assert res.n_r.tolist() == [1]
    assert res.status[0] == DISSOLVED and "second virtual pole" in res.reason[0]
    assert math.isnan(res.kappa[0])
    # ... while at 0.96·g_c it is still there: the smaller root
    res = bs.resonances(bs.potential("square_well", 0.96 * g_c, 1.0), 0, n_r_max=2)
    kv = np.linspace(0.01, 2.0, 20001)
    q = np.sqrt(2 * 0.96 * g_c - kv**2)
    f = q / np.tan(q) - kv
    first = kv[np.nonzero(np.sign(f[1:]) != np.sign(f[:-1]))[0][0]]
    assert res.status[0] == OK and abs(res.kappa[0] - first) < 1e-3


# the last two lie at 60 % and 80 % of the tail's branch point κ = 1/2λ, where the virtual state's
# wave grows by 10^4..10^7 across the tail: before the tail beyond the exterior cut was taken to
# second order, the first came out 2e-6 off (estimate 6e-8) and the second out of reach
@pytest.mark.parametrize("Z, lam, n", [(0.45, 1.0, 1), (0.2, 2.0, 1), (1.9, 1.0, 2), (0.2, 1.0, 1), (0.1, 1.0, 1)])
def test_hulthen_virtual_state_is_exact(Z, lam, n):
    # Hulthén s waves (Flügge, Practical Quantum Mechanics, problem 67): the Jost function
    # vanishes at k = i(μZ/n − n/2λ), bound while n² < 2μZλ.  The zero is analytic in Z, so past
    # threshold it continues down the imaginary axis: a virtual state with κ_v = n/2λ − μZ/n
    # (the same closed form continued, common practice).  A tail e^{−r/λ} that is not compact.
    res = bs.resonances(bs.potential("hulthen", Z, lam), 0, n_r_max=n)
    exact = n / (2 * lam) - Z / n
    assert res.n_r.tolist()[-1] == n - 1
    assert res.status[-1] == OK, res.reason[-1]
    assert abs(res.kappa[-1] - exact) <= 1e-9 * exact
    assert abs(res.kappa[-1] - exact) <= max(res.kappa_error[-1], 1e-14)  # the estimate covers it


# ---------------------------------------------------------------------------------------------
# Wigner's threshold law (Wigner, Phys. Rev. 73, 1002 (1948)): the barrier's transmission at
# low energy makes Γ ∝ E_r^{l+½}, so d ln Γ / d ln E_r → l + ½ just past λ_c.

@pytest.mark.parametrize("family", ["yukawa", "ecsc"])
@pytest.mark.parametrize("l", [1, 2, 3])
def test_wigner_threshold_law(family, l):
    lam_c = bs.critical_screening_length(family, 1.0, l, 0)

    def slope(eps):
        a, b = (bs.resonances(bs.potential(family, 1.0, lam_c * (1 - e)), l, n_r_max=1) for e in (eps, 2 * eps))
        assert a.status[0] == OK and b.status[0] == OK, (a.reason, b.reason)
        assert a.width_error[0] < 1e-3 * a.width[0]  # Γ is resolved, not round-off
        return math.log(b.width[0] / a.width[0]) / math.log(b.energy[0] / a.energy[0])

    near, far = slope(1e-4), slope(1e-3)
    assert abs(near - (l + 0.5)) < 0.01
    assert abs(near - (l + 0.5)) < abs(far - (l + 0.5))  # it tends to l + ½


# ---------------------------------------------------------------------------------------------
# Breit–Wigner: near a narrow resonance the phase shift δ_l(E) rises through π/2 (mod π) at
# E ≈ E_r with dδ/dE = 2/Γ there (e.g. Sakurai, Modern Quantum Mechanics, §7.8 (value from
# memory for the section)).  δ_l comes from scipy.integrate.solve_ivp (DOP853) out to 50λ,
# where V is e^{-50} of its scale, matched to ĵ_l cos δ − n̂_l sin δ (n̂_l = kr·y_l, scipy.special).

def cot_phase_shift(pot, l, E, R):
    k = math.sqrt(2 * pot.mass * E)

    def rhs(r, y):
        return [y[1], (2 * pot.mass * float(pot(np.array([r]))[0]) + l * (l + 1) / r**2 - 2 * pot.mass * E) * y[0]]

    r0 = 1e-6
    sol = solve_ivp(rhs, (r0, R), [r0 ** (l + 1), (l + 1) * r0**l], method="DOP853", rtol=1e-12, atol=1e-300)
    u, du = sol.y[:, -1]
    L, z = du / u, k * R
    j, dj = z * spherical_jn(l, z), spherical_jn(l, z) + z * spherical_jn(l, z, derivative=True)
    n, dn = z * spherical_yn(l, z), spherical_yn(l, z) + z * spherical_yn(l, z, derivative=True)
    return (k * dn - L * n) / (k * dj - L * j)


def test_breit_wigner_phase_shift():
    l = 2
    lam = bs.critical_screening_length("yukawa", 1.0, l, 0) * (1 - 1e-3)
    pot = bs.potential("yukawa", 1.0, lam)
    res = bs.resonances(pot, l, n_r_max=1)
    E_r, G = res.energy[0], res.width[0]
    assert res.status[0] == OK and G < 1e-2 * E_r  # a narrow resonance
    R = 50 * lam
    E_half = brentq(lambda E: cot_phase_shift(pot, l, E, R), E_r - G, E_r + G, xtol=1e-6 * G)
    assert abs(E_half - E_r) < 1e-2 * G
    h = 1e-3 * G
    slope = -(cot_phase_shift(pot, l, E_half + h, R) - cot_phase_shift(pot, l, E_half - h, R)) / (2 * h)
    assert slope * G / 2 == pytest.approx(1.0, rel=1e-2)  # dδ/dE = −d(cot δ)/dE at δ = π/2


# ---------------------------------------------------------------------------------------------
# Method parameters: the pole is a property of the potential, not of the exterior ray's angle,
# the matching radius or where the tail is cut (common practice, no source).

@pytest.mark.parametrize("eps", [1e-3, 0.05])
def test_independent_of_method_parameters(eps):
    pot = bs.potential("yukawa", 1.0, bs.critical_screening_length("yukawa", 1.0, 1, 0) * (1 - eps))
    ref = pole(bs.resonances(pot, 1, n_r_max=1))
    variants = [dict(contour_angle=20.0), dict(contour_angle=40.0), dict(matching_radius=1.5),
                dict(matching_radius=3.0), dict(tail_tolerance=1e-12), dict(tail_tolerance=1e-18)]
    if eps < 1e-2:
        variants.append(dict(contour_angle=0.0))  # the real axis serves a narrow pole
    for kw in variants:
        res = bs.resonances(pot, 1, n_r_max=1, **kw)
        assert res.status[0] == OK, (kw, res.reason)
        assert abs(pole(res) - ref) <= 1e-9 * abs(ref), (kw, pole(res), ref)


def test_broad_pole_is_out_of_reach_of_the_real_axis():
    # with the exterior forced onto the real axis a broad pole cannot be resolved: that is said
    pot = bs.potential("yukawa", 1.0, bs.critical_screening_length("yukawa", 1.0, 1, 0) * 0.85)
    res = bs.resonances(pot, 1, n_r_max=1, contour_angle=0.0)
    assert res.status[0] != OK and res.reason[0]


# ---------------------------------------------------------------------------------------------
# Continuity with the bound branch.  Near threshold the Jost function is, to leading order,
# f ∝ (E − c·δ) + i·a·k^{2l+1}, δ the distance to λ_c (the effective-range expansion; e.g.
# Taylor, Scattering Theory, §11-c, value from memory for the section).  For l = 1 its pole is
# E_r − iΓ/2 = cδ − i a k³ past threshold (k real: Γ/2 = a k³) and E_b = cδ + a κ³ before it
# (k = iκ), so E_r(λ_c(1−ε)) + E_b(λ_c(1+ε)) → −Γ/2: the bound level's threshold shift is the
# resonance's half-width, and both vanish.  For l = 0, κ is analytic through threshold:
# κ_v(λ_c(1−ε))/κ_b(λ_c(1+ε)) − 1 = O(ε).  λ_c from bs.critical_screening_length, E_b from
# bs.bound_levels.

def test_resonance_continues_the_bound_level():
    lam_c = bs.critical_screening_length("yukawa", 1.0, 1, 0)
    gaps, widths, energies = [], [], []
    for eps in (1e-3, 1e-4):
        bound = bs.bound_levels(bs.potential("yukawa", 1.0, lam_c * (1 + eps)), 1)
        res = bs.resonances(bs.potential("yukawa", 1.0, lam_c * (1 - eps)), 1, n_r_max=1)
        assert bound.num_bound == 1 and res.num_bound == 0 and res.status[0] == OK
        gaps.append(abs((res.energy[0] + bound.energy[0]) / (-res.width[0] / 2) - 1))
        widths.append(res.width[0])
        energies.append(res.energy[0])
        assert res.critical_scaling[0] == pytest.approx(1 / (1 - eps), rel=1e-9)  # λ_c/λ
    assert gaps[1] < 1e-2 and gaps[1] < gaps[0] / 2  # → 0 like √ε
    assert energies[1] < energies[0] / 9 and widths[1] < widths[0] / 25  # E_r ∝ ε, Γ ∝ ε^{3/2}


def test_virtual_state_continues_the_bound_level():
    lam_c = bs.critical_screening_length("yukawa", 1.0, 0, 0)
    gaps = []
    for eps in (1e-3, 1e-4):
        bound = bs.bound_levels(bs.potential("yukawa", 1.0, lam_c * (1 + eps)), 0)
        kappa_b = math.sqrt(-2 * bound.energy[0])
        res = bs.resonances(bs.potential("yukawa", 1.0, lam_c * (1 - eps)), 0, n_r_max=1)
        assert res.status[0] == OK and res.kind == "virtual"
        gaps.append(abs(res.kappa[0] / kappa_b - 1))
    assert gaps[1] < 2e-3 and gaps[1] < gaps[0] / 5


@pytest.mark.parametrize("family, Z, l", [("yukawa", 2.0, 1), ("ecsc", 1.0, 2), ("square_well", 3.0, 1)])
def test_critical_scaling_matches_the_critical_length(family, Z, l):
    # λ_c/λ for one-scale families; for the square well depth scaling is radius scaling squared
    lam = 0.9 * bs.critical_screening_length(family, Z, l, 0)
    res = bs.resonances(bs.potential(family, Z, lam), l, n_r_max=1)
    lam_c = bs.critical_screening_length(family, Z, l, 0)
    expected = lam_c / lam if family != "square_well" else (lam_c / lam) ** 2
    assert res.critical_scaling[0] == pytest.approx(expected, rel=1e-9)


# ---------------------------------------------------------------------------------------------
# The result: which states, statuses, reasons and errors.

def test_lists_exactly_the_states_not_bound():
    pot = bs.potential("yukawa", 1.0, 4.3)
    res = bs.resonances(pot, 0)
    assert res.num_bound == bs.count_bound(pot, 0) == 2
    assert res.n_r.tolist() == [2, 3, 4, 5] and res.labels[0] == "3s"  # DEFAULT_LOST = 4 after the bound ones
    assert bs.resonances(pot, 0, n_r_max=3).n_r.tolist() == [2]
    assert bs.resonances(pot, 0, n_r_max=1).n_r.size == 0
    res = bs.resonances(pot, 1, n_r_max=2)
    assert res.kind == "resonance" and res.n.tolist() == [2, 3] and np.all(np.isnan(res.kappa))
    assert res.status.dtype == np.int8 and set(res.status.tolist()) <= set(range(len(RESONANCE_STATUS)))
    assert RESONANCE_STATUS[DISSOLVED] == "dissolved" and RESONANCE_STATUS[NOT_CONVERGED] == "not_converged"


def test_dissolved_states_say_why():
    # Γ > E_r: the pole is given, the state is dissolved
    res = bs.resonances(bs.potential("yukawa", 1.0, 4.0), 1, n_r_max=1)
    assert res.status[0] == DISSOLVED and res.width[0] > res.energy[0] > 0
    assert "Γ exceeds E_r" in res.reason[0] and "λ ≈ 4.2088 bohr" in res.reason[0]
    # far past threshold the pole is out of reach: no values, the reason says where it dissolved
    res = bs.resonances(bs.potential("yukawa", 1.0, 3.0), 1, n_r_max=1)
    assert res.status[0] == DISSOLVED and math.isnan(res.energy[0]) and math.isnan(res.width[0])
    assert "out of reach" in res.reason[0] and "dissolved (Γ = E_r) where λ ≈ 4.2088 bohr" in res.reason[0]
    # ok states carry no reason
    res = bs.resonances(bs.potential("yukawa", 1.0, 4.4), 1, n_r_max=1)
    assert res.status[0] == OK and res.reason == [""] and res.width[0] < res.energy[0]


@pytest.mark.parametrize("family, lam", [("coulomb", None), ("harmonic", None)])
def test_coulomb_and_confining_tails_have_no_lost_states(family, lam):
    with pytest.raises(bs.InputError, match="tail"):
        bs.resonances(bs.potential(family, 1.0, lam), 1)


@pytest.mark.parametrize("kw", [dict(l=-1), dict(n_r_max=-1), dict(rtol=0.0), dict(contour_angle=95.0),
                                dict(matching_radius=-1.0)])
def test_bad_arguments_are_one_line_input_errors(kw):
    args = {"l": 1, **kw}
    l = args.pop("l")
    with pytest.raises(bs.InputError):
        bs.resonances(bs.potential("yukawa", 1.0, 4.3), l, **args)


def test_tabulated_potential_uses_the_real_axis():
    # A table has no analytic continuation: the exterior is the real axis beyond the table.
    # Consistency with the same potential given by formula (not an outside reference).
    lam = 4.3
    r = np.geomspace(1e-4, 110.0, 6000)
    pot = bs.potential("tabulated", 1.0, table=(r, -np.exp(-r / lam) / r))
    res = bs.resonances(pot, 1, n_r_max=1)
    ref = bs.resonances(bs.potential("yukawa", 1.0, lam), 1, n_r_max=1)
    assert res.status[0] == OK
    assert abs(pole(res) - pole(ref)) <= 1e-6 * abs(pole(ref))


def test_a_cell_does_not_depend_on_the_cells_before_it():
    # one-scale families share one trajectory per state; a cell's bits must not depend on order
    code = ("import json, boundscape as bs; r = bs.resonances(bs.potential('yukawa', 2.0, 2.2), 1, n_r_max=2); "
            "print(json.dumps([r.energy.tolist(), r.width.tolist()]))")
    fresh = json.loads(subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True,
                                      timeout=300).stdout)
    for lam in (1.0, 2.4, 2.0):
        bs.resonances(bs.potential("yukawa", 3.0, lam), 1, n_r_max=2)
    here = bs.resonances(bs.potential("yukawa", 2.0, 2.2), 1, n_r_max=2)
    assert json.dumps([here.energy.tolist(), here.width.tolist()]) == json.dumps(fresh)


@pytest.mark.parametrize("family, l, n_r", [("yukawa", 1, 0), ("ecsc", 2, 0), ("hulthen", 1, 1)])
def test_dissolution_length_is_where_the_width_reaches_the_energy(family, l, n_r):
    # the definition itself, checked on resonances computed either side of it
    lam_d = bs.dissolution_screening_length(family, 2.0, l, n_r)
    assert lam_d < bs.critical_screening_length(family, 2.0, l, n_r)
    above, below = (bs.resonances(bs.potential(family, 2.0, lam_d * f), l, n_r_max=n_r + 1) for f in (1 + 1e-6, 1 - 1e-6))
    assert above.status[-1] == OK and above.width[-1] < above.energy[-1]
    assert below.status[-1] == DISSOLVED and below.width[-1] > below.energy[-1]
    assert abs(above.width[-1] / above.energy[-1] - 1) < 1e-4
    shown = float(below.reason[-1].split("λ ≈ ")[1].split(" bohr")[0])  # the coarse-grid root, 5 digits
    assert abs(shown / lam_d - 1) < 1e-4
    with pytest.raises(bs.InputError):
        bs.dissolution_screening_length(family, 2.0, 0, n_r)
    with pytest.raises(bs.InputError):
        bs.dissolution_screening_length("square_well", 2.0, l, n_r)


def test_known_bound_count_is_taken():
    pot = bs.potential("yukawa", 1.0, 4.3)
    levels = bs.bound_levels(pot, 0)
    a, b = bs.resonances(pot, 0, num_bound=levels.num_bound), bs.resonances(pot, 0)
    assert a.n_r.tolist() == b.n_r.tolist() and np.array_equal(a.kappa, b.kappa, equal_nan=True)


def mp_square_well_condition(l, V0):
    """The square-well condition above (a = μ = 1) in mpmath's own Bessel functions at 40 digits,
    for poles whose Γ is far below double precision relative to E_r (DLMF 10.47.3, 10.51.2)."""
    def j(n, z):
        return mpmath.sqrt(mpmath.pi / (2 * z)) * mpmath.besselj(n + 0.5, z)

    def y(n, z):
        return mpmath.sqrt(mpmath.pi / (2 * z)) * mpmath.bessely(n + 0.5, z)

    def F(E):
        k, q = mpmath.sqrt(2 * E), mpmath.sqrt(2 * (E + V0))
        dj = (l / q) * j(l, q) - j(l + 1, q)
        h, dh = j(l, k) + 1j * y(l, k), (l / k) * (j(l, k) + 1j * y(l, k)) - (j(l + 1, k) + 1j * y(l + 1, k))
        return q * dj / j(l, q) - k * dh / h
    return F


@pytest.mark.parametrize("l, g_c, eps", [(2, 10.095364278219792, 1e-4), (3, 16.6, 1e-4), (1, math.pi**2 / 2, 1e-6)])
def test_error_estimates_cover_the_true_error_near_threshold(l, g_c, eps):
    with mpmath.workdps(40):
        if l == 3:  # the 4f threshold: the first zero of j_2 (Riccati: ĵ_{l−1}(qa) = 0 at E = 0)
            g_c = float(mpmath.findroot(lambda g: mpmath.besselj(2.5, mpmath.sqrt(2 * g)), g_c))
        V0 = g_c * (1 - eps)
        res = bs.resonances(bs.potential("square_well", V0, 1.0), l, n_r_max=1)
        exact = complex(mpmath.findroot(mp_square_well_condition(l, mpmath.mpf(V0)), mpmath.mpc(pole(res))))
    assert res.status[0] == OK
    assert abs(res.energy[0] - exact.real) <= res.energy_error[0]
    assert abs(res.width[0] + 2 * exact.imag) <= res.width_error[0] < 1e-6 * res.width[0]


@pytest.mark.parametrize("eps", [1e-6, 1e-9])
def test_virtual_state_error_estimate_covers_the_true_error_near_threshold(eps):
    # Hulthén 1s at Z = (1 − ε)/2, λ = 1: κ_v = ε/2 exactly (Flügge problem 67, continued as above)
    res = bs.resonances(bs.potential("hulthen", 0.5 * (1 - eps), 1.0), 0, n_r_max=1)
    assert res.status[0] == OK
    assert abs(res.kappa[0] - eps / 2) <= res.kappa_error[0] <= 1e-13
