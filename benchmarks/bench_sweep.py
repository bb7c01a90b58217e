"""End-to-end speed of the sweep workflow against the plain script on the same cores.

    python benchmarks/bench_sweep.py [--cores 2] [--config config/sweeps/large.yaml] [--warm] [--no-plain]
    python benchmarks/bench_sweep.py --dedupe [--cores 2] [--config config/sweeps/conditions.yaml]
    python benchmarks/bench_sweep.py --populations [--cores 2] [--config config/config.yaml]

Runs, in one process and one after the other:

1. the plain script: every cell of the sweep with the plain approach (uniform grid, N = 2000,
   r_max = 100 bohr, scipy.linalg.eigh_tridiagonal below zero), split over ``--cores`` worker
   processes; its wall time, and its ideal time (its summed per-cell time over the cores);
2. the workflow (Snakemake, the cube only, no figures) from scratch in a temporary directory,
   with an empty kernel cache, so the one compilation of the engine's kernels is in the figure
   (``--warm``: also a second run with the cache the first one filled).

Printed: wall times, their ratio to the plain script's ideal time, the engine's own time summed
over the jobs, the collect step's peak resident memory and the cube's size on disk.

``--dedupe`` measures a sweep over conditions (default: the 110,715-cell plasma sweep
``config/sweeps/conditions.yaml``, n_e × T_e with Debye screening) two ways on the same cores,
one after the other: the plan's tiles, which solve each distinct engine cell (strength, λ, l)
once, and the same cells without deduplication, every condition solved at its own λ in tiles of
the same size.  Both use ``boundscape.sweep.solve_tile`` in ``--cores`` worker processes (their
kernels loaded before the clock starts); the energies of the two are compared cell by cell.  It
also prints how many distinct lengths the same grid has under finite-temperature screening, and
how long planning it takes.

``--populations`` runs the workflow (the cube only) on one sweep (default: the demo,
``config/config.yaml``) without and with ``populations: true``, side by side: first once without
to fill the kernel cache, then without and with, each from scratch with that warm cache; printed:
the wall times, the engine time summed over the jobs, and the ratio with/without.
"""

from __future__ import annotations

import argparse
import csv
import json
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


def _solve(spec):
    from boundscape.sweep import solve_tile

    start = time.perf_counter()
    out = solve_tile(spec)
    return out["energy"], time.perf_counter() - start


def _warm(_):
    from boundscape import bound_levels, potential

    bound_levels(potential("yukawa", 1.0, 10.0), 0)
    return os.getpid()


