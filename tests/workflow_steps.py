"""A sweep's cube computed with the workflow's own steps (solve-tile, criticals, collect) in the
test process: the one copy every test module that needs a small cube uses."""

from __future__ import annotations

import json
from pathlib import Path

from boundscape import sweep
from boundscape.cli import steps
from boundscape.cube import open_cube
from boundscape.cube.collect import collect


def solve_parts(directory: Path, config: dict, *, trajectories: bool = False):
    """(validated config, plan, tile paths, critical-block paths) of ``config``, each part written by
    the workflow's step into ``directory``; with ``trajectories`` the poles are traced once first
    (the workflow's ``trajectories`` step, ``directory/resonance_trajectories.json``) and every part
    reads them."""
    config = sweep.validate_config(json.loads(json.dumps(config)))  # the caller's dict stays as it was
    plan = sweep.plan(config)
    directory = Path(directory)
    directory.mkdir(parents=True, exist_ok=True)
    extra = []
    if trajectories:
        traced = directory / "resonance_trajectories.json"
        assert steps.main(["trajectories", "--spec", json.dumps(plan.critical_spec(plan.critical_blocks[0])),
                           "--output", str(traced)]) == 0
        extra = ["--trajectories", str(traced)]
    tiles, blocks = [], []
    for kind, parts, spec, paths in (("solve-tile", plan.tiles, plan.tile_spec, tiles),
                                     ("criticals", plan.critical_blocks, plan.critical_spec, blocks)):
        for part in parts:
            path = directory / f"{kind}_{part.name}.nc"
            assert steps.main([kind, "--spec", json.dumps(spec(part)), "--output", str(path), *extra]) == 0
            paths.append(str(path))
    return config, plan, tiles, blocks


def build_cube(directory: Path, config: dict, *, trajectories: bool = False, summary: Path | None = None):
    """(the cube of ``config``, loaded; its plan): the parts of :func:`solve_parts` collected into
    ``directory/levels.nc`` (and the run summary into ``summary``, if given)."""
    config, plan, tiles, blocks = solve_parts(directory, config, trajectories=trajectories)
    collect(config, tiles, blocks, Path(directory) / "levels.nc", *([summary] if summary else []))
    with open_cube(Path(directory) / "levels.nc") as ds:
        return ds.load(), plan
