"""The sweep workflow end to end, on a tiny Yukawa sweep (2 strengths x 5 λ x 2 l):
lint, schema errors, agreement with the engine, consistency with the critical lengths,
determinism, resuming after a kill, reruns after a config change, isolated failures."""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest
import xarray as xr
import yaml

import boundscape as bs
from boundscape import engine, sweep
from boundscape.cli import steps
from boundscape.cube import read_part
from boundscape.cube.collect import collect
from boundscape.sweep import tiles
from boundscape.errors import ConvergenceError

pytestmark = pytest.mark.workflow

REPO = Path(__file__).resolve().parents[1]
TINY = {
    "sweep": "tiny",
    "potential": {"family": "yukawa", "mass": 1.0},
    # λ from 0.5 bohr (below the 1s critical length of Z = 1, 0.84 bohr) to 50 bohr.
    "grid": {"strength": [1.0, 2.0], "screening_length": {"start": 0.5, "stop": 50.0, "num": 5, "spacing": "log"},
             "l": [0, 1], "n_r_max": 3},
    "lines": ["1s-2p", "2s-3p"],
    "tiles": {"cells": 4},
}
ARRAYS = ("energy", "energy_error", "mean_radius", "num_bound", "status", "critical_screening_length",
          "critical_screening_length_flag", "line_energy", "oscillator_strength", "einstein_A", "line_shift",
          "line_status")


def with_changes(**changes):
    config = json.loads(json.dumps(TINY))
    for dotted, value in changes.items():
        *head, last = dotted.split("__")
        node = config
        for key in head:
            node = node[key]
        node[last] = value
    return config


def snakemake(workdir, config, *args, check=True, timeout=600):
    """Run the repository's Snakefile in ``workdir`` with ``config`` written beside it, up to the cube
    (the figures have their own tests)."""
    workdir.mkdir(parents=True, exist_ok=True)
    (workdir / "sweep.yaml").write_text(yaml.safe_dump(config))
    target = [] if "--unlock" in args else [f"results/{config['sweep']}/levels.nc"]
    command = [sys.executable, "-m", "snakemake", *target, "--snakefile", str(REPO / "workflow" / "Snakefile"),
               "--directory", str(workdir), "--configfile", str(workdir / "sweep.yaml"), *args]
    run = subprocess.run(command, capture_output=True, text=True, timeout=timeout)
    if check and run.returncode != 0:
        raise AssertionError(f"snakemake failed ({run.returncode}):\n{run.stdout[-3000:]}\n{run.stderr[-3000:]}")
    return run


def load(path):
    with xr.open_dataset(path) as ds:
        return ds.load()


@pytest.fixture(scope="module")
def tiny_run(tmp_path_factory):
    workdir = tmp_path_factory.mktemp("tiny")
    run = snakemake(workdir, TINY, "--cores", "2")
    return workdir, run, load(workdir / "results" / "tiny" / "levels.nc")


def tile_mtimes(workdir, sweep_name="tiny"):
    return {p.name: p.stat().st_mtime_ns for p in (workdir / "results" / sweep_name / "tiles").glob("tile_*.nc")}


def test_lint_is_clean():
    run = subprocess.run([sys.executable, "-m", "snakemake", "--lint", "--snakefile", str(REPO / "workflow" / "Snakefile"),
                          "--directory", str(REPO)], capture_output=True, text=True, timeout=300)
    output = run.stdout + run.stderr
    assert run.returncode == 0, output
    assert "Congratulations, your workflow is in a good condition!" in output
    assert "Lints for" not in output


def test_bad_config_stops_before_any_job(tmp_path):
    config = with_changes(grid__screening_length={"start": -1.0, "stop": 50.0, "num": 5})
    run = snakemake(tmp_path, config, "--cores", "1", check=False)
    assert run.returncode != 0
    message = [line for line in run.stderr.splitlines() if line.startswith("boundscape:")]
    assert message and "grid.screening_length" in message[0]
    assert not (tmp_path / "results").exists()


def test_summary_is_printed_at_the_end(tiny_run):
    _, run, _ = tiny_run
    out = run.stdout + run.stderr
    assert "sweep tiny: 20 cells (2 x 5 x 2)" in out and "not converged, rejected or not solved: 0" in out
    assert "cube: results/tiny/levels.nc" in out


def test_workflow_cube_passes_the_cf_checker(tiny_run, cf_findings):
    workdir, _, ds = tiny_run
    assert ds.attrs["Conventions"] == "CF-1.10" and ds.attrs["config_sha256"]
    assert cf_findings(workdir / "results" / "tiny" / "levels.nc") == []


