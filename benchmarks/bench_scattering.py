"""Scattering benchmark: boundscape.scattering and phase_shifts against boundscape.bound_levels,
per cell, side by side in one run.

The cells are those of config/sweeps/debye_lengths.yaml (the demo before condition axes): Yukawa, Z = 1..6, λ from 0.3 to 300 bohr
(48, log-spaced), l = 0..3.  Printed, from one run on one machine:

* bound_levels per cell (every level with n_r < n_r_max, as a sweep solves a cell);
* scattering per cell (a_l, 1/a_l, r_e), on its own and with the bound-state count handed over
  as a sweep that has just run bound_levels would;
* phase_shifts per cell at 8 energies, kλ = 0.01..10 log-spaced (threshold region to kλ = 10);
* the sweep's cost: every tile of the same cells solved as the workflow solves it
  (``boundscape.sweep.solve_tile``), without ``scattering:``, with ``scattering: true`` and with
  ``scattering: {energies: [8 energies, 1e-4..1 hartree]}``, per cell and as ratios;
* their ratios; how many results are flagged; the largest error estimates; and, on every 8th
  cell, the largest difference from a reference run with the grid refined 8× (rtol 1e-14).

Timings are wall-clock on whatever else the machine is running; only the ratios measured in
the same run mean much.

    python benchmarks/bench_scattering.py [--quick]
"""

from __future__ import annotations

import argparse
import math
import time
from pathlib import Path

import numpy as np
import yaml

import boundscape as bs
from boundscape import sweep

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


def angle(s, L):
    return math.atan((s.length / L) ** (2 * s.l + 1)) if abs(s.length) <= L else \
        math.copysign(math.pi / 2, s.length) - math.atan((s.inverse_length * L) ** (2 * s.l + 1))


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="every fourth screening length")
    args = ap.parse_args()
    family, mass, cells, n_r_max = demo_cells(args.quick)
    t0 = time.perf_counter()
    bs.bound_levels(bs.potential(family, 1.0, 10.0, mass), 0)  # imports, first calls and compiles, both sides
    bs.scattering(bs.potential(family, 1.0, 10.0, mass), 0)
    bs.phase_shifts(bs.potential(family, 1.0, 10.0, mass), 0, [0.1])
    first = time.perf_counter() - t0
    pots = [(bs.potential(family, Z, lam, mass), l) for Z, lam, l in cells]
    print(f"{len(pots)} cells: {family}, Z = 1..6, λ = 0.3..300 bohr, l = 0..3 "
          f"(imports and first calls: {first:.1f} s)")

    levels, t_levels = timed(lambda p, l: bs.bound_levels(p, l, n_r_max=n_r_max), pots)
    alone, t_alone = timed(lambda p, l: bs.scattering(p, l), pots)
    counted = [(p, l, lv.num_bound) for (p, l), lv in zip(pots, levels)]
    given, t_given = timed(lambda p, l, nb: bs.scattering(p, l, num_bound=nb), counted)
    energies = [(p, l, nb, (np.geomspace(0.01, 10.0, 8) / p.screening_length) ** 2 / (2 * p.mass))
                for p, l, nb in counted]
    shifts, t_shifts = timed(lambda p, l, nb, e: bs.phase_shifts(p, l, e, num_bound=nb), energies)
    again, _ = timed(lambda p, l: bs.scattering(p, l), pots)

    same = all(a.length == b.length and (a.effective_range == b.effective_range or
                                         math.isnan(a.effective_range) and math.isnan(b.effective_range))
               for a, b in zip(alone, again))
    counts_agree = all(s.num_bound == lv.num_bound for s, lv in zip(alone, levels))
    flagged = sum(s.status != 0 for s in alone)
    flagged_shifts = sum(int(np.count_nonzero(ps.status)) for ps in shifts)
    worst_angle = max(_angle_error(s, p.screening_length) for s, (p, _) in zip(alone, pots))
    worst_re = max((s.effective_range_error / max(abs(s.effective_range), p.screening_length)
                    for s, (p, _) in zip(alone, pots) if s.l == 0), default=0.0)
    worst_delta = max(float(np.max(ps.phase_shift_error / np.maximum(np.abs(ps.phase_shift), 1e-300))) for ps in shifts)
    dev_angle = dev_re = 0.0
    for (p, l), s in list(zip(pots, alone))[::8]:
        ref = bs.scattering(p, l, rtol=1e-14)
        L = p.screening_length
        dev_angle = max(dev_angle, abs(angle(s, L) - angle(ref, L)))
        if l == 0:
            dev_re = max(dev_re, abs(s.effective_range - ref.effective_range) / max(abs(ref.effective_range), L))

    print(f"{'':40}{'bound_levels':>14}{'scattering':>14}{'phase_shifts':>14}")
    print(f"{'cost per cell, ms':40}{t_levels * 1e3:>14.2f}{t_alone * 1e3:>14.2f}{t_shifts * 1e3:>14.2f}"
          "   (phase_shifts: 8 energies, kλ = 0.01..10)")
    print(f"{'  ... given num_bound (as a sweep)':40}{'':>14}{t_given * 1e3:>14.2f}")
    print(f"ratio scattering / bound_levels: {t_alone / t_levels:.2f} ({t_given / t_levels:.2f} given num_bound); "
          f"phase_shifts (8 energies) / bound_levels: {t_shifts / t_levels:.2f}")
    print(f"flagged not_converged: scattering {flagged} of {len(alone)}, phase shifts {flagged_shifts} of "
          f"{8 * len(shifts)}")
    print(f"num_bound equals bound_levels' count in every cell: {counts_agree}; "
          f"two passes give identical values: {same}")
    print(f"largest error estimate: angle arctan(a^(2l+1)/λ^(2l+1)) {worst_angle:.1e} rad, r_e {worst_re:.1e} "
          f"(relative to max(|r_e|, λ)), δ_l {worst_delta:.1e} (relative)")
    print(f"every 8th cell against a grid refined 8x (rtol 1e-14): angle {dev_angle:.1e} rad, r_e {dev_re:.1e}")
    sweep_costs(args.quick)
    print("(the machine is shared: absolute times move with its load; the ratios were taken in one run)")


