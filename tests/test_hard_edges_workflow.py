"""Hard edges of the sweep workflow: sweeps of 10,000 tiles and more, grids over a limit,
broken parts (a tile truncated, a tile copied over another), a results folder that cannot be
written, and cells whose bound-state count is unknown."""

from __future__ import annotations

import contextlib
import json
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import netCDF4
import numpy as np
import pytest
import yaml

from boundscape import engine, sweep
from boundscape.cli import steps
from boundscape.cube.collect import collect
from boundscape.cube.model import NUM_BOUND_UNKNOWN
from boundscape.errors import ConvergenceError, InputError
from boundscape.sweep.limits import L_LIMIT, LIMITS, N_R_MAX_LIMIT
from test_workflow import ARRAYS, TINY, load, snakemake, with_changes

REPO = Path(__file__).resolve().parents[1]


def one_cell_tiles(num_tiles):
    """A sweep of ``num_tiles`` one-cell tiles (a valid Yukawa sweep: λ one value, l = 0)."""
    return {"sweep": "many", "potential": {"family": "yukawa"},
            "grid": {"strength": {"start": 1.0, "stop": 2.0, "num": num_tiles}, "screening_length": [10.0],
                     "l": [0], "n_r_max": 1},
            "tiles": {"cells": 1}}


def rule_constraint(name):
    text = (REPO / "workflow" / "rules" / "solve.smk").read_text()
    return re.compile(re.search(rf'{name}=r"([^"]+)"', text).group(1))


# -- scale ------------------------------------------------------------------------------------

def test_ten_thousand_tiles_and_more_are_named_and_matched_by_the_rules():
    plan = sweep.plan(one_cell_tiles(10_001))
    names = [tile.name for tile in plan.tiles]
    assert len(names) == len(set(names)) == 10_001
    assert names[:2] == ["0000", "0001"] and names[9_999:] == ["9999", "10000"]   # 4 digits kept, then more
    tile, block = rule_constraint("tile"), rule_constraint("block")
    assert all(tile.fullmatch(name) for name in names)
    assert block.fullmatch("10000") and block.fullmatch("0000") and not block.fullmatch("000")
    paths = plan.tile_paths("results/many")
    assert paths[-1] == "results/many/tiles/tile_10000.nc" and len(set(paths)) == len(paths)


@pytest.mark.workflow
def test_snakemake_plans_ten_thousand_one_cell_tiles(tmp_path):
    (tmp_path / "sweep.yaml").write_text(yaml.safe_dump(one_cell_tiles(10_001)))
    run = subprocess.run([sys.executable, "-m", "snakemake", "-n", "--snakefile", str(REPO / "workflow" / "Snakefile"),
                          "--directory", str(tmp_path), "--configfile", str(tmp_path / "sweep.yaml"), "--cores", "2",
                          "results/many/levels.nc"], capture_output=True, text=True, timeout=600)
    assert run.returncode == 0, run.stdout[-3000:] + run.stderr[-3000:]
    stats = dict(line.split() for line in run.stdout.splitlines()
                 if line.startswith(("solve_tile ", "criticals ", "check_parts ", "collect ")))
    assert stats == {"solve_tile": "10001", "criticals": "1", "check_parts": "1", "collect": "1"}
    # Every job's command fits the 128 KiB one shell command may hold (Linux MAX_ARG_STRLEN):
    # the parts' paths are not on collect's command line.
    commands = [line for line in run.stdout.splitlines() if "boundscape.cli.steps" in line]
    assert commands and max(map(len, commands)) < 131_072


def test_a_grid_over_the_cell_limit_is_refused_before_anything_is_built():
    config = with_changes(grid__strength={"start": 1.0, "stop": 2.0, "num": 10**9})
    with pytest.raises(InputError) as info:
        sweep.plan(config)   # 8 GB of strengths if it built the axis
    message = str(info.value)
    assert message.startswith("config key grid: 10,000,000,000 cells") and "limit of 10,000,000" in message
    assert "limits.max_cells" in message
    # The limit is a config key: the 20-cell tiny sweep under a 19-cell limit, and at 20.
    with pytest.raises(InputError, match="20 cells .* limit of 19 "):
        sweep.plan({**TINY, "limits": {"max_cells": 19}})
    assert sweep.plan({**TINY, "limits": {"max_cells": 20}}).num_cells == 20
    assert LIMITS["max_cells"] == 10_000_000


