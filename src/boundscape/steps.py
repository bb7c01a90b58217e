"""The workflow's steps as one small command: ``python -m boundscape.steps <step> ...``.

The Snakemake rules call these and contain no physics themselves:

* ``plan --config FILE``: print the cells and tiles of a configuration;
* ``solve-tile --spec JSON --output FILE``: bound levels of one tile;
* ``criticals --spec JSON --output FILE``: critical screening lengths of one block of strengths;
* ``collect --config-json JSON --tiles ... --criticals ... --output FILE --summary FILE``:
  merge into the cube and print how many cells were flagged.
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
from pathlib import Path

import numpy as np

from . import sweep
from .errors import InputError

LEVEL_VARS = ("energy", "energy_error", "mean_radius")


def _solve_tile(args):
    from .cube import LEVEL_DIMS, CELL_DIMS, write_part
    from .tiles import solve_tile

    spec = json.loads(args.spec)
    result = solve_tile(spec)
    dims = {**{name: LEVEL_DIMS for name in LEVEL_VARS}, "num_bound": CELL_DIMS, "status": CELL_DIMS}
    write_part(args.output, {name: result[name] for name in dims}, dims,
               {"spec_json": json.dumps(spec), "engine_seconds": result["engine_seconds"],
                "reasons_json": json.dumps(result["reasons"])})
    cells = int(np.prod(result["status"].shape))
    print(f"tile {args.output}: {cells} cells, {np.count_nonzero(result['status'])} flagged, "
          f"engine {result['engine_seconds']:.3f} s")
    for i, j, k, text in result["reasons"]:
        print(f"  flagged strength={spec['strength'][i]!r} screening_length="
              f"{spec['screening_length'][j]!r} l={spec['l'][k]}: {text}")


def _criticals(args):
    from .cube import CRITICAL_DIMS, write_part
    from .tiles import solve_criticals

    spec = json.loads(args.spec)
    result = solve_criticals(spec)
    names = ("critical_screening_length", "critical_flag")
    write_part(args.output, {name: result[name] for name in names}, dict.fromkeys(names, CRITICAL_DIMS),
               {"spec_json": json.dumps(spec), "engine_seconds": result["engine_seconds"],
                "reasons_json": json.dumps(result["reasons"])})
    print(f"criticals {args.output}: {result['critical_flag'].size} states, "
          f"engine {result['engine_seconds']:.3f} s")


def _git_commit() -> str | None:
    try:
        out = subprocess.run(["git", "-C", str(Path(__file__).parent), "describe", "--always",
                              "--dirty", "--abbrev=40"], capture_output=True, text=True, timeout=10)
    except (OSError, subprocess.SubprocessError):
        return None
    return out.stdout.strip() or None


def _read_checked(path, expected_spec):
    from .cube import read_part

    arrays, attrs = read_part(path)
    if json.loads(attrs["spec_json"]) != expected_spec:
        raise InputError(f"{path} was computed for other cells or settings than the plan's; rerun the workflow")
    return arrays, attrs


def collect(config: dict, tile_paths, critical_paths, output, summary=None) -> str:
    """Merge tile files and critical blocks into the cube.

    Parameters
    ----------
    config : dict
        The sweep configuration the tiles were planned from.
    tile_paths, critical_paths : list of path
        The files of every tile and every critical block, in the plan's order; each is checked
        against the plan, so a stale file is an error rather than silently merged.
    output : path
        Where the cube is written (atomically).
    summary : path, optional
        Where the summary text is written as well.

    Returns
    -------
    str
        The summary: cells, flagged cells and where to look, where the cube is.
    """
    from . import __version__
    from .cube import build_cube, write_cube
    from .tiles import CRITICAL_FLAGS

    plan = sweep.plan(config)
    if len(tile_paths) != len(plan.tiles) or len(critical_paths) != len(plan.critical_blocks):
        raise InputError(f"collect needs {len(plan.tiles)} tiles and {len(plan.critical_blocks)} "
                         f"critical blocks, got {len(tile_paths)} and {len(critical_paths)}")
    shape = (plan.strength.size, plan.screening_length.size, plan.l.size)
    levels = {name: np.full(shape + (plan.n_r_max,), np.nan) for name in LEVEL_VARS}
    levels["num_bound"] = np.zeros(shape, np.int32)
    levels["status"] = np.zeros(shape, np.int8)
    levels["reasons"] = []
    engine_seconds = 0.0
    for tile, path in zip(plan.tiles, tile_paths):
        arrays, attrs = _read_checked(path, plan.tile_spec(tile))
        where = (slice(*tile.strength_slice), list(tile.screening_length_index))
        for name in (*LEVEL_VARS, "num_bound", "status"):
            levels[name][where] = arrays[name]
        engine_seconds += float(attrs["engine_seconds"])
        levels["reasons"] += [f"strength={tile.strength[i]!r} screening_length={tile.screening_length[j]!r} "
                              f"l={int(plan.l[k])}: {text}" for i, j, k, text in json.loads(attrs["reasons_json"])]

    crit_shape = (plan.strength.size, plan.l.size, plan.n_r_max)
    criticals = {"critical_screening_length": np.full(crit_shape, np.nan),
                 "critical_flag": np.zeros(crit_shape, np.int8), "reasons": []}
    for block, path in zip(plan.critical_blocks, critical_paths):
        arrays, attrs = _read_checked(path, plan.critical_spec(block))
        for name in ("critical_screening_length", "critical_flag"):
            criticals[name][slice(*block.strength_slice)] = arrays[name]
        engine_seconds += float(attrs["engine_seconds"])
        criticals["reasons"] += [f"strength={block.strength[i]!r} l={int(plan.l[k])} n_r={n_r}: {text}"
                                 for i, k, n_r, text in json.loads(attrs["reasons_json"])]
    # The grid flags need the grid's λ range, which only the whole plan knows.
    lam_c, flag = criticals["critical_screening_length"], criticals["critical_flag"]
    finite = np.isfinite(lam_c) & (flag == 0)
    flag[finite & (lam_c < plan.screening_length[0])] = CRITICAL_FLAGS.index("below_grid")
    flag[finite & (lam_c > plan.screening_length[-1])] = CRITICAL_FLAGS.index("above_grid")

    text, sha = sweep.config_text(config)
    provenance = {"sweep": plan.sweep, "family": plan.engine["family"], "mass": plan.engine["mass"],
                  "config_yaml": text, "config_sha256": sha, "version": __version__,
                  "git_commit": _git_commit(),
                  "history": f"boundscape.steps collect: {len(tile_paths)} tiles and "
                             f"{len(critical_paths)} critical blocks merged"}
    ds = build_cube({"strength": plan.strength, "screening_length": plan.screening_length,
                     "l": plan.l, "n_r_max": plan.n_r_max}, levels, criticals, provenance=provenance)
    ds.attrs["engine_seconds"] = engine_seconds
    from .presets import add_physical_coordinates, from_config

    # The physical reading of the axes (issue 4) travels with the cube as extra coordinates.
    ds = add_physical_coordinates(ds, from_config(config.get("preset")))
    write_cube(ds, output)
    flagged = int(np.count_nonzero(levels["status"]))
    lines = [f"sweep {plan.sweep}: {plan.num_cells} cells ({' x '.join(map(str, shape))}), "
             f"{flagged} flagged, {len(criticals['reasons'])} critical lengths not converged; "
             f"engine time {engine_seconds:.2f} s",
             f"cube: {output}"]
    if flagged or criticals["reasons"]:
        lines.append(f"flagged cells: variable status (attribute flagged_cells) in {output}, "
                     f"and the tile logs beside it")
    report = "\n".join(lines)
    if summary:
        Path(summary).write_text(report + "\n")
    return report


def _collect(args):
    report = collect(json.loads(args.config_json), args.tiles, args.criticals, args.output, args.summary)
    print(report)


def _plan(args):
    plan = sweep.plan(sweep.load_config(args.config))
    print(f"sweep {plan.sweep}: {plan.num_cells} cells = {plan.strength.size} strengths x "
          f"{plan.screening_length.size} screening lengths x {plan.l.size} l; "
          f"{len(plan.tiles)} tiles, {len(plan.critical_blocks)} critical blocks")


def main(argv=None):
    parser = argparse.ArgumentParser(prog="python -m boundscape.steps", description=__doc__.splitlines()[0])
    sub = parser.add_subparsers(dest="step", required=True)
    p = sub.add_parser("plan")
    p.add_argument("--config", required=True)
    p.set_defaults(run=_plan)
    for name, run in (("solve-tile", _solve_tile), ("criticals", _criticals)):
        p = sub.add_parser(name)
        p.add_argument("--spec", required=True, help="the job's params, JSON")
        p.add_argument("--output", required=True)
        p.set_defaults(run=run)
    p = sub.add_parser("collect")
    p.add_argument("--config-json", required=True)
    p.add_argument("--tiles", nargs="+", required=True)
    p.add_argument("--criticals", nargs="+", required=True)
    p.add_argument("--output", required=True)
    p.add_argument("--summary")
    p.set_defaults(run=_collect)
    args = parser.parse_args(argv)
    try:
        args.run(args)
    except InputError as exc:
        print(f"boundscape: error: {exc}", file=sys.stderr)
        return 2
    return 0


if __name__ == "__main__":
    sys.exit(main())
