"""Engine benchmark: boundscape.bound_levels against the plain approach, side by side.

The plain approach is what a physicist writes first: a uniform grid of N = 2000 points on
(0, 100 bohr], three-point differences, scipy.linalg.eigh_tridiagonal for every eigenvalue
below zero.  Both run over the same cells (families × Z × λ × l, a third of them close to a
threshold).  Printed: cost per cell of each, their ratio, each one's largest relative error
against converged values, and each one's number of cells with a wrong bound-state count.

Converged values: exact where known (Hulthén l = 0, square well); elsewhere the engine itself
with every refinement doubled and a wider box margin, whose own agreement with the exact
Hulthén levels is printed too.

    python benchmarks/bench_engine.py [--quick]
"""

from __future__ import annotations

import argparse
import math
import time

import numpy as np
from scipy.linalg import eigh_tridiagonal

import boundscape as bs
from boundscape.engine import levels as radial


def plain_levels(pot, l, n=2000, r_max=100.0):
    h = r_max / n
    r = h * np.arange(1, n + 1)
    v = pot(r) + l * (l + 1) / (2 * pot.mass * r * r)
    d = 1.0 / (pot.mass * h * h) + v
    e = np.full(n - 1, -0.5 / (pot.mass * h * h))
    lowest = float(np.min(v)) - 1.0
    w = eigh_tridiagonal(d, e, eigvals_only=True, select="v", select_range=(lowest, 0.0))
    return np.sort(w)


def cells(quick=False):
    out = []
    families = ["yukawa", "ecsc", "hulthen", "square_well"]
    for family in families:
        for Z in (1.0, 2.0):
            for l in (0, 1, 2):
                if family == "square_well":
                    base = [0.8, 1.5, 3.0, 6.0]
                else:
                    base = [1.5 / Z, 5.0 / Z, 20.0 / Z, 60.0 / Z]
                near = []
                for n_r in (0, 1):
                    lc = bs.critical_screening_length(family, Z, l, n_r)
                    near += [lc * 1.02, lc * 1.001, lc * (1 + 1e-5)]
                for lam in base + near:
                    out.append((family, Z, lam, l))
    return out[::4] if quick else out


def square_well_levels(depth, radius, l, mass=1.0):
    """Exact square-well levels: zeros of the Wronskian of r·j_l(kr) inside and r·k_l(κr)
    outside at r = radius (any quantum mechanics textbook), scanned in E then brentq."""
    from scipy.optimize import brentq
    from scipy.special import spherical_jn, kve

    def wronskian(E):
        k, kap = math.sqrt(2 * mass * (E + depth)), math.sqrt(-2 * mass * E)
        x, z = k * radius, kap * radius
        uin = radius * spherical_jn(l, x)
        duin = spherical_jn(l, x) + x * spherical_jn(l, x, derivative=True)
        nu = l + 0.5  # r·k_l(κr) ∝ √r K_ν(κr), exponentially scaled
        uout = math.sqrt(radius) * kve(nu, z)
        duout = uout * (0.5 / radius - kap * (kve(nu - 1, z) / kve(nu, z) + nu / z))
        return duin * uout - duout * uin

    es = -np.concatenate([np.linspace(depth * (1 - 1e-9), 1e-3 * depth, 4000), np.geomspace(1e-3 * depth, 1e-14 * depth, 2000)])
    w = np.array([wronskian(e) for e in es])
    roots = [brentq(wronskian, es[i], es[i + 1], xtol=1e-300, rtol=1e-15)
             for i in range(len(es) - 1) if np.sign(w[i]) != np.sign(w[i + 1])]
    return np.array(sorted(roots))


