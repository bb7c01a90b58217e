"""Status reasons come from the engine, which writes its own units as "bohr" and "hartree"; the
command line shows them in the units of the table (a nuclear table in fm and MeV never says bohr).
Contract: every number in the user's trade's units (common practice, no source)."""

from __future__ import annotations

import importlib
import json

import pytest

from boundscape.cli import main
from boundscape.cli.readings import reading_of
from boundscape.physics.units import BOHR_M, HARTREE_EV


def _reading(*flags):
    # the flags as the levels command parses them
    parser = importlib.import_module("boundscape.cli.main").build_parser()
    return reading_of(parser.parse_args(["levels", "--family", "yukawa", *flags]))


def test_atomic_units_leave_the_text_alone():
    text = "it dissolved where λ ≈ 23.517 bohr; |E| = 1e-05 hartree"
    assert _reading("--strength", "1").shown(text) == text


def test_lengths_in_effective_units_are_shown_in_nm():
    # The semiconductor preset runs the engine in effective units: its "bohr" is a* = ε_r/μ* bohr
    # (hydrogenic donor scaling, any semiconductor text), 12.9/0.067 × 0.0529177 nm = 10.189 nm.
    reading = _reading("--preset", "semiconductor", "--effective-mass", "0.067", "--permittivity", "12.9",
                       "--strength", "1")
    a_star_nm = 12.9 / 0.067 * BOHR_M * 1e9
    assert reading.length_unit == "nm"
    assert reading.shown("λ ≈ 10 bohr, and 3 bohrs stay") == f"λ ≈ {10 * a_star_nm:.5g} nm, and 3 bohrs stay"
    assert reading.shown("") == ""


def test_a_nuclear_resonance_table_never_says_bohr(capsys):
    status = main(["resonances", "--family", "yukawa", "--preset", "nuclear", "--reduced-mass", "469.459",
                   "--coupling", "30", "--range", "2", "--l", "1", "--format", "json"])
    assert status == 0
    out = json.loads(capsys.readouterr().out)
    reasons = [row["reason"] for row in out["resonances"] if row.get("reason")]
    assert reasons, "the case has states dissolved out of reach, with their λ in the reason"
    assert not [r for r in reasons if "bohr" in r or "hartree" in r]
    assert any(" fm" in r for r in reasons)


@pytest.mark.parametrize("value", [1.0, 0.25])
def test_energy_words_follow_the_table(value):
    reading = _reading("--preset", "plasma", "--nuclear-charge", "1", "--density", "1e20", "--temperature", "10")
    assert reading.energy_unit == "eV"
    assert reading.shown(f"E = {value} hartree") == f"E = {value * HARTREE_EV:.5g} eV"


def test_nuclear_levels_say_which_state_labels_they_use(capsys):
    # The shell model labels a level by n_r + 1 (1s, 1p, 1d; any nuclear-structure text); the table
    # keeps n = n_r + l + 1 and says so, under the nuclear preset only.
    args = ["levels", "--family", "woods_saxon", "--preset", "nuclear", "--reduced-mass", "916", "--strength", "50",
            "--screening-length", "4.1", "--param", "diffuseness=0.65", "--length-unit", "fm", "--l", "1",
            "--format", "json"]
    assert main(args) == 0
    out = json.loads(capsys.readouterr().out)
    assert "shell model" in out["state_labels"]
    lowest_p = out["levels"][0]
    assert (lowest_p["state"], lowest_p["n_r"]) == ("2p", 0)  # the shell model's 1p
    assert main(["levels", "--family", "yukawa", "--strength", "1", "--screening-length", "10", "--l", "0",
                 "--format", "json"]) == 0
    assert "state_labels" not in json.loads(capsys.readouterr().out)
