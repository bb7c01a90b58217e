"""``boundscape scattering`` and ``boundscape fit``: the JSON shapes (contracts), the units a preset
reads and prints, the table, and one-line errors; values against the engine and scipy.constants."""

from __future__ import annotations

import importlib
import json
import math

import pytest
from scipy.constants import physical_constants as pc

import boundscape as bs

cli = importlib.import_module("boundscape.cli.main")

HBAR_C = pc["reduced Planck constant times c in MeV fm"][0]
BOHR_NM = pc["Bohr radius"][0] * 1e9
HARTREE_EV = pc["Hartree energy in eV"][0]
# the issue's contract: these keys first, in this order
KEYS = ["l", "scattering_length_bohr", "inverse_scattering_length_per_bohr", "effective_range_bohr", "num_bound",
        "phase_shifts", "status"]
PHASE_KEYS = ["energy_hartree", "phase_shift_rad", "cross_section_bohr2"]
NUCLEAR = ["--family", "yukawa", "--preset", "nuclear", "--reduced-mass", "469.459", "--screening-length", "1.4",
           "--length-unit", "fm"]


def run_json(capsys, *argv):
    assert cli.main([*argv, "--format", "json"]) == 0
    return json.loads(capsys.readouterr().out)


def fails(capsys, *argv):
    assert cli.main(list(argv)) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and err[0].startswith("boundscape: error: ")
    return err[0]


def test_scattering_json_shape_and_values(capsys):
    out = run_json(capsys, "scattering", "--family", "yukawa", "--strength", "1", "--screening-length", "2",
                   "--l", "0-2", "--energies", "0.01,0.1,1")
    assert out["potential"] == {"family": "yukawa", "strength": 1.0, "mass": 1.0, "screening_length_bohr": 2.0}
    rows = out["scattering"]
    assert [row["l"] for row in rows] == [0, 1, 2]
    pot = bs.potential("yukawa", 1.0, 2.0)
    for row in rows:
        assert list(row)[: len(KEYS)] == KEYS
        assert all(list(p)[: len(PHASE_KEYS)] == PHASE_KEYS for p in row["phase_shifts"])
        s = bs.scattering(pot, row["l"])
        ps = bs.phase_shifts(pot, row["l"], [0.01, 0.1, 1.0])
        assert row["scattering_length_bohr"] == s.length
        assert row["inverse_scattering_length_per_bohr"] == s.inverse_length
        assert row["num_bound"] == s.num_bound and row["status"] == "ok"
        assert [p["energy_hartree"] for p in row["phase_shifts"]] == [0.01, 0.1, 1.0]
        assert [p["phase_shift_rad"] for p in row["phase_shifts"]] == ps.phase_shift.tolist()
        assert [p["cross_section_bohr2"] for p in row["phase_shifts"]] == ps.cross_section.tolist()
    assert rows[0]["effective_range_bohr"] == bs.scattering(pot, 0).effective_range
    assert rows[1]["effective_range_bohr"] is None  # r_e is an s-wave quantity


def test_scattering_without_energies_lists_none(capsys):
    row = run_json(capsys, "scattering", "--family", "square_well", "--strength", "1", "--screening-length", "1")[
        "scattering"][0]
    assert row["phase_shifts"] == []
    # a = R − tan(qR)/q, q = √(2μV0) (square well, closed form)
    assert row["scattering_length_bohr"] == pytest.approx(1 - math.tan(math.sqrt(2)) / math.sqrt(2), rel=1e-10)


