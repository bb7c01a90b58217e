"""End-to-end speed of the sweep workflow: the large sweep, then the same sweep at half the cells.

    python benchmarks/bench_sweep.py [--cores 2] [--config config/sweeps/large.yaml] [--fraction 1.0]

Prints, side by side for the full and the half sweep: wall time, cells per second, the engine's
own compute time summed over tiles and critical blocks (recorded by each job in its file), the
jobs' total time from Snakemake's benchmark files, and the workflow's overhead as a fraction of
the cores' wall time not spent in the engine; then the growth factor and the targets.
Each run starts from scratch in a temporary directory; only the cube is built (no figures).
"""

from __future__ import annotations

import argparse
import csv
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import xarray as xr
import yaml

from boundscape import sweep

REPO = Path(__file__).resolve().parents[1]
TARGETS = {"cells": 20_000, "wall_s": 60.0, "overhead": 0.15, "growth": 2.1}


def with_lambda_points(config, num, cells_per_tile):
    config = yaml.safe_load(yaml.safe_dump(config))
    axis = config["grid"]["screening_length"]
    if not isinstance(axis, dict):
        raise SystemExit("bench_sweep: the sweep's screening_length must be a {start, stop, num} range")
    axis["num"] = int(num)
    # Same cells per tile in both sweeps, so half the cells means half the jobs.
    config["tiles"]["cells"] = int(cells_per_tile)
    return config


def run(config, cores, workdir):
    workdir.mkdir(parents=True)
    (workdir / "sweep.yaml").write_text(yaml.safe_dump(config))
    plan = sweep.plan(config)
    cube = workdir / "results" / plan.sweep / "levels.nc"
    command = [sys.executable, "-m", "snakemake", str(cube.relative_to(workdir)), "--snakefile",
               str(REPO / "workflow" / "Snakefile"), "--directory", str(workdir), "--configfile", str(workdir / "sweep.yaml"),
               "--cores", str(cores), "--quiet", "all"]
    start = time.perf_counter()
    proc = subprocess.run(command, capture_output=True, text=True)
    wall = time.perf_counter() - start
    if proc.returncode != 0:
        raise SystemExit(f"bench_sweep: snakemake failed:\n{proc.stdout[-2000:]}\n{proc.stderr[-2000:]}")
    with xr.open_dataset(cube) as ds:
        engine = float(ds.attrs["engine_seconds"])
        flagged = int((ds.status != 0).sum())
    jobs = 0.0
    for tsv in (workdir / "results" / plan.sweep / "benchmarks").glob("*.tsv"):
        with tsv.open() as fh:
            jobs += sum(float(row["s"]) for row in csv.DictReader(fh, delimiter="\t"))
    return {"cells": plan.num_cells, "jobs": len(plan.tiles) + len(plan.critical_blocks) + 1, "wall_s": wall,
            "cells_per_s": plan.num_cells / wall, "engine_s": engine, "job_s": jobs,
            "overhead": 1.0 - engine / (cores * wall), "flagged": flagged}


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cores", type=int, default=2)
    parser.add_argument("--config", default=str(REPO / "config" / "sweeps" / "large.yaml"))
    parser.add_argument("--fraction", type=float, default=1.0,
                        help="scale the number of screening lengths (for a quick look; 1.0 for the real figures)")
    parser.add_argument("--only", choices=("full", "half"), help="run one of the two sweeps")
    args = parser.parse_args()

    base = sweep.load_config(args.config)
    num = max(2, round(base["grid"]["screening_length"]["num"] * args.fraction))
    cells = max(1, round(base["tiles"]["cells"] * args.fraction))
    sweeps = {"full": with_lambda_points(base, num, cells), "half": with_lambda_points(base, max(1, num // 2), cells)}
    if args.only:
        sweeps = {args.only: sweeps[args.only]}
    results = {}
    with tempfile.TemporaryDirectory(prefix="bench_sweep_") as tmp:
        for name, config in sweeps.items():
            print(f"running the {name} sweep ({sweep.plan(config).num_cells} cells) on {args.cores} cores ...",
                  flush=True)
            results[name] = run(config, args.cores, Path(tmp) / name)

    rows = [("cells", "{:d}"), ("jobs", "{:d}"), ("wall_s", "{:.1f}"), ("cells_per_s", "{:.0f}"),
            ("engine_s", "{:.1f}"), ("job_s", "{:.1f}"), ("overhead", "{:.1%}"), ("flagged", "{:d}")]
    names = list(results)
    print(f"\n{'':<14}" + "".join(f"{n:>12}" for n in names))
    for key, fmt in rows:
        print(f"{key:<14}" + "".join(f"{fmt.format(results[n][key]):>12}" for n in names))
    print(f"\nengine_s: the engine's own time summed over all jobs; job_s: Snakemake's per-job times summed;\n"
          f"overhead: 1 - engine_s / (cores x wall_s), i.e. the share of {args.cores} cores' wall time not in the engine.")
    full = results.get("full")
    print("\ntarget                       measured      goal")
    if full:
        print(f"cells in the sweep           {full['cells']:>8d}   >= {TARGETS['cells']}")
        print(f"wall time (s)                {full['wall_s']:>8.1f}   <= {TARGETS['wall_s']:.0f}")
        print(f"workflow overhead            {full['overhead']:>8.1%}   <= {TARGETS['overhead']:.0%}")
    if len(results) == 2:
        growth = results["full"]["wall_s"] / results["half"]["wall_s"]
        print(f"wall(full) / wall(half)      {growth:>8.2f}   <= {TARGETS['growth']}")
    print(f"(load average during the run: {os.getloadavg()[0]:.2f})")


if __name__ == "__main__":
    main()
