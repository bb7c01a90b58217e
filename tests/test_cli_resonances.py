"""The ``boundscape resonances`` command: its JSON shape and its table, against the engine."""

from __future__ import annotations

import json
import math

import pytest

import boundscape as bs
from boundscape.cli.main import main

KEYS = ["n", "l", "n_r", "state", "kind", "energy_hartree", "width_hartree", "kappa_per_bohr", "status", "reason"]
ARGS = ["resonances", "--family", "yukawa", "--strength", "1", "--screening-length", "4.3"]


def run_json(capsys, *extra):
    assert main([*ARGS, *extra, "--format", "json"]) == 0
    return json.loads(capsys.readouterr().out)


def test_json_shape_and_values(capsys):
    out = run_json(capsys, "--l", "0-1", "--n-max", "3")
    assert out["potential"] == {"family": "yukawa", "strength": 1.0, "mass": 1.0, "screening_length_bohr": 4.3}
    rows = out["resonances"]
    assert all(list(row) == KEYS for row in rows)
    # n ≤ 3: 3s (l = 0, two s states bound) and 2p, 3p (no p state bound)
    assert [row["state"] for row in rows] == ["3s", "2p", "3p"]
    engine = bs.resonances(bs.potential("yukawa", 1.0, 4.3), 1, n_r_max=2)
    p2 = rows[1]
    assert p2 == {"n": 2, "l": 1, "n_r": 0, "state": "2p", "kind": "resonance", "energy_hartree": engine.energy[0],
                  "width_hartree": engine.width[0], "kappa_per_bohr": None, "status": "ok", "reason": ""}
    assert rows[2]["status"] == "dissolved" and rows[2]["energy_hartree"] is None and rows[2]["reason"]


def test_virtual_state_json(capsys):
    row = run_json(capsys, "--family", "square_well", "--strength", "1.1", "--screening-length", "1", "--l", "0",
                   "--n-max", "1")["resonances"][0]
    assert row["kind"] == "virtual" and row["width_hartree"] is None and row["status"] == "ok"
    assert row["energy_hartree"] == pytest.approx(-row["kappa_per_bohr"] ** 2 / 2, rel=1e-12)


def test_table_matches_the_levels_layout(capsys):
    assert main([*ARGS, "--l", "1", "--n-max", "2"]) == 0
    lines = capsys.readouterr().out.splitlines()
    levels_args = ["levels", *ARGS[1:], "--l", "1"]
    assert main(levels_args) == 0
    assert lines[0] == capsys.readouterr().out.splitlines()[0]  # the same title line as `levels`
    assert lines[0].startswith("# Yukawa, ") and "λ = 4.3 bohr" in lines[0]
    assert lines[1].split()[:4] == ["n", "l", "state", "kind"] and lines[1].rstrip().endswith("status")
    row = lines[2].split()
    assert row[:5] == ["2", "1", "p", "2p", "resonance"] and row[-1] == "ok"
    assert math.isclose(float(row[5]), bs.resonances(bs.potential("yukawa", 1.0, 4.3), 1, n_r_max=1).energy[0],
                        rel_tol=1e-13)
    assert lines[-1] == "# l=1 (p): 0 bound states; the states listed are past their thresholds"


def test_errors_are_one_line(capsys):
    assert main(["resonances", "--family", "coulomb", "--strength", "1", "--l", "1"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "coulomb tail" in err[0]
    assert main([*ARGS, "--n-max", "0"]) == 2
    assert "--n-max" in capsys.readouterr().err
