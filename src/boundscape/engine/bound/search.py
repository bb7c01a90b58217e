"""The eigenvalue search of one level on one grid (compiled).

Eigenvalue search.  Sturm bisection isolates level k; Newton's method then takes over, with the
energy correction of Cooley (Math. Comp. 15, 363 (1961)): integrate outward to the outer
turning point and inward from R, join the two there, and correct E by the residual of the
joining row over dY·M'(E)·Y.  Bound levels are corrected in κ = √(2μ|E|), in which the outer
condition is smooth down to threshold.
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit

from .. import jitcache
from .numerov import A1, A2, b1, f8, floor_energy, i8, join, sturm_count

_saved_cache_dir = jitcache.enter()  # this module's kernels are cached by jitcache's rule

__all__ = ["grid_eigenvalue", "grid_parameters", "sturm", "solve_grid"]


@njit([(A1, A1, i8, i8, f8, i8, f8, f8, f8, b1, f8, i8, i8, f8, f8, f8, f8, f8,)], cache=True)
def _isolate(q0, rho, stride, n, h, k, energy, lo, top, kappa_mode, scale, kind, l, mass, p, R, g_end, gp_end):
    """A bracket (e_lo, e_hi) holding level k alone (Sturm counts k and k + 1 at its ends),
    narrow enough for Newton's method: grown geometrically from ``energy``, then bisected
    (geometrically in κ).  Returns (e_lo, e_hi, status, counts): status 1 if level k lies below
    ``lo``, 4 if it is not below ``top``.  One count per step, from one call site (a smaller
    compiled kernel)."""
    e_lo, e_hi = lo, top
    c_lo, c_hi = -1, -1
    trial = energy
    step = max(abs(energy) * 0.5, 1e-3 * scale)
    at_floor = False
    at_top = False
    counts = 0
    for _ in range(400):
        ct = sturm_count(q0, rho, stride, n, h, trial, kind, l, mass, p, R, g_end, gp_end)
        counts += 1
        if ct > k:
            if at_floor:
                return e_lo, e_hi, 1, counts
            e_hi, c_hi = trial, ct
        else:
            if at_top:
                return e_lo, e_hi, 4, counts
            e_lo, c_lo = trial, ct
        if c_lo < 0:  # downward from the lowest energy counted above k
            if kappa_mode and e_hi < 0.0:
                trial = -((math.sqrt(-2.0 * mass * e_hi) * 1.6) ** 2) / (2.0 * mass)
            else:
                trial = e_hi - step
                step *= 2.0
            if trial <= lo:
                trial = lo
                at_floor = True
        elif c_hi < 0:  # upward from the highest energy counted at or below k
            if kappa_mode:
                kap = 0.25 * math.sqrt(-2.0 * mass * e_lo) if e_lo < 0.0 else 0.0
                trial = -kap * kap / (2.0 * mass)
                if kap < 1e-9 * math.sqrt(2.0 * mass * abs(lo)) or trial >= top:
                    trial = top if math.isfinite(top) else 0.0
                    at_top = True
            else:
                trial = e_lo + step
                step *= 2.0
                if trial >= top:
                    trial = top
                    at_top = True
        else:
            if kappa_mode:
                klo = math.sqrt(-2.0 * mass * e_lo)
                khi = math.sqrt(-2.0 * mass * min(e_hi, 0.0))
                narrow = klo - khi <= 0.05 * klo
                kmid = math.sqrt(klo * khi) if khi > 1e-3 * klo else 0.5 * (klo + khi)
                mid = -kmid * kmid / (2.0 * mass)
            else:
                narrow = e_hi - e_lo <= 0.02 * max(abs(e_lo), abs(e_hi))
                mid = 0.5 * (e_lo + e_hi)
            if (c_lo == k and c_hi == k + 1 and narrow) or not (e_lo < mid < e_hi):
                break
            trial = mid
    return e_lo, e_hi, 0, counts


@njit([(A1, A1, A1, A1, i8, i8, f8, i8, f8, f8, f8, b1, b1, f8, i8, i8, f8, f8, f8, f8, f8, A1, b1,)], cache=True)
def grid_eigenvalue(q0, rho, r, g2, stride, n, h, k, energy, lo, hi, locate, kappa_mode, scale,
                kind, l, mass, p, R, g_end, gp_end, work, want_u):
    """Eigenvalue k (0-based) of the discrete problem on one grid (nodes every ``stride``-th
    of the arrays, ``n`` steps of ``h``).

    ``locate``: isolate level k by Sturm bisection first, starting at ``energy`` within the
    bracket (lo, hi) (±inf: unknown); otherwise ``energy`` is trusted as a start close to it.
    ``kappa_mode``: Newton in κ = √(−2μE) (bound levels); else in E.

    Returns (energy, status, passes, ∫u² dr, ∫r u² dr, u(R)²) (the integrals over the box, of
    the joined solution in its own normalisation): status 0 converged, 1 level k lies below the
    grid's floor (energy is then the floor, an upper bound), 2
    Newton did not settle, 3 wrong node count, 4 no level k below the
    grid's top (hi, or threshold).
    ``work`` (≥ n + 2) holds the joined w when ``want_u``."""
    passes = 0
    floor = floor_energy(q0, rho, stride, n, h)
    if lo < floor:
        lo = floor
    top = hi
    if kappa_mode and top > 0.0:
        top = 0.0
    if locate:
        if energy <= lo or energy >= top:
            if math.isfinite(top):
                energy = lo + 0.5 * (top - lo) if lo > -1e299 else top - 1.0
            else:
                energy = lo + 1.0
        e_lo, e_hi, status, spent = _isolate(q0, rho, stride, n, h, k, energy, lo, top, kappa_mode, scale, kind, l,
                                             mass, p, R, g_end, gp_end)
        passes += spent
        if status != 0:
            return (e_lo if status == 1 else energy), status, passes, 0.0, 0.0, 0.0
        lo, hi = e_lo, e_hi
        if kappa_mode:
            klo = math.sqrt(-2.0 * mass * e_lo)
            khi = math.sqrt(-2.0 * mass * min(e_hi, 0.0))
            kmid = 0.5 * (klo + khi)
            energy = -kmid * kmid / (2.0 * mass)
        else:
            energy = 0.5 * (e_lo + e_hi)
    # Newton (Cooley's correction), safeguarded by the bracket
    norm = 0.0
    first = 0.0
    uend2 = 0.0
    last_step = 1e300
    status = 2
    for it in range(60):
        num, den, nodes, norm, first, uend2 = join(q0, rho, r, g2, stride, n, h, energy, kind, l, mass, p, R,
                                                g_end, gp_end, work, want_u)
        passes += 1
        # ΔE = −λ/λ' with λ = Y·M·Y/Y·Y = −residual·Y_m/Y·Y and λ' = Y·M'·Y/Y·Y = −den/Y·Y
        de = -num / den if den != 0.0 else 0.0
        if kappa_mode and energy < 0.0:
            kap = math.sqrt(-2.0 * mass * energy)
            knew = kap - mass * de / kap if kap > 0.0 else 0.0
            new = -knew * knew / (2.0 * mass) if knew > 0.0 else 0.5 * energy
            if knew <= 0.0:
                new = 0.25 * energy
        else:
            new = energy + de
        if not (lo < new < hi) or (kappa_mode and new >= 0.0):
            # out of the bracket: halve it with a Sturm count
            mid = 0.5 * (lo + hi) if (math.isfinite(lo) and math.isfinite(hi)) else energy + 0.5 * de
            if not (math.isfinite(lo) and math.isfinite(hi)):
                return energy, 2, passes, norm, first, uend2
            cm = sturm_count(q0, rho, stride, n, h, mid, kind, l, mass, p, R, g_end, gp_end)
            passes += 1
            if cm > k:
                hi = mid
            else:
                lo = mid
            energy = mid
            last_step = 1e300
            continue
        step = abs(new - energy)
        energy = new
        # relative to |E| (with a floor for eigenvalues near zero in E mode): stop once a step is
        # both small and a thousandth of the one before (Newton's quadratic contraction: the
        # next one would be at roundoff), or at roundoff, or when steps stop shrinking there
        # (E mode serves the zero-energy problem, whose μ near zero decide counts and critical
        # parameters: there only roundoff ends the iteration)
        size = abs(energy) if kappa_mode else abs(energy) + 1e-4 * scale
        quick = 1e-9 if kappa_mode else 1e-13
        if (step <= quick * size and step <= 1e-3 * last_step) or step <= 4e-16 * size or (
                step <= 1e-8 * size and step >= 0.5 * last_step):
            # after isolation the bracket's Sturm counts identify the level; else its nodes must
            status = 0 if (nodes == k or (locate and lo < energy < hi)) else 3
            break
        last_step = step
    if status == 2 and locate and math.isfinite(lo) and math.isfinite(hi):
        # Newton did not settle inside an isolating bracket (two close levels can pull Cooley's
        # correction astray): bisect on Sturm counts to roundoff, then one pass for the sums
        for _ in range(200):
            mid = 0.5 * (lo + hi)
            if not (lo < mid < hi) or hi - lo <= 4e-16 * max(abs(lo), abs(hi), 1e-300):
                break
            if sturm_count(q0, rho, stride, n, h, mid, kind, l, mass, p, R, g_end, gp_end) > k:
                hi = mid
            else:
                lo = mid
            passes += 1
        energy = 0.5 * (lo + hi)
        num, den, nodes, norm, first, uend2 = join(q0, rho, r, g2, stride, n, h, energy, kind, l, mass, p, R,
                                                    g_end, gp_end, work, want_u)
        passes += 1
        status = 0  # the Sturm counts at the bracket's ends identify level k
    return energy, status, passes, norm, first, uend2


@njit([(f8, i8, i8, f8, f8, f8, f8, f8, b1,)], cache=True)
def grid_parameters(mass, l, kind, p, R, g_end, gp_end, scale, kappa_mode):
    """The parameter vector of :func:`solve_grid` and :func:`sturm` (their ``prm``): μ, l, tail kind and
    parameter, R, g(R), g'/g(R), energy scale, κ mode, and an open bracket (−∞, ∞)."""
    return np.array([mass, float(l), float(kind), p, R, g_end, gp_end, scale, 1.0 if kappa_mode else 0.0,
                     -math.inf, math.inf])


