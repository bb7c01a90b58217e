"""The ``boundscape`` command line: one meaning and one unit per flag, errors that name the
subcommand, presets, and output that survives a closed pipe."""

from __future__ import annotations

import argparse
import json
import math
import subprocess
import sys

import pytest
from scipy import constants as sc
from scipy.constants import physical_constants as pc

import importlib

cli = importlib.import_module("boundscape.cli.main")
from boundscape.errors import InputError

HBAR_C = pc["reduced Planck constant times c in MeV fm"][0]
BOHR = pc["Bohr radius"][0]
RYDBERG_EV = pc["Rydberg constant times hc in eV"][0]


# What the console script runs (``python -m boundscape.cli.main`` would warn that the module was
# imported already, by the package).
COMMAND = "import sys; from boundscape.cli import main; sys.exit(main())"


def run(*argv):
    """Exit status, stdout and stderr of ``boundscape argv`` in a fresh interpreter."""
    proc = subprocess.run([sys.executable, "-c", COMMAND, *argv], capture_output=True, text=True, timeout=120)
    return proc.returncode, proc.stdout, proc.stderr


def run_json(capsys, *argv):
    assert cli.main([*argv, "--format", "json"]) == 0
    return json.loads(capsys.readouterr().out)


def test_misspelt_flag_prints_the_subcommand_usage():
    status, _, err = run("levels", "--family", "yukawa", "--strength", "1", "--screening-lenght", "10")
    assert status == 2
    assert err.startswith("usage: boundscape levels") and "did you mean --screening-length?" in err
    status, _, err = run("convert", "plasma", "--density", "1", "--temperature", "1", "--ion-charge", "2")
    assert status == 2 and err.startswith("usage: boundscape convert plasma")
    assert "--nuclear-charge" in err and "--screening-ion-charge" in err


def test_strength_is_required_and_a_default_is_echoed(capsys, tmp_path):
    with pytest.raises(InputError, match="--strength is required for family yukawa"):
        cli.run_levels(cli.build_parser().parse_args(["levels", "--family", "yukawa", "--screening-length", "10"]))
    # A table's scale factor defaults to 1, and the header says so.
    import numpy as np

    r = np.geomspace(1e-4, 80.0, 300)
    np.savetxt(tmp_path / "y.csv", np.column_stack([r, -np.exp(-r / 2.0) / r]), delimiter=",")
    assert cli.main(["levels", "--family", "tabulated", "--table", str(tmp_path / "y.csv")]) == 0
    assert "strength 1 (scale factor on the table, the default)" in capsys.readouterr().out.splitlines()[0]


def test_confining_family_says_what_it_returns(capsys):
    # Isotropic oscillator: E = ω(2n_r + l + 3/2) (any QM textbook), all positive.
    out = run_json(capsys, "levels", "--family", "harmonic", "--strength", "0.5", "--l", "1", "--n-r-max", "3")
    energies = [row["energy_hartree"] for row in out["levels"]]
    assert energies == pytest.approx([0.5 * (2 * k + 1 + 1.5) for k in range(3)], rel=1e-10)
    assert "confining" in out["note"] and "E > 0" in out["note"]
    assert "confining" in cli.LEVELS_DESCRIPTION and "E > 0" in cli.LEVELS_DESCRIPTION
    assert cli.main(["levels", "--family", "harmonic", "--strength", "0.5", "--n-r-max", "2"]) == 0
    assert "confining: every level is bound and E > 0" in capsys.readouterr().out


def test_closed_pipe_ends_quietly():
    # Coulomb, l = 0..19: 210 lines, far more than a pipe buffer holds before head exits.
    proc = subprocess.run(f"{sys.executable} -c '{COMMAND}' levels --family coulomb --strength 1 --l 0-19 "
                          "| head -n 1", shell=True, capture_output=True, text=True, timeout=120)
    assert proc.stdout.startswith("# Coulomb")
    assert "Traceback" not in proc.stderr and "BrokenPipe" not in proc.stderr, proc.stderr