def test_every_energy_equals_the_engine(tiny_run):
    _, _, ds = tiny_run
    for Z in ds.strength.values:
        for lam in ds.screening_length.values:
            pot = bs.potential("yukawa", float(Z), float(lam), 1.0)
            for l in ds.l.values:
                res = bs.bound_levels(pot, int(l), n_r_max=3)
                cell = ds.sel(strength=Z, screening_length=lam, l=l)
                expected = np.full(3, np.nan)
                expected[res.n_r] = res.energy
                np.testing.assert_array_equal(cell.energy.values, expected)
                assert int(cell.num_bound) == res.num_bound
    # Rogers, Graboske & Harwood, Phys. Rev. A 1, 1577 (1970): the 1s level of Z = 1 is lost at
    # λ = 1/1.19061 bohr, so λ = 0.5 has no bound s state and λ = 50 has one near -0.49 hartree.
    assert np.isnan(ds.energy.sel(strength=1.0, l=0, n_r=0).values[0])
    assert -0.5 < ds.energy.sel(strength=1.0, l=0, n_r=0).values[-1] < -0.47


def test_energies_are_finite_exactly_above_the_critical_length(tiny_run):
    _, _, ds = tiny_run
    assert (ds.status == 0).all()
    lam_c = ds.critical_screening_length  # (strength, l, n_r), from the engine's direct method
    bound = ds.screening_length > lam_c
    finite = np.isfinite(ds.energy)
    assert bool((finite == bound.transpose(*finite.dims)).all())
    # num_bound = stored finite levels + the levels with n_r >= n_r_max (counted, not stored).
    stored = finite.sum("n_r")
    assert bool((stored == np.minimum(ds.num_bound, ds.sizes["n_r"])).all())
    assert bool((ds.num_bound > ds.sizes["n_r"]).any())  # the λ = 50 cells hold more than 3 levels


def test_critical_flags_against_the_grid(tiny_run):
    _, _, ds = tiny_run
    meanings = ds.critical_screening_length_flag.attrs["flag_meanings"].split()
    lam_c = ds.critical_screening_length.values
    flag = ds.critical_screening_length_flag.values
    lo, hi = ds.screening_length.values[[0, -1]]
    np.testing.assert_array_equal(flag == meanings.index("below_grid"), lam_c < lo)
    np.testing.assert_array_equal(flag == meanings.index("above_grid"), lam_c > hi)
    # Rogers et al. (1970): λ_c(1s) = 1/(1.19061 Z) bohr; value from memory, 6 digits.
    np.testing.assert_allclose(ds.critical_screening_length.sel(l=0, n_r=0).values,
                               1 / (1.19061 * ds.strength.values), rtol=5e-6)


def test_deterministic_over_cores_and_tile_sizes(tiny_run, tmp_path):
    _, _, reference = tiny_run
    one_core = snakemake(tmp_path / "one_core", TINY, "--cores", "1")
    other_tiles = snakemake(tmp_path / "other_tiles", with_changes(tiles__cells=10), "--cores", "2")
    assert one_core.returncode == other_tiles.returncode == 0
    for name in ("one_core", "other_tiles"):
        ds = load(tmp_path / name / "results" / "tiny" / "levels.nc")
        for var in ARRAYS:
            np.testing.assert_array_equal(ds[var].values, reference[var].values, err_msg=f"{name}: {var}")


def test_resumes_after_a_kill(tmp_path):
    config = TINY  # 6 tiles, run one at a time
    (tmp_path / "sweep.yaml").write_text(yaml.safe_dump(config))
    command = [sys.executable, "-m", "snakemake", "results/tiny/levels.nc", "--snakefile", str(REPO / "workflow" / "Snakefile"),
               "--directory", str(tmp_path), "--configfile", str(tmp_path / "sweep.yaml"), "--cores", "1"]
    process = subprocess.Popen(command, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, start_new_session=True)
    benchmarks = tmp_path / "results" / "tiny" / "benchmarks"
    deadline = time.monotonic() + 120
    try:
        # Wait until two tiles are done: Snakemake writes a job's benchmark file once the job's
        # process has ended (a job that printed but is still exiting counts as unfinished to it).
        while time.monotonic() < deadline:
            done = list(benchmarks.glob("solve_tile_*.tsv"))
            if len(done) >= 2:
                break
            time.sleep(0.05)
        time.sleep(0.3)
    finally:
        os.killpg(process.pid, signal.SIGKILL)  # the whole group, as when a node dies
        process.wait()
    before = tile_mtimes(tmp_path)
    assert 2 <= len(before) < 6, "the kill must land half-way"
    assert not (tmp_path / "results" / "tiny" / "levels.nc").exists()
    for name in before:  # no partial file under a final name
        arrays, attrs = read_part(tmp_path / "results" / "tiny" / "tiles" / name)
        assert arrays["energy"].shape[-1] == 3 and "spec_json" in attrs

    snakemake(tmp_path, config, "--unlock")
    snakemake(tmp_path, config, "--cores", "2")
    after = tile_mtimes(tmp_path)
    assert len(after) == 6
    assert all(after[name] == mtime for name, mtime in before.items()), "finished tiles were recomputed"
    ds = load(tmp_path / "results" / "tiny" / "levels.nc")
    assert int(np.isfinite(ds.energy).sum()) > 0


