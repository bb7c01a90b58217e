"""Scattering lengths, effective ranges and phase shifts, each checked against something outside
the engine (named beside the check): closed forms, scipy.special's Bessel functions, mpmath's
log-gamma, and an independent DOP853 integration written here."""

from __future__ import annotations

import cmath
import math

import mpmath
import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.special import spherical_in, spherical_jn, spherical_yn

import boundscape as bs
from boundscape.engine.continuum.scattering import double_factorials
from boundscape.engine.potentials.family import FAMILIES, Family, register


# ---------------------------------------------------------------------------------------------
# Square well, depth V0, radius R, mass μ: inside u = ĵ_l(qr), q² = 2μ(E + V0).
# Scattering length a = R − tan(qR)/q with q = √(2μV0) (e.g. Sakurai, Modern Quantum Mechanics,
# §7.7; Blatt & Weisskopf, Theoretical Nuclear Physics, ch. II) and the closed-form effective
# range r_e = R − R³/(3a²) − 1/(q²a) (Blatt & Jackson, Phys. Rev. 76, 18 (1949); formula from
# memory, and checked below against k cot δ of the exact phase shifts, which it must reproduce).

def square_well_length(V0, R, mu=1.0):
    q = math.sqrt(2 * mu * V0)
    return R - math.tan(q * R) / q


def square_well_range(V0, R, mu=1.0):
    q = math.sqrt(2 * mu * V0)
    a = square_well_length(V0, R, mu)
    return R - R**3 / (3 * a * a) - 1 / (q * q * a)


def matched_tan_delta(l, k, R, log_derivative):
    """tan δ_l from the interior log-derivative L = u'/u at R, matched to ĵ_l(kr) − tan δ ŷ_l(kr)
    (spherical Bessel functions from scipy.special; the Riccati functions' extra 1/r cancels)."""
    z = k * R
    j, dj = spherical_jn(l, z), spherical_jn(l, z, derivative=True)
    y, dy = spherical_yn(l, z), spherical_yn(l, z, derivative=True)
    L = log_derivative - 1.0 / R  # of j_l(kr) itself
    return (k * dj - L * j) / (k * dy - L * y)


def square_well_tan_delta(l, V0, R, E, mu=1.0):
    q = math.sqrt(2 * mu * (E + V0))
    inner = q * spherical_jn(l, q * R, derivative=True) / spherical_jn(l, q * R) + 1.0 / R
    return matched_tan_delta(l, math.sqrt(2 * mu * E), R, inner)


def mod_pi(x):
    """x folded into [−π/2, π/2): the part of a phase shift that matching alone determines."""
    return (np.asarray(x) + np.pi / 2) % np.pi - np.pi / 2


@pytest.mark.parametrize("V0, R, mu", [(1.0, 1.0, 1.0), (2.0, 1.5, 1.0), (0.3, 2.0, 1.0), (4.0, 1.0, 1.0),
                                       (2.0, 1.0, 0.5), (10.0, 2.0, 1.0)])
def test_square_well_scattering_length_and_effective_range(V0, R, mu):
    s = bs.scattering(bs.potential("square_well", V0, R, mu), 0)
    a, r_e = square_well_length(V0, R, mu), square_well_range(V0, R, mu)
    assert s.status == 0, s.reason
    assert s.length == pytest.approx(a, rel=1e-10)
    assert s.inverse_length == pytest.approx(1 / a, rel=1e-10)
    assert s.effective_range == pytest.approx(r_e, rel=1e-10, abs=1e-10 * R)
    # the error estimates cover the true errors and are not absurdly wide
    assert abs(s.length - a) <= 10 * s.length_error + 1e-13 * abs(a) and s.length_error < 1e-8 * abs(a)
    assert abs(s.effective_range - r_e) <= 10 * s.effective_range_error + 1e-13 * R
    # count of s states: the zeros of sin(qR) below qR, i.e. floor(qR/π + 1/2) (exact, common practice)
    assert s.num_bound == math.floor(math.sqrt(2 * mu * V0) * R / math.pi + 0.5)


def test_square_well_effective_range_formula_is_k_cot_delta():
    # the closed form r_e above, checked on its own: k cot δ₀ = −1/a + r_e k²/2 + O(k⁴) for the
    # exact square-well δ₀ (a central difference in k², at k = 1e-3 and 2e-3)
    V0, R = 1.0, 1.0
    f = [k / square_well_tan_delta(0, V0, R, k * k / 2) for k in (1e-3, 2e-3)]
    slope = (f[1] - f[0]) / (4e-6 - 1e-6)
    assert f[0] == pytest.approx(-1 / square_well_length(V0, R), rel=1e-5)
    assert 2 * slope == pytest.approx(square_well_range(V0, R), rel=1e-4)