def test_critical_has_no_screened_flag():
    # Critical lengths always screen a table; a flag that changed nothing is refused.
    status, _, err = run("critical", "--family", "yukawa", "--strength", "1", "--screened")
    assert status == 2 and err.startswith("usage: boundscape critical") and "--screened" in err


def test_plasma_charges_have_one_meaning_each(capsys):
    base = ["convert", "plasma", "--density", "1e20", "--temperature", "10", "--screening", "debye"]
    rows = {r["quantity"]: r["value"] for r in run_json(capsys, *base, "--nuclear-charge", "3")}
    plain = {r["quantity"]: r["value"] for r in run_json(capsys, *base)}
    assert rows["engine strength Z (nuclear charge)"] == 3.0
    assert rows["engine screening_length"] == plain["engine screening_length"]  # the ion does not screen itself
    # Screening ions of charge Z_i at T_i = T_e add Z_i n_e/T to 1/λ² (Chen, Introduction to Plasma
    # Physics, §1.4): λ = λ_e/√(1 + Z_i) with Z_i = 2.
    ions = {r["quantity"]: r["value"] for r in run_json(capsys, *base, "--species", "electrons_and_ions",
                                                         "--screening-ion-charge", "2")}
    assert ions["engine strength Z (nuclear charge)"] == 1.0
    assert ions["engine screening_length"] == pytest.approx(plain["engine screening_length"] / math.sqrt(3), rel=1e-11)


def test_screening_length_is_in_one_unit_everywhere(capsys):
    # --screening-length 10 means 10 bohr in every subcommand unless --length-unit says otherwise.
    plasma = {r["quantity"]: r for r in run_json(capsys, "convert", "plasma", "--screening-length", "10",
                                                  "--temperature", "10")}
    assert plasma["engine screening_length"]["value"] == pytest.approx(10.0, rel=1e-12)
    semi = run_json(capsys, "convert", "semiconductor", "--effective-mass", "0.067", "--permittivity", "12.9",
                    "--screening-length", "10")
    rows = {r["quantity"]: r["value"] for r in semi}
    assert rows["atomic units: screening_length"] == pytest.approx(10.0, rel=1e-12)
    # a* = (ε_r/μ*) a₀ (Yu & Cardona, §4.2).
    assert rows["effective units: screening_length"] == pytest.approx(10.0 * 0.067 / 12.9, rel=1e-11)
    semi = run_json(capsys, "convert", "semiconductor", "--effective-mass", "0.067", "--permittivity", "12.9",
                    "--screening-length", "10", "--length-unit", "a*")
    assert {r["quantity"]: r["value"] for r in semi}["effective units: screening_length"] == pytest.approx(10.0)
    levels = run_json(capsys, "levels", "--family", "yukawa", "--strength", "1", "--screening-length", "0.529177210544",
                      "--length-unit", "nm")
    assert levels["potential"]["screening_length_bohr"] == pytest.approx(10.0, rel=1e-11)  # a₀ = 0.0529... nm
    assert cli.main(["levels", "--family", "yukawa", "--strength", "1", "--screening-length", "10"]) == 0
    assert "λ = 10 bohr" in capsys.readouterr().out


def _subparsers(parser):
    for action in parser._actions:
        if isinstance(action, argparse._SubParsersAction):
            for name, sub in action.choices.items():
                yield name, sub
                yield from _subparsers(sub)


def test_every_option_has_help():
    missing = [f"{name} {' '.join(a.option_strings) or a.dest}" for name, sub in _subparsers(cli.build_parser())
               for a in sub._actions if not isinstance(a, argparse._SubParsersAction) and not a.help]
    assert missing == []