def reference(pot, l):
    if pot.family == "square_well":
        return square_well_levels(pot.strength, pot.screening_length, l, pot.mass), "exact"
    if pot.family == "hulthen" and l == 0 and pot.mass == 1.0:
        Z, lam = pot.strength, pot.screening_length
        n = np.arange(1, int(math.ceil(math.sqrt(2 * Z * lam))) + 1)
        n = n[n * n < 2 * Z * lam]
        return -0.5 * (Z / n - n / (2 * lam)) ** 2, "exact"
    saved = radial.FACTORS, radial.DECAY_LENGTHS
    radial.FACTORS, radial.DECAY_LENGTHS = (4, 6, 8, 10, 12), 30.0
    try:
        res = bs.bound_levels(pot, l)
    finally:
        radial.FACTORS, radial.DECAY_LENGTHS = saved
    return res.energy, "engine x2"


def max_rel(values, ref, scale):
    """Largest relative error over the levels both have, among those with |E| >= 1e-6·scale."""
    k = min(len(values), len(ref))
    a, b = np.asarray(values[:k], dtype=float), np.asarray(ref[:k], dtype=float)
    keep = np.abs(b) >= 1e-6 * scale
    if not np.any(keep):
        return 0.0
    return float(np.nanmax(np.abs(a[keep] / b[keep] - 1.0)))


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="a quarter of the cells")
    args = ap.parse_args()
    todo = cells(args.quick)
    pots = [(bs.potential(f, Z, lam), l) for f, Z, lam, l in todo]
    print(f"{len(pots)} cells: families yukawa, ecsc, hulthen, square_well; Z 1, 2; l 0-2; "
          f"{sum(1 for c in todo if c[2] not in (0.8, 1.5, 3.0, 6.0) and not any(abs(c[2]*c[1] - b) < 1e-12 for b in (1.5, 5, 20, 60)))} near a threshold")

    refs = [reference(p, l) for p, l in pots]
    # warm-up, so neither side pays first-call costs
    bs.bound_levels(*pots[0])
    plain_levels(*pots[0])

    t0 = time.perf_counter()
    ours = [bs.bound_levels(p, l) for p, l in pots]
    t_ours = (time.perf_counter() - t0) / len(pots)
    t0 = time.perf_counter()
    plain = [plain_levels(p, l) for p, l in pots]
    t_plain = (time.perf_counter() - t0) / len(pots)

    err_ours = err_plain = 0.0
    miss_ours = miss_plain = 0
    flagged = 0
    exact_agreement = 0.0
    for (p, l), (ref, kind), a, b in zip(pots, refs, ours, plain):
        n_ref = len(ref)
        miss_ours += int(a.num_bound != n_ref or len(a.energy) != n_ref)
        miss_plain += int(len(b) != n_ref)
        err_ours = max(err_ours, max_rel(a.energy, ref, p.energy_scale))
        err_plain = max(err_plain, max_rel(b, ref, p.energy_scale))
        flagged += int(np.any(a.status != 0))
    # how good is the "engine x2" reference? against the exact levels
    for (p, l), (ref, kind) in zip(pots, refs):
        if kind == "exact":
            saved = radial.FACTORS, radial.DECAY_LENGTHS
            radial.FACTORS, radial.DECAY_LENGTHS = (4, 6, 8, 10, 12), 30.0
            try:
                e2 = bs.bound_levels(p, l).energy
            finally:
                radial.FACTORS, radial.DECAY_LENGTHS = saved
            exact_agreement = max(exact_agreement, max_rel(e2, ref, p.energy_scale))

    print(f"{'':28}{'boundscape':>14}{'plain N=2000':>16}")
    print(f"{'cost per cell (ms)':28}{t_ours * 1e3:>14.3f}{t_plain * 1e3:>16.3f}")
    print(f"{'max relative error':28}{err_ours:>14.2e}{err_plain:>16.2e}   (levels with |E| >= 1e-6 Z^2 mu)")
    print(f"{'cells with a wrong count':28}{miss_ours:>14d}{miss_plain:>16d}   of {len(pots)}")
    print(f"cost ratio (boundscape / plain): {t_ours / t_plain:.2f}")
    print(f"error ratio (plain / boundscape): {err_plain / max(err_ours, 1e-300):.2e}")
    print(f"cells with a level flagged not converged: {flagged}")
    print(f"reference check: 'engine x2' against the exact levels: max relative error {exact_agreement:.2e}")


if __name__ == "__main__":
    main()
