"""The ``boundscape lines`` command: its JSON shape and its table, against the engine and the
closed-form hydrogen values."""

from __future__ import annotations

import json
import math

import boundscape as bs
from boundscape.cli.main import main

KEYS = ["lower", "upper", "energy_hartree", "wavelength_nm", "radial_integral_bohr", "oscillator_strength",
        "einstein_A_per_s", "status"]
ARGS = ["lines", "--family", "yukawa", "--strength", "1", "--screening-length", "10"]


def run_json(capsys, *args):
    assert main([*args, "--format", "json"]) == 0
    return json.loads(capsys.readouterr().out)


def test_json_shape_and_values(capsys):
    out = run_json(capsys, *ARGS, "--n-max", "3")
    assert out["potential"] == {"family": "yukawa", "strength": 1.0, "mass": 1.0, "screening_length_bohr": 10.0}
    rows = out["lines"]
    assert all(list(row) == KEYS for row in rows)
    engine = bs.lines(bs.potential("yukawa", 1.0, 10.0), 3)
    assert [(r["lower"], r["upper"]) for r in rows] == list(zip(engine.lower, engine.upper))
    first = rows[0]
    assert first == {"lower": "1s", "upper": "2p", "energy_hartree": engine.energy[0],
                     "wavelength_nm": engine.wavelength_nm[0], "radial_integral_bohr": engine.radial_integral[0],
                     "oscillator_strength": engine.oscillator_strength[0],
                     "einstein_A_per_s": engine.einstein_A[0], "status": "ok"}


def test_hydrogen_lyman_alpha(capsys):
    rows = run_json(capsys, "lines", "--family", "coulomb", "--strength", "1", "--n-max", "2")["lines"]
    assert [(r["lower"], r["upper"]) for r in rows] == [("1s", "2p")]
    # f = 2¹³/3⁹ (Bethe & Salpeter 1957, §63)
    assert math.isclose(rows[0]["oscillator_strength"], 2**13 / 3**9, rel_tol=1e-9)


def test_l_max_keeps_the_lower_angular_momenta(capsys):
    rows = run_json(capsys, "lines", "--family", "coulomb", "--strength", "1", "--n-max", "4", "--l-max", "1")["lines"]
    assert rows and all(r["lower"][-1] in "sp" and r["upper"][-1] in "sp" for r in rows)


def test_table_matches_the_levels_layout(capsys):
    assert main([*ARGS, "--n-max", "2"]) == 0
    out = capsys.readouterr().out.splitlines()
    assert main(["levels", *ARGS[1:], "--l", "1"]) == 0
    assert out[0] == capsys.readouterr().out.splitlines()[0]  # the same title line as `levels`
    assert out[1].split()[:2] == ["lower", "upper"] and out[1].rstrip().endswith("status")
    row = out[2].split()
    assert row[:2] == ["1s", "2p"] and row[-1] == "ok"
    assert math.isclose(float(row[2]), bs.lines(bs.potential("yukawa", 1.0, 10.0), 2).energy[0], rel_tol=1e-12)
    assert out[-1].startswith("# ")


def test_no_lines_and_errors_are_one_line(capsys):
    # below λ_c(2p) = 4.54 bohr no n = 2 level but 1s is bound: no line
    assert main(["lines", "--family", "yukawa", "--strength", "1", "--screening-length", "3", "--n-max", "2"]) == 0
    assert "no lines" in capsys.readouterr().out
    assert main([*ARGS, "--n-max", "1"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "--n-max" in err[0]
    assert main([*ARGS, "--n-max", "3", "--l-max", "0"]) == 2
    assert "--l-max" in capsys.readouterr().err