def test_nuclear_preset_reads_MeV_and_fm(capsys):
    # Yukawa ground-state threshold 2μg²λ_c/ħ² = 2/1.19061 (Rogers, Graboske & Harwood,
    # Phys. Rev. A 1, 1577 (1970); value from memory).
    mu, g2 = 469.4591, 60.0
    out = run_json(capsys, "critical", "--family", "yukawa", "--preset", "nuclear", "--reduced-mass", str(mu),
                   "--coupling", str(g2), "--n-max", "1")
    lam_fm = out["states"][0]["critical_screening_length_fm"]
    assert 2 * mu * g2 * lam_fm / HBAR_C ** 2 == pytest.approx(2 / 1.19061, rel=5e-6)
    # Unscreened limit: E_1s = -μ g⁴/(2(ħc)²) (hydrogen with e² → g²), MeV.
    out = run_json(capsys, "levels", "--family", "coulomb", "--preset", "nuclear", "--reduced-mass", str(mu),
                   "--coupling", str(g2))
    assert out["levels"][0]["energy_MeV"] == pytest.approx(-mu * g2 ** 2 / (2 * HBAR_C ** 2), rel=1e-10)
    assert out["levels"][0]["mean_radius_fm"] == pytest.approx(1.5 * HBAR_C ** 2 / (mu * g2), rel=1e-9)
    assert cli.main(["levels", "--family", "yukawa", "--preset", "nuclear", "--reduced-mass", str(mu),
                     "--coupling", str(g2), "--screening-length", "2", "--length-unit", "fm"]) == 0
    text = capsys.readouterr().out
    assert "E (MeV)" in text and "<r> (fm)" in text and "λ = 2 fm" in text and "bohr" not in text
    with pytest.raises(InputError, match="--strength does not apply with --preset nuclear"):
        cli.run_levels(cli.build_parser().parse_args(["levels", "--family", "yukawa", "--preset", "nuclear",
                                                      "--reduced-mass", "1", "--strength", "1"]))


def test_semiconductor_preset_reads_meV_and_nm(capsys):
    # Hydrogenic donor and exciton: E_1s = -Ry* = -(μ*/ε_r²) Ry, ⟨r⟩_1s = 1.5 a*, a* = (ε_r/μ*) a₀
    # (Yu & Cardona, §4.2 and §6.3, exciton μ* = m_e m_h/(m_e + m_h)).
    for extra, mu in (([], 0.067), (["--hole-mass", "0.5"], 0.067 * 0.5 / 0.567)):
        out = run_json(capsys, "levels", "--family", "coulomb", "--strength", "1", "--preset", "semiconductor",
                       "--effective-mass", "0.067", "--permittivity", "12.9", *extra)
        level = out["levels"][0]
        assert level["energy_meV"] == pytest.approx(-mu / 12.9 ** 2 * RYDBERG_EV * 1e3, rel=1e-9)
        assert level["mean_radius_nm"] == pytest.approx(1.5 * 12.9 / mu * BOHR * 1e9, rel=1e-9)
    with pytest.raises(InputError, match="--permittivity is required"):
        cli.run_levels(cli.build_parser().parse_args(["levels", "--family", "coulomb", "--strength", "1",
                                                      "--preset", "semiconductor", "--effective-mass", "0.067"]))
    with pytest.raises(InputError, match="--effective-mass does not apply without --preset semiconductor"):
        cli.run_levels(cli.build_parser().parse_args(["levels", "--family", "coulomb", "--strength", "1",
                                                      "--effective-mass", "0.067"]))


def test_json_numbers_carry_significant_digits(capsys):
    rows = run_json(capsys, "convert", "plasma", "--density", "1e22", "--temperature", "20")
    density = next(r for r in rows if r["quantity"] == "electron density")
    assert density["value"] == 1e22  # not 1.0000000000000002e+22 from the cm-3 -> m-3 -> cm-3 round trip
    # The Debye length itself, to its 13 digits: λ_D = √(ε₀ k T/(n e²)) (NRL Plasma Formulary).
    debye = next(r for r in rows if r["quantity"] == "Debye length" and r["unit"] == "m")
    expected = math.sqrt(sc.epsilon_0 * 20 * sc.e / (1e28 * sc.e ** 2))
    assert debye["value"] == pytest.approx(expected, rel=1e-11) and len(repr(debye["value"])) <= 18
