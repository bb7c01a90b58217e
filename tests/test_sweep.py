"""Configuration checks and the plan of tiles (boundscape.sweep): no physics, no engine."""

from __future__ import annotations

import copy
from pathlib import Path

import numpy as np
import pytest
import yaml

from boundscape import sweep
from boundscape.errors import InputError

REPO = Path(__file__).resolve().parents[1]
# A sweep over screening lengths under the plasma preset (the demo before it ran over n_e x T_e):
# the checks of the engine's own axes are made on it.
DEMO = {"sweep": "demo", "potential": {"family": "yukawa", "mass": 1.0},
        "grid": {"strength": [1, 2, 3, 4, 5, 6], "screening_length": {"start": 0.3, "stop": 300, "num": 48,
                                                                      "spacing": "log"},
                 "l": [0, 1, 2, 3], "n_r_max": 8},
        "resonances": True, "lines": ["1s-2p", "2s-3p", "2p-3d", "1s-3p"], "tiles": {"cells": 96},
        "preset": {"kind": "plasma", "species": "electrons", "temperature_eV": 20.0}}


def mutated(change):
    config = copy.deepcopy(DEMO)
    change(config)
    return config


@pytest.mark.parametrize("path", sorted((REPO / "config").glob("**/*.yaml")), ids=lambda p: p.name)
def test_shipped_configs_are_valid(path):
    plan = sweep.plan(sweep.load_config(path))
    assert plan.num_cells > 0 and len(plan.tiles) >= 1


def test_large_sweep_has_at_least_20000_cells():
    # The benchmark sweep must be the size the benchmark reports.
    assert sweep.plan(sweep.load_config(REPO / "config" / "sweeps" / "large.yaml")).num_cells >= 20_000


@pytest.mark.parametrize("change, key", [
    (lambda c: c["grid"].update(foo=1), "grid"),
    (lambda c: c.update(colour="red"), "config"),
    (lambda c: c["potential"].update(mass=0), "potential.mass"),
    (lambda c: c["potential"].update(mass="heavy"), "potential.mass"),
    (lambda c: c["grid"]["screening_length"].update(start=-1.0), "grid.screening_length.start"),
    (lambda c: c["grid"]["screening_length"].update(spacing="cubic"), "grid.screening_length.spacing"),
    (lambda c: c["grid"].update(strength=[1, 0]), "grid.strength.1"),
    (lambda c: c["grid"].update(l=[0, 1.5]), "grid.l.1"),
    (lambda c: c["grid"].update(l=[-1]), "grid.l.0"),
    (lambda c: c["grid"].update(n_r_max=0), "grid.n_r_max"),
    (lambda c: c["tiles"].update(cells=0), "tiles.cells"),
    (lambda c: c["grid"].pop("l"), "grid"),
    (lambda c: c["potential"].update(family="yukava"), "potential.family"),
    (lambda c: c["potential"].update(table="core.csv"), "potential.table"),
    (lambda c: c["potential"].update(family="tabulated"), "potential.table"),
    (lambda c: c["grid"].update(strength=[1, 2, 2]), "grid.strength"),
    (lambda c: c["grid"].update(l={"start": 3, "stop": 1}), "grid.l"),
    (lambda c: c["grid"].update(screening_length=[1.0, float("inf")]), "grid.screening_length"),
])
def test_bad_config_is_one_line_naming_the_key(change, key):
    with pytest.raises(InputError) as info:
        sweep.plan(mutated(change))
    message = str(info.value)
    assert "\n" not in message
    assert (f"config key {key}" in message) if key != "config" else message.startswith("config:")


def test_log_axis_has_constant_ratio_and_exact_ends():
    # Geometric progression: x_k = start·q^k, q = (stop/start)^(1/(num-1)) (handbook formula).
    plan = sweep.plan(DEMO)
    lam = plan.screening_length
    q = (300 / 0.3) ** (1 / 47)
    assert lam.size == 48
    np.testing.assert_allclose(lam[1:] / lam[:-1], q, rtol=1e-12)
    assert lam[0] == pytest.approx(0.3, rel=1e-15) and lam[-1] == pytest.approx(300, rel=1e-15)


def test_linear_and_range_axes():
    config = mutated(lambda c: c["grid"].update(strength={"start": 1, "stop": 2, "num": 5},
                                                l={"start": 0, "stop": 3}))
    plan = sweep.plan(config)
    np.testing.assert_array_equal(plan.strength, [1.0, 1.25, 1.5, 1.75, 2.0])
    np.testing.assert_array_equal(plan.l, [0, 1, 2, 3])


