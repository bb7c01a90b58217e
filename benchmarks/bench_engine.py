"""Engine benchmark: boundscape.bound_levels against the plain approach, side by side.

The plain approach is what a physicist writes first: a uniform grid of N = 2000 points on
(0, 100 bohr], three-point differences, scipy.linalg.eigh_tridiagonal for every eigenvalue
below zero.  Both solve the same distinct random cells (no cell repeats, so nothing is served
from a cache): families yukawa, ecsc, hulthen, square_well, a tabulated potential, woods_saxon
(a = 0.3 bohr), ion_sphere and two_yukawa (Malfliet–Tjon III's c and ρ), l 0-4, every bound
level, half of the cells within 1 % of a threshold (λ = λ_c(1 ± ε), ε log-uniform in
1e-5 .. 1e-2).  Timed in alternating rounds in one process; printed: cost per cell of each,
their ratio (median over rounds), the first call's cost (numba's cache loaded or, with --cold,
every kernel compiled), each one's largest relative error and number of wrong counts.

Reference values: exact where known (Hulthén l = 0; the square well's matching condition,
roots by brentq; Woods–Saxon l = 0 in hypergeometric functions, mpmath); elsewhere the engine itself with a 2.5× finer design grid (θ = 0.1) and a 30
decay-length box, whose own agreement with the exact levels is printed too.  Counts of the
cells near a threshold are known exactly: n_r below and n_r + 1 above λ_c(n_r).

    python benchmarks/bench_engine.py [--cells-per-family 48] [--rounds 3] [--seed 8] [--cold]
"""

from __future__ import annotations

import argparse
import math
import os
import statistics
import sys
import tempfile
import time

if "--cold" in sys.argv:  # before numba is imported: an empty cache, so every kernel compiles
    os.environ["NUMBA_CACHE_DIR"] = tempfile.mkdtemp(prefix="bench_engine_cold_")

import numpy as np  # noqa: E402
from scipy.linalg import eigh_tridiagonal  # noqa: E402
from scipy.optimize import brentq  # noqa: E402
from scipy.special import kve, spherical_jn  # noqa: E402

import boundscape as bs  # noqa: E402
from boundscape.engine.potentials import validate_table  # noqa: E402

FAMILIES = ("yukawa", "ecsc", "hulthen", "square_well", "tabulated", "woods_saxon", "ion_sphere", "two_yukawa")
# the families' own parameters in every cell: a Woods–Saxon surface thinner than the deep wells'
# decay lengths (κa ≤ 3; thicker ones are the known gap of tests/test_families_woods_saxon.py)
PARAMETERS = {"woods_saxon": {"diffuseness": 0.3}}
WELLS = ("square_well", "woods_saxon")  # strength a depth in hartree, length a radius


def plain_levels(pot, l, n=2000, r_max=100.0):
    h = r_max / n
    r = h * np.arange(1, n + 1)
    v = pot(r) + l * (l + 1) / (2 * pot.mass * r * r)
    d = 1.0 / (pot.mass * h * h) + v
    e = np.full(n - 1, -0.5 / (pot.mass * h * h))
    lowest = float(np.min(v)) - 1.0
    w = eigh_tridiagonal(d, e, eigvals_only=True, select="v", select_range=(lowest, 0.0))
    return np.sort(w)


def core_table():
    """A screened-ion core: −(1 + 2e^{−r})/r on 2000 points from 1e-6 bohr with its −1/r tail
    declared.  (Below its first point a table holds r·V fixed, a kink in V' that costs an h²
    error term; a table that starts at 1e-3 bohr limits a deep level to ~1e-9.)"""
    r = np.geomspace(1e-6, 40.0, 2000)
    v = -(1.0 + 2.0 * np.exp(-r)) / r
    v[-1] = -1.0 / r[-1]
    return validate_table(r, v, coulomb_tail=1.0, source="benchmark core")


def make(family, Z, lam, table):
    if family == "tabulated":
        return bs.potential("tabulated", Z, lam, table=table, screened=True, coulomb_tail=1.0)
    return bs.potential(family, Z, lam, **PARAMETERS.get(family, {}))


def critical(family, Z, l, n_r, table):
    if family == "tabulated":
        return bs.critical_screening_length("tabulated", Z, l, n_r, table=table, coulomb_tail=1.0)
    return bs.critical_screening_length(family, Z, l, n_r, **PARAMETERS.get(family, {}))


