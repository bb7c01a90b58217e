"""Family parameters in a sweep: fixed under ``potential:``, checked with one-line errors naming the
key, carried by the cube as scalar coordinates with units and long names (a CF checker finds
nothing), and the cube's numbers are the engine's at those parameters.  Also: README's family
table and the cube's family names keep up with the registry."""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest

import boundscape as bs
from boundscape import sweep
from boundscape.errors import InputError
from boundscape.physics.units import BOHR_M, BOHR_UDUNITS
from test_cube_lines import build

WS = {"sweep": "ws", "potential": {"family": "woods_saxon", "diffuseness": 0.5},
      "grid": {"strength": [2.0, 5.0], "screening_length": [1.0, 3.0], "l": [0, 1], "n_r_max": 3},
      "tiles": {"cells": 4}}
TWO = {"sweep": "mt", "potential": {"family": "two_yukawa", "core_strength": 0.5, "core_range": 0.3},
       "grid": {"strength": [1.0], "screening_length": [4.7, 6.0], "l": [1], "n_r_max": 1},
       "resonances": True, "tiles": {"cells": 2}}


@pytest.fixture(scope="module")
def ws_cube(tmp_path_factory):
    return build(tmp_path_factory.mktemp("ws"), sweep.validate_config(WS))


def test_the_cube_carries_the_diffuseness_as_a_scalar_coordinate(ws_cube):
    ds, _ = ws_cube
    a = ds["diffuseness"]
    assert a.dims == () and float(a) == 0.5 and "diffuseness" in ds.coords
    assert a.attrs["units"] == BOHR_UDUNITS and a.attrs["length_unit_in_m"] == BOHR_M
    assert "diffuseness" in a.attrs["long_name"]
    # the numbers are the engine's at that diffuseness
    for i, depth in enumerate(ds.strength.values):
        for j, radius in enumerate(ds.screening_length.values):
            for k, l in enumerate(ds.l.values):
                res = bs.bound_levels(bs.potential("woods_saxon", depth, radius, diffuseness=0.5), int(l), n_r_max=3)
                got = ds.energy.values[i, j, k, : len(res.energy)]
                assert np.array_equal(got, res.energy) and int(ds.num_bound.values[i, j, k]) == res.num_bound
    lam_c = bs.critical_screening_length("woods_saxon", 5.0, 1, 0, diffuseness=0.5)
    assert ds.critical_screening_length.sel(strength=5.0, l=1, n_r=0).item() == lam_c


def test_a_cf_checker_finds_nothing(ws_cube, cf_findings):
    _, path = ws_cube
    assert cf_findings(path) == []


def test_defaults_and_resonances_of_a_two_yukawa_sweep(tmp_path):
    ds, _ = build(tmp_path, sweep.validate_config(TWO))
    assert float(ds.core_strength) == 0.5 and float(ds.core_range) == 0.3
    assert ds.core_range.attrs["units"] == "1" and "core" in ds.core_range.attrs["long_name"]
    # the 2p is lost at λ_c ≈ 4.94 bohr: at 4.7 it is a resonance, the engine's at these parameters
    pot = bs.potential("two_yukawa", 1.0, 4.7, core_strength=0.5, core_range=0.3)
    res = bs.resonances(pot, 1, n_r_max=1)
    assert ds.resonance_energy.sel(strength=1.0, screening_length=4.7, l=1, n_r=0).item() == res.energy[0]
    assert ds.num_bound.sel(strength=1.0, screening_length=6.0, l=1).item() == 1
    # a sweep without the parameters takes the family's defaults, and records them
    config = sweep.validate_config({**TWO, "potential": {"family": "two_yukawa"}, "resonances": False})
    plan = sweep.plan(config)
    assert plan.engine["core_strength"] == bs.family_parameters("two_yukawa")[0].default


@pytest.mark.parametrize("potential, key, words", [
    ({"family": "woods_saxon"}, "potential.diffuseness", "required"),
    ({"family": "yukawa", "diffuseness": 0.6}, "potential.diffuseness", "takes no parameters"),
    ({"family": "ion_sphere", "core_range": 0.5}, "potential.core_range", "no parameter"),
    ({"family": "woods_saxon", "diffuseness": -0.5}, "potential.diffuseness", "minimum"),
    ({"family": "woods_saxon", "diffuseness": "thin"}, "potential.diffuseness", "number"),
    ({"family": "two_yukawa", "core_strength": -1}, "potential.core_strength", "minimum"),
    ({"family": "two_yukawa", "core_range": 0}, "potential.core_range", "minimum")])
def test_config_errors_name_the_key(potential, key, words):
    with pytest.raises(InputError) as info:
        sweep.validate_config({**WS, "potential": potential})
    text = str(info.value)
    assert text.startswith(f"config key {key}:") and words in text and "\n" not in text, text


def test_readme_family_table_lists_every_family_and_its_parameters():
    readme = (Path(__file__).parents[1] / "README.md").read_text()
    table = readme[readme.index("| family |"):]
    table = table[: table.index("\n\n")]
    rows = {m.group(1): line for line in table.splitlines() if (m := re.match(r"\| `(\w+)` \|", line))}
    assert set(rows) == set(bs.FAMILIES), sorted(set(rows) ^ set(bs.FAMILIES))
    for name, info in bs.FAMILIES.items():
        for q in info.parameters:
            assert f"`{q.name}`" in rows[name], (name, q.name)


def test_the_cube_names_every_family_as_the_family_does():
    from boundscape.cube.model import family_title

    for name, info in bs.FAMILIES.items():
        assert family_title(name) == info.display_name, name
    assert family_title("not_a_family") == "not_a_family"