@pytest.mark.parametrize("cells", [1, 3, 7, 50, 192, 500, 10_000])
def test_tiles_cover_every_cell_once(cells):
    plan = sweep.plan(mutated(lambda c: c["tiles"].update(cells=cells)))
    count = np.zeros((plan.strength.size, plan.screening_length.size), int)
    for tile in plan.tiles:
        s, j = slice(*tile.strength_slice), list(tile.screening_length_index)
        count[s, j] += 1
        np.testing.assert_array_equal(tile.strength, plan.strength[s])
        np.testing.assert_array_equal(tile.screening_length, plan.screening_length[j])
        # A tile never exceeds its budget, except that one (strength, λ) row of every l is indivisible.
        assert len(tile.strength) * len(tile.screening_length) * plan.l.size <= max(cells, plan.l.size)
    assert np.all(count == 1)
    blocks = np.zeros(plan.strength.size, int)
    for block in plan.critical_blocks:
        blocks[slice(*block.strength_slice)] += 1
    assert np.all(blocks == 1)


def test_adding_a_strength_leaves_existing_tiles_unchanged():
    # What lets Snakemake's params trigger rerun only the new tiles.
    before = sweep.plan(DEMO)
    after = sweep.plan(mutated(lambda c: c["grid"].update(strength=[1, 2, 3, 4, 5, 6, 7])))
    old = [before.tile_spec(t) for t in before.tiles]
    new = [after.tile_spec(t) for t in after.tiles]
    assert new[:len(old)] == old and len(new) > len(old)


def test_tile_spec_changes_with_engine_settings():
    before = sweep.plan(DEMO)
    after = sweep.plan(mutated(lambda c: c["grid"].update(n_r_max=9)))
    assert all(before.tile_spec(a) != after.tile_spec(b) for a, b in zip(before.tiles, after.tiles))


def test_config_text_round_trips_with_its_hash():
    import hashlib

    text, sha = sweep.config_text(sweep.validate_config(DEMO))
    assert hashlib.sha256(text.encode()).hexdigest() == sha  # FIPS 180-4 via hashlib
    assert yaml.safe_load(text)["grid"]["n_r_max"] == DEMO["grid"]["n_r_max"]


def test_missing_or_broken_config_file(tmp_path):
    with pytest.raises(InputError, match="does not exist"):
        sweep.load_config(tmp_path / "nope.yaml")
    broken = tmp_path / "broken.yaml"
    broken.write_text("sweep: [unclosed\n")
    with pytest.raises(InputError, match="not valid YAML"):
        sweep.load_config(broken)


def test_plan_step_prints_the_plan_and_errors_in_one_line(tmp_path):
    import subprocess
    import sys

    ok = subprocess.run([sys.executable, "-m", "boundscape.cli.steps", "plan", "--config", str(REPO / "config" / "config.yaml")],
                        capture_output=True, text=True, check=True)
    plan = sweep.plan(sweep.load_config(REPO / "config" / "config.yaml"))
    assert f"{plan.num_cells} cells" in ok.stdout and f"{len(plan.tiles)} tiles" in ok.stdout
    bad = tmp_path / "bad.yaml"
    bad.write_text(yaml.safe_dump(mutated(lambda c: c["potential"].update(family="yukava"))))
    run = subprocess.run([sys.executable, "-m", "boundscape.cli.steps", "plan", "--config", str(bad)],
                         capture_output=True, text=True)
    assert run.returncode == 2 and run.stdout == ""
    assert run.stderr.count("\n") == 1 and "potential.family" in run.stderr and "Traceback" not in run.stderr


# ---------------------------------------------------------------------------------------------
# Wrong types: one line naming the key and the bad value, also through Snakemake.

WRONG_TYPES = [
    ("strength", "abc", "grid.strength", "'abc'"),
    ("screening_length", [1, -2, 3], "grid.screening_length.1", "-2"),
    ("strength", [1, 0], "grid.strength.1", "0"),
    ("strength", [1, "two"], "grid.strength.1", "'two'"),
    ("l", "zero", "grid.l", "'zero'"),
    ("n_r_max", [3], "grid.n_r_max", "[3]"),
]


