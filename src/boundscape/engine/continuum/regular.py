"""The regular solution at an energy E ≥ 0 on the bound-state solver's mapped grid: what
scattering lengths (:mod:`.scattering`) and phase shifts (:mod:`.phase_shifts`) are read from.

Grid.  The map, Liouville form and Numerov arrays of :mod:`..bound` (:func:`..bound.design.design`,
:func:`..bound.design.arrays_for`), from r_min (:func:`..bound.mapping.origin_radius`: the
Dirichlet end there moves nothing by more than 1e-14) to a radius R beyond which the potential
may be left out and the exterior solution is known in closed form.  At E = 0 it is the grid of
the engine's own zero-energy problem (:func:`..bound.zero_energy.zero_energy_problem`, out to
``pot.support``, where V is zero or below e⁻⁵⁰ of its scale), so that a scattering length
passes through infinity where the engine's counts change.  Above threshold the grid resolves
the largest momentum asked for and ends where the tail left out moves the phase by less than
1e-13 rad (:func:`cut_radius`): at high momentum far inside the support.  Where V jumps at R (the square well) R is a node, and the
ghost node past it carries V's interior formula, as the bound-state solver's does.

Solution.  Numerov's recurrence from w_0 = 0 outwards, in the summed (difference) form of
:func:`..bound.numerov.join`, one node past R (the ghost node).  Read at R:

* u(R) = g^{1/2} w_N and u'(R) from the ghost node's Taylor relation inverted,
  w'(1 + h²Q/6) = (w_{N+1} − w_{N−1})/2h − h²Q'w/6 (the relation that closes the bound-state
  box, :func:`..bound.numerov.last_excess`), whose error is an even series from h⁴ on;
* integrals ∫₀^R f(r) u(r) dr by Simpson's rule in t (dr = g dt), error series h⁴, h⁶.

Both are Richardson-extrapolated (:mod:`..richardson`) over the grids h, h/2, h/4, as levels are.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from numba import njit

from .. import jitcache
from ..bound.design import SAMPLES, GridArrays, arrays_for, design, samples
from ..bound.mapping import H_MAX, REFINE, THETA, MappedGrid, origin_radius
from ..bound.numerov import A1, f8, i8
from ..bound.zero_energy import THETA_CRITICAL, zero_energy_problem
from .outgoing import exterior_cut, is_compact

_saved_cache_dir = jitcache.enter()  # this module's kernel is cached by jitcache's rule

__all__ = ["regular_solution", "ContinuumGrid", "RegularSolution", "zero_energy_grid", "continuum_grid", "cut_radius",
           "MAX_STEPS", "STRIDES", "REFINEMENTS", "TAIL_TOLERANCE"]

# Grids h, h/2, h/4 are every 4th, 2nd and every node of the finest arrays (FACTORS 1, 2, 4).
STRIDES = (REFINE, REFINE // 2, REFINE // 4)
# Where an error estimate misses its tolerance the designed grid's step is divided by these in turn.
REFINEMENTS = (1, 2, 4, 8)
# A coarse grid of more steps than this is refused: 4× that many nodes in five rows (~32 MB).
MAX_STEPS = 100_000
# Above threshold the grid ends where the tail left out moves δ by less than this (rad, first
# order), checked on this many log-spaced samples of V.
TAIL_TOLERANCE = 1e-13
SAMPLES_TAIL = 400


@njit([(A1, A1, i8, i8, f8, f8,)], cache=True)
def regular_solution(q0, rho, stride, n, h, energy):
    """w_0..w_n of the regular solution (w_0 = 0, Y_1 = 1) at ``energy`` on the nodes j·stride;
    with n one past the grid's last node it includes the ghost node.  Summed form: the
    differences ΔY_j = ΔY_{j−1} + c/(1 − c/12)·Y_j, c = h²Q, keep E's share of c that
    Y_{j+1} = (b/a)Y_j − Y_{j−1} would lose to rounding on fine grids."""
    h2 = h * h
    w = np.empty(n + 1)
    w[0] = 0.0
    y, dy = 1.0, 1.0  # Y_j and Y_j − Y_{j−1}
    for j in range(1, n + 1):
        i = j * stride
        cq = h2 * (q0[i] - energy * rho[i])
        inv = 1.0 / (1.0 - cq / 12.0)
        w[j] = y * inv
        dy = dy + cq * inv * y
        y = y + dy
        if abs(y) > 1e150:
            y *= 1e-150
            dy *= 1e-150
            for jj in range(j + 1):
                w[jj] *= 1e-150
    return w


jitcache.leave(_saved_cache_dir)


@dataclass
class RegularSolution:
    """The regular solution on one grid: u at the nodes r (0..N, r[-1] = R), the Simpson
    weights of ∫ dr over them, u and u' at R, and its node count on (0, R]."""

    r: np.ndarray
    u: np.ndarray
    weights: np.ndarray
    u_end: float
    du_end: float
    nodes: int