@njit([(A2, A1, i8, i8, f8, f8,)], cache=True)
def sturm(a, prm, stride, n, h, energy):
    """:func:`sturm_count` on the arrays of :func:`map_nodes` and the parameters of :func:`solve_grid`."""
    return sturm_count(a[3], a[4], stride, n, h, energy, int(prm[2]), int(prm[1]), prm[0], prm[3], prm[4],
                       prm[5], prm[6])


@njit([(A2, A1, i8, i8, f8, i8, f8, f8, A1, b1,)], cache=True)
def solve_grid(a, prm, stride, n, h, k, start, near, work, want_u):
    """Level k on the grid of every ``stride``-th node of ``a``: Newton's method from ``start``,
    and if that does not settle on a level with k nodes, Sturm bisection from ``near`` first.

    ``prm`` = (μ, l, tail kind, tail parameter, R, g(R), g'/g(R), energy scale, κ mode, lo, hi).
    Returns (energy, status, passes, ∫u² dr, ∫r u² dr, u(R)²) as :func:`grid_eigenvalue`."""
    mass, l, kind, p, R, g_end, gp_end, scale = prm[0], int(prm[1]), int(prm[2]), prm[3], prm[4], prm[5], prm[6], prm[7]
    kappa_mode = prm[8] != 0.0
    lo, hi = prm[9], prm[10]
    spent = 0
    for attempt in range(2):  # one call site: the kernel is compiled (and inlined) once
        out = grid_eigenvalue(a[3], a[4], a[0], a[1], stride, n, h, k, start if attempt == 0 else near, lo, hi,
                          attempt == 1, kappa_mode, scale, kind, l, mass, p, R, g_end, gp_end, work, want_u)
        spent += out[2]
        if out[1] == 0 or attempt == 1:
            return out[0], out[1], spent, out[3], out[4], out[5]
    return out[0], out[1], spent, out[3], out[4], out[5]


jitcache.leave(_saved_cache_dir)