def draw_cells(per_family, seed, table):
    """(family, Z, λ, l, expected count or None) with no two alike; half near a threshold."""
    rng = np.random.default_rng(seed)
    cells = []
    for family in FAMILIES:
        for i in range(per_family):
            l = int(rng.integers(0, 5))
            if family in WELLS:
                Z = float(np.exp(rng.uniform(0.0, math.log(50.0))))
            else:
                Z = float(rng.uniform(1.0, 8.0))
            if i % 2 == 0:
                if family in WELLS:
                    lam = float(np.exp(rng.uniform(math.log(0.5), math.log(5.0))))
                else:
                    lam = float(1.0 / (Z * np.exp(rng.uniform(math.log(0.004), math.log(1.1)))))
                cells.append((family, Z, lam, l, None))
            else:
                n_r = int(rng.integers(0, 5))
                eps = float(10 ** rng.uniform(-5, -2)) * (1 if rng.random() < 0.5 else -1)
                lam_c = critical(family, Z, l, n_r, table)
                cells.append((family, Z, lam_c * (1 + eps), l, n_r + (1 if eps > 0 else 0)))
    return cells


def square_well_levels(depth, radius, l, mass=1.0):
    """Exact square-well levels: zeros of the Wronskian of r·j_l(kr) inside and r·k_l(κr)
    outside at r = radius (Schiff, Quantum Mechanics, §15), scanned in E then brentq."""
    def wronskian(E):
        k, kap = math.sqrt(2 * mass * (E + depth)), math.sqrt(-2 * mass * E)
        x, z = k * radius, kap * radius
        uin = radius * spherical_jn(l, x)
        duin = spherical_jn(l, x) + x * spherical_jn(l, x, derivative=True)
        nu = l + 0.5  # r·k_l(κr) ∝ √r K_ν(κr), exponentially scaled
        uout = math.sqrt(radius) * kve(nu, z)
        duout = uout * (0.5 / radius - kap * (kve(nu - 1, z) / kve(nu, z) + nu / z))
        return duin * uout - duout * uin

    es = -np.concatenate([np.linspace(depth * (1 - 1e-9), 1e-3 * depth, 4000),
                          np.geomspace(1e-3 * depth, 1e-14 * depth, 2000)])
    w = np.array([wronskian(e) for e in es])
    roots = [brentq(wronskian, es[i], es[i + 1], xtol=1e-300, rtol=1e-15)
             for i in range(len(es) - 1) if np.sign(w[i]) != np.sign(w[i + 1])]
    return np.array(sorted(roots))


def woods_saxon_s_levels(depth, radius, a, mass=1.0, scan=800):
    """The l = 0 Woods–Saxon levels exactly: zeros at r = 0 of
    u = y^ν (1 − y)^{ika} ₂F₁(ν + ika, ν + ika + 1; 2ν + 1; y), y = 1/(1 + e^{(r−R)/a}), ν = κa
    (the s-wave problem in hypergeometric functions, e.g. Flügge, Practical Quantum Mechanics;
    derived again in tests/families_reference.py), mpmath.hyp2f1, scanned in E, then brentq."""
    import mpmath

    def u0(E):
        with mpmath.workdps(40):
            nu = mpmath.sqrt(-2 * mass * mpmath.mpf(E)) * a
            ika = 1j * mpmath.sqrt(2 * mass * (depth + mpmath.mpf(E))) * a
            q = mpmath.exp(-mpmath.mpf(radius) / a)
            return float(((q / (1 + q)) ** ika * mpmath.hyp2f1(nu + ika, nu + ika + 1, 2 * nu + 1, 1 / (1 + q))).real)

    es = -depth * (1.0 - np.linspace(0.0, 1.0, scan + 1)[1:-1]) ** 2
    w = [u0(e) for e in es]
    return np.array([brentq(u0, es[i], es[i + 1], xtol=1e-15 * depth, rtol=1e-15)
                     for i in range(len(es) - 1) if np.signbit(w[i]) != np.signbit(w[i + 1])])


def finer(pot, l):
    """The engine on a 2.5× finer design grid and a 30 decay-length box."""
    return bs.bound_levels(pot, l, resolution=bs.Resolution(theta=0.1, decay_lengths=30.0)).energy


def exact(pot, l):
    if pot.family == "square_well":
        return square_well_levels(pot.strength, pot.screening_length, l, pot.mass)
    if pot.family == "woods_saxon" and l == 0:
        return woods_saxon_s_levels(pot.strength, pot.screening_length, pot.params["diffuseness"], pot.mass)
    if pot.family == "hulthen" and l == 0 and pot.mass == 1.0:
        Z, lam = pot.strength, pot.screening_length
        n = np.arange(1, int(math.ceil(math.sqrt(2 * Z * lam))) + 1)
        n = n[n * n < 2 * Z * lam]
        return -0.5 * (Z / n - n / (2 * lam)) ** 2
    return None