def run_dedupe(config_path, cores):
    """The sweep's cells solved once per distinct engine cell, and once per condition."""
    config = sweep.load_config(config_path)
    start = time.perf_counter()
    plan = sweep.plan(config)
    plan_s = time.perf_counter() - start
    grid = plan.conditions
    lengths = grid.engine_length.ravel()  # every condition's own λ (the preset's value)
    per_tile = max(1, int(config["tiles"]["cells"]) // plan.l.size)
    plain = [{**plan.tile_spec(plan.tiles[0]), "strength": [float(z)], "screening_length": chunk.tolist(),
              "strength_slice": [i, i + 1], "screening_length_index": list(range(chunk.size))}
             for i, z in enumerate(plan.strength) for chunk in np.array_split(lengths, -(-lengths.size // per_tile))]
    print(f"sweep {plan.sweep}: {plan.num_cells} cells; {plan.num_engine_cells} distinct engine cells "
          f"({plan.screening_length.size} distinct screening lengths of {lengths.size} conditions) in "
          f"{len(plan.tiles)} tiles; without dedupe {len(plain)} tiles; plan {plan_s:.2f} s", flush=True)
    with multiprocessing.Pool(cores) as pool:
        pool.map(_warm, range(4 * cores))
        results = {}
        for name, specs in (("dedupe", [plan.tile_spec(t) for t in plan.tiles]), ("no dedupe", plain)):
            start = time.perf_counter()
            solved = pool.map(_solve, specs, chunksize=1)
            wall = time.perf_counter() - start
            results[name] = (wall, sum(s for _, s in solved), solved, specs)
            print(f"{name}: wall {wall:.1f} s on {cores} cores, engine {results[name][1]:.1f} s summed, "
                  f"{len(specs)} tiles", flush=True)
    # the same energies cell by cell: the dedupe side mapped onto the conditions
    engine = np.full((plan.strength.size, plan.screening_length.size, plan.l.size, plan.n_r_max), np.nan)
    for (energy, _), spec in zip(results["dedupe"][2], results["dedupe"][3]):
        engine[slice(*spec["strength_slice"]), spec["screening_length_index"]] = energy
    mapped = engine[:, plan.length_index.ravel()]
    direct = np.concatenate([np.concatenate([energy for (energy, _), spec in zip(results["no dedupe"][2],
                                                                                 results["no dedupe"][3])
                                             if spec["strength_slice"][0] == i], axis=1)[0][None]
                             for i in range(plan.strength.size)])
    both = np.isfinite(mapped) & np.isfinite(direct)
    same_count = np.array_equal(np.isfinite(mapped), np.isfinite(direct))
    worst = float(np.max(np.abs(mapped[both] - direct[both]) / np.abs(direct[both]))) if both.any() else 0.0
    ratio = results["no dedupe"][0] / results["dedupe"][0]
    print(f"saving: {ratio:.1f}x in wall time ({results['no dedupe'][1] / results['dedupe'][1]:.1f}x in engine "
          f"time) for {plan.num_cells / plan.num_engine_cells:.1f}x fewer engine cells; energies agree to "
          f"{worst:.1e} relative ({'the same' if same_count else 'DIFFERENT'} levels bound)")
    fermi = json.loads(json.dumps(config))
    fermi["preset"]["screening"] = "finite_temperature"
    start = time.perf_counter()
    fermi_plan = sweep.plan(fermi)
    print(f"the same grid with finite_temperature screening: {fermi_plan.screening_length.size} distinct screening "
          f"lengths of {lengths.size} conditions ({fermi_plan.num_engine_cells} engine cells); plan "
          f"{time.perf_counter() - start:.2f} s")


def run_populations(config_path, cores):
    """The same sweep without and with populations: the cost of the complete level sets."""
    import yaml

    config = sweep.load_config(config_path)
    with tempfile.TemporaryDirectory(prefix="bench_populations_") as tmp:
        tmp = Path(tmp)
        cache = tmp / "numba_cache"
        runs = {}
        for name, on in (("warm-up", False), ("without populations", False), ("with populations", True)):
            path = tmp / f"{name.replace(' ', '_')}.yaml"
            path.write_text(yaml.safe_dump({**config, "populations": on}, sort_keys=False))
            runs[name] = run_workflow(path, cores, tmp / name.replace(" ", "_"), cache)
            res = runs[name]
            print(f"{name}: wall {res['wall_s']:.1f} s for {res['cells']} cells, {res['jobs']} jobs, engine "
                  f"{res['engine_s']:.1f} s summed, cube {res['cube_mb']:.1f} MB", flush=True)
    without, with_ = runs["without populations"], runs["with populations"]
    print(f"populations cost: {with_['wall_s'] / without['wall_s']:.2f}x the wall time "
          f"({with_['engine_s'] / without['engine_s']:.2f}x the engine time) of the same sweep without them")


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cores", type=int, default=2)
    parser.add_argument("--config", default=str(REPO / "config" / "sweeps" / "large.yaml"))
    parser.add_argument("--warm", action="store_true", help="also run the workflow again with a filled kernel cache")
    parser.add_argument("--no-plain", action="store_true", help="skip the plain script (e.g. for the scale sweep)")
    parser.add_argument("--dedupe", action="store_true",
                        help="a sweep over conditions with and without solving each distinct engine cell once "
                             "(default config: config/sweeps/conditions.yaml)")
    parser.add_argument("--populations", action="store_true",
                        help="the same sweep without and with populations: true (default config: the demo, "
                             "config/config.yaml)")
    args = parser.parse_args()
    if args.populations:
        config = args.config if args.config != parser.get_default("config") else str(REPO / "config" / "config.yaml")
        run_populations(Path(config).resolve(), args.cores)
        print(f"(load average at the end: {os.getloadavg()[0]:.2f})")
        return
    if args.dedupe:
        config = args.config if args.config != parser.get_default("config") else \
            str(REPO / "config" / "sweeps" / "conditions.yaml")
        run_dedupe(config, args.cores)
        print(f"(load average at the end: {os.getloadavg()[0]:.2f})")
        return

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
