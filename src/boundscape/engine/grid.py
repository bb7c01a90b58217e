"""The discretised radial problem: an explicit mapped grid, its Numerov arrays, and Richardson
extrapolation of what they yield.

Map.  r(t) = β·ln(1 + eˢ), s = t − c·ln(1 + e^{tc − t}), on a uniform t grid.  The softplus
is logarithmic for r ≪ β, where u ~ r^{l+1} varies on the scale r, and linear (spacing β·h)
for r ≫ β, where a level decays like e^{−κr}; β of order 1/κ.  Below the knee at
r(tc) ≈ β·e^{tc} the logarithmic stretch is compressed by 1 + c (c = 0..4, an integer, which
keeps the nodes cheap to compute): down there Q → (l + ½)²(1+c)² and nothing oscillates, so it
may take longer steps.  The map is explicit (no inversion per
node); with p = σ(s), the logistic: g = dr/dt = β p s', g'/g = (1 − p)s' + s''/s', and the
Liouville term F = ¾(g'/g)² − ½g''/g is F = (1 − p²)/4 where c = 0.

Liouville form.  With u(r) = g^{1/2} w(t) the radial equation is w'' = Q w,
Q = 2μg²(V_eff − E) + F, no first-derivative term: the form Numerov's method needs
(:mod:`.numerov`).  ``design_grid`` picks β, c and the step from the local wavenumber |Q|^{1/2}.

Grids.  A level is solved on the design grid and two halvings of its step (h, h/2, h/4); the
arrays are built once on the finest and the coarser grids use every 2nd and 4th node.  The
discrete eigenvalue's error is an even series from h⁴ on, removed by Richardson extrapolation.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from .jitcache import lazy_module

nv = lazy_module("numerov")

__all__ = ["MappedGrid", "GridArrays", "design_grid", "build_arrays", "richardson", "richardson_weights",
           "THETA", "H_MAX", "REFINE", "STRIDES"]

# Largest phase (or decay) per coarse step, and largest coarse step in t.  Measured: θ = 0.25
# with three grids leaves ≲ 1e-10 relative on the benchmark cells (common practice is
# 0.1-0.3 rad per Numerov step, no source).
THETA = 0.25
H_MAX = 0.5
REFINE = 4  # the finest grid halves the design step twice
STRIDES = (4, 2, 1)  # node strides of the grids h, h/2, h/4 in the finest arrays
FACTORS = (1, 2, 4)


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
        return nv.map_nodes(self.beta, self.c, self.tc, self.t0, self.h, self.n + 1, self.r_max, self.n)[0]


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


def build_arrays(grid: MappedGrid, potential, continued, mass: float, l: int, refine: int = REFINE) -> GridArrays:
    """Nodes of ``grid`` refined ``refine`` times, V there, and Q's two parts.

    ``potential(r)`` is V (hartree) on [r_min, r_max]; ``continued(r)`` V's interior formula
    continued past r_max, for the ghost nodes (it differs where V jumps at r_max)."""
    n_fine = grid.n * refine
    a = nv.map_nodes(grid.beta, grid.c, grid.tc, grid.t0, grid.h / refine, n_fine + refine + 1, grid.r_max, n_fine)
    v = np.empty(a.shape[1])
    v[:n_fine + 1] = potential(a[0, :n_fine + 1])
    v[n_fine + 1:] = continued(a[0, n_fine + 1:])
    nv.assemble(a, v, mass, l)
    _, g_end, gp_end, _ = nv.map_point(grid.beta, grid.c, grid.tc, grid.t1)
    return GridArrays(grid, a, g_end, gp_end, refine)


def design_grid(samples_r, samples_veff, mass: float, l: int, energy: float, r_min: float, R: float,
                r_core: float, theta: float = THETA, h_max: float = H_MAX) -> MappedGrid:
    """The map and coarse step for one problem: V_eff sampled at ``samples_r``, energy ``energy``
    (hartree; its κ proposes β), box [r_min, R], inner knee near ``r_core``."""
    kappa = math.sqrt(2.0 * mass * -energy) if energy < 0 else 0.0
    betas = [R / 64.0, R / 16.0, R / 4.0, R, 4.0 * R]
    if kappa > 0:
        betas += [0.5 / kappa, 1.0 / kappa, 2.0 / kappa, 4.0 / kappa]
    betas = np.array([b for b in betas if b > 4.0 * r_min], dtype=float)
    beta, c, tc, t0, t1, n = nv.design_map(samples_r, samples_veff, energy, mass, l, r_min, R, theta, h_max,
                                           betas, max(r_core, r_min))
    return MappedGrid(float(r_min), float(R), float(beta), float(c), float(tc), float(t0), float(t1), int(n))


def richardson(values, factors=FACTORS, powers=(4, 6)) -> tuple[float, float]:
    """Extrapolate values computed with steps h/f, f in ``factors``, to h → 0 for an error series
    in h^p, p in ``powers`` (Richardson 1911); return (estimate, error estimate).  The error
    estimate is the change from the extrapolation that uses one grid fewer (the finest ones)."""
    v = np.asarray(values, dtype=float)
    best = float(richardson_weights(tuple(factors), tuple(powers)) @ v)
    second = float(richardson_weights(tuple(factors[1:]), tuple(powers[:-1])) @ v[1:])
    return best, abs(best - second)


@lru_cache(maxsize=64)
def richardson_weights(factors, powers) -> np.ndarray:
    # Σ w_j = 1 and Σ w_j f_j^{−p} = 0 for each p in powers
    f = np.asarray(factors, dtype=float)
    rows = [np.ones_like(f)] + [f ** (-float(p)) for p in powers[: len(f) - 1]]
    rhs = np.zeros(len(f))
    rhs[0] = 1.0
    return np.linalg.solve(np.array(rows), rhs)
