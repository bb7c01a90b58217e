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
DEMO = yaml.safe_load((REPO / "config" / "config.yaml").read_text())


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
    plan = sweep.plan(DEMO)
    assert f"{plan.num_cells} cells" in ok.stdout and f"{len(plan.tiles)} tiles" in ok.stdout
    bad = tmp_path / "bad.yaml"
    bad.write_text(yaml.safe_dump(mutated(lambda c: c["potential"].update(family="yukava"))))
    run = subprocess.run([sys.executable, "-m", "boundscape.cli.steps", "plan", "--config", str(bad)],
                         capture_output=True, text=True)
    assert run.returncode == 2 and run.stdout == ""
    assert run.stderr.count("\n") == 1 and "potential.family" in run.stderr and "Traceback" not in run.stderr
