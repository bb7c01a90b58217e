"""A whole cell (one potential, one l) in one compiled call: the exact count, and every level's
box, grid, eigenvalues on h, h/2, h/4 and their extrapolation.

Count.  For a short-range potential the exact count N_b comes from the zero-energy problem
(:mod:`.zero_energy`): Sturm counts on the E = 0 grid at 0 and ±margin·scale, the marginal
eigenvalue μ_k settled on the grid h/2 or extrapolated.

A level.  A Langer-WKB guess sets the level's box R = r_t + DECAY_LENGTHS/κ (or the potential's
range, where the exterior closes it exactly; always there for a potential that jumps at its
support) and the design grid (θ = 0.25 rad of local wavenumber per coarse step).  Sturm counts
isolate level k if Newton's method with Cooley's correction, iterated in κ, does not settle on a
solution with k nodes by itself (:mod:`.numerov`).  If the solved level asks for another box or
grid, the grid is designed again.  Grids h, h/2, h/4 share one array of nodes; Richardson in
h⁴, h⁶ (:mod:`..richardson`); the error estimate is the change against the two-grid
extrapolation; θ shrinks by 0.6 while it misses the tolerance.  Everything happens here without
returning to Python: per level the interpreter would otherwise cost more than the arithmetic.
Only the exterior's share of ⟨r⟩ is left to the caller (:mod:`.levels`).
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit

from .. import jitcache
from ..potentials.exterior import TAIL_CONFINING, TAIL_FIXED, TAIL_SHORT
from ..potentials.kernels import FORMULA
from ..richardson import extrapolate_grids
from .design import box, build, design, fits, samples, wkb_energy
from .numerov import A1, A2, GRID_RESULT, b1, f8, i8
from .search import grid_parameters, solve_grid, sturm

_saved_cache_dir = jitcache.enter()  # this module's kernels are cached by jitcache's rule

__all__ = ["solve_cell", "zero_energy_count", "ROW", "REASONS"]

# Columns of a level's row in the result.
ROW = {name: i for i, name in enumerate(
    ("energy", "error", "status", "reason", "R", "closed", "norm0", "norm1", "norm2", "first0", "first1", "first2",
     "uend0", "uend1", "uend2", "beta", "c", "tc", "t0", "t1", "n", "e0", "e1", "e2", "passes", "attempts"))}
REASONS = ("", "level below the reach of every grid tried", "level not bound on its grid (within discretisation "
           "error of threshold)", "Newton iteration on the coarse grid failed", "Newton iteration on a finer grid "
           "failed", "error estimate exceeds the tolerance", "no attempt converged",
           "its grid would exceed the engine's limit on grid nodes (engine.limits.MAX_NODES)")
_WIDTH = len(ROW)


@njit([(FORMULA, A1, A1, A2, f8, i8, A1, A1, f8, f8, f8, f8, f8, f8, f8, i8,)], cache=True)
def zero_energy_count(vfun, fp, tx, tcoef, mass, l, rs, veff, r_min, support, r_core, scale, theta, h_max, margin,
                      max_nodes):
    """The exact count and its status (1: the marginal μ_k did not converge): Sturm counts on the
    E = 0 grids h and h/2 at 0, and on h at ±margin·scale.  A μ_k whose sign the two grids
    disagree on, or that lies within the margin of zero, is the one the coarse count may misjudge
    (two states within discretisation error of threshold at once do not occur); it is settled on
    the grid h/2 if its sign is clearly beyond its error there, else extrapolated from h, h/2, h/4
    (as the critical lengths are, so that a cell just on either side of a threshold is counted
    consistently with its critical length).  The h/2 count catches a coarse grid whose error
    exceeds the margin (the ion sphere's 2p just above threshold: μ off by 1.2e-5 of Z²μ on h, by
    7e-7 on h/2).  Status 2: the grid would exceed ``max_nodes`` (the count is then not known)."""
    beta, c, tc, t0, t1, n = design(rs, veff, mass, l, 0.0, r_min, support, r_core, theta, h_max)
    if 4 * n > max_nodes:
        return -1, 2
    a, g_end, gp_end = build(vfun, fp, tx, tcoef, mass, l, beta, c, tc, t0, t1, n, support, 1)
    fixed = -l / support
    prm = grid_parameters(mass, l, TAIL_FIXED, fixed, support, g_end, gp_end, scale, False)
    h = (t1 - t0) / n
    count = sturm(a, prm, 1, n, h, 0.0)
    half, g_half, gp_half = build(vfun, fp, tx, tcoef, mass, l, beta, c, tc, t0, t1, n, support, 2)
    prm_half = grid_parameters(mass, l, TAIL_FIXED, fixed, support, g_half, gp_half, scale, False)
    count_half = sturm(half, prm_half, 1, 2 * n, h / 2.0, 0.0)
    delta = margin * scale
    k = -1
    if count_half != count:
        k = min(count, count_half)
    elif count > 0 and sturm(a, prm, 1, n, h, -delta) < count:
        k = count - 1
    elif sturm(a, prm, 1, n, h, delta) > count:
        k = count
    if k < 0:
        return count, 0
    # μ_k on the grids h and h/2, and on h/4 if still unclear (located from 0 by Sturm counts:
    # in a wide box other μ, of states or of the box, may lie as close to 0)
    mu = np.zeros(3)
    start = 0.0
    value = 0.0
    for i in range(3):
        if i == 0:
            fine, ge, gpe = a, g_end, gp_end
        elif i == 1:
            fine, ge, gpe = half, g_half, gp_half
        else:
            fine, ge, gpe = build(vfun, fp, tx, tcoef, mass, l, beta, c, tc, t0, t1, n, support, 4)
        prm = grid_parameters(mass, l, TAIL_FIXED, fixed, support, ge, gpe, scale, False)
        nn = n * (1 if i == 0 else 2 * i)
        out = solve_grid(fine, prm, 1, nn, (t1 - t0) / nn, k, start, start, np.empty(nn + 2), False)
        if out[1] == 1:
            mu[i] = out[0]  # below the grid's floor: negative, as far as the count goes
        elif out[1] != 0:
            return count, 1
        else:
            mu[i] = out[0]
        if i == 1:
            if abs(mu[1]) > 30.0 * abs(mu[0] - mu[1]):
                value = mu[1]
                break
            start = mu[1] + (mu[1] - mu[0]) / 15.0
        elif i == 2:
            value = extrapolate_grids(mu[0], mu[1], mu[2])[0]
        else:
            start = mu[0]
    if k == count - 1 and value >= 0.0:
        return count - 1, 0
    if k == count and value < 0.0:
        return count + 1, 0
    return count, 0


@njit([(A1, i8, i8, i8,)], cache=True)
def _fail(row, why, passes, tried):
    row[0] = math.nan
    row[1] = math.inf
    row[2] = 1.0
    row[3] = why
    row[24] = passes
    row[25] = tried


@njit([(A2, i8, GRID_RESULT,)], cache=True)
def _put(res, i, t):
    res[i, 0] = t[0]
    res[i, 1] = t[1]
    res[i, 2] = t[2]
    res[i, 3] = t[3]
    res[i, 4] = t[4]
    res[i, 5] = t[5]


@njit([(FORMULA, A1, A1, A2, f8, i8, i8, f8, f8, b1, f8, i8, f8, f8, f8, f8, f8, f8, f8, A1, A1, i8, f8, i8, A1,)],
      cache=True)
def _level(vfun, fp, tx, tcoef, mass, l, kind, tail_p, support, jumps, scale, k, guess, theta0, h_max, rtol, decay,
           r_min, r_core, rs, veff, attempts, roundoff, max_nodes, row):
    """Level k of the cell: fills ``row`` (columns in :data:`ROW`)."""
    bound = kind != TAIL_CONFINING
    energy = guess
    theta = theta0
    why = 6
    have = False
    best = math.nan
    err = math.inf
    res = np.empty((3, 6))  # the last attempt that reached all three grids
    cur = np.empty((3, 6))
    R = 0.0
    beta = c = tc = t0 = t1 = 0.0
    n = 0
    closed = False
    passes = 0
    tried = 0
    for _attempt in range(attempts):
        tried += 1
        R = box(rs, veff, energy, mass, kind, tail_p, support, jumps, rs[-1], decay, l)
        if R > rs[-1] * (1.0 + 1e-9):
            # a box beyond the samples: sample again out to it
            rs, veff, _, _ = samples(vfun, fp, tx, tcoef, mass, l, r_min, R, rs.size)
        closed = math.isfinite(support) and R >= support * (1.0 - 1e-12)
        beta, c, tc, t0, t1, n = design(rs, veff, mass, l, energy, r_min, R, r_core, theta, h_max)
        if 4 * n > max_nodes:
            why = 7
            break
        a, g_end, gp_end = build(vfun, fp, tx, tcoef, mass, l, beta, c, tc, t0, t1, n, R, 4)
        prm = grid_parameters(mass, l, kind, tail_p, R, g_end, gp_end, scale, bound)
        h = (t1 - t0) / n
        # the grids h, h/2, h/4 from one call site (the kernel is compiled, and inlined, once)
        failed = False
        refit = False
        stop = False
        for stage in range(3):
            nn = n << stage
            if stage == 0:
                start = near = energy
            elif stage == 1:
                start = near = cur[0, 0]
            else:
                start = cur[1, 0] + (cur[1, 0] - cur[0, 0]) / 15.0
                near = cur[1, 0]
            out = solve_grid(a, prm, 4 >> stage, nn, h / (1 << stage), k, start, near, np.empty(nn + 2), False)
            passes += out[2] * nn
            _put(cur, stage, out)
            status = out[1]
            if stage > 0:
                if status != 0:
                    why = 4
                    failed = True
                    break
                continue
            if status == 1:  # deeper than this grid resolves: below its floor, out[0]
                energy = min(4.0 * energy, 1.2 * out[0]) if (bound and energy < 0.0) else energy - scale
                why = 1
                failed = True
                break
            if status == 4:  # not bound in this box: a larger box (or it is not resolved at all)
                why = 2
                if closed or not bound:
                    stop = True
                    break
                energy *= 1e-2
                failed = True
                break
            if status != 0:
                why = 3
                failed = True
                break
            if bound and not fits(rs, veff, energy, out[0], R, closed, decay, support, mass):
                energy = out[0]
                refit = True
                break
        if stop:
            break
        if refit:
            continue
        if failed:
            if why in (3, 4):
                theta *= 0.6
            continue
        have = True
        for i in range(3):  # element by element: a slice copy compiles a shape check that formats its error text
            for j in range(6):
                res[i, j] = cur[i, j]
        best, err = extrapolate_grids(res[0, 0], res[1, 0], res[2, 0])
        err = max(err, roundoff * abs(best))
        energy = best
        if err <= rtol * abs(best) or theta < 0.05:
            break
        theta *= 0.6
    if not have:
        return _fail(row, why, passes, tried)
    row[24] = passes
    row[25] = tried
    row[0] = best
    row[1] = err
    ok = err <= rtol * abs(best) and math.isfinite(best)
    row[2] = 0.0 if ok else 1.0
    row[3] = 0.0 if ok else 5.0
    row[4] = R
    row[5] = 1.0 if closed else 0.0
    for j in range(3):
        row[6 + j] = res[j, 3]
        row[9 + j] = res[j, 4]
        row[12 + j] = res[j, 5]
        row[21 + j] = res[j, 0]
    row[15] = beta
    row[16] = c
    row[17] = tc
    row[18] = t0
    row[19] = t1
    row[20] = n



@njit([(FORMULA, A1, A1, A2, f8, i8, i8, f8, f8, b1, f8, f8, f8, f8, f8, i8, f8, f8, f8, f8, f8, i8, i8, f8, i8,)],
      cache=True)
def solve_cell(vfun, fp, tx, tcoef, mass, l, kind, tail_p, support, jumps, r_min, r_core, scale, reach, e_top,
               keep_max, theta0, h_max, rtol, margin, decay, n_samples, attempts, roundoff, max_nodes):
    """Count and levels of one cell.  ``kind`` the tail (exterior.TAIL_*), ``tail_p`` its charge or
    ω; the grids start at ``r_min`` with their inner knee near ``r_core``; ``e_top`` the top of
    the window for first guesses; ``keep_max`` the levels wanted (−1: all, short range only).
    Returns (count, status of the count, rows) with one row per level (columns in ROW); no grid
    holds more than ``max_nodes`` nodes (a count beyond it is status 2, with no rows)."""
    confining = kind == TAIL_CONFINING
    rs, veff, vl, dln = samples(vfun, fp, tx, tcoef, mass, l, r_min, reach, n_samples)
    count = -1
    count_status = 0
    if kind == TAIL_SHORT:
        count, count_status = zero_energy_count(vfun, fp, tx, tcoef, mass, l, rs, veff, r_min, support, r_core,
                                                 scale, theta0, h_max, margin, max_nodes)
        if count_status != 0:
            return count, count_status, np.full((0, _WIDTH), np.nan)
        keep = count if keep_max < 0 else min(count, keep_max)
    else:
        keep = keep_max
    rows = np.full((keep, _WIDTH), np.nan)
    e_lo = vl.min()
    for k in range(keep):
        guess = math.nan
        if e_lo < e_top:
            guess = wkb_energy(rs, vl, mass, math.pi * (k + 0.5), e_lo, e_top, 40, dln)
        if not math.isfinite(guess) or (not confining and guess >= 0.0):
            guess = -1e-10 * scale
        row = rows[k]
        _level(vfun, fp, tx, tcoef, mass, l, kind, tail_p, support, jumps, scale, k, guess, theta0, h_max, rtol,
               decay, r_min, r_core, rs, veff, attempts, roundoff, max_nodes, row)
    return count, count_status, rows


jitcache.leave(_saved_cache_dir)