@pytest.mark.parametrize("l", [1, 2])
@pytest.mark.parametrize("V0, R", [(1.0, 1.0), (4.0, 1.0), (2.0, 1.5)])
def test_square_well_generalised_length(l, V0, R):
    # u = A r^{l+1} + B r^{−l} outside; matching R u'/u to ĵ_l(qR) inside gives B/A, and
    # a_l^{2l+1} = −(B/A)/[(2l+1)!!(2l−1)!!] (the small-k limit of tan δ_l = −(k a_l)^{2l+1};
    # checked against the exact δ_l below in test_wigner_threshold_law)
    q = math.sqrt(2 * V0)
    x = q * R * spherical_jn(l, q * R, derivative=True) / spherical_jn(l, q * R) + 1  # R u'/u of r j_l(qr)
    ratio = ((l + 1) - x) / (x + l) * R ** (2 * l + 1)  # B/A
    volume = -ratio / double_factorials(l)
    exact = math.copysign(abs(volume) ** (1 / (2 * l + 1)), volume)
    s = bs.scattering(bs.potential("square_well", V0, R), l)
    assert s.status == 0 and math.isnan(s.effective_range)
    assert s.length == pytest.approx(exact, rel=1e-10)
    assert s.inverse_length == pytest.approx(1 / exact, rel=1e-10)


@pytest.mark.parametrize("l", [0, 1, 2])
@pytest.mark.parametrize("V0, R", [(1.0, 1.0), (2.0, 1.5), (10.0, 2.0)])
def test_square_well_phase_shifts_match_bessel(l, V0, R):
    energies = np.array([1e-5, 1e-3, 0.05, 0.3, 1.0, 4.0, 30.0])
    ps = bs.phase_shifts(bs.potential("square_well", V0, R), l, energies)
    exact = np.array([math.atan(square_well_tan_delta(l, V0, R, e)) for e in energies])
    assert np.all(ps.status == 0), ps.reason
    assert np.max(np.abs(mod_pi(ps.phase_shift - exact))) < 1e-10
    assert np.all(np.abs(mod_pi(ps.phase_shift - exact)) <= 10 * ps.phase_shift_error + 1e-13)
    k = np.sqrt(2 * energies)
    assert np.allclose(ps.momentum, k, rtol=1e-15)
    # σ_l = 4π(2l+1) sin²δ/k² (a definition: checked, not re-derived); rtol 1e-9 on δ mod π
    # leaves at most 2e-9 on σ
    assert np.allclose(ps.cross_section, 4 * np.pi * (2 * l + 1) * np.sin(exact) ** 2 / k**2, rtol=3e-9, atol=0)


# ---------------------------------------------------------------------------------------------
# The hard-sphere limit.  A repulsive barrier V = +V0 for r ≤ R (a family registered for this
# test only) has, with κ = √(2μV0), a = R − tanh(κR)/κ (u = sinh κr inside) and δ_l from matching
# to r·i_l(Kr) inside, K² = 2μ(V0 − E) (scipy.special.spherical_in); as V0 → ∞ both tend to the
# hard sphere: a → R and tan δ_l → j_l(kR)/y_l(kR) (e.g. Sakurai, §7.5).

class _Barrier(Family):
    name, display_name, formula_text = "test_barrier", "repulsive square barrier", "+V0 for r<λ, 0 outside"

    @staticmethod
    def formula(r, p, x, c, continued):
        return 0.0 + p[0] * (continued | (r <= p[1]))

    def support(self, pot):
        return float(pot.screening_length)

    def jumps_at_support(self, pot):
        return True

    def energy_scale(self, pot):
        return pot.strength

    def length_scale(self, pot):
        return min(pot.screening_length, 1.0 / math.sqrt(2 * pot.mass * pot.strength))


@pytest.fixture(scope="module")
def barrier():
    register(_Barrier)
    yield "test_barrier"
    del FAMILIES["test_barrier"]


@pytest.mark.parametrize("V0", [1.0, 1e2, 1e4])
def test_repulsive_barrier_and_hard_sphere_limit(barrier, V0):
    R = 1.5
    pot = bs.potential(barrier, V0, R)
    kappa = math.sqrt(2 * V0)
    s = bs.scattering(pot, 0)
    assert s.num_bound == 0 and s.status == 0
    assert s.length == pytest.approx(R - math.tanh(kappa * R) / kappa, rel=1e-10)
    assert abs(s.length - R) <= 1.01 / kappa  # → the hard sphere's a = R
    energies = np.array([1e-3, 0.1, 0.5])
    for l in (0, 1, 2):
        ps = bs.phase_shifts(pot, l, energies)
        K = np.sqrt(2 * (V0 - energies))
        inner = K * spherical_in(l, K * R, derivative=True) / spherical_in(l, K * R) + 1 / R
        exact = np.array([math.atan(matched_tan_delta(l, math.sqrt(2 * e), R, L)) for e, L in zip(energies, inner)])
        assert np.max(np.abs(mod_pi(ps.phase_shift - exact))) < 1e-9
        # repulsion, no bound state: δ_l < 0 on the branch through δ(∞) = 0 (Levinson, N_b = 0)
        assert np.all(ps.phase_shift < 0) and np.all(ps.phase_shift > -np.pi)
        if V0 == 1e4:
            k = np.sqrt(2 * energies)
            hard = np.arctan(spherical_jn(l, k * R) / spherical_yn(l, k * R))
            assert np.max(np.abs(mod_pi(ps.phase_shift - hard))) < 2 * np.max(k) / kappa * (l + 1)