def scale_of(pot):
    return pot.strength if pot.family in WELLS else pot.strength**2 * pot.mass


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
    ap.add_argument("--cells-per-family", type=int, default=48)
    ap.add_argument("--rounds", type=int, default=3)
    ap.add_argument("--seed", type=int, default=8)
    ap.add_argument("--cold", action="store_true", help="start from an empty kernel cache (compile everything)")
    args = ap.parse_args()

    # the first call: loads the compiled kernels from numba's cache (or compiles them)
    t0 = time.perf_counter()
    bs.bound_levels(bs.potential("yukawa", 1.0, 10.0), 0)
    first_call = time.perf_counter() - t0

    table = core_table()
    cells = draw_cells(args.cells_per_family, args.seed, table)
    pots = [(make(f, Z, lam, table), l) for f, Z, lam, l, _ in cells]
    assert len({(f, Z, lam, l) for f, Z, lam, l, _ in cells}) == len(cells), "cells must be distinct"
    near = sum(1 for c in cells if c[4] is not None)
    print(f"{len(cells)} distinct cells: {', '.join(FAMILIES)} ({args.cells_per_family} each), l 0-4; "
          f"{near} ({near / len(cells):.0%}) within 1 % of a threshold")
    print(f"first call (kernels {'compiled' if args.cold else 'loaded from the cache'}): {first_call:.2f} s")

    # alternating rounds, each over every cell (the engine's cells are new to it in round 1 only,
    # but it keeps nothing between cells: rounds differ only by the machine's load)
    t_ours, t_plain = [], []
    for _ in range(args.rounds):
        t = time.perf_counter()
        ours = [bs.bound_levels(p, l) for p, l in pots]
        t_ours.append((time.perf_counter() - t) / len(pots))
        t = time.perf_counter()
        plain = [plain_levels(p, l) for p, l in pots]
        t_plain.append((time.perf_counter() - t) / len(pots))
    ratios = [a / b for a, b in zip(t_ours, t_plain)]

    err_ours = err_plain = ref_check = 0.0
    miss_ours = miss_plain = flagged = 0
    by_family = {f: [0.0, 0, 0, 0] for f in FAMILIES}  # max error, wrong counts, flagged cells, levels
    for (p, l), cell, a, b in zip(pots, cells, ours, plain):
        ref = exact(p, l)
        if ref is None:
            ref = finer(p, l)
        else:
            ref_check = max(ref_check, max_rel(finer(p, l), ref, scale_of(p)))
        expected = cell[4] if cell[4] is not None else len(ref)
        miss_ours += int(a.num_bound != expected or len(a.energy) != expected)
        miss_plain += int(len(b) != expected)
        err_ours = max(err_ours, max_rel(a.energy, ref, scale_of(p)))
        err_plain = max(err_plain, max_rel(b, ref, scale_of(p)))
        flagged += int(np.any(a.status != 0))
        row = by_family[p.family]
        row[0] = max(row[0], max_rel(a.energy, ref, scale_of(p)))
        row[1] += int(a.num_bound != expected or len(a.energy) != expected)
        row[2] += int(np.any(a.status != 0))
        row[3] += len(a.energy)

    levels_total = sum(len(a.energy) for a in ours)
    print(f"{levels_total} levels in all")
    print(f"{'':30}{'boundscape':>14}{'plain N=2000':>16}")
    print(f"{'cost per cell (ms), median':30}{statistics.median(t_ours) * 1e3:>14.3f}{statistics.median(t_plain) * 1e3:>16.3f}")
    print(f"{'max relative error':30}{err_ours:>14.2e}{err_plain:>16.2e}   (levels with |E| >= 1e-6 Z^2 mu)")
    print(f"{'cells with a wrong count':30}{miss_ours:>14d}{miss_plain:>16d}   of {len(pots)}")
    print(f"cost ratio (boundscape / plain), per round: {', '.join(f'{r:.2f}' for r in ratios)}; "
          f"median {statistics.median(ratios):.2f}")
    amortised = statistics.median(t_ours) + first_call / len(pots)
    print(f"with the first call spread over these {len(pots)} cells: {amortised * 1e3:.3f} ms per cell, "
          f"ratio {amortised / statistics.median(t_plain):.2f}")
    print(f"cells with a level flagged not converged: {flagged}")
    print(f"reference check: the finer engine against the exact levels: max relative error {ref_check:.2e}")
    print(f"{'family':14}{'levels':>8}{'max rel. error':>16}{'wrong counts':>14}{'flagged cells':>15}")
    for family, (err, miss, flag, count) in by_family.items():
        print(f"{family:14}{count:>8d}{err:>16.2e}{miss:>14d}{flag:>15d}")
    print(f"(load average during the run: {os.getloadavg()[0]:.2f})")


if __name__ == "__main__":
    main()
