"""Line benchmark: boundscape.lines against boundscape.bound_levels, per cell, side by side.

The cells are those of config/sweeps/debye_lengths.yaml (the demo before condition axes): Yukawa, Z = 1..6, λ from 0.3 to 300 bohr
(48, log-spaced).  A sweep cell here is one (Z, λ): for the levels that is every l of the demo
(0..3, n_r_max = 8, one bound_levels call each), for the lines the demo's configured lines
(pairs=…, as the sweep asks) and, beside it, every line with n ≤ 4 (no pairs).
Printed, from one run on one machine: the cost of each per cell, their ratios, and how many
lines came out ok.  Wall-clock on whatever else the machine runs; only the ratios of one run mean much.

    python benchmarks/bench_lines.py [--quick]
"""

from __future__ import annotations

import argparse
import time
from pathlib import Path

import numpy as np
import yaml

import boundscape as bs
from boundscape.labels import parse_state

CONFIG = Path(__file__).resolve().parents[1] / "config" / "sweeps" / "debye_lengths.yaml"


def timed(fn, items):
    t0 = time.perf_counter()
    out = [fn(item) for item in items]
    return out, (time.perf_counter() - t0) / len(items)


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="every fourth screening length")
    args = ap.parse_args()
    cfg = yaml.safe_load(CONFIG.read_text())
    grid, family, mass = cfg["grid"], cfg["potential"]["family"], cfg["potential"].get("mass", 1.0)
    axis = grid["screening_length"]
    lams = np.geomspace(axis["start"], axis["stop"], axis["num"])[:: 4 if args.quick else 1]
    pots = [bs.potential(family, float(Z), float(lam), mass) for Z in grid["strength"] for lam in lams]
    ls, n_r_max = [int(l) for l in grid["l"]], int(grid["n_r_max"])
    pairs = [tuple(parse_state(s) for s in line.split("-")) for line in cfg.get("lines") or ["1s-2p"]]
    n_max = max(n for pair in pairs for n, _ in pair)
    l_max = max(l for pair in pairs for _, l in pair)
    print(f"{len(pots)} cells (Z, λ): {family}, Z = {grid['strength'][0]}..{grid['strength'][-1]}, "
          f"λ = {lams[0]:g}..{lams[-1]:g} bohr; levels l = {ls}, n_r_max = {n_r_max}; "
          f"lines {', '.join(cfg.get('lines') or ['1s-2p'])}")
    bs.lines(bs.potential(family, 1.0, 10.0, mass), 2)  # imports and first calls (kernels cached on disk)

    _, t_levels = timed(lambda p: [bs.bound_levels(p, l, n_r_max=n_r_max) for l in ls], pots)
    configured, t_lines = timed(lambda p: bs.lines(p, n_max, l_max=l_max, pairs=pairs), pots)
    every, t_every = timed(lambda p: bs.lines(p, 4), pots)
    found = sum(len(r) for r in configured)
    ok = sum(int(np.sum(r.status == 0)) for r in configured)
    found4 = sum(len(r) for r in every)
    ok4 = sum(int(np.sum(r.status == 0)) for r in every)
    worst = max((float(np.max(r.radial_integral_error / r.radial_integral)) for r in every if len(r)), default=0.0)

    print(f"{'':40}{'ms per cell':>12}{'ratio':>8}")
    print(f"{'bound_levels, l = ' + ','.join(map(str, ls)):40}{t_levels * 1e3:>12.2f}{1.0:>8.2f}")
    print(f"{'lines, the configured ' + str(len(pairs)):40}{t_lines * 1e3:>12.2f}{t_lines / t_levels:>8.2f}"
          f"   {found} lines present, {ok} ok")
    print(f"{'lines, every one with n <= 4':40}{t_every * 1e3:>12.2f}{t_every / t_levels:>8.2f}"
          f"   {found4} lines present, {ok4} ok")
    print(f"per line present: configured {t_lines * len(pots) / max(found, 1) * 1e3:.2f} ms, "
          f"n <= 4 {t_every * len(pots) / max(found4, 1) * 1e3:.2f} ms")
    print(f"largest error estimate of a radial integral (n <= 4), relative: {worst:.1e}")
    print("(the machine is shared: absolute times move with its load; the ratios were taken in one run)")


if __name__ == "__main__":
    main()