@dataclass
class ContinuumGrid:
    """A designed grid for one potential and l, its Numerov arrays refined REFINE times, and V
    at their nodes up to R (the integrals' weights)."""

    pot: object
    l: int
    grid: MappedGrid
    arrays: GridArrays
    potential: np.ndarray = field(repr=False)

    @property
    def R(self) -> float:
        return self.grid.r_max

    def solve(self, stride: int, energy: float) -> RegularSolution:
        """The regular solution at ``energy`` on every ``stride``-th node of the finest arrays."""
        a = self.arrays
        n = a.steps(stride)
        h = a.step(stride)
        q0, rho = a.a[3], a.a[4]
        w = regular_solution(q0, rho, stride, n + 1, h, float(energy))
        idx = slice(0, n * stride + 1, stride)
        g2 = a.g2[idx]
        g = np.sqrt(g2)
        u = np.sqrt(g) * w[: n + 1]
        weights = np.full(n + 1, 2.0)
        weights[1::2] = 4.0
        weights[0] = weights[-1] = 1.0
        weights *= g * (h / 3.0)
        # u'(R) from the ghost node: w' from the Taylor relation of Numerov's closing row
        i_m, i_n, i_g = (n - 1) * stride, n * stride, (n + 1) * stride
        qm, qn, qg = (q0[i] - energy * rho[i] for i in (i_m, i_n, i_g))
        dw = ((w[n + 1] - w[n - 1]) / (2.0 * h) - h * h * (qg - qm) / (2.0 * h) * w[n] / 6.0) / (1.0 + h * h * qn / 6.0)
        g_end, gp_end = a.g_end, a.gp_end
        u_end = math.sqrt(g_end) * w[n]
        du_end = (dw + 0.5 * gp_end * w[n]) / math.sqrt(g_end)
        nodes = int(np.count_nonzero(np.signbit(w[2: n + 1]) != np.signbit(w[1:n])))
        return RegularSolution(a.r[idx], u, weights, u_end, du_end, nodes)


def _with_potential(pot, l, grid):
    if grid.n > MAX_STEPS:
        raise ValueError(f"the grid would need {grid.n} steps (limit {MAX_STEPS})")
    arrays = arrays_for(pot, l, grid)
    n_fine = arrays.steps(1)
    return ContinuumGrid(pot, l, grid, arrays, np.asarray(pot(arrays.r[: n_fine + 1]), dtype=float))


def zero_energy_grid(pot, l: int, theta: float = THETA_CRITICAL, refine: int = 1) -> ContinuumGrid:
    """The engine's zero-energy grid (:func:`..bound.zero_energy.zero_energy_problem`) designed at
    ``theta``, its step divided by ``refine`` (the design's step is capped at H_MAX, so only
    this refines a grid where nothing oscillates, e.g. a weak potential)."""
    return _with_potential(pot, l, zero_energy_problem(pot, l, theta=theta).grid.refined(refine))


def cut_radius(pot, k: float, tolerance: float = TAIL_TOLERANCE) -> float:
    """Where the potential may be left out at momentum k: the end of a compact support, else the
    first radius past which the tail changes the phase by less than ``tolerance`` (rad) in first
    order, (2μ/k)∫_R^∞|V| dr (or 2μ∫_R^∞|V| r dr where kr < 1: :func:`.outgoing.exterior_cut`);
    never beyond ``pot.support``."""
    R = float(pot.support)
    if is_compact(pot) or k <= 0.0:
        return R
    t = np.geomspace(origin_radius(pot, 0), R, SAMPLES_TAIL)
    j = exterior_cut(np.abs(pot(t)), t, t, float(pot.mass), complex(k), 0.0, tolerance=tolerance)[0]
    return R if j is None else float(t[j])


def continuum_grid(pot, l: int, energy: float, lowest: float | None = None, theta: float = THETA,
                   refine: int = 1) -> ContinuumGrid:
    """A grid that resolves the regular solution at energies up to ``energy`` (hartree, > 0) at
    ``theta`` radians of local phase per coarse step (the bound-state solver's design; it
    meets 1e-10 on the square well's exact δ_l up to E = 100 V0), its step divided by ``refine``, out to
    where the potential may be left out at the ``lowest`` energy of its batch (default
    ``energy``; :func:`cut_radius`).

    Raises ``ValueError`` if that takes more than :data:`MAX_STEPS` coarse steps."""
    k = math.sqrt(2.0 * pot.mass * max(energy, 0.0))
    R = cut_radius(pot, math.sqrt(2.0 * pot.mass * max(energy if lowest is None else lowest, 0.0)))
    # an upper bound on the steps first (the linear stretch alone needs k·R/θ), so that an
    # absurd energy is refused before anything of that size is built
    if k * R * refine / theta > MAX_STEPS:
        raise ValueError(f"the grid would need more than {k * R * refine / theta:.3g} steps (limit {MAX_STEPS})")
    r_min = origin_radius(pot, l)
    rs, veff, _, _ = samples(pot.info.kernel, *pot.kernel_inputs, float(pot.mass), int(l), r_min, R, SAMPLES)
    beta, c, tc, t0, t1, n = design(rs, veff, float(pot.mass), int(l), float(energy), r_min, R,
                                    0.1 * pot.length_scale, float(theta), H_MAX)
    return _with_potential(pot, l, MappedGrid(r_min, R, beta, c, tc, t0, t1, int(n) * refine))
