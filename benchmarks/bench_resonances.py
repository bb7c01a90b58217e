"""Resonance benchmark: boundscape.resonances against boundscape.bound_levels, per cell, side by side.

The cells are those of config/sweeps/debye_lengths.yaml (the demo before condition axes): Yukawa, Z = 1..6, λ from 0.3 to 300 bohr
(48, log-spaced), l = 0..3, n_r_max = 8, i.e. every state n_r < 8 that a cell does not bind.
Printed, from one run on one machine:

* bound_levels per cell;
* resonances per cell, cold (the first pass, which also follows each state's pole from its
  threshold once per (l, n_r): the one-scale trajectories) and warm (a second pass over the
  same cells, the trajectories cached in the process);
* warm again with the bound-state count handed over, as a sweep that has just run
  bound_levels would;
* their ratios, and what the states came out as (ok, dissolved with values, out of reach,
  not converged).

Timings are wall-clock on whatever else the machine is running; only the ratios measured in
the same run mean much.

    python benchmarks/bench_resonances.py [--quick]
"""

from __future__ import annotations

import argparse
import collections
import time
from pathlib import Path

import numpy as np
import yaml

import boundscape as bs
from boundscape.engine import DISSOLVED, NOT_CONVERGED, OK

CONFIG = Path(__file__).resolve().parents[1] / "config" / "sweeps" / "debye_lengths.yaml"


def demo_cells(quick=False):
    cfg = yaml.safe_load(CONFIG.read_text())
    grid = cfg["grid"]
    axis = grid["screening_length"]
    lams = np.geomspace(axis["start"], axis["stop"], axis["num"])
    if quick:
        lams = lams[::4]
    cells = [(float(Z), float(lam), int(l)) for Z in grid["strength"] for lam in lams for l in grid["l"]]
    return cfg["potential"]["family"], cfg["potential"].get("mass", 1.0), cells, int(grid["n_r_max"])


def timed(fn, items):
    t0 = time.perf_counter()
    out = [fn(*item) for item in items]
    return out, (time.perf_counter() - t0) / len(items)


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="every fourth screening length")
    args = ap.parse_args()
    family, mass, cells, n_r_max = demo_cells(args.quick)
    pots = [(bs.potential(family, Z, lam, mass), l) for Z, lam, l in cells]
    print(f"{len(pots)} cells: {family}, Z = 1..6, λ = 0.3..300 bohr, l = 0..3, n_r_max = {n_r_max}")
    bs.bound_levels(bs.potential(family, 1.0, 10.0, mass), 0)  # imports and first calls, for both sides

    levels, t_levels = timed(lambda p, l: bs.bound_levels(p, l, n_r_max=n_r_max), pots)
    t0 = time.perf_counter()
    cold, t_cold = timed(lambda p, l: bs.resonances(p, l, n_r_max=n_r_max), pots)
    cold_total = time.perf_counter() - t0
    warm, t_warm = timed(lambda p, l: bs.resonances(p, l, n_r_max=n_r_max), pots)
    counted = [(p, l, lv.num_bound) for (p, l), lv in zip(pots, levels)]
    given, t_given = timed(lambda p, l, nb: bs.resonances(p, l, n_r_max=n_r_max, num_bound=nb), counted)

    def equal(a, b):
        return np.array_equal(a.energy, b.energy, equal_nan=True) and np.array_equal(a.width, b.width, equal_nan=True)

    same = all(equal(a, b) and equal(a, c) for a, b, c in zip(cold, warm, given))
    counts = collections.Counter()
    worst = 0.0
    for res in warm:
        for i in range(len(res.n_r)):
            status = int(res.status[i])
            if status == OK:
                key = "ok"
                scale = abs(res.energy[i]) if res.kind == "virtual" else abs(complex(res.energy[i], res.width[i] / 2))
                worst = max(worst, res.energy_error[i] / scale)
            elif status == DISSOLVED:
                key = "dissolved, pole given (Γ > E_r)" if np.isfinite(res.energy[i]) else "dissolved, out of reach"
            else:
                key = "not converged" if status == NOT_CONVERGED else f"status {status}"
            counts[(res.kind, key)] += 1
    lost = sum(len(r.n_r) for r in warm)
    bound = sum(len(r.energy) for r in levels)

    print(f"{'':34}{'bound_levels':>14}{'resonances':>14}")
    print(f"{'cost per cell, ms (cold)':34}{t_levels * 1e3:>14.2f}{t_cold * 1e3:>14.2f}"
          f"   first pass: follows each pole from threshold once ({cold_total:.1f} s in all)")
    print(f"{'cost per cell, ms (warm)':34}{'':>14}{t_warm * 1e3:>14.2f}")
    print(f"{'  ... given num_bound (as a sweep)':34}{'':>14}{t_given * 1e3:>14.2f}"
          "   the count bound_levels already made is not redone")
    print(f"{'states per cell':34}{bound / len(pots):>14.2f}{lost / len(pots):>14.2f}")
    print(f"ratio resonances / bound_levels: cold {t_cold / t_levels:.2f}, warm {t_warm / t_levels:.2f}, "
          f"warm given num_bound {t_given / t_levels:.2f}")
    print(f"cold and warm passes give identical values: {same}")
    print("states past threshold:")
    for (kind, key), n in sorted(counts.items()):
        print(f"  {kind:>9}  {key:<34}{n:>6}")
    print(f"largest error estimate of an ok pole, relative: {worst:.1e}")
    print("(the machine is shared: absolute times move with its load; the ratios were taken in one run)")


if __name__ == "__main__":
    main()