@pytest.mark.parametrize("name, value, key, shown", WRONG_TYPES)
def test_wrong_type_names_the_key_and_the_value(name, value, key, shown):
    with pytest.raises(InputError) as info:
        sweep.validate_config(mutated(lambda c: c["grid"].update({name: value})))
    message = str(info.value)
    assert "\n" not in message and f"config key {key}:" in message and shown in message, message


def test_wrong_types_stop_snakemake_with_one_line(tmp_path):
    import shutil
    import subprocess
    import sys

    shutil.copytree(REPO / "workflow", tmp_path / "workflow")
    (tmp_path / "config").mkdir()
    for name, value, key, shown in WRONG_TYPES[:4]:
        (tmp_path / "config" / "config.yaml").write_text(yaml.safe_dump(mutated(lambda c: c["grid"].update({name: value}))))
        run = subprocess.run([sys.executable, "-m", "snakemake", "-n"], cwd=tmp_path, capture_output=True, text=True,
                             timeout=120)
        assert run.returncode != 0
        lines = [line for line in run.stderr.splitlines() if line.startswith("boundscape:")]
        assert len(lines) == 1 and f"config key {key}:" in lines[0] and shown in lines[0], run.stderr[-800:]
        assert "Error" not in run.stderr.replace(lines[0], ""), run.stderr[-800:]


# ---------------------------------------------------------------------------------------------
# A bad potential table stops the sweep at validation, naming the file and the line.

def _table_config(path, **pot):
    config = mutated(lambda c: c["potential"].update(family="tabulated", table=str(path), screened=True, **pot))
    config.pop("preset")
    return config


def _yukawa_rows(points=40):
    r = np.geomspace(0.01, 60.0, points)
    return r, -np.exp(-r / 2.0) / r


def _write_table(path, r, v, header=True):
    lines = (["# a screened well", "r,V"] if header else []) + [f"{float(a)!r},{float(b)!r}" for a, b in zip(r, v)]
    path.write_text("\n".join(lines) + "\n")
    return 3 if header else 1  # file line of the first point


@pytest.mark.parametrize("defect, point, words", [
    ("nan", 7, "NaN"),
    ("decreasing", 12, "sorted ascending"),
    ("repeated", 20, "repeated radius"),
    ("short_tail", 39, "tail"),
])
def test_bad_table_is_rejected_at_validation_naming_file_and_line(tmp_path, defect, point, words):
    r, v = _yukawa_rows()
    if defect == "nan":
        v[point] = np.nan
    elif defect == "decreasing":
        r[point] = r[point - 1] * 0.9
    elif defect == "repeated":
        r[point] = r[point - 1]
    else:
        r = np.geomspace(0.01, 5.0, 40)  # cut where |V| r² is still large
        v = -np.exp(-r / 2.0) / r
    path = tmp_path / "well.csv"
    first = _write_table(path, r, v)
    with pytest.raises(InputError) as info:
        sweep.plan(_table_config(path))
    message = str(info.value)
    assert "\n" not in message and "config key potential.table" in message
    assert f"{path}, line {first + point}" in message and words in message, message


def test_empty_table_gives_the_message_alone(tmp_path):
    import warnings

    for text in ("", "# r,V\n", "r,V\n"):
        path = tmp_path / "empty.csv"
        path.write_text(text)
        with warnings.catch_warnings():
            warnings.simplefilter("error")  # numpy's "input contained no data" must not appear
            with pytest.raises(InputError, match="empty.csv: no data"):
                sweep.plan(_table_config(path))


def test_good_table_passes_validation(tmp_path):
    r, v = _yukawa_rows(200)
    path = tmp_path / "well.csv"
    _write_table(path, r, v, header=False)
    assert sweep.plan(_table_config(path)).num_cells > 0


def test_bad_table_stops_snakemake_before_any_job(tmp_path):
    import shutil
    import subprocess
    import sys

    r, v = _yukawa_rows()
    v[5] = np.nan
    _write_table(tmp_path / "well.csv", r, v)
    shutil.copytree(REPO / "workflow", tmp_path / "workflow")
    (tmp_path / "config").mkdir()
    (tmp_path / "config" / "config.yaml").write_text(yaml.safe_dump(_table_config(tmp_path / "well.csv")))
    run = subprocess.run([sys.executable, "-m", "snakemake", "--cores", "1"], cwd=tmp_path, capture_output=True,
                         text=True, timeout=120)
    assert run.returncode != 0 and not (tmp_path / "results").exists()
    lines = [line for line in run.stderr.splitlines() if line.startswith("boundscape:")]
    assert len(lines) == 1 and "well.csv, line 8" in lines[0], run.stderr[-800:]