def test_a_changed_config_recomputes_only_what_it_changes(tiny_run):
    tmp_path = tiny_run[0]  # continues the module's run; its cube was loaded already
    before = tile_mtimes(tmp_path)
    assert len(before) == 6  # 2 strengths x 3 tiles dealing out λ: indices (0, 3), (1, 4), (2,)
    more = with_changes(grid__strength=[1.0, 2.0, 3.0])
    snakemake(tmp_path, more, "--cores", "2")
    after = tile_mtimes(tmp_path)
    assert len(after) == 9
    assert all(after[name] == mtime for name, mtime in before.items())
    with xr.open_dataset(tmp_path / "results" / "tiny" / "levels.nc") as ds:
        assert list(ds.strength.values) == [1.0, 2.0, 3.0]
    # An engine setting touches every tile: the dry run plans all nine again, for changed params.
    dry = snakemake(tmp_path, with_changes(grid__strength=[1.0, 2.0, 3.0], grid__n_r_max=4), "-n", "--cores", "2")
    stats = dict(line.split() for line in dry.stdout.splitlines() if line.startswith(("solve_tile ", "criticals ")))
    assert stats == {"solve_tile": "9", "criticals": "1"}


def _fake_unconverged(real):
    def bound_levels(pot, l, n_r_max=None, wavefunctions=False):
        if pot.strength == 2.0 and l == 1 and abs(pot.screening_length - 5.0) < 1e-9:  # the middle λ
            raise ConvergenceError("energy tolerance 1e-12 not met after 6 grid refinements")
        return real(pot, l, n_r_max=n_r_max, wavefunctions=wavefunctions)
    return bound_levels


def test_failed_cell_is_isolated_and_reported(tmp_path, monkeypatch, capsys):
    monkeypatch.setattr(engine, "bound_levels", _fake_unconverged(engine.bound_levels))
    plan = sweep.plan(TINY)
    tile_paths = [tmp_path / f"tile_{t.name}.nc" for t in plan.tiles]
    critical_paths = [tmp_path / f"criticals_{b.name}.nc" for b in plan.critical_blocks]
    for tile, path in zip(plan.tiles, tile_paths):
        assert steps.main(["solve-tile", "--spec", json.dumps(plan.tile_spec(tile)), "--output", str(path)]) == 0
    for block, path in zip(plan.critical_blocks, critical_paths):
        assert steps.main(["criticals", "--spec", json.dumps(plan.critical_spec(block)), "--output", str(path)]) == 0
    report = collect(sweep.validate_config(TINY), tile_paths, critical_paths, tmp_path / "levels.nc")
    assert "not converged, rejected or not solved: 1 (status 1)" in report and "flagged_cells" in report
    lam = float(plan.screening_length[2])  # 5 bohr up to rounding in the log spacing
    cell = f"strength=2.0 screening_length={lam!r} l=1: ConvergenceError"
    assert f"flagged {cell}" in capsys.readouterr().out
    ds = load(tmp_path / "levels.nc")
    bad = ds.sel(strength=2.0, screening_length=lam, l=1)
    assert np.isnan(bad.energy).all() and int(bad.status) == 1
    assert cell in ds.status.attrs["flagged_cells"]
    assert int((ds.status != 0).sum()) == 1
    assert int(np.isfinite(ds.energy.sel(strength=2.0, screening_length=lam, l=0)).sum()) > 0


def test_an_unconverged_level_is_nan_and_flags_its_cell(monkeypatch):
    real = engine.bound_levels

    def one_level_short(pot, l, n_r_max=None, wavefunctions=False):
        res = real(pot, l, n_r_max=n_r_max)
        if res.energy.size:
            res.status = np.array(res.status).copy()
            res.status[-1] = 1
            res.reason = list(res.reason[:-1]) + ["error estimate above tolerance"]
        return res

    monkeypatch.setattr(engine, "bound_levels", one_level_short)
    plan = sweep.plan(TINY)
    tile = next(t for t in plan.tiles if t.strength == (2.0,) and 50.0 in t.screening_length)
    j = tile.screening_length.index(50.0)
    out = tiles.solve_tile(plan.tile_spec(tile))
    reference = real(bs.potential("yukawa", 2.0, 50.0), 0, n_r_max=3)
    assert reference.energy.size == 3
    assert out["status"][0, j, 0] == 1
    np.testing.assert_array_equal(out["energy"][0, j, 0, :-1], reference.energy[:2])
    assert np.isnan(out["energy"][0, j, 0, -1])
    assert any("error estimate above tolerance" in text for *_, text in out["reasons"])