def test_too_many_tiles_are_refused_with_a_tile_size_that_fits():
    config = {**one_cell_tiles(60_000), "limits": {"max_tiles": 50_000}}
    with pytest.raises(InputError) as info:
        sweep.plan(config)
    message = str(info.value)
    assert "60,000 tiles (jobs), over the limit of 50,000 (limits.max_tiles)" in message
    cells = int(re.search(r"at least (\d+)", message.replace(",", "")).group(1))
    assert len(sweep.plan({**config, "tiles": {"cells": cells}}).tiles) <= 50_000


@pytest.mark.parametrize("change, key", [
    ({"grid__n_r_max": N_R_MAX_LIMIT + 1}, "grid.n_r_max"),
    ({"grid__n_r_max": 100_000}, "grid.n_r_max"),
    ({"grid__l": [0, L_LIMIT + 1]}, "grid.l"),
    ({"grid__l": {"start": 0, "stop": 100_000}}, "grid.l"),
])
def test_levels_per_l_and_l_are_capped_with_the_reason(change, key):
    config = with_changes(**change)
    with pytest.raises(InputError) as info:
        sweep.plan(config)
    assert str(info.value).startswith(f"config key {key}: ") and "over the limit of" in str(info.value)
    assert "(" in str(info.value)   # the reason
    # The schema says so too (Snakemake validates against it).
    assert sweep.schema_error(config) is not None
    assert sweep.plan(with_changes(grid__n_r_max=N_R_MAX_LIMIT)).n_r_max == N_R_MAX_LIMIT


@pytest.mark.workflow
def test_snakemake_refuses_a_billion_cells_in_one_line(tmp_path):
    config = with_changes(grid__strength={"start": 1.0, "stop": 2.0, "num": 10**8})
    run = snakemake(tmp_path, config, "-n", "--cores", "1", check=False, timeout=120)
    assert run.returncode != 0
    lines = [line for line in run.stderr.splitlines() if line.startswith("boundscape:")]
    assert lines and "1,000,000,000 cells" in lines[0] and "limits.max_cells" in lines[0], run.stderr[-2000:]
    assert "Traceback" not in run.stderr and not (tmp_path / "results").exists()


# -- broken parts and folders ----------------------------------------------------------------

@pytest.fixture(scope="module")
def tiny(tmp_path_factory):
    workdir = tmp_path_factory.mktemp("edges")
    snakemake(workdir, TINY, "--cores", "2")
    return workdir, load(workdir / "results" / "tiny" / "levels.nc")


def assert_same_cube(path, reference):
    ds = load(path)
    for var in ARRAYS:
        np.testing.assert_array_equal(ds[var].values, reference[var].values, err_msg=var)