def test_scattering_under_the_nuclear_preset_is_in_fm_and_MeV(capsys):
    out = run_json(capsys, "scattering", *NUCLEAR, "--coupling", "70.9", "--energies", "1,10")
    row = out["scattering"][0]
    assert list(row)[:7] == ["l", "scattering_length_fm", "inverse_scattering_length_per_fm", "effective_range_fm",
                             "num_bound", "phase_shifts", "status"]
    assert list(row["phase_shifts"][0])[:3] == ["energy_MeV", "phase_shift_rad", "cross_section_fm2"]
    # engine units: lengths in fm, energies in (ħc)²/(μc² fm²), strength g²μc²/(ħc)² (scipy.constants' ħc)
    mu = 469.459
    unit = HBAR_C**2 / mu
    pot = bs.potential("yukawa", 70.9 * mu / HBAR_C**2, 1.4)
    s = bs.scattering(pot, 0)
    assert row["scattering_length_fm"] == pytest.approx(s.length, rel=1e-11)
    assert row["effective_range_fm"] == pytest.approx(s.effective_range, rel=1e-11)
    ps = bs.phase_shifts(pot, 0, [1 / unit, 10 / unit])
    assert [p["energy_MeV"] for p in row["phase_shifts"]] == [1.0, 10.0]
    assert [p["phase_shift_rad"] for p in row["phase_shifts"]] == pytest.approx(ps.phase_shift.tolist(), rel=1e-11)
    assert [p["cross_section_fm2"] for p in row["phase_shifts"]] == pytest.approx(ps.cross_section.tolist(), rel=1e-11)


def test_scattering_under_the_plasma_preset_is_in_nm_and_eV(capsys):
    # under the plasma preset the strength is the ion's nuclear charge, --nuclear-charge
    row = run_json(capsys, "scattering", "--family", "yukawa", "--nuclear-charge", "1", "--screening-length", "2",
                   "--preset", "plasma", "--energies", "1")["scattering"][0]
    pot = bs.potential("yukawa", 1.0, 2.0)
    assert row["scattering_length_nm"] == pytest.approx(bs.scattering(pot, 0).length * BOHR_NM, rel=1e-11)
    ps = bs.phase_shifts(pot, 0, [1 / HARTREE_EV])
    assert row["phase_shifts"][0]["energy_eV"] == 1.0
    assert row["phase_shifts"][0]["cross_section_nm2"] == pytest.approx(ps.cross_section[0] * BOHR_NM**2, rel=1e-11)


