"""The workflow's steps as one small command: ``python -m boundscape.cli.steps <step> ...``.

The Snakemake rules call these and contain no physics themselves:

* ``plan --config FILE``: print the cells and tiles of a configuration;
* ``solve-tile --spec JSON --output FILE``: bound levels (and configured lines) of one tile;
* ``criticals --spec JSON --output FILE``: critical screening lengths of one block of strengths;
* ``collect --config-json JSON --tiles ... --criticals ... --output FILE --summary FILE``:
  merge into the cube and print how many cells were flagged;
* ``figures CUBE OUTDIR``: render every figure and table of a cube;
* ``trajectories --spec JSON --output FILE``: the poles' trajectories past threshold, computed
  once for every tile (``resonances: true``); ``solve-tile`` and ``criticals`` take them with
  ``--trajectories FILE``.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

import numpy as np

from ..errors import InputError
from ..sweep import load_config, plan, resonance_tiles, solve_criticals, solve_tile


def _solve_tile(args):
    from ..cube import CELL_DIMS, LEVEL_DIMS, write_part
    from ..cube.model import LEVEL_VARS

    spec = json.loads(args.spec)
    _take_trajectories(args, spec)
    result = solve_tile(spec)
    dims = {**{name: LEVEL_DIMS for name in LEVEL_VARS}, "num_bound": CELL_DIMS, "status": CELL_DIMS}
    attrs = {"spec_json": json.dumps(spec), "reasons_json": json.dumps(result["reasons"])}
    if "resonance_status" in result:
        dims.update(dict.fromkeys(resonance_tiles.RESONANCE_VARS, LEVEL_DIMS))
        attrs.update(resonance_reasons_json=json.dumps(result["resonance_reasons"]),
                     resonance_seconds=result["resonance_seconds"])
    if spec.get("lines"):
        from ..cube.lines import LINE_DIMS
        from ..sweep.line_tiles import LINE_VARS, solve_line_tile

        lines = solve_line_tile(spec)
        dims.update(dict.fromkeys((*LINE_VARS, "line_status"), LINE_DIMS))
        result.update(lines, engine_seconds=result["engine_seconds"] + lines["engine_seconds"])
        attrs["line_reasons_json"] = json.dumps(lines["line_reasons"])
    write_part(args.output, {name: result[name] for name in dims}, dims,
               {**attrs, "engine_seconds": result["engine_seconds"]})
    cells = int(np.prod(result["status"].shape))
    print(f"tile {args.output}: {cells} cells, {np.count_nonzero(result['status'])} flagged, "
          f"engine {result['engine_seconds']:.3f} s"
          + (f" (past threshold {result['resonance_seconds']:.3f} s)" if "resonance_seconds" in result else ""))
    for i, j, k, text in result["reasons"]:
        print(f"  flagged strength={spec['strength'][i]!r} screening_length="
              f"{spec['screening_length'][j]!r} l={spec['l'][k]}: {text}")


def _criticals(args):
    from ..cube import CRITICAL_DIMS, write_part

    spec = json.loads(args.spec)
    _take_trajectories(args, spec)
    result = solve_criticals(spec)
    names = ("critical_screening_length", "critical_flag")
    attrs = {"spec_json": json.dumps(spec), "engine_seconds": result["engine_seconds"],
             "reasons_json": json.dumps(result["reasons"])}
    if "dissolution_flag" in result:
        names += resonance_tiles.DISSOLUTION_VARS
        attrs["dissolution_reasons_json"] = json.dumps(result["dissolution_reasons"])
    write_part(args.output, {name: result[name] for name in names}, dict.fromkeys(names, CRITICAL_DIMS), attrs)
    print(f"criticals {args.output}: {result['critical_flag'].size} states, "
          f"engine {result['engine_seconds']:.3f} s")


def _take_trajectories(args, spec):
    if getattr(args, "trajectories", None):
        resonance_tiles.use_trajectories(Path(args.trajectories).read_text(), spec)


def _trajectories(args):
    from ..cube.netcdf import replace_atomically

    spec = json.loads(args.spec)
    text = resonance_tiles.trajectories(spec)
    replace_atomically(lambda temp: Path(temp).write_text(text), args.output)
    print(f"trajectories {args.output}: {len(json.loads(text)['records'])} (l, n_r) trajectories")


def _collect(args):
    from ..cube.collect import collect

    print(collect(json.loads(args.config_json), args.tiles, args.criticals, args.output, args.summary))


def _plan(args):
    p = plan(load_config(args.config))
    print(f"sweep {p.sweep}: {p.num_cells} cells = {p.strength.size} strengths x "
          f"{p.screening_length.size} screening lengths x {p.l.size} l; "
          f"{len(p.tiles)} tiles, {len(p.critical_blocks)} critical blocks")


def _figures(args):
    from ..cube import open_cube
    from ..plots import render_all

    with open_cube(args.cube) as ds:
        for path in render_all(ds.load(), args.outdir):
            print(path)


def main(argv=None):
    parser = argparse.ArgumentParser(prog="python -m boundscape.cli.steps", description=__doc__.splitlines()[0])
    sub = parser.add_subparsers(dest="step", required=True)
    p = sub.add_parser("plan")
    p.add_argument("--config", required=True)
    p.set_defaults(run=_plan)
    for name, run in (("solve-tile", _solve_tile), ("criticals", _criticals)):
        p = sub.add_parser(name)
        p.add_argument("--spec", required=True, help="the job's params, JSON")
        p.add_argument("--output", required=True)
        p.add_argument("--trajectories", help="trajectories written by the trajectories step (resonances: true)")
        p.set_defaults(run=run)
    p = sub.add_parser("trajectories")
    p.add_argument("--spec", required=True, help="the sweep's critical-block params, JSON")
    p.add_argument("--output", required=True)
    p.set_defaults(run=_trajectories)
    p = sub.add_parser("collect")
    p.add_argument("--config-json", required=True)
    p.add_argument("--tiles", nargs="+", required=True)
    p.add_argument("--criticals", nargs="+", required=True)
    p.add_argument("--output", required=True)
    p.add_argument("--summary")
    p.set_defaults(run=_collect)
    p = sub.add_parser("figures")
    p.add_argument("cube")
    p.add_argument("outdir")
    p.set_defaults(run=_figures)
    args = parser.parse_args(argv)
    try:
        args.run(args)
    except InputError as exc:
        print(f"boundscape: error: {exc}", file=sys.stderr)
        return 2
    return 0


if __name__ == "__main__":
    sys.exit(main())
