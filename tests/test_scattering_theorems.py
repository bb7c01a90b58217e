"""What scattering must obey whatever the potential: Levinson's theorem, the effective-range
expansion (against the engine's own bound states and the virtual states of ``bs.resonances``)
and Wigner's threshold law.  Each theorem is named beside its check."""

from __future__ import annotations

import math

import numpy as np
import pytest

import boundscape as bs


def ere_tan_delta(k, s):
    """tan δ₀ from the effective-range expansion k cot δ₀ = −1/a + r_e k²/2 (Bethe 1949)."""
    return k / (-s.inverse_length + 0.5 * s.effective_range * k * k)


@pytest.mark.parametrize("family, strength", [("yukawa", 1.0), ("ecsc", 2.0), ("square_well", 3.0)])
def test_levinson_across_a_sweep(family, strength):
    # Levinson's theorem: δ_l(0⁺) − δ_l(∞) = N_b π (Levinson, Kgl. Danske Vid. Selsk. Mat.-fys.
    # Medd. 25, no. 9 (1949)); δ(∞) = 0 on the reported branch, N_b the engine's exact count.
    # At k ≪ 1/|a| the remainder is −arctan of the effective-range expansion's tan δ₀.
    lengths = np.geomspace(0.4, 40.0, 11) if family != "square_well" else np.geomspace(0.3, 6.0, 9)
    seen = set()
    for lam in lengths:
        pot = bs.potential(family, strength, float(lam))
        s = bs.scattering(pot, 0)
        k = 1e-4 / max(abs(s.length), lam)
        delta = bs.phase_shifts(pot, 0, [k * k / 2]).phase_shift[0]
        n_b = bs.count_bound(pot, 0)
        seen.add(n_b)
        assert abs(delta - n_b * math.pi) < 1e-3, (lam, delta, n_b)
        assert delta - n_b * math.pi == pytest.approx(math.atan(ere_tan_delta(k, s)), rel=1e-6, abs=1e-14)
    assert len(seen) >= 3  # the sweep crosses thresholds


@pytest.mark.parametrize("side", [+1, -1])
def test_levinson_just_either_side_of_a_threshold(side):
    # one part in 10⁶ either side of λ_c(2s): the count and δ₀(0⁺)/π change together
    lam_c = bs.critical_screening_length("yukawa", 1.0, 0, 1)
    pot = bs.potential("yukawa", 1.0, lam_c * (1 + side * 1e-6))
    s = bs.scattering(pot, 0)
    assert math.copysign(1, s.length) == side and abs(s.length) > 1e5 * lam_c  # a → ±∞ at the threshold
    k = 1e-3 / abs(s.length)
    delta = bs.phase_shifts(pot, 0, [k * k / 2]).phase_shift[0]
    assert round(delta / math.pi) == bs.count_bound(pot, 0) == (2 if side > 0 else 1)


@pytest.mark.parametrize("eps", [0.1, 0.03, 0.01])
def test_effective_range_expansion_predicts_shallow_bound_and_virtual_states(eps):
    # a pole of S = (k cot δ + ik)/(k cot δ − ik) at k = iκ (bound) or k = −iκ_v (virtual):
    # −1/a − r_e κ²/2 + κ = 0 and −1/a − r_e κ_v²/2 − κ_v = 0 (Bethe 1949; Newton, Scattering
    # Theory of Waves and Particles, §12.1).  The neglected shape term is O(κ⁴ r_e³): the
    # relative error of κ is bounded by (κ r_e)³/5 here (measured ~(κ r_e)³/15).
    lam_c = bs.critical_screening_length("yukawa", 1.0, 0, 0)
    bound = bs.potential("yukawa", 1.0, lam_c * (1 + eps))
    s = bs.scattering(bound, 0)
    kappa = math.sqrt(-2 * bs.bound_levels(bound, 0).energy[0])
    a, r_e = s.length, s.effective_range
    predicted = (1 - math.sqrt(1 - 2 * r_e / a)) / r_e
    assert abs(predicted / kappa - 1) < (kappa * r_e) ** 3 / 5
    assert abs(predicted / kappa - 1) < 0.05 * abs(1 / (a * kappa) - 1)  # r_e does most of the work
    virtual = bs.potential("yukawa", 1.0, lam_c * (1 - eps))
    s = bs.scattering(virtual, 0)
    res = bs.resonances(virtual, 0, n_r_max=1)
    assert res.kind == "virtual" and res.status[0] == 0
    kappa_v = res.kappa[0]
    a, r_e = s.length, s.effective_range
    assert a < 0
    predicted = (-1 + math.sqrt(1 - 2 * r_e / a)) / r_e
    assert abs(predicted / kappa_v - 1) < (kappa_v * r_e) ** 3 / 5
    assert abs(predicted / kappa_v - 1) < 0.05 * abs(-1 / (a * kappa_v) - 1)