def truncate_to_half(path):
    size = path.stat().st_size
    with open(path, "r+b") as f:
        f.truncate(size // 2)


@contextlib.contextmanager
def read_only(path):
    """``path`` made unwritable: chmod for a user; for root, whom chmod does not stop, the
    immutable attribute (skips where the file system has none)."""
    if os.geteuid() != 0:
        mode = path.stat().st_mode
        path.chmod(mode & ~0o222)
        try:
            yield
        finally:
            path.chmod(mode)
        return
    if shutil.which("chattr") is None or subprocess.run(["chattr", "+i", str(path)]).returncode != 0:
        pytest.skip("cannot make a file read-only for root here (no chattr +i)")
    try:
        yield
    finally:
        subprocess.run(["chattr", "-i", str(path)], check=True)


@pytest.mark.workflow
def test_a_truncated_tile_is_solved_again_and_the_cube_is_complete(tiny):
    workdir, reference = tiny
    tile = workdir / "results" / "tiny" / "tiles" / "tile_0002.nc"
    truncate_to_half(tile)
    snakemake(workdir, TINY, "--cores", "2")
    log = (workdir / "results" / "tiny" / "logs" / "check_parts.log").read_text()
    assert f"results/tiny/tiles/tile_0002.nc: does not read back" in log and "solving it again" in log
    assert "1 solved again" in log
    assert_same_cube(workdir / "results" / "tiny" / "levels.nc", reference)
    again = snakemake(workdir, TINY, "-n", "--cores", "2")
    assert "Nothing to be done" in again.stdout + again.stderr


@pytest.mark.workflow
def test_a_tile_copied_over_another_is_solved_again(tiny):
    workdir, reference = tiny
    tiles = workdir / "results" / "tiny" / "tiles"
    shutil.copyfile(tiles / "tile_0001.nc", tiles / "tile_0004.nc")
    snakemake(workdir, TINY, "--cores", "2")
    log = (workdir / "results" / "tiny" / "logs" / "check_parts.log").read_text()
    assert "tile_0004.nc: was computed for other cells or settings than the plan's" in log
    assert_same_cube(workdir / "results" / "tiny" / "levels.nc", reference)


@pytest.mark.workflow
def test_a_failed_check_leaves_the_previous_cube_in_place(tiny):
    workdir, reference = tiny
    if os.geteuid() != 0:
        pytest.skip("a file that cannot be replaced needs root's immutable attribute")
    cube = workdir / "results" / "tiny" / "levels.nc"
    tile = workdir / "results" / "tiny" / "tiles" / "tile_0003.nc"
    truncate_to_half(tile)
    with read_only(tile):   # so the broken tile cannot be rewritten: the check step fails
        run = snakemake(workdir, TINY, "--cores", "2", check=False)
    assert run.returncode != 0
    log = (workdir / "results" / "tiny" / "logs" / "check_parts.log").read_text().splitlines()
    assert log[-1].startswith("boundscape: error: cannot write") and "tile_0003.nc" in log[-1]
    assert cube.is_file(), "the good cube was removed before its replacement was complete"
    assert_same_cube(cube, reference)
    snakemake(workdir, TINY, "--cores", "2")   # writable again: the rerun recovers
    assert_same_cube(cube, reference)


@pytest.mark.workflow
def test_a_read_only_results_folder_is_one_line(tiny):
    workdir, reference = tiny
    results = workdir / "results" / "tiny"
    truncate_to_half(results / "tiles" / "tile_0000.nc")   # the check and collect must run again
    with read_only(results):
        run = snakemake(workdir, TINY, "--cores", "2", check=False)
    assert run.returncode != 0
    assert "Traceback" not in run.stdout + run.stderr
    lines = [line for line in run.stderr.splitlines() if line.startswith("boundscape:")]
    assert lines == ["boundscape: results folder 'results/tiny' is not writable; make it writable (or run in "
                     "another directory)"]
    assert_same_cube(results / "levels.nc", reference)
    snakemake(workdir, TINY, "--cores", "2")   # writable again: the rerun recovers
    assert_same_cube(results / "levels.nc", reference)


def test_a_step_that_cannot_write_is_one_line(tmp_path, capsys):
    plan = sweep.plan(TINY)
    folder = tmp_path / "tiles"
    folder.mkdir()
    with read_only(folder):
        status = steps.main(["solve-tile", "--spec", json.dumps(plan.tile_spec(plan.tiles[0])),
                             "--output", str(folder / "tile_0000.nc")])
    err = capsys.readouterr().err
    assert status == 2 and len(err.splitlines()) == 1
    assert err.startswith(f"boundscape: error: cannot write '{folder / 'tile_0000.nc'}'")


# -- unknown counts -----------------------------------------------------------------------------

@pytest.fixture(scope="module")
def failed_cells(tmp_path_factory):
    """A tiny cube with one cell whose solve failed (2.0, 5 bohr, l = 1) and one (strength, λ)
    whose input the engine rejected (1.0, 50 bohr; both l), built through the workflow's steps."""
    tmp_path = tmp_path_factory.mktemp("failed")
    monkeypatch = pytest.MonkeyPatch()
    real_levels, real_potential = engine.bound_levels, engine.potential_from_spec
    lam = float(sweep.plan(TINY).screening_length[2])   # the middle λ, 5 bohr

    def bound_levels(pot, l, n_r_max=None, wavefunctions=False):
        if pot.strength == 2.0 and l == 1 and abs(pot.screening_length - lam) < 1e-9:
            raise ConvergenceError("energy tolerance 1e-12 not met after 6 grid refinements")
        return real_levels(pot, l, n_r_max=n_r_max, wavefunctions=wavefunctions)

    def potential_from_spec(spec, strength, screening_length):
        if strength == 1.0 and screening_length == 50.0:
            raise InputError("rejected for the test")
        return real_potential(spec, strength, screening_length)

    monkeypatch.setattr(engine, "bound_levels", bound_levels)
    monkeypatch.setattr(engine, "potential_from_spec", potential_from_spec)
    try:
        plan = sweep.plan(TINY)
        tiles = [tmp_path / f"tile_{t.name}.nc" for t in plan.tiles]
        blocks = [tmp_path / f"criticals_{b.name}.nc" for b in plan.critical_blocks]
        for tile, path in zip(plan.tiles, tiles):
            assert steps.main(["solve-tile", "--spec", json.dumps(plan.tile_spec(tile)), "--output", str(path)]) == 0
        for block, path in zip(plan.critical_blocks, blocks):
            assert steps.main(["criticals", "--spec", json.dumps(plan.critical_spec(block)),
                               "--output", str(path)]) == 0
        collect(sweep.validate_config(TINY), tiles, blocks, tmp_path / "levels.nc")
    finally:
        monkeypatch.undo()
    return tmp_path / "levels.nc", lam


def test_num_bound_of_a_failed_cell_is_the_fill_value(failed_cells):
    path, lam = failed_cells
    with netCDF4.Dataset(path) as nc:   # the file as stored
        var = nc.variables["num_bound"]
        var.set_auto_mask(False)
        raw = var[...]
        assert var.dtype == np.int32 and var.getncattr("_FillValue") == NUM_BOUND_UNKNOWN == -2147483647
        assert "unknown" in var.comment
    ds = load(path)   # as xarray reads it: CF masking gives NaN
    unknown = ds.num_bound.isnull()
    failed = dict(strength=2.0, screening_length=lam, l=1)
    rejected = dict(strength=1.0, screening_length=50.0)
    assert bool(unknown.sel(**failed)) and bool(unknown.sel(**rejected).all())
    assert int(unknown.sum()) == 3 == int((raw == NUM_BOUND_UNKNOWN).sum())
    assert bool((unknown == (ds.status != 0)).all())
    # Every other count is the engine's.
    spec = sweep.plan(TINY).tile_spec(sweep.plan(TINY).tiles[0])
    for Z, lam_j, l in ((1.0, lam, 0), (2.0, 50.0, 1), (2.0, lam, 0)):
        expected = engine.bound_levels(engine.potential_from_spec(spec, Z, lam_j), l, n_r_max=3).num_bound
        assert int(ds.num_bound.sel(strength=Z, screening_length=lam_j, l=l)) == expected
    # The threshold map leaves the unknown cells blank rather than drawing "0 states".
    from boundscape.plots.threshold_map import threshold_map

    count = threshold_map(ds, 1)[1]["count"]
    assert np.isnan(count[1, 2]) and np.isnan(count[0, 4]) and np.isfinite(count[0, 0])


def test_a_cube_with_unknown_counts_passes_the_cf_checker(failed_cells, cf_findings):
    # CF-1.10 section 2.5.1: a _FillValue of the variable's own type, outside its valid values.
    with netCDF4.Dataset(failed_cells[0]) as nc:
        assert nc.variables["num_bound"].getncattr("_FillValue").dtype == np.int32
    assert cf_findings(failed_cells[0]) == []
