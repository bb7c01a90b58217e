"""Bound levels of one central potential and one angular momentum l: the public entry points over
the compiled cell solver (:mod:`.cell`).

1. Count.  For a short-range potential the exact count N_b comes from the zero-energy problem.
   Coulomb-tail and confining potentials bind infinitely many levels: the lowest ``n_r_max``
   (default 20) are returned.
2. Per level, in one compiled call for the whole cell (:mod:`.cell`): its own box and grid,
   Sturm isolation and Newton–Cooley on h, h/2, h/4, Richardson extrapolation, refinement while
   the error estimate misses the tolerance, a flag (not a drop) if it still does.
3. Here: the exterior's share of ⟨r⟩ (:func:`..potentials.exterior.tail_integrals`), ⟨r⟩
   extrapolated like the energies, and u(r) on request.

Every number depends only on the cell (potential, l): no state is kept between calls, so a cell
gives the same bits whatever was solved before it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ...checks import quantum_number
from ...errors import ConvergenceError
from ...labels import state_label
from ..potentials.exterior import (GAUSS_NODES, GAUSS_WEIGHTS, TAIL_CONFINING, TAIL_PANELS, survey_window, tail_code,
                                   tail_integrals)
from ..limits import MAX_LEVELS, MAX_NODES, check_count, check_l
from ..richardson import extrapolate_grids
from ..status import NOT_CONVERGED, OK
from .cell import REASONS, solve_cell
from .design import DECAY_LENGTHS, SAMPLES, arrays_for
from .mapping import H_MAX, THETA, MappedGrid, origin_radius
from .search import grid_parameters, solve_grid
from .zero_energy import MARGIN, too_many_states

__all__ = ["BoundLevels", "bound_levels", "LevelSolution", "solve_level", "level_solutions", "level_on_grid",
           "Resolution", "DEFAULT_LEVELS", "RTOL"]

DEFAULT_LEVELS = 20  # levels returned for potentials that bind infinitely many
ROUNDOFF = 1e-14  # floor of an error estimate, relative
RTOL = 1e-9  # the accuracy the sweep promises on every level (relative)
ATTEMPTS = 8


@dataclass(frozen=True)
class Resolution:
    """How finely a level is resolved: the largest phase per coarse step θ (rad) and the box's
    reach past the turning point in decay lengths.  The defaults give the promised accuracy; a
    finer resolution serves as a reference (the engine benchmark uses θ = 0.1, 30 lengths)."""

    theta: float = THETA
    decay_lengths: float = DECAY_LENGTHS


@dataclass
class BoundLevels:
    """Bound levels of one l, ascending in energy (atomic units)."""

    l: int
    energy: np.ndarray
    n_r: np.ndarray
    energy_error: np.ndarray
    mean_radius: np.ndarray
    status: np.ndarray
    reason: list
    num_bound: int  # exact count; -1 where infinitely many (Coulomb tail, confining)
    r: list | None = field(default=None, repr=False)
    u: list | None = field(default=None, repr=False)

    @property
    def n(self) -> np.ndarray:
        return self.n_r + self.l + 1

    @property
    def labels(self) -> list[str]:
        return [state_label(int(n), self.l) for n in self.n]


@dataclass
class LevelSolution:
    """One level, converged: its extrapolated energy, error estimate and ⟨r⟩, and what it was
    solved on — the design grid (``grid``; the solver's grids are it refined 1, 2 and 4 times)
    and the discrete eigenvalue on each (``grid_energies``).

    ``r`` and ``u`` (when asked for) are u(r) on the finest grid, normalised to
    ∫₀^∞ u² dr = 1 with the exterior part beyond r[-1] (see :func:`level_on_grid`)."""

    l: int
    n_r: int
    energy: float
    error: float
    mean_radius: float
    status: int
    reason: str
    grid: MappedGrid | None = None
    grid_energies: tuple = ()
    r: np.ndarray | None = field(default=None, repr=False)
    u: np.ndarray | None = field(default=None, repr=False)


def bound_levels(pot, l: int, n_r_max: int | None = None, wavefunctions: bool = False, rtol: float = RTOL,
                 resolution: Resolution = Resolution()) -> BoundLevels:
    """Every bound level of angular momentum ``l`` (or the lowest ``n_r_max``).

    Parameters
    ----------
    pot : Potential
        From :func:`boundscape.potential`.
    l : int
        Angular momentum quantum number, ≥ 0.
    n_r_max : int, optional
        Keep levels n_r = 0 .. n_r_max-1.  Default: all (20 for Coulomb-tail and confining potentials).
    wavefunctions : bool
        Also return, per level, the radii ``r`` and the normalised u(r) on its finest grid (the
        part beyond the box, if any, is analytic and not sampled); see :func:`solve_level` for
        every grid of a level and :func:`level_on_grid` for a grid of your choice.
    rtol : float
        Relative tolerance on each energy; levels whose error estimate exceeds it get status 1.
    resolution : Resolution
        The solver's resolution (the default is what the accuracy is checked at).

    Returns
    -------
    BoundLevels
    """
    l = check_l(quantum_number(l))
    keep_max = -1
    if n_r_max is not None:
        keep_max = check_count(quantum_number(n_r_max, "n_r_max"), "n_r_max", MAX_LEVELS, "levels of one l per call")
    elif pot.tail != "short":
        keep_max = DEFAULT_LEVELS
    count, solved = _cell(pot, l, keep_max, rtol, resolution)
    out = BoundLevels(
        l=l,
        energy=np.array([lv.energy for lv in solved]),
        n_r=np.arange(len(solved)),
        energy_error=np.array([lv.error for lv in solved]),
        mean_radius=np.array([lv.mean_radius for lv in solved]),
        status=np.array([lv.status for lv in solved], dtype=np.int8),
        reason=[lv.reason for lv in solved],
        num_bound=count,
    )
    finite = out.energy[np.isfinite(out.energy)]
    if np.any(np.diff(finite) <= 0):
        raise ConvergenceError(f"levels of l={l} came out unordered for {pot}: {out.energy}")
    if wavefunctions:
        for lv in solved:
            if lv.grid is not None:
                _attach_wavefunction(pot, lv)
        out.r = [lv.r for lv in solved]
        out.u = [lv.u for lv in solved]
    return out


def _reach(pot, l, keep):
    """Farthest radius a box of the lowest ``keep`` levels may need (bohr)."""
    if math.isfinite(pot.support):
        return float(pot.support)
    kind, p = tail_code(pot)
    return 1.5 * survey_window(kind, l, pot.mass, p, max(keep, DEFAULT_LEVELS, 1), DECAY_LENGTHS)[1]


def _top(pot, l, keep):
    """Top of the energy window the guesses are sought in (hartree)."""
    if pot.tail != "confining":
        return 0.0
    kind, p = tail_code(pot)
    return 1.5 * survey_window(kind, l, pot.mass, p, max(keep, DEFAULT_LEVELS), 8.0)[0]


def _tail(pot, l, energy, R):
    """(∫ u², ∫ r u²) of the exterior part beyond R, relative to u(R)² (short range only:
    the other tails' boxes reach past any part that counts)."""
    if pot.tail != "short":
        return 0.0, 0.0
    return tail_integrals(int(l), int(l), float(pot.mass), float(energy), float(energy), float(R), GAUSS_NODES,
                          GAUSS_WEIGHTS, TAIL_PANELS)


def _cell(pot, l, keep_max, rtol=RTOL, resolution=Resolution()):
    """The count and every level of a cell in one compiled call (:func:`.cell.solve_cell`).
    ``keep_max``: levels wanted, −1 for all (short range only)."""
    kind, p = tail_code(pot)
    r_min = origin_radius(pot, l)
    count, count_status, rows = solve_cell(
        pot.info.kernel, *pot.kernel_inputs, float(pot.mass), int(l), kind, p, float(pot.support),
        pot.jumps_at_support, r_min, 0.1 * pot.length_scale, float(pot.energy_scale), _reach(pot, l, keep_max),
        _top(pot, l, keep_max), int(keep_max), float(resolution.theta), H_MAX, float(rtol), MARGIN,
        float(resolution.decay_lengths), SAMPLES, ATTEMPTS, ROUNDOFF, MAX_NODES)
    if count_status == 2:
        raise too_many_states(pot, l)
    if count_status:
        raise ConvergenceError(f"zero-energy eigenvalue of l={l} for {pot} near threshold did not converge")
    solved = []
    for k, row in enumerate(rows.tolist()):
        energy, err, status, why, R, closed = row[:6]
        if not math.isfinite(energy):
            solved.append(LevelSolution(l, k, math.nan, math.inf, math.nan, NOT_CONVERGED, REASONS[int(why)]))
            continue
        reason = f"error estimate {err:.2e} hartree exceeds rtol {rtol:g}·|E|" if status else ""
        t0, t1 = _tail(pot, l, energy, R) if closed else (0.0, 0.0)
        norm, first, uend = row[6:9], row[9:12], row[12:15]
        radii = [(first[j] + t1 * uend[j]) / (norm[j] + t0 * uend[j]) for j in range(3)]
        radius = extrapolate_grids(*radii)[0]
        grid = MappedGrid(r_min, R, row[15], row[16], row[17], row[18], row[19], int(row[20]))
        solved.append(LevelSolution(l, k, energy, err, radius, int(status), reason, grid, tuple(row[21:24])))
    return count, solved


def _eigenpair(pot, l, arrays, k, start):
    """Level k on the finest grid of ``arrays`` from ``start``: (energy, status, ∫u², u(R)², w)."""
    kind, p = tail_code(pot)
    prm = grid_parameters(float(pot.mass), int(l), kind, p, arrays.grid.r_max, arrays.g_end, arrays.gp_end,
                          float(pot.energy_scale), kind != TAIL_CONFINING)
    n = arrays.steps(1)
    work = np.empty(n + 2)
    out = solve_grid(arrays.a, prm, 1, n, arrays.step(1), int(k), float(start), float(start), work, True)
    return out[0], out[1], out[3], out[5], work


def _attach_wavefunction(pot, lv):
    """u(r) of a solved level on its finest grid, normalised with the exterior part."""
    arrays = arrays_for(pot, lv.l, lv.grid)
    _, _, norm, uend2, w = _eigenpair(pot, lv.l, arrays, lv.n_r, lv.grid_energies[2])
    R = lv.grid.r_max
    t0 = _tail(pot, lv.l, lv.energy, R)[0] if pot.reaches_support(R) else 0.0
    n = arrays.steps(1)
    lv.r = arrays.r[: n + 1].copy()
    lv.u = _oriented(np.sqrt(np.sqrt(arrays.g2[: n + 1])) * w[: n + 1] / math.sqrt(norm + t0 * uend2))


def _wanted(pot, keep):
    return max(keep, DEFAULT_LEVELS) if pot.tail != "short" else keep


def solve_level(pot, l: int, n_r: int, rtol: float = RTOL, wavefunction: bool = True) -> LevelSolution:
    """Level (n_r, l) alone, as :func:`bound_levels` solves it, with its grids.

    Parameters
    ----------
    pot : Potential
    l, n_r : int
        Angular momentum and node count of the level (it must be bound).
    rtol : float
        Relative tolerance on the energy.
    wavefunction : bool
        Also return u(r) on the finest grid.

    Returns
    -------
    LevelSolution
        The same energy bits as :func:`bound_levels` gives for this level.
    """
    l = check_l(quantum_number(l))
    n_r = check_count(quantum_number(n_r, "n_r"), "n_r", MAX_LEVELS - 1, "levels of one l per call")
    count, solved = _cell(pot, l, _wanted(pot, n_r + 1), rtol)
    if n_r >= len(solved):
        raise ConvergenceError(f"level n_r={n_r}, l={l} is not bound in {pot} (it binds {count})")
    lv = solved[n_r]
    if wavefunction and lv.grid is not None:
        _attach_wavefunction(pot, lv)
    return lv


def level_solutions(pot, l: int, keep: int, rtol: float = RTOL) -> list:
    """The lowest ``keep`` levels of ``l`` that are bound (fewer if fewer are), each a
    :class:`LevelSolution` with its grids, as :func:`bound_levels` solves them."""
    l = check_l(quantum_number(l))
    keep = check_count(quantum_number(keep, "keep"), "keep", MAX_LEVELS, "levels of one l per call")
    if keep == 0:
        return []
    return _cell(pot, l, _wanted(pot, keep), rtol)[1][:keep]


def level_on_grid(pot, l: int, n_r: int, grid: MappedGrid, energy: float):
    """The discrete eigenpair of level (n_r, l) on a grid of your choice, for matrix elements
    between levels on one common grid (then Richardson-extrapolated over ``grid.refined(f)``,
    f = 1, 2, 4, with :func:`boundscape.engine.richardson.extrapolate`).

    Parameters
    ----------
    pot : Potential
    l, n_r : int
    grid : MappedGrid
        E.g. ``solve_level(...).grid`` of the level with the larger box; its end must lie where
        the exterior solution applies.
    energy : float
        A start close to the level (e.g. its converged energy).

    Returns
    -------
    energy : float
        The discrete eigenvalue on ``grid``.
    r, u : ndarray
        Nodes 0..n and u there, normalised to ∫₀^∞ u² dr = 1 including the exterior part
        beyond r[-1] when the grid ends at the potential's range.
    weights : ndarray
        Simpson's weights in t times g = dr/dt at the nodes: Σ weights·f(r)·u_a·u_b approximates
        ∫ f u_a u_b dr over the box with an error series in h⁴, h⁶.
    """
    l, n_r = quantum_number(l), quantum_number(n_r, "n_r")
    check_count(grid.n, "the grid's nodes", MAX_NODES, "the arrays of one grid, ~160 MB")
    arrays = arrays_for(pot, l, grid, refine=1)  # the nodes of ``grid`` only (stride 1)
    e, status, norm, uend2, w = _eigenpair(pot, l, arrays, n_r, energy)
    if status != 0:
        raise ConvergenceError(f"level n_r={n_r}, l={l}: no discrete eigenvalue found on the given grid (status {status})")
    # Newton stops once its step is small, and w is joined at the energy before that step
    # (~1e-9 relative off): a second pass from the converged energy joins w at it.
    e2, status, norm, uend2, w = _eigenpair(pot, l, arrays, n_r, e)
    if status == 0:
        e = e2
    R = grid.r_max
    t0 = _tail(pot, l, e, R)[0] if pot.reaches_support(R) else 0.0
    n = grid.n
    r = arrays.r[: n + 1].copy()
    g = np.sqrt(arrays.g2[: n + 1])
    u = np.sqrt(g) * w[: n + 1] / math.sqrt(norm + t0 * uend2)
    simpson = np.where(np.arange(n + 1) % 2 == 1, 4.0, 2.0)
    simpson[0] = simpson[-1] = 1.0
    weights = simpson * grid.h / 3.0 * g  # dr = g dt
    return e, r, _oriented(u), weights


def _oriented(u):
    head = u[: max(2, u.size // 50)]
    return u if head[np.argmax(np.abs(head))] >= 0 else -u
