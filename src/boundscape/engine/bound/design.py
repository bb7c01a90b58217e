"""One potential and l as the solver sees them (compiled): V_eff sampled once, WKB first guesses,
the box of a level, its grid's design, and the Numerov arrays of a grid.

Box.  A level of energy E < 0 gets R = r_t + DECAY_LENGTHS/κ (r_t its outer turning point,
κ = √(2μ|E|)), or further where the WKB exponent past r_t has not reached DECAY_LENGTHS by then
(:func:`decay_end`), or the end of the potential's range if that comes first — there the exterior
solution (:mod:`..potentials.exterior`) closes the box exactly.  The density left beyond R is
e^{−2C} relative; C = 20 keeps it ~4e-18 (a probe found 16 too few for 1e-9 on every level:
the turning-point region decays more slowly than e^{−κr}).  A potential that jumps at its
support (the square well) always ends its box there.  An oscillator's box ends 8 oscillator
lengths past the turning point.

Guesses.  Langer's WKB condition ∫√(2μ(E − V_L)) dr = π(n_r + ½), V_L = V + (l + ½)²/(2μr²)
(Langer, Phys. Rev. 51, 669 (1937)), exact for the Coulomb and oscillator problems and within
a few per cent elsewhere, gives each level's first box and grid; the level is then located
exactly on that grid by Sturm counts, so a poor guess costs time, never a wrong level.

V is the family's compiled formula (:mod:`..potentials.kernels`), passed to every kernel here as
a first-class function ``vfun`` with its parameters (fp, tx, tcoef).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numba import njit

from .. import jitcache
from ..potentials.exterior import TAIL_CONFINING
from ..potentials.kernels import FORMULA
from .mapping import REFINE, MappedGrid, design_map, map_nodes, map_point
from .numerov import A1, A2, assemble, b1, f8, i8

_saved_cache_dir = jitcache.enter()  # this module's kernels are cached by jitcache's rule

__all__ = ["samples", "turning_point", "decay_end", "wkb_energy", "build", "design", "fits", "box", "GridArrays", "arrays_for",
           "SAMPLES", "DECAY_LENGTHS"]

DECAY_LENGTHS = 20.0
SAMPLES = 256  # log-spaced samples of V_eff, for boxes, grid design and guesses


@njit([(FORMULA, A1, A1, A2, f8, i8, f8, f8, i8,)], cache=True)
def samples(vfun, fp, tx, tcoef, mass, l, r_min, reach, n):
    rs = np.empty(n)
    veff = np.empty(n)
    vl = np.empty(n)
    reach = max(reach, 4.0 * r_min)
    ln0 = math.log(r_min)
    dln = (math.log(reach) - ln0) / (n - 1)
    for j in range(n):
        r = math.exp(ln0 + j * dln)
        v = vfun(r, fp, tx, tcoef, False)
        rs[j] = r
        veff[j] = v + l * (l + 1.0) / (2.0 * mass * r * r)
        vl[j] = v + (l + 0.5) ** 2 / (2.0 * mass * r * r)
    return rs, veff, vl, dln


@njit([(A1, A1, f8,)], cache=True)
def turning_point(rs, veff, energy):
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


@njit([(A1, A1, f8, f8, f8,)], cache=True)
def decay_end(rs, veff, energy, mass, decay):
    """Where a level of ``energy`` < 0 has decayed by e^{−decay} past its outer turning point r_t:
    the larger of r_t + decay/κ and the radius where the WKB exponent ∫_{r_t} √(2μ(V_eff − E)) dr
    reaches ``decay`` (trapezoidal on the samples; past them V_eff − E ≈ −E).  The two agree
    where V is negligible past r_t; the second reaches further where the well is still deep there
    (the ground state of a deep Woods–Saxon well with a thick surface: r_t + 20/κ ended at
    V ≈ −0.87 V₀, and the level came out 2.7e-7 off)."""
    r_t = turning_point(rs, veff, energy)
    kap = math.sqrt(2.0 * mass * -energy)
    plain = r_t + decay / kap
    acc = 0.0
    r_prev = r_t
    q_prev = 0.0
    for j in range(rs.size):
        if rs[j] <= r_t:
            continue
        q = math.sqrt(max(2.0 * mass * (veff[j] - energy), 0.0))
        step = 0.5 * (q + q_prev) * (rs[j] - r_prev)
        if acc + step >= decay:
            return max(plain, r_prev + (decay - acc) / step * (rs[j] - r_prev))
        acc += step
        r_prev = rs[j]
        q_prev = q
    return max(plain, r_prev + (decay - acc) / kap)


@njit([(A1, A1, f8, f8, f8,)], cache=True)
def _action(rs, vlanger, mass, e, dln):
    total = 0.0
    for j in range(rs.size):
        k2 = 2.0 * mass * (e - vlanger[j])
        if k2 > 0.0:
            total += math.sqrt(k2) * rs[j]
    return total * dln


@njit([(A1, A1, f8, f8, f8, f8, i8, f8,)], cache=True)
def wkb_energy(rs, vlanger, mass, phase, e_lo, e_hi, iterations, dln):
    """Energy at which ∫√(2μ(E − V_L)) dr = ``phase`` (Langer's V_L; a sum in ln r over the
    log-spaced samples, step ``dln``), by bisection in [e_lo, e_hi]; NaN if even e_hi gives less phase."""
    if _action(rs, vlanger, mass, e_hi, dln) < phase:
        return math.nan
    a, b = e_lo, e_hi
    for _ in range(iterations):
        mid = 0.5 * (a + b)
        if _action(rs, vlanger, mass, mid, dln) < phase:
            a = mid
        else:
            b = mid
    return 0.5 * (a + b)


@njit([(FORMULA, A1, A1, A2, f8, i8, f8, f8, f8, f8, f8, i8, f8, i8,)], cache=True)
def build(vfun, fp, tx, tcoef, mass, l, beta, c, tc, t0, t1, n, R, refine):
    n_fine = n * refine
    a = map_nodes(beta, c, tc, t0, (t1 - t0) / n / refine, n_fine + refine + 1, R, n_fine)
    v = np.empty(a.shape[1])
    for i in range(a.shape[1]):
        v[i] = vfun(a[0, i], fp, tx, tcoef, i > n_fine)
    assemble(a, v, mass, l)
    _, g_end, gp_end, _ = map_point(beta, c, tc, t1)
    return a, g_end, gp_end


@njit([(A1, A1, f8, i8, f8, f8, f8, f8, f8, f8,)], cache=True)
def design(rs, veff, mass, l, energy, r_min, R, r_core, theta, h_max):
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
    return design_map(rs, veff, energy, mass, l, r_min, R, theta, h_max, keep[:k], max(r_core, r_min))


@njit([(A1, A1, f8, f8, f8, b1, f8, f8, f8,)], cache=True)
def fits(rs, veff, designed_for, energy, R, closed, decay, support, mass):
    if energy >= 0.0 or designed_for >= 0.0:
        return False
    need = min(support, decay_end(rs, veff, energy, mass, decay))
    if not (closed or need <= 1.05 * R):
        return False
    ratio = math.sqrt(energy / designed_for)
    return (1.0 / 1.3 <= ratio <= 1.3) or (closed and ratio < 1.3)


@njit([(A1, A1, f8, f8, i8, f8, f8, b1, f8, f8, i8,)], cache=True)
def box(rs, veff, energy, mass, kind, tail_p, support, jumps, reach, decay, l):
    if kind == TAIL_CONFINING:
        mw = mass * tail_p
        r_t = math.sqrt(max(2.0 * energy, 0.0) / (mass * tail_p * tail_p)) + 1.0 / math.sqrt(mw)
        return r_t + 8.0 / math.sqrt(mw)
    if jumps:
        return support
    if energy >= 0.0:
        return support if math.isfinite(support) else reach
    return min(support, decay_end(rs, veff, energy, mass, decay))


@dataclass
class GridArrays:
    """Numerov arrays of a grid refined ``refine`` times, with ghost nodes past r_max for every
    stride: rows r, g², F, Q0, ρ of ``a`` (Q(E) = Q0 − E·ρ); node refine·n is r_max."""

    grid: MappedGrid
    a: np.ndarray
    g_end: float  # g and g'/g at r_max, for the outer condition
    gp_end: float
    refine: int = REFINE

    @property
    def r(self) -> np.ndarray:
        return self.a[0]

    @property
    def g2(self) -> np.ndarray:
        return self.a[1]

    def steps(self, stride: int) -> int:
        return self.grid.n * self.refine // stride

    def step(self, stride: int) -> float:
        return self.grid.h * stride / self.refine


def arrays_for(pot, l: int, grid: MappedGrid, refine: int = REFINE) -> GridArrays:
    """The arrays of ``grid`` refined ``refine`` times for ``pot`` and ``l`` (:func:`build`)."""
    a, g_end, gp_end = build(pot.info.kernel, *pot.kernel_inputs, float(pot.mass), int(l), grid.beta, grid.c, grid.tc,
                             grid.t0, grid.t1, int(grid.n), grid.r_max, int(refine))
    return GridArrays(grid, a, g_end, gp_end, refine)


jitcache.leave(_saved_cache_dir)
