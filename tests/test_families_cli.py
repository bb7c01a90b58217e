"""The command line's family parameters (--param NAME=VALUE on levels, critical, resonances and
lines) and critical strengths at a fixed length (critical --vary strength), against outside
values: Bessel zeros (scipy.special), the Yukawa threshold of Rogers, Graboske & Harwood, and the
one-scale law."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.constants import physical_constants as pc
from scipy.optimize import brentq
from scipy.special import spherical_jn

import boundscape as bs
from boundscape.cli import main as cli_main
from cli_calls import message, run_json

HBAR_C = pc["reduced Planck constant times c in MeV fm"][0]




def test_param_reaches_levels_critical_resonances_and_lines(capsys):
    ws = ["--family", "woods_saxon", "--strength", "2", "--param", "diffuseness=0.6"]
    pot = bs.potential("woods_saxon", 2.0, 4.0, diffuseness=0.6)
    out = run_json(capsys, "levels", *ws, "--screening-length", "4", "--l", "0-1")
    assert out["potential"]["parameters"] == {"diffuseness": 0.6}
    assert [row["energy_hartree"] for row in out["levels"] if row["l"] == 1] == bs.bound_levels(pot, 1).energy.tolist()
    out = run_json(capsys, "critical", *ws, "--l", "1", "--n-max", "2")
    assert out["states"][0]["critical_screening_length_bohr"] == \
        bs.critical_screening_length("woods_saxon", 2.0, 1, 0, diffuseness=0.6)
    out = run_json(capsys, "resonances", *ws, "--screening-length", "4", "--l", "3", "--n-max", "5")
    assert out["resonances"][0]["state"] == "5f"
    assert out["resonances"][0]["energy_hartree"] == bs.resonances(pot, 3, n_r_max=2).energy[-1]
    ty = ["--family", "two_yukawa", "--strength", "1", "--screening-length", "20", "--param", "core_strength=0.3",
          "--param", "core_range=2"]
    out = run_json(capsys, "lines", *ty, "--n-max", "2")
    found = bs.lines(bs.potential("two_yukawa", 1.0, 20.0, core_strength=0.3, core_range=2.0), 2)
    assert [row["oscillator_strength"] for row in out["lines"]] == found.oscillator_strength.tolist()
    assert out["potential"]["parameters"] == {"core_strength": 0.3, "core_range": 2.0}
    # the table's title names them with their units
    assert cli_main(["levels", *ws, "--screening-length", "4"]) == 0
    assert "diffuseness 0.6 bohr" in capsys.readouterr().out.splitlines()[0]


def test_param_errors_are_one_line_and_name_the_parameter(capsys):
    ws = ["levels", "--family", "woods_saxon", "--strength", "2", "--screening-length", "4"]
    text = message(capsys, *ws)
    assert "'diffuseness'" in text and "--param diffuseness=VALUE" in text
    text = message(capsys, *ws, "--param", "diffusenes=0.5")
    assert "'diffusenes'" in text and "it takes diffuseness" in text
    assert "'diffuseness'" in message(capsys, "levels", "--family", "yukawa", "--strength", "1",
                                      "--screening-length", "4", "--param", "diffuseness=0.5")
    assert "diffuseness" in message(capsys, *ws, "--param", "diffuseness=-1")
    assert "diffuseness=abc" in message(capsys, *ws, "--param", "diffuseness=abc")
    assert "NAME=VALUE" in message(capsys, *ws, "--param", "diffuseness")
    assert "given twice" in message(capsys, *ws, "--param", "diffuseness=1", "--param", "diffuseness=2")
    assert "--mass" in message(capsys, *ws, "--param", "mass=2")
    assert "core_range" in message(capsys, "critical", "--family", "two_yukawa", "--strength", "1",
                                   "--param", "core_range=0")


def square_well_threshold_depths(a, l, count, mu=1.0):
    """V₀ at which the square well's state n_r appears: k a = the n_r-th zero of j_{l−1} (l ≥ 1)
    or (n_r + ½)π (l = 0), V₀ = (ka)²/(2μa²) (Schiff, Quantum Mechanics, §15); scipy.special."""
    if l == 0:
        zeros = [(k + 0.5) * math.pi for k in range(count)]
    else:
        x = np.linspace(0.1, (count + l + 2) * math.pi, 20001)
        f = spherical_jn(l - 1, x)
        idx = np.nonzero(np.signbit(f[1:]) != np.signbit(f[:-1]))[0][:count]
        zeros = [brentq(lambda t: spherical_jn(l - 1, t), x[i], x[i + 1], xtol=1e-15, rtol=1e-15) for i in idx]
    return [z * z / (2 * mu * a * a) for z in zeros]


def test_critical_strengths_of_the_square_well_at_bessel_zeros(capsys):
    a, mu = 1.5, 0.7
    out = run_json(capsys, "critical", "--vary", "strength", "--family", "square_well", "--screening-length", str(a),
                   "--mass", str(mu), "--l", "0-2", "--n-max", "4")
    assert out["critical_strength_meaning"] == "depth (hartree)"
    for l in range(3):
        rows = [row for row in out["states"] if row["l"] == l]
        exact = square_well_threshold_depths(a, l, len(rows), mu)
        got = [row["critical_strength"] for row in rows]
        assert np.allclose(got, exact, rtol=1e-9, atol=0.0), (l, got, exact)


def test_critical_strength_of_yukawa_follows_the_one_scale_law(capsys):
    # Z_c λ = λ_c(Z = 1) for V = Z f(r/λ)/r; for 1s, 1/λ_c = 1.19061 Z (Rogers, Graboske & Harwood,
    # Phys. Rev. A 1, 1577 (1970), table I)
    lam = 7.5
    out = run_json(capsys, "critical", "--vary", "strength", "--family", "yukawa", "--screening-length", str(lam),
                   "--l", "0-1", "--n-max", "2")
    by_state = {row["state"]: row["critical_strength"] for row in out["states"]}
    assert set(by_state) == {"1s", "2s", "2p"}
    for row in out["states"]:
        lam_1 = bs.critical_screening_length("yukawa", 1.0, row["l"], row["n_r"])
        assert row["critical_strength"] * lam == pytest.approx(lam_1, rel=1e-12)
    assert round(1.0 / (by_state["1s"] * lam), 5) == 1.19061
    # the same from --length-unit nm: λ converted to bohr first
    out = run_json(capsys, "critical", "--vary", "strength", "--family", "yukawa", "--screening-length", "1",
                   "--length-unit", "nm", "--n-max", "1")
    bohr_nm = pc["Bohr radius"][0] * 1e9
    assert out["states"][0]["critical_strength"] * (1.0 / bohr_nm) == pytest.approx(1 / 1.19061, rel=5e-6)


def test_critical_coupling_under_the_nuclear_preset(capsys):
    # μ g²_c λ/(ħc)² = 1/1.19061 at a fixed range (Rogers, Graboske & Harwood 1970; the nuclear
    # reading of the one-scale law, value from memory of the table's 1.19061)
    mu, lam = 469.4591, 1.4
    out = run_json(capsys, "critical", "--vary", "strength", "--family", "yukawa", "--preset", "nuclear",
                   "--reduced-mass", str(mu), "--screening-length", str(lam), "--length-unit", "fm", "--n-max", "1")
    assert out["critical_strength_meaning"] == "g², MeV fm"
    g2 = out["states"][0]["critical_strength"]
    assert mu * g2 * lam / HBAR_C**2 == pytest.approx(1 / 1.19061, rel=5e-6)
    assert cli_main(["critical", "--vary", "strength", "--family", "yukawa", "--preset", "nuclear", "--reduced-mass",
                     str(mu), "--screening-length", str(lam), "--length-unit", "fm", "--n-max", "1"]) == 0
    assert "g², MeV fm" in capsys.readouterr().out.splitlines()[0]


def test_critical_strengths_of_the_new_families_are_their_thresholds(capsys):
    # each printed strength is where the count steps (cells computed directly, bs.count_bound)
    # (not the ion sphere's 2p: the engine's count misses it just above its threshold, see
    # test_families_ion_sphere.test_the_2p_count_just_above_its_threshold)
    for family, lam, params, ls in [("woods_saxon", 3.0, ["--param", "diffuseness=0.5"], "0-1"),
                                    ("ion_sphere", 12.0, [], "0,2"), ("two_yukawa", 5.0, [], "0-1")]:
        out = run_json(capsys, "critical", "--vary", "strength", "--family", family, "--screening-length", str(lam),
                       *params, "--l", ls, "--n-max", "3")
        own = {p.split("=")[0]: float(p.split("=")[1]) for p in params[1::2]}
        for row in out["states"]:
            z = row["critical_strength"]
            above = bs.count_bound(bs.potential(family, z * (1 + 1e-6), lam, **own), row["l"])
            below = bs.count_bound(bs.potential(family, z * (1 - 1e-6), lam, **own), row["l"])
            assert (below, above) == (row["n_r"], row["n_r"] + 1), (family, row)


def test_vary_strength_refuses_what_does_not_apply(capsys):
    base = ["critical", "--vary", "strength", "--family", "yukawa"]
    assert "--screening-length" in message(capsys, *base)
    assert "--strength does not apply" in message(capsys, *base, "--strength", "1", "--screening-length", "3")
    assert "--coupling does not apply" in message(capsys, *base, "--preset", "nuclear", "--reduced-mass", "469",
                                                  "--coupling", "50", "--screening-length", "3")
    assert "no screening length" in message(capsys, "critical", "--vary", "strength", "--family", "coulomb",
                                            "--screening-length", "3")
    # without --vary strength the screening length is what critical finds
    assert "--vary strength" in message(capsys, "critical", "--family", "yukawa", "--strength", "1",
                                        "--screening-length", "3")