def test_scattering_table(capsys):
    assert cli.main(["scattering", "--family", "yukawa", "--strength", "1", "--screening-length", "2", "--l", "0-1",
                     "--energies", "0.1"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert lines[0] == "# Yukawa, strength 1, λ = 2 bohr, mass 1 m_e (atomic units)"
    assert lines[1].split()[:3] == ["l", "a_l", "(bohr)"] and lines[1].rstrip().endswith("status")
    assert float(lines[2].split()[1]) == pytest.approx(bs.scattering(bs.potential("yukawa", 1.0, 2.0), 0).length,
                                                       rel=1e-12)
    assert any(line.startswith("# phase shifts, l = 0 (s): δ_l(0⁺) = 1π (Levinson)") for line in lines)


def test_the_issue_s_fit_example(capsys):
    out = run_json(capsys, "fit", *NUCLEAR, "--vary", "coupling", "--state", "1s", "--energy", "-2.2246")
    assert list(out)[0] == "coupling_MeV_fm"
    mu = 469.459
    unit = HBAR_C**2 / mu
    engine = bs.solve_for(bs.potential("yukawa", 1.0, 1.4), "strength", energy=-2.2246 / unit, state="1s")
    assert out["coupling_MeV_fm"] == pytest.approx(engine.value * HBAR_C**2 / mu, rel=1e-11)
    assert out["energy_MeV"] == pytest.approx(-2.2246, rel=1e-12)
    assert out["target"] == {"energy_MeV": -2.2246} and out["state"] == "1s" and out["status"] == "ok"
    assert out["scattering_length_fm"] == pytest.approx(engine.scattering.length, rel=1e-11)
    assert out["num_bound"] == 1 and out["coupling_error_MeV_fm"] < 1e-8
    assert out["potential"]["screening_length_fm"] == 1.4
    # the table says the same
    assert cli.main(["fit", *NUCLEAR, "--vary", "coupling", "--state", "1s", "--energy", "-2.2246"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert lines[0].startswith("# fit: Yukawa, g² = 70.9038 MeV fm, λ = 1.4 fm")
    assert lines[1] == "# vary coupling so that the 1s energy is -2.2246 MeV"
    assert lines[2].split()[:3] == ["coupling", "(MeV", "fm)"]
    assert float(lines[2].split()[3]) == pytest.approx(out["coupling_MeV_fm"], rel=1e-12)


def test_fit_a_screening_length_and_a_scattering_length(capsys):
    out = run_json(capsys, "fit", "--family", "hulthen", "--strength", "1", "--vary", "screening-length", "--state",
                   "1s", "--energy", "-0.3")
    # Hulthén 1s: κλ = λ − ½ for Z = μ = 1 (exact), so λ = 1/(2(1 − κ)), κ = √0.6
    assert out["screening_length_bohr"] == pytest.approx(1 / (2 * (1 - math.sqrt(0.6))), rel=1e-9)
    out = run_json(capsys, "fit", *NUCLEAR, "--vary", "coupling", "--scattering-length", "-23.7")
    assert out["scattering_length_fm"] == pytest.approx(-23.7, rel=1e-10) and out["num_bound"] == 0
    assert out["state"] is None and "energy_MeV" not in out


@pytest.mark.parametrize("argv, words", [
    (["scattering", "--family", "coulomb", "--strength", "1"], "coulomb tail"),
    (["scattering", "--family", "yukawa", "--strength", "1", "--screening-length", "2", "--energies", "0.1,x"],
     "--energies must be numbers"),
    (["scattering", "--family", "yukawa", "--strength", "1", "--screening-length", "2", "--energies", "-1"],
     "--energies must be positive"),
    (["scattering", *NUCLEAR, "--coupling", "70", "--energies", "1e12"], "1e+12 MeV needs too fine a grid"),
    (["fit", "--family", "yukawa", "--screening-length", "2", "--vary", "coupling", "--state", "1s", "--energy",
      "-0.1"], "--vary coupling does not apply without a preset"),
    (["fit", *NUCLEAR, "--coupling", "70", "--vary", "coupling", "--state", "1s", "--energy", "-2"],
     "--coupling is what --vary coupling solves for"),
    (["fit", *NUCLEAR, "--vary", "coupling", "--energy", "-2"], "--energy needs --state"),
    (["fit", *NUCLEAR, "--vary", "coupling", "--state", "1s", "--energy", "2"], "--energy must be negative"),
    (["fit", "--family", "yukawa", "--preset", "nuclear", "--reduced-mass", "469.459", "--coupling", "70",
      "--vary", "screening-length", "--state", "1s", "--energy", "-300"], "MeV is out of reach"),
    (["fit", *NUCLEAR, "--vary", "coupling", "--effective-range", "2.7"], "2.7 fm is out of reach"),
])
def test_errors_are_one_line_in_the_user_s_units(capsys, argv, words):
    assert words in fails(capsys, *argv)


def test_unreachable_energy_names_the_range_in_MeV(capsys):
    # λ → ∞ leaves the Coulomb 1s, −μg⁴/(2(ħc)²) (Bohr's formula, scipy.constants' ħc)
    err = fails(capsys, "fit", "--family", "yukawa", "--preset", "nuclear", "--reduced-mass", "469.459", "--coupling",
                "70", "--vary", "screening-length", "--state", "1s", "--energy", "-300")
    limit = -469.459 * 70**2 / (2 * HBAR_C**2)
    low = float(err.split("runs over (")[1].split(",")[0])
    assert low == pytest.approx(limit, rel=1e-9) and err.rstrip(")").endswith("the lower end is the unscreened "
                                                                              "potential's")