# ---------------------------------------------------------------------------------------------
# Hulthén, V = −(Z/λ) e^{−r/λ}/(1 − e^{−r/λ}), g = 2μZλ: with x = e^{−r/λ} the s-wave equation is
# hypergeometric, and the Jost function is F(k) = Γ(1 − 2iq)/[Γ(1 − iq − ν)Γ(1 − iq + ν)],
# q = kλ, ν = √(g − q²) (derived here from F(a, b; c; 1) = Γ(c)Γ(c−a−b)/Γ(c−a)Γ(c−b), DLMF 15.4.20;
# the result is the textbook one, e.g. Flügge, Practical Quantum Mechanics, problem 67, and
# Newton, Scattering Theory of Waves and Particles, §12.1 — cited from memory), so
# δ₀ = −arg F(k) = Im[lnΓ(1 − iq − ν) + lnΓ(1 − iq + ν) − lnΓ(1 − 2iq)].  mpmath.loggamma is
# continuous in k > 0 on this path and vanishes as k → ∞: it gives the full branch, not only δ mod π.
# The formula is cross-checked against an independent DOP853 integration below.

def hulthen_delta(k, Z, lam, mu=1.0):
    q, g = k * lam, 2 * mu * Z * lam
    nu = cmath.sqrt(g - q * q)
    return float(mpmath.im(mpmath.loggamma(1 - 1j * q - nu) + mpmath.loggamma(1 - 1j * q + nu)
                           - mpmath.loggamma(1 - 2j * q)))


@pytest.mark.parametrize("Z, lam", [(1.0, 0.3), (1.0, 1.0), (1.0, 3.0), (2.0, 5.0)])
def test_hulthen_s_wave_phase_shift_closed_form(Z, lam):
    energies = np.array([1e-6, 1e-3, 0.01, 0.1, 1.0, 10.0])
    ps = bs.phase_shifts(bs.potential("hulthen", Z, lam), 0, energies)
    exact = np.array([hulthen_delta(math.sqrt(2 * e), Z, lam) for e in energies])
    assert np.all(ps.status == 0), ps.reason
    # the whole value, branch included (no folding mod π)
    assert np.allclose(ps.phase_shift, exact, rtol=1e-9, atol=1e-12)
    # Hulthén's bound s states: κ_n λ = (g − n²)/(2n) > 0, n = 1, 2, … (exact; common practice)
    assert ps.num_bound == sum(1 for n in range(1, 100) if 2 * Z * lam > n * n)


def test_hulthen_closed_form_against_dop853():
    Z, lam, E = 1.0, 3.0, 0.07
    k = math.sqrt(2 * E)
    engine = bs.phase_shifts(bs.potential("hulthen", Z, lam), 0, [E]).phase_shift[0]
    assert float(mod_pi(hulthen_delta(k, Z, lam) - dop853_phase_shift(bs.potential("hulthen", Z, lam), 0, E))) \
        == pytest.approx(0.0, abs=1e-9)
    assert engine == pytest.approx(hulthen_delta(k, Z, lam), rel=1e-10)


def test_half_bound_state_gives_half_pi():
    # at g = 2μZλ = 1 the Hulthén 1s state sits exactly at threshold (κλ = (g − 1)/2 = 0): the
    # exception to Levinson's theorem, δ₀(0⁺) = π/2 for N_b = 0 (Newton, §12.2; the closed form
    # above says the same)
    k = 1e-4
    assert hulthen_delta(k, 0.5, 1.0) == pytest.approx(math.pi / 2, abs=1e-3)
    engine = bs.phase_shifts(bs.potential("hulthen", 0.5, 1.0), 0, [k * k / 2]).phase_shift[0]
    # here δ₀ ≈ arccot(−1/(ka)) moves by δ(1/a)/k: the engine's 1/a at threshold, ~1e-14, sets the tolerance
    assert engine == pytest.approx(hulthen_delta(k, 0.5, 1.0), abs=1e-8)


