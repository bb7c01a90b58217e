"""The workflow's steps as one small command: ``python -m boundscape.cli.steps <step> ...``.

The Snakemake rules call these and contain no physics themselves:

* ``plan --config FILE``: print the cells and tiles of a configuration;
* ``solve-tile --spec JSON --output FILE``: bound levels (and configured lines) of one tile;
* ``criticals --spec JSON --output FILE``: critical screening lengths of one block of strengths;
* ``check-parts --config-json JSON --results DIR --output FILE``: read every tile and critical
  block back against the plan, and solve again any that does not (truncated, damaged, a copy of
  another part);
* ``collect --config-json JSON --results DIR --output FILE --summary FILE``: merge into the cube
  and print how many cells were flagged;
* ``figures CUBE OUTDIR``: render every figure and table of a cube;
* ``report-pages --cube --summary --table --config --outdir``: the report's landing text and
  the pages it shows inline (run summary, configuration, critical-length table);
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
from ..sweep import load_config, plan, population_tiles, resonance_tiles, scattering_tiles, solve_criticals, solve_tile


def write_tile(spec: dict, output) -> None:
    """Solve one tile (bound levels, and the configured lines and states past threshold) and
    write it to ``output``, printing one line and every flagged cell."""
    from ..cube import CELL_DIMS, LEVEL_DIMS, write_part
    from ..cube.model import LEVEL_VARS

    result = solve_tile(spec)
    dims = {**{name: LEVEL_DIMS for name in LEVEL_VARS}, "num_bound": CELL_DIMS, "status": CELL_DIMS}
    attrs = {"spec_json": json.dumps(spec), "reasons_json": json.dumps(result["reasons"])}
    if "resonance_status" in result:
        dims.update(dict.fromkeys(resonance_tiles.RESONANCE_VARS, LEVEL_DIMS))
        attrs.update(resonance_reasons_json=json.dumps(result["resonance_reasons"]),
                     resonance_seconds=result["resonance_seconds"])
    if scattering_tiles.wanted(spec):
        dims.update(scattering_tiles.part_dims(spec))
        attrs.update(scattering_tiles.part_attrs(result))
    if population_tiles.wanted(spec):  # each engine cell's complete level set
        dims.update(population_tiles.tile_dims(spec))
        attrs.update(population_reasons_json=json.dumps(result["population_reasons"]),
                     population_seconds=result["population_seconds"])
    if spec.get("lines"):
        from ..cube.lines import LINE_DIMS
        from ..sweep.line_tiles import LINE_VARS, solve_line_tile

        lines = solve_line_tile(spec)
        dims.update(dict.fromkeys((*LINE_VARS, "line_status"), LINE_DIMS))
        result.update(lines, engine_seconds=result["engine_seconds"] + lines["engine_seconds"])
        attrs["line_reasons_json"] = json.dumps(lines["line_reasons"])
    write_part(output, {name: result[name] for name in dims}, dims,
               {**attrs, "engine_seconds": result["engine_seconds"]})
    cells = int(np.prod(result["status"].shape))
    print(f"tile {output}: {cells} cells, {np.count_nonzero(result['status'])} flagged, "
          f"engine {result['engine_seconds']:.3f} s"
          + (f" (past threshold {result['resonance_seconds']:.3f} s)" if "resonance_seconds" in result else ""))
    for i, j, k, text in result["reasons"]:
        print(f"  flagged strength={spec['strength'][i]!r} screening_length="
              f"{spec['screening_length'][j]!r} l={spec['l'][k]}: {text}")


def write_criticals(spec: dict, output) -> None:
    """Solve one block of critical lengths and write it to ``output``."""
    from ..cube import CRITICAL_DIMS, write_part

    result = solve_criticals(spec)
    names = ("critical_screening_length", "critical_screening_length_error", "critical_flag")
    attrs = {"spec_json": json.dumps(spec), "engine_seconds": result["engine_seconds"],
             "reasons_json": json.dumps(result["reasons"])}
    dims = dict.fromkeys(names, CRITICAL_DIMS)
    if "dissolution_flag" in result:
        dims.update(dict.fromkeys(resonance_tiles.DISSOLUTION_VARS, CRITICAL_DIMS))
        attrs["dissolution_reasons_json"] = json.dumps(result["dissolution_reasons"])
    if "critical_strength" in result:  # over (screening length, l, n_r)
        dims.update(dict.fromkeys(("critical_strength", "critical_strength_flag"), ("screening_length", "l", "n_r")))
        attrs["critical_strength_reasons_json"] = json.dumps(result["critical_strength_reasons"])
    write_part(output, {name: result[name] for name in dims}, dims, attrs)
    print(f"criticals {output}: {result['critical_flag'].size} states, engine {result['engine_seconds']:.3f} s")


def _solve_tile(args):
    spec = json.loads(args.spec)
    _take_trajectories(args, spec)
    write_tile(spec, args.output)


def _criticals(args):
    spec = json.loads(args.spec)
    _take_trajectories(args, spec)
    write_criticals(spec, args.output)


def _take_trajectories(args, spec):
    if getattr(args, "trajectories", None):
        resonance_tiles.use_trajectories(Path(args.trajectories).read_text(), spec)


def _trajectories(args):
    from ..cube.netcdf import replace_atomically

    spec = json.loads(args.spec)
    text = resonance_tiles.trajectories(spec)
    replace_atomically(lambda temp: Path(temp).write_text(text), args.output)
    print(f"trajectories {args.output}: {len(json.loads(text)['records'])} (l, n_r) trajectories")


def _check_parts(args):
    """Read every tile and critical block back against the plan; one that does not read back
    (truncated, damaged) or was computed for other cells (a copy of another) is solved again
    from its spec and rewritten, with a line saying so. Runs before collect, as its own job,
    so that a failure here leaves the previous cube in place."""
    from ..cube.netcdf import part_problem, replace_atomically

    p = plan(json.loads(args.config_json))
    parts = [(path, p.tile_spec(tile), write_tile) for tile, path in zip(p.tiles, p.tile_paths(args.results))]
    parts += [(path, p.critical_spec(block), write_criticals)
              for block, path in zip(p.critical_blocks, p.critical_paths(args.results))]
    solved_again = []
    for count, (path, spec, write) in enumerate(parts, 1):
        problem = part_problem(path, spec)
        if problem is not None:
            print(f"{path}: {problem}; solving it again from the plan", flush=True)
            if args.trajectories and not solved_again:  # before the first part solved again
                resonance_tiles.use_trajectories(Path(args.trajectories).read_text(), spec)
            write(spec, path)
            if (still := part_problem(path, spec)) is not None:
                raise InputError(f"{path}: {still}, even as just written again; check the disk (df, dmesg) "
                                 "and rerun the workflow")
            solved_again.append(f"{path}: {problem}")
        if count % 1000 == 0:
            print(f"checked {count} of {len(parts)} parts", flush=True)
    text = (f"{len(p.tiles)} tiles and {len(p.critical_blocks)} critical block{'s' * (len(p.critical_blocks) != 1)} "
            "read back against the plan; "
            f"{len(solved_again)} solved again\n" + "".join(f"{line}\n" for line in solved_again))
    replace_atomically(lambda temp: Path(temp).write_text(text), args.output)
    print(text, end="")


def _collect(args):
    from ..cube.collect import collect

    p = plan(json.loads(args.config_json))
    print(collect(json.loads(args.config_json), p.tile_paths(args.results), p.critical_paths(args.results),
                  args.output, args.summary))


def _plan(args):
    print(plan(load_config(args.config)).describe())


def _figures(args):
    from ..cube import open_cube
    from ..plots import render_all

    with open_cube(args.cube) as ds:
        for path in render_all(ds.load(), args.outdir):
            print(path)


def _report_pages(args):
    from .report_pages import write_report_pages

    for path in write_report_pages(args.cube, args.summary, args.table, args.config, args.outdir):
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
    # The parts' paths come from the plan, not the command line: 20,000 of them would pass the
    # 128 KiB a single shell command may hold.
    p = sub.add_parser("check-parts")
    p.add_argument("--config-json", required=True)
    p.add_argument("--results", required=True, help="the sweep's results folder, results/<sweep>")
    p.add_argument("--output", required=True, help="where the list of parts solved again goes")
    p.add_argument("--trajectories", help="trajectories written by the trajectories step (resonances: true)")
    p.set_defaults(run=_check_parts)
    p = sub.add_parser("collect")
    p.add_argument("--config-json", required=True)
    p.add_argument("--results", required=True, help="the sweep's results folder, results/<sweep>")
    p.add_argument("--output", required=True)
    p.add_argument("--summary")
    p.set_defaults(run=_collect)
    p = sub.add_parser("figures")
    p.add_argument("cube")
    p.add_argument("outdir")
    p.set_defaults(run=_figures)
    p = sub.add_parser("report-pages", help="the report's landing text and inline pages (cli/report_pages.py)")
    for name, what in (("cube", "the cube, levels.nc"), ("summary", "the run summary, summary.txt"),
                       ("table", "critical_screening_lengths.csv"), ("config", "sweep_config.yaml"),
                       ("outdir", "where the pages go, results/<sweep>/report")):
        p.add_argument(f"--{name}", required=True, help=what)
    p.set_defaults(run=_report_pages)
    args = parser.parse_args(argv)
    try:
        args.run(args)
    except InputError as exc:
        print(f"boundscape: error: {exc}", file=sys.stderr)
        return 2
    except PermissionError as exc:
        print(f"boundscape: error: cannot write {exc.filename!r} ({exc.strerror}); make the results folder "
              "writable", file=sys.stderr)
        return 2
    except OSError as exc:  # a full disk, a file that does not read: one line naming the file
        if exc.filename is None:
            raise
        print(f"boundscape: error: {exc.filename}: {exc.strerror or exc}", file=sys.stderr)
        return 2
    return 0


if __name__ == "__main__":
    sys.exit(main())