@pytest.mark.parametrize("family, strength, lam", [("yukawa", 1.0, 2.0), ("square_well", 2.0, 1.5),
                                                   ("hulthen", 1.0, 4.0)])
@pytest.mark.parametrize("l", [0, 1, 2])
def test_wigner_threshold_law(family, strength, lam, l):
    # Wigner's threshold law: tan δ_l ∝ k^{2l+1} as k → 0 (Wigner, Phys. Rev. 73, 1002 (1948));
    # with the engine's generalised length, δ_l − N_b π = −(k a_l)^{2l+1}(1 + O(k²)).
    pot = bs.potential(family, strength, lam)
    s = bs.scattering(pot, l)
    ks = np.array([1e-2, 1e-3, 1e-4]) / max(abs(s.length), lam)
    ps = bs.phase_shifts(pot, l, ks**2 / 2)
    assert np.all(ps.status == 0) and ps.num_bound == s.num_bound
    # δ − N_b π from σ_l = 4π(2l+1) sin²δ/k², which keeps the digits of a tiny remainder that
    # N_b π + ε rounds away in δ itself (its sign from δ)
    rest = np.sign(ps.phase_shift - s.num_bound * np.pi) * np.arcsin(
        np.sqrt(ps.cross_section * ks**2 / (4 * np.pi * (2 * l + 1))))
    law = -(ks * s.length) ** (2 * l + 1)
    deviation = np.abs(rest / law - 1)
    assert deviation[0] < 1e-2 and deviation[1] < 1e-4 and deviation[2] < 1e-6
    assert deviation[1] < deviation[0] / 50 and deviation[2] < deviation[1] / 50  # O(k²)
    slopes = np.diff(np.log(np.abs(rest))) / np.diff(np.log(ks))
    assert slopes == pytest.approx([2 * l + 1] * 2, abs=1e-3)


@pytest.mark.parametrize("family, strength, lam, l, slope_tol, cross_tol", [
    ("square_well", 10.0, 1.0, 2, 1e-3, 0.02),  # Γ/E_r ≈ 0.01
    ("yukawa", 1.0, 4.535, 1, 1e-2, 0.1),  # Γ/E_r ≈ 0.11, just past λ_c(2p) = 4.54098
])
def test_breit_wigner_at_a_resonance_of_resonances(family, strength, lam, l, slope_tol, cross_tol):
    # near a narrow resonance δ_l ≈ δ_bg + arctan[(Γ/2)/(E_r − E)] (Breit & Wigner, Phys. Rev. 49,
    # 519 (1936)): δ rises through π/2 (mod π) within O(Γ) of E_r, with dδ/dE = 2/Γ there — E_r and
    # Γ from bs.resonances (the S-matrix pole, a separate calculation on complex paths)
    pot = bs.potential(family, strength, lam)
    n_b = bs.count_bound(pot, l)
    res = bs.resonances(pot, l, n_r_max=n_b + 1)
    e_r, width = res.energy[-1], res.width[-1]
    assert res.kind == "resonance" and res.status[-1] == 0 and width < 0.2 * e_r
    e = e_r + width * np.array([-1e-3, 0.0, 1e-3])
    delta = bs.phase_shifts(pot, l, e).phase_shift
    slope = (delta[2] - delta[0]) / (e[2] - e[0])
    assert slope * width / 2 == pytest.approx(1.0, abs=slope_tol)
    assert abs(delta[1] - n_b * np.pi - np.pi / 2) < cross_tol * np.pi
