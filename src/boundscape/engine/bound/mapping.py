"""The mapped radial grid: an explicit map r(t) on a uniform t grid, and the choice of its
parameters for one problem.

Map.  r(t) = β·ln(1 + eˢ), s = t − c·ln(1 + e^{tc − t}), on a uniform t grid.  The softplus
is logarithmic for r ≪ β, where u ~ r^{l+1} varies on the scale r, and linear (spacing β·h)
for r ≫ β, where a level decays like e^{−κr}; β of order 1/κ.  Below the knee at
r(tc) ≈ β·e^{tc} the logarithmic stretch is compressed by 1 + c (c = 0..4, an integer, which
keeps the nodes cheap to compute): down there Q → (l + ½)²(1+c)² and nothing oscillates, so it
may take longer steps.  The map is explicit (no inversion per node); with p = σ(s), the
logistic: g = dr/dt = β p s', g'/g = (1 − p)s' + s''/s', and the Liouville term
F = ¾(g'/g)² − ½g''/g is F = (1 − p²)/4 where c = 0.

Liouville form.  With u(r) = g^{1/2} w(t) the radial equation is w'' = Q w,
Q = 2μg²(V_eff − E) + F, no first-derivative term: the form Numerov's method needs
(:mod:`.numerov`).  :func:`design_map` picks β, c and the step from the local wavenumber |Q|^{1/2}.

Grids.  A level is solved on the design grid and two halvings of its step (h, h/2, h/4); the
arrays are built once on the finest and the coarser grids use every 2nd and 4th node.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numba import njit, types

from .. import jitcache

_saved_cache_dir = jitcache.enter()  # this module's kernels are cached by jitcache's rule

__all__ = ["MappedGrid", "map_point", "map_nodes", "t_of_r", "design_map", "origin_radius", "THETA", "H_MAX",
           "REFINE", "ORIGIN_TOLERANCE", "C_MAX"]

f8, i8 = types.float64, types.int64
A1 = types.float64[::1]

# Largest phase (or decay) per coarse step, and largest coarse step in t.  Measured: θ = 0.25
# with three grids leaves ≲ 1e-10 relative on the benchmark cells (common practice is
# 0.1-0.3 rad per Numerov step, no source).
THETA = 0.25
H_MAX = 0.5
REFINE = 4  # the finest grid halves the design step twice
# Largest compression of the logarithmic stretch near the origin (its knee adds to F).
C_MAX = 4
# Dirichlet at r_min perturbs a level by ~ (r_min/a)^{2l+1}; keep that below 1e-14 (common practice, no source).
ORIGIN_TOLERANCE = 1e-14


def origin_radius(pot, l: int) -> float:
    """Where the grid starts: a Dirichlet end there moves no level by more than ORIGIN_TOLERANCE."""
    return pot.length_scale * ORIGIN_TOLERANCE ** (1.0 / (2 * l + 1))


@dataclass(frozen=True)
class MappedGrid:
    """Uniform t grid t0 + i·h, i = 0..n (n even); r(t0) = r_min carries w = 0, r(t1) = r_max the
    outer condition.  Map parameters β (bohr), c, tc as in the module docstring."""

    r_min: float
    r_max: float
    beta: float
    c: float
    tc: float
    t0: float
    t1: float
    n: int

    @property
    def h(self) -> float:
        return (self.t1 - self.t0) / self.n

    def refined(self, factor: int) -> "MappedGrid":
        return MappedGrid(self.r_min, self.r_max, self.beta, self.c, self.tc, self.t0, self.t1, self.n * factor)

    def with_steps(self, n: int) -> "MappedGrid":
        return MappedGrid(self.r_min, self.r_max, self.beta, self.c, self.tc, self.t0, self.t1, int(n) + int(n) % 2)

    def nodes(self) -> np.ndarray:
        """r at the nodes i = 0..n."""
        return map_nodes(self.beta, self.c, self.tc, self.t0, self.h, self.n + 1, self.r_max, self.n)[0]

    def stretched_to(self, R: float) -> "MappedGrid":
        """The same map, start and number of steps, ending at R instead (a grid that moves
        smoothly with a parameter along a root search)."""
        return MappedGrid(self.r_min, R, self.beta, self.c, self.tc, self.t0,
                          float(t_of_r(self.beta, self.c, self.tc, R)), self.n)


@njit([(f8,)], cache=True)
def _softplus(y):
    if y > 0.0:
        return y + math.log1p(math.exp(-y))
    return math.log1p(math.exp(y))


@njit([(f8,)], cache=True)
def _logistic(y):
    if y >= 0.0:
        return 1.0 / (1.0 + math.exp(-y))
    e = math.exp(y)
    return e / (1.0 + e)


@njit([(f8, f8, f8, f8,)], cache=True)
def map_point(beta, c, tc, t):
    """r(t) = β·ln(1 + eˢ), s = t − c·ln(1 + e^{tc−t}); returns r, g = dr/dt, g'/g, g''/g."""
    sc = _logistic(tc - t)
    s = t - c * _softplus(tc - t)
    s1 = 1.0 + c * sc
    s2 = -c * sc * (1.0 - sc)
    s3 = c * sc * (1.0 - sc) * (1.0 - 2.0 * sc)
    p = _logistic(s)
    q = _logistic(-s)  # 1 − p without cancellation
    r = beta * _softplus(s)
    g = beta * p * s1
    gp = q * s1 + s2 / s1
    gpp = q * (q - p) * s1 * s1 + 3.0 * q * s2 + s3 / s1
    return r, g, gp, gpp


