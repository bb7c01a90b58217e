"""The workflow's steps as one small command: ``python -m boundscape.cli.steps <step> ...``.

The Snakemake rules call these and contain no physics themselves:

* ``plan --config FILE``: print the cells and tiles of a configuration;
* ``solve-tile --spec JSON --output FILE``: bound levels (and configured lines) of one tile;
* ``criticals --spec JSON --output FILE``: critical screening lengths of one block of strengths;
* ``collect --config-json JSON --tiles ... --criticals ... --output FILE --summary FILE``:
  merge into the cube and print how many cells were flagged;
* ``figures CUBE OUTDIR``: render every figure and table of a cube.
"""

from __future__ import annotations

import argparse
import json
import sys

import numpy as np

from ..errors import InputError
from ..sweep import load_config, plan, solve_criticals, solve_tile


def _solve_tile(args):
    from ..cube import CELL_DIMS, LEVEL_DIMS, write_part
    from ..cube.model import LEVEL_VARS

    spec = json.loads(args.spec)
    result = solve_tile(spec)
    dims = {**{name: LEVEL_DIMS for name in LEVEL_VARS}, "num_bound": CELL_DIMS, "status": CELL_DIMS}
    attrs = {"spec_json": json.dumps(spec), "reasons_json": json.dumps(result["reasons"])}
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
          f"engine {result['engine_seconds']:.3f} s")
    for i, j, k, text in result["reasons"]:
        print(f"  flagged strength={spec['strength'][i]!r} screening_length="
              f"{spec['screening_length'][j]!r} l={spec['l'][k]}: {text}")


def _criticals(args):
    from ..cube import CRITICAL_DIMS, write_part

    spec = json.loads(args.spec)
    result = solve_criticals(spec)
    names = ("critical_screening_length", "critical_flag")
    write_part(args.output, {name: result[name] for name in names}, dict.fromkeys(names, CRITICAL_DIMS),
               {"spec_json": json.dumps(spec), "engine_seconds": result["engine_seconds"],
                "reasons_json": json.dumps(result["reasons"])})
    print(f"criticals {args.output}: {result['critical_flag'].size} states, "
          f"engine {result['engine_seconds']:.3f} s")


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
        p.set_defaults(run=run)
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