SWEEP_ENERGIES = np.geomspace(1e-4, 1.0, 8).tolist()  # hartree


def sweep_costs(quick=False):
    """The cells of the config solved tile by tile as the workflow does, with and without
    scattering: the cost per cell a user pays for the key."""
    cfg = yaml.safe_load(CONFIG.read_text())
    for key in ("resonances", "lines", "preset"):  # their own costs, measured by their own benchmarks
        cfg.pop(key, None)
    if quick:
        cfg["grid"]["screening_length"]["num"] = 12
    seconds = {}
    for label, section in (("levels only", False), ("scattering: true", True),
                           ("+ 8 energies", {"energies": SWEEP_ENERGIES})):
        plan = sweep.plan({**cfg, "scattering": section})
        specs = [plan.tile_spec(tile) for tile in plan.tiles]
        t0 = time.perf_counter()
        flagged = 0
        for spec in specs:
            out = sweep.solve_tile(spec)
            flagged += sum(int(np.count_nonzero(out[name] != 0)) for name in ("scattering_status", "phase_shift_status")
                           if name in out)
        seconds[label] = (time.perf_counter() - t0) / plan.num_cells
        cells = plan.num_cells
    base = seconds["levels only"]
    print(f"\nthe sweep, {cells} cells in tiles (sweep.solve_tile), cost per cell, ms:")
    print("".join(f"{label:>20}" for label in seconds))
    print("".join(f"{value * 1e3:>20.2f}" for value in seconds.values()))
    print("".join(f"{value / base:>19.2f}x" for value in seconds.values()) + "   (ratio to levels only)")
    print(f"flagged in the sweep with energies: {flagged} of {cells} zero-energy results and "
          f"{cells * len(SWEEP_ENERGIES)} phase shifts")


def _angle_error(s, L):
    # the error of the angle arctan(a^p/L^p) from a's: |dθ/da| δa = p a^{p−1} L^p/(L^{2p} + a^{2p}) δa
    p = 2 * s.l + 1
    x = abs(s.length) / L
    if not math.isfinite(x):
        return s.inverse_length_error * L
    return p * x ** (p - 1) / (1 + x ** (2 * p)) * s.length_error / L


if __name__ == "__main__":
    main()