# ---------------------------------------------------------------------------------------------
# Families without a screening length: the axis is not required, and not accepted.

@pytest.mark.parametrize("family", ["coulomb", "harmonic"])
def test_families_without_a_screening_length_need_no_axis(family):
    config = mutated(lambda c: (c["potential"].update(family=family), c["grid"].pop("screening_length")))
    config.pop("preset")
    config.pop("resonances", None)  # nothing is lost with a Coulomb or confining tail (tested beside resonances)
    plan = sweep.plan(config)
    assert plan.screening_length.tolist() == [float("inf")]
    assert plan.num_cells == plan.strength.size * plan.l.size
    with pytest.raises(InputError, match="config key grid.screening_length: family .* has no screening length"):
        sweep.plan(mutated(lambda c: c["potential"].update(family=family)))


def test_families_with_a_screening_length_still_need_the_axis():
    with pytest.raises(InputError, match="config key grid.screening_length: family yukawa needs"):
        sweep.plan(mutated(lambda c: c["grid"].pop("screening_length")))


# ---------------------------------------------------------------------------------------------
# The reduced mass: from the preset where it says so, never applied twice.

def test_plasma_reduced_mass_reaches_the_engine():
    config = mutated(lambda c: (c["potential"].pop("mass"), c["preset"].update(reduced_mass=0.9994557)))
    plan = sweep.plan(config)
    assert plan.engine["mass"] == 0.9994557
    assert all(plan.tile_spec(t)["mass"] == 0.9994557 for t in plan.tiles)
    with pytest.raises(InputError, match="config key potential.mass: 1 differs from preset.reduced_mass"):
        sweep.plan(mutated(lambda c: c["preset"].update(reduced_mass=0.9994557)))


SEMI = {"kind": "semiconductor", "effective_mass": 0.067, "permittivity": 12.9}


def test_effective_units_refuse_a_second_effective_mass():
    with pytest.raises(InputError, match="config key potential.mass: .*μ\\* would count twice"):
        sweep.plan(mutated(lambda c: (c.update(preset=dict(SEMI)), c["potential"].update(mass=0.067))))
    plan = sweep.plan(mutated(lambda c: (c.update(preset=dict(SEMI)), c["potential"].pop("mass"))))
    assert plan.engine["mass"] == 1.0


def test_atomic_units_take_mu_star_from_the_preset():
    # Exciton reduced mass μ = m_e m_h/(m_e + m_h) (Yu & Cardona, §6.3): GaAs-like 0.067, 0.5.
    preset = {**SEMI, "units": "atomic", "hole_mass": 0.5}
    plan = sweep.plan(mutated(lambda c: (c.update(preset=preset), c["potential"].pop("mass"))))
    assert plan.engine["mass"] == pytest.approx(0.067 * 0.5 / 0.567, rel=1e-14)


def test_nuclear_couplings_in_MeV_fm():
    # Engine strength of a coupling g²: g² μc² b/(ħc)² (mass 1, b = 1 fm), ħc from CODATA via scipy.
    from scipy.constants import physical_constants

    hbar_c = physical_constants["reduced Planck constant times c in MeV fm"][0]
    config = mutated(lambda c: (c.update(preset={"kind": "nuclear", "reduced_mass_MeV": 469.4591}),
                                c["grid"].pop("strength"), c["grid"].update(coupling_MeV_fm=[40.0, 60.0])))
    plan = sweep.plan(config)
    np.testing.assert_allclose(plan.strength, np.array([40.0, 60.0]) * 469.4591 / hbar_c ** 2, rtol=1e-12)
    with pytest.raises(InputError, match="exactly one of strength and coupling_MeV_fm"):
        sweep.plan(mutated(lambda c: (c.update(preset={"kind": "nuclear"}), c["grid"].update(coupling_MeV_fm=[1.0]))))
    with pytest.raises(InputError, match="needs preset kind nuclear"):
        sweep.plan(mutated(lambda c: (c["grid"].pop("strength"), c["grid"].update(coupling_MeV_fm=[1.0]))))
    with pytest.raises(InputError, match="leave potential.mass at 1"):
        sweep.plan(mutated(lambda c: (c.update(preset={"kind": "nuclear"}), c["potential"].update(mass=2.0))))