@njit([(f8, f8, f8, f8, f8, i8, f8, i8,)], cache=True)
def map_nodes(beta, c, tc, t0, h, n, r_end, i_end):
    """Rows r, g², F = ¾(g'/g)² − ½g''/g (and room for Q's two parts, see :func:`assemble`) at
    t0 + i·h, i < n; node ``i_end`` is set to exactly ``r_end`` (the outer condition is
    evaluated there).

    With c an integer, eˢ = eᵗ/(1 + e^{tc−t})^c needs no transcendental function, and eᵗ, e^{tc−t}
    are carried from node to node by multiplication, re-anchored every 64 nodes (so their error
    stays at rounding level): one log1p per node, for r = β·ln(1 + eˢ)."""
    out = np.empty((5, n))
    ci = int(c)
    step = math.exp(h)
    et = math.exp(t0)
    etc = math.exp(tc)
    for i in range(n):
        if i % 64 == 0:
            et = math.exp(t0 + i * h)  # re-anchored now and then: the drift stays at rounding level
        eu = etc / et  # e^{tc − t}
        sc = eu / (1.0 + eu) if eu < 1e300 else 1.0  # logistic(tc − t)
        base = 1.0 + eu
        den = 1.0
        for _ in range(ci):
            den *= base
        es = et / den  # e^s
        s1 = 1.0 + c * sc
        s2 = -c * sc * (1.0 - sc)
        s3 = -s2 * (1.0 - 2.0 * sc)
        p = es / (1.0 + es)  # logistic(s)
        q = 1.0 / (1.0 + es)
        inv = 1.0 / s1
        g = beta * p * s1
        gp = q * s1 + s2 * inv
        gpp = q * (q - p) * s1 * s1 + 3.0 * q * s2 + s3 * inv
        out[0, i] = beta * math.log1p(es)
        out[1, i] = g * g
        out[2, i] = 0.75 * gp * gp - 0.5 * gpp
        et *= step
    if 0 <= i_end < n:
        out[0, i_end] = r_end
    return out


@njit([(f8, f8, f8, f8,)], cache=True)
def t_of_r(beta, c, tc, r):
    """Invert the map (one point): s from the softplus in closed form, t by Newton's method
    (s(t) is increasing and convex-concave with s' ≥ 1, so a few steps suffice)."""
    y = r / beta
    if y > 30.0:
        s = y + math.log(-math.expm1(-y))
    else:
        s = math.log(math.expm1(y))
    t = s if s >= tc else (s + c * tc) / (1.0 + c)
    for _ in range(100):
        f = t - c * _softplus(tc - t) - s
        step = f / (1.0 + c * _logistic(tc - t))
        t -= step
        if abs(step) <= 1e-15 * (1.0 + abs(t)):
            break
    return t



@njit([(A1, A1, f8, f8, i8, f8, f8, f8, f8, A1, f8,)], cache=True)
def design_map(rs, veff, energy, mass, l, r_min, R, theta, h_max, betas, r_core):
    """Choose β among ``betas``, the inner compression c and the coarse step h for the map, so
    that the local wavenumber |Q|^{1/2} in t is resolved to ``theta`` per step on [r_min, R].

    Samples (rs, veff) of V_eff; outside the inner knee r_core the map is the softplus
    (g = β(1 − e^{−r/β}), F = (1 − p²)/4); inside it the logarithmic stretch is compressed by
    1 + c, where Q → (l + ½)²(1 + c)² and nothing oscillates.  Returns (β, c, tc, t0, t1, n)."""
    best = 1e300
    best_beta = betas[0]
    best_h = h_max
    best_c = 0.0
    inner = math.log(max(r_core, r_min) / r_min)  # the logarithmic stretch below the knee
    for b in range(betas.size):
        beta = betas[b]
        kmax = 0.0
        for j in range(rs.size):
            rj = rs[j]
            if rj < r_core or rj > R:
                continue
            p = -math.expm1(-rj / beta)
            g = beta * p
            F = 0.25 * (1.0 - p * p)
            qv = abs(2.0 * mass * g * g * (veff[j] - energy) + F)
            if qv > kmax * kmax:
                kmax = math.sqrt(qv)
        h = min(theta / kmax, h_max) if kmax > 0.0 else h_max
        # below the knee Q → (l + ½)²(1 + c)²: compress as far as θ allows
        c = float(max(0, min(int(theta / (h * (l + 0.5)) - 1.0), C_MAX)))
        y = R / beta
        s1 = y + math.log(-math.expm1(-y)) if y > 30.0 else math.log(math.expm1(y))
        y0 = max(r_core, r_min) / beta
        s0 = y0 + math.log(-math.expm1(-y0)) if y0 > 30.0 else math.log(math.expm1(y0))
        steps = ((s1 - s0) + inner / (1.0 + c)) / h
        if steps < best:
            best = steps
            best_beta = beta
            best_h = h
            best_c = c
    beta = best_beta
    h = best_h
    c = best_c
    y0 = r_core / beta
    tc = y0 + math.log(-math.expm1(-y0)) if y0 > 30.0 else math.log(math.expm1(y0))
    if r_core <= r_min * 4.0:
        c = 0.0
    t0 = t_of_r(beta, c, tc, r_min)
    t1 = t_of_r(beta, c, tc, R)
    n = int(math.ceil((t1 - t0) / h))
    n = max(16, n + (n % 2))
    return beta, c, tc, t0, t1, n


jitcache.leave(_saved_cache_dir)