# ---------------------------------------------------------------------------------------------
# Yukawa against an independent integration: scipy's DOP853 (rtol 1e-13) from r0 = 1e-7 with
# u = r^{l+1}(1 − μZr/(l+1)) out to 45λ (where e^{−45} leaves the potential ~1e-20 of itself),
# then u = A r^{l+1} + B r^{−l} there (E = 0), or the Riccati–Bessel match (E > 0).

def _dop853(pot, l, energy, R):
    mu, Z = pot.mass, pot.strength

    def rhs(r, y):
        return [y[1], (l * (l + 1) / r**2 + 2 * mu * (float(pot(r)) - energy)) * y[0]]

    r0 = 1e-7
    y0 = [r0 ** (l + 1) * (1 - mu * Z * r0 / (l + 1)), (l + 1) * r0**l - (l + 2) * mu * Z * r0 ** (l + 1) / (l + 1)]
    sol = solve_ivp(rhs, (r0, R), y0, method="DOP853", rtol=1e-13, atol=1e-300)
    return sol.y[0, -1], sol.y[1, -1]


def dop853_length(pot, l):
    R = 45 * pot.screening_length
    u, du = _dop853(pot, l, 0.0, R)
    A = (l * u + R * du) / ((2 * l + 1) * R ** (l + 1))
    B = R**l * ((l + 1) * u - R * du) / (2 * l + 1)
    volume = -(B / A) / double_factorials(l)
    return math.copysign(abs(volume) ** (1 / (2 * l + 1)), volume)


def dop853_phase_shift(pot, l, energy):
    R = 45 * pot.screening_length
    u, du = _dop853(pot, l, energy, R)
    return math.atan(matched_tan_delta(l, math.sqrt(2 * pot.mass * energy), R, du / u))


@pytest.mark.parametrize("Z, lam, l", [(1.0, 1.0, 0), (1.0, 3.0, 0), (1.0, 10.0, 0), (2.5, 2.0, 0), (1.0, 2.0, 1),
                                       (1.0, 8.0, 1), (3.0, 1.0, 2)])
def test_yukawa_against_dop853(Z, lam, l):
    pot = bs.potential("yukawa", Z, lam)
    s = bs.scattering(pot, l)
    assert s.status == 0, s.reason
    assert s.length == pytest.approx(dop853_length(pot, l), rel=1e-8)
    energies = [1e-3, 0.05, 0.5]
    ps = bs.phase_shifts(pot, l, energies)
    other = np.array([dop853_phase_shift(pot, l, e) for e in energies])
    assert np.max(np.abs(mod_pi(ps.phase_shift - other))) < 1e-8


def test_yukawa_born_limit():
    # first Born approximation a_B = 2μ∫V r² dr = −2μZλ² (common practice); the next term is of
    # relative order μZλ, so (a/a_B − 1)/(μZλ) tends to a constant as Z → 0
    lam = 2.0
    rel = []
    for Z in (1e-3, 1e-4, 1e-5):
        s = bs.scattering(bs.potential("yukawa", Z, lam), 0)
        assert s.status == 0, s.reason
        born = -2 * Z * lam**2
        assert s.length == pytest.approx(born, rel=2 * Z * lam)
        rel.append((s.length / born - 1) / (Z * lam))
    assert rel[1] == pytest.approx(rel[0], rel=3e-3) and rel[2] == pytest.approx(rel[1], rel=3e-4)
    assert s.effective_range > 0 and s.num_bound == 0


def test_bad_input_is_one_line():
    pot = bs.potential("yukawa", 1.0, 2.0)
    for call, word in [(lambda: bs.scattering(bs.potential("coulomb", 1.0), 0), "coulomb tail"),
                       (lambda: bs.scattering(pot, 51), "l = 51"),
                       (lambda: bs.scattering(pot, -1), "l must be"),
                       (lambda: bs.phase_shifts(pot, 0, [0.1, -2.0]), "-2"),
                       (lambda: bs.phase_shifts(pot, 0, []), "non-empty"),
                       (lambda: bs.phase_shifts(pot, 0, [1e9]), "too fine a grid"),
                       (lambda: bs.phase_shifts(bs.potential("harmonic", 1.0), 0, [1.0]), "confining tail")]:
        with pytest.raises(bs.InputError) as err:
            call()
        assert word in str(err.value) and "\n" not in str(err.value)


def test_a_problem_too_large_is_refused_quickly():
    # a Yukawa that binds ~10⁴ s states: its zero-energy solution oscillates too often for the
    # grid's size limit; refused in one line, before anything of that size is built
    with pytest.raises(bs.InputError, match="too large a problem"):
        bs.scattering(bs.potential("yukawa", 1e4, 1e3), 0)
    with pytest.raises(bs.InputError, match="too fine a grid"):
        bs.phase_shifts(bs.potential("yukawa", 1e4, 1e3), 0, [1.0])
