"""A whole cell (one potential, one l) in one compiled call: the count, every level's box,
grid, eigenvalues on h, h/2, h/4 and their extrapolation.

The steps are those of :mod:`.levels` (its Python path, kept for families without a compiled
formula, is the readable statement of the method; a test checks the two agree), done here
without returning to Python between them: per level the interpreter would otherwise cost more
than the arithmetic.  Only the exterior's share of ⟨r⟩ (scipy.special) is left to the caller.
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit

from . import jitcache

_saved_cache_dir = jitcache.enter()  # this module's kernels are cached by jitcache's rule

from . import numerov as nv
from .compiled_potentials import potential_at
from .numerov import A1, A2, GRID_RESULT, b1, f8, i8  # the kernels' types

__all__ = ["solve_cell", "ROW", "REASONS"]

# Columns of a level's row in the result.
ROW = {name: i for i, name in enumerate(
    ("energy", "error", "status", "reason", "R", "closed", "norm0", "norm1", "norm2", "first0", "first1", "first2",
     "uend0", "uend1", "uend2", "beta", "c", "tc", "t0", "t1", "n", "e0", "e1", "e2", "passes", "attempts"))}
REASONS = ("", "level below the reach of every grid tried", "level not bound on its grid (within discretisation "
           "error of threshold)", "Newton iteration on the coarse grid failed", "Newton iteration on a finer grid "
           "failed", "error estimate exceeds the tolerance", "no attempt converged")
_WIDTH = len(ROW)


@njit([(f8, f8, f8,)], cache=True)
def _richardson(e0, e1, e2):
    # weights of grids h, h/2, h/4 for an error series h⁴, h⁶ (Σw = 1, Σw·f⁻⁴ = Σw·f⁻⁶ = 0), and
    # of h/2, h/4 for h⁴ alone: the error estimate is the difference of the two
    best = (e0 - 80.0 * e1 + 1024.0 * e2) / 945.0
    second = (16.0 * e2 - e1) / 15.0
    return best, abs(best - second)


@njit([(i8, A1, A1, A2, f8, i8, f8, f8, i8,)], cache=True)
def _samples(code, fp, tx, tcoef, mass, l, r_min, reach, n):
    rs = np.empty(n)
    veff = np.empty(n)
    vl = np.empty(n)
    reach = max(reach, 4.0 * r_min)
    ln0 = math.log(r_min)
    dln = (math.log(reach) - ln0) / (n - 1)
    for j in range(n):
        r = math.exp(ln0 + j * dln)
        v = potential_at(code, fp, tx, tcoef, r, False)
        rs[j] = r
        veff[j] = v + l * (l + 1.0) / (2.0 * mass * r * r)
        vl[j] = v + (l + 0.5) ** 2 / (2.0 * mass * r * r)
    return rs, veff, vl, dln


@njit([(A1, A1, f8,)], cache=True)
def _turning_point(rs, veff, energy):
    j = -1
    for i in range(rs.size - 1, -1, -1):
        if veff[i] < energy:
            j = i
            break
    if j < 0:
        return rs[0]
    if j + 1 >= rs.size:
        return rs[-1]
    f = (energy - veff[j]) / (veff[j + 1] - veff[j])
    return rs[j] + f * (rs[j + 1] - rs[j])


@njit([(i8, A1, A1, A2, f8, i8, f8, f8, f8, f8, f8, i8, f8, i8,)], cache=True)
def _build(code, fp, tx, tcoef, mass, l, beta, c, tc, t0, t1, n, R, refine):
    n_fine = n * refine
    a = nv.map_nodes(beta, c, tc, t0, (t1 - t0) / n / refine, n_fine + refine + 1, R, n_fine)
    v = np.empty(a.shape[1])
    for i in range(a.shape[1]):
        v[i] = potential_at(code, fp, tx, tcoef, a[0, i], i > n_fine)
    nv.assemble(a, v, mass, l)
    _, g_end, gp_end, _ = nv.map_point(beta, c, tc, t1)
    return a, g_end, gp_end


@njit([(A1, A1, f8, i8, f8, f8, f8, f8, f8, f8,)], cache=True)
def _design(rs, veff, mass, l, energy, r_min, R, r_core, theta, h_max):
    kappa = math.sqrt(2.0 * mass * -energy) if energy < 0 else 0.0
    cand = np.array([R / 64.0, R / 16.0, R / 4.0, R, 4.0 * R, 0.5 / max(kappa, 1e-300), 1.0 / max(kappa, 1e-300),
                     2.0 / max(kappa, 1e-300), 4.0 / max(kappa, 1e-300)])
    m = 5 if kappa == 0.0 else 9
    keep = np.empty(m)
    k = 0
    for i in range(m):
        if cand[i] > 4.0 * r_min:
            keep[k] = cand[i]
            k += 1
    return nv.design_map(rs, veff, energy, mass, l, r_min, R, theta, h_max, keep[:k], max(r_core, r_min))


@njit([(f8, i8, i8, f8, f8, f8, f8, f8, b1,)], cache=True)
def _prm(mass, l, kind, p, R, g_end, gp_end, scale, kappa_mode):
    return np.array([mass, float(l), float(kind), p, R, g_end, gp_end, scale, 1.0 if kappa_mode else 0.0,
                     -math.inf, math.inf])


@njit([(i8, A1, A1, A2, f8, i8, A1, A1, f8, f8, f8, f8, f8, f8, f8,)], cache=True)
def _zero_energy_count(code, fp, tx, tcoef, mass, l, rs, veff, r_min, support, r_core, scale, theta, h_max, margin):
    """The exact count: Sturm counts on the E = 0 grid at 0 and ±margin·scale, the marginal μ_k
    settled on the grid h/2 or extrapolated (as ZeroEnergyProblem.count)."""
    beta, c, tc, t0, t1, n = _design(rs, veff, mass, l, 0.0, r_min, support, r_core, theta, h_max)
    a, g_end, gp_end = _build(code, fp, tx, tcoef, mass, l, beta, c, tc, t0, t1, n, support, 1)
    fixed = -l / support
    prm = _prm(mass, l, nv.TAIL_FIXED, fixed, support, g_end, gp_end, scale, False)
    h = (t1 - t0) / n
    count = nv.sturm(a, prm, 1, n, h, 0.0)
    delta = margin * scale
    k = -1
    if count > 0 and nv.sturm(a, prm, 1, n, h, -delta) < count:
        k = count - 1
    elif nv.sturm(a, prm, 1, n, h, delta) > count:
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
        else:
            fine, ge, gpe = _build(code, fp, tx, tcoef, mass, l, beta, c, tc, t0, t1, n, support, 2 * i)
        prm = _prm(mass, l, nv.TAIL_FIXED, fixed, support, ge, gpe, scale, False)
        nn = n * (1 if i == 0 else 2 * i)
        out = nv.solve_grid(fine, prm, 1, nn, (t1 - t0) / nn, k, start, start, np.empty(nn + 2), False)
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
            value = _richardson(mu[0], mu[1], mu[2])[0]
        else:
            start = mu[0]
    if k == count - 1 and value >= 0.0:
        return count - 1, 0
    if k == count and value < 0.0:
        return count + 1, 0
    return count, 0


@njit([(A1, A1, f8, f8, f8, b1, f8, f8, f8,)], cache=True)
def _fits(rs, veff, designed_for, energy, R, closed, decay, support, mass):
    if energy >= 0.0 or designed_for >= 0.0:
        return False
    kap = math.sqrt(2.0 * mass * -energy)
    need = min(support, _turning_point(rs, veff, energy) + decay / kap)
    if not (closed or need <= 1.05 * R):
        return False
    ratio = math.sqrt(energy / designed_for)
    return (1.0 / 1.3 <= ratio <= 1.3) or (closed and ratio < 1.3)


@njit([(A1, A1, f8, f8, i8, f8, f8, b1, f8, f8, i8,)], cache=True)
def _box(rs, veff, energy, mass, kind, tail_p, support, jumps, reach, decay, l):
    if kind == nv.TAIL_CONFINING:
        mw = mass * tail_p
        r_t = math.sqrt(max(2.0 * energy, 0.0) / (mass * tail_p * tail_p)) + 1.0 / math.sqrt(mw)
        return r_t + 8.0 / math.sqrt(mw)
    if jumps:
        return support
    if energy >= 0.0:
        return support if math.isfinite(support) else reach
    kap = math.sqrt(2.0 * mass * -energy)
    R = _turning_point(rs, veff, energy) + decay / kap
    return min(support, R)


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


@njit([(i8, A1, A1, A2, f8, i8, i8, f8, f8, b1, f8, i8, f8, f8, f8, f8, f8, f8, f8, A1, A1, i8, f8, A1,)], cache=True)
def _level(code, fp, tx, tcoef, mass, l, kind, tail_p, support, jumps, scale, k, guess, theta0, h_max, rtol, decay,
           r_min, r_core, rs, veff, attempts, roundoff, row):
    """Level k (as levels._solve): fills ``row``."""
    bound = kind != nv.TAIL_CONFINING
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
        R = _box(rs, veff, energy, mass, kind, tail_p, support, jumps, rs[-1], decay, l)
        if R > rs[-1] * (1.0 + 1e-9):
            # a box beyond the samples: sample again out to it
            rs, veff, _, _ = _samples(code, fp, tx, tcoef, mass, l, r_min, R, rs.size)
        closed = math.isfinite(support) and R >= support * (1.0 - 1e-12)
        beta, c, tc, t0, t1, n = _design(rs, veff, mass, l, energy, r_min, R, r_core, theta, h_max)
        a, g_end, gp_end = _build(code, fp, tx, tcoef, mass, l, beta, c, tc, t0, t1, n, R, 4)
        prm = _prm(mass, l, kind, tail_p, R, g_end, gp_end, scale, bound)
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
            out = nv.solve_grid(a, prm, 4 >> stage, nn, h / (1 << stage), k, start, near, np.empty(nn + 2), False)
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
            if bound and not _fits(rs, veff, energy, out[0], R, closed, decay, support, mass):
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
        best, err = _richardson(res[0, 0], res[1, 0], res[2, 0])
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



@njit([(i8, A1, A1, A2, f8, i8, i8, f8, f8, b1, f8, f8, f8, f8, i8, f8, f8, f8, f8, f8, f8, i8, i8, f8,)], cache=True)
def solve_cell(code, fp, tx, tcoef, mass, l, kind, tail_p, support, jumps, length_scale, scale, reach, e_top,
               keep_max, theta0, h_max, rtol, margin, decay, origin_tolerance, samples, attempts, roundoff):
    """Count and levels of one cell.  ``kind`` the tail (numerov.TAIL_*), ``tail_p`` its charge or
    ω; ``e_top`` the top of the window for first guesses; ``keep_max`` the levels wanted (−1: all,
    short range only).  Returns (count, status of the
    count, rows) with one row per level (columns in ROW)."""
    r_min = length_scale * origin_tolerance ** (1.0 / (2 * l + 1))
    r_core = 0.1 * length_scale
    confining = kind == nv.TAIL_CONFINING
    rs, veff, vl, dln = _samples(code, fp, tx, tcoef, mass, l, r_min, reach, samples)
    count = -1
    count_status = 0
    if kind == nv.TAIL_SHORT:
        count, count_status = _zero_energy_count(code, fp, tx, tcoef, mass, l, rs, veff, r_min, support, r_core,
                                                 scale, theta0, h_max, margin)
        keep = count if keep_max < 0 else min(count, keep_max)
    else:
        keep = keep_max
    rows = np.full((keep, _WIDTH), np.nan)
    e_lo = vl.min()
    for k in range(keep):
        guess = math.nan
        if e_lo < e_top:
            guess = nv.wkb_energy(rs, vl, mass, math.pi * (k + 0.5), e_lo, e_top, 40, dln)
        if not math.isfinite(guess) or (not confining and guess >= 0.0):
            guess = -1e-10 * scale
        row = rows[k]
        _level(code, fp, tx, tcoef, mass, l, kind, tail_p, support, jumps, scale, k, guess, theta0, h_max, rtol,
               decay, r_min, r_core, rs, veff, attempts, roundoff, row)
    return count, count_status, rows


jitcache.leave(_saved_cache_dir)
