"""End-to-end speed of the sweep workflow against the plain script on the same cores.

    python benchmarks/bench_sweep.py [--cores 2] [--config config/sweeps/large.yaml] [--warm] [--no-plain]

Runs, in one process and one after the other:

1. the plain script: every cell of the sweep with the plain approach (uniform grid, N = 2000,
   r_max = 100 bohr, scipy.linalg.eigh_tridiagonal below zero), split over ``--cores`` worker
   processes; its wall time, and its ideal time (its summed per-cell time over the cores);
2. the workflow (Snakemake, the cube only, no figures) from scratch in a temporary directory,
   with an empty kernel cache, so the one compilation of the engine's kernels is in the figure
   (``--warm``: also a second run with the cache the first one filled).

Printed: wall times, their ratio to the plain script's ideal time, the engine's own time summed
over the jobs, the collect step's peak resident memory and the cube's size on disk.
"""

from __future__ import annotations

import argparse
import csv
import multiprocessing
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import xarray as xr

from boundscape import sweep

REPO = Path(__file__).resolve().parents[1]


def plain_cell(args):
    """Bound levels of one cell, the plain way; returns the seconds it took."""
    from scipy.linalg import eigh_tridiagonal

    from boundscape import potential

    family, Z, lam, l, mass = args
    start = time.perf_counter()
    pot = potential(family, Z, lam, mass)
    n, r_max = 2000, 100.0
    h = r_max / n
    r = h * np.arange(1, n + 1)
    v = pot(r) + l * (l + 1) / (2 * mass * r * r)
    d = 1.0 / (mass * h * h) + v
    e = np.full(n - 1, -0.5 / (mass * h * h))
    eigh_tridiagonal(d, e, eigvals_only=True, select="v", select_range=(float(np.min(v)) - 1.0, 0.0))
    return time.perf_counter() - start


def run_plain(plan, cores):
    cells = [(plan.engine["family"], float(Z), float(lam), int(l), plan.engine["mass"])
             for Z in plan.strength for lam in plan.screening_length for l in plan.l]
    start = time.perf_counter()
    with multiprocessing.Pool(cores) as pool:
        seconds = pool.map(plain_cell, cells, chunksize=max(1, len(cells) // (8 * cores)))
    wall = time.perf_counter() - start
    return {"wall_s": wall, "ideal_s": sum(seconds) / cores, "per_cell_ms": 1e3 * sum(seconds) / len(cells)}


def run_workflow(config_path, cores, workdir, cache_dir):
    workdir.mkdir(parents=True, exist_ok=True)
    plan = sweep.plan(sweep.load_config(config_path))
    cube = workdir / "results" / plan.sweep / "levels.nc"
    command = [sys.executable, "-m", "snakemake", str(cube.relative_to(workdir)), "--snakefile",
               str(REPO / "workflow" / "Snakefile"), "--directory", str(workdir), "--configfile", str(config_path),
               "--cores", str(cores), "--quiet", "all"]
    env = {**os.environ, "NUMBA_CACHE_DIR": str(cache_dir)}
    start = time.perf_counter()
    proc = subprocess.run(command, capture_output=True, text=True, env=env)
    wall = time.perf_counter() - start
    if proc.returncode != 0:
        raise SystemExit(f"bench_sweep: snakemake failed:\n{proc.stdout[-2000:]}\n{proc.stderr[-2000:]}")
    with xr.open_dataset(cube) as ds:
        engine = float(ds.attrs["engine_seconds"])
        flagged = int((ds.status != 0).sum())
    bench = workdir / "results" / plan.sweep / "benchmarks"
    rows = {}
    for tsv in bench.glob("*.tsv"):
        with tsv.open() as fh:
            rows[tsv.stem] = next(csv.DictReader(fh, delimiter="\t"))
    kernels = float(rows.get("engine_kernels", {}).get("s", "nan"))
    return {"cells": plan.num_cells, "jobs": len(rows), "wall_s": wall, "engine_s": engine,
            "kernels_s": kernels, "collect_rss_mb": float(rows["collect"]["max_rss"]),
            "cube_mb": cube.stat().st_size / 2**20, "flagged": flagged}


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cores", type=int, default=2)
    parser.add_argument("--config", default=str(REPO / "config" / "sweeps" / "large.yaml"))
    parser.add_argument("--warm", action="store_true", help="also run the workflow again with a filled kernel cache")
    parser.add_argument("--no-plain", action="store_true", help="skip the plain script (e.g. for the scale sweep)")
    args = parser.parse_args()

    plan = sweep.plan(sweep.load_config(args.config))
    print(f"sweep {plan.sweep}: {plan.num_cells} cells, {len(plan.tiles)} tiles, {args.cores} cores", flush=True)
    plain = None
    if not args.no_plain:
        plain = run_plain(plan, args.cores)
        print(f"plain script: wall {plain['wall_s']:.1f} s, ideal {plain['ideal_s']:.1f} s "
              f"({plain['per_cell_ms']:.2f} ms per cell)", flush=True)
    with tempfile.TemporaryDirectory(prefix="bench_sweep_") as tmp:
        cache = Path(tmp) / "numba_cache"
        runs = {"cold": run_workflow(Path(args.config).resolve(), args.cores, Path(tmp) / "cold", cache)}
        if args.warm:
            runs["warm"] = run_workflow(Path(args.config).resolve(), args.cores, Path(tmp) / "warm", cache)
    for name, res in runs.items():
        line = (f"workflow ({name} kernel cache): wall {res['wall_s']:.1f} s for {res['cells']} cells "
                f"({res['cells'] / res['wall_s']:.0f} cells/s), {res['jobs']} jobs, engine {res['engine_s']:.1f} s "
                f"summed, kernels {res['kernels_s']:.1f} s, collect peak RSS {res['collect_rss_mb']:.0f} MB, "
                f"cube {res['cube_mb']:.1f} MB, {res['flagged']} cells flagged")
        print(line)
        if plain:
            print(f"  ratio to the plain script's ideal 2-core time: {res['wall_s'] / plain['ideal_s']:.2f} "
                  f"(to its measured wall time: {res['wall_s'] / plain['wall_s']:.2f})")
    print(f"(load average at the end: {os.getloadavg()[0]:.2f})")


if __name__ == "__main__":
    main()
