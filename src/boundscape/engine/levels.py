"""Bound levels of one central potential and one angular momentum l.

Method (the discretisation is in :mod:`.grid`, the compiled kernels in :mod:`.numerov`):

1. Count.  For a short-range potential the exact count N_b comes from the zero-energy problem
   (:mod:`.zero_energy`).  Coulomb-tail and confining potentials bind infinitely many levels:
   the lowest ``n_r_max`` (default 20) are returned.
2. Per level.  A Langer-WKB guess sets the level's own box (:mod:`.problem`) and grid; the
   level is isolated there by Sturm counts and converged by Newton's method with Cooley's
   energy correction, the exterior condition at R taken at the current energy.  If the solved
   level asks for another box or grid than its guess gave, the grid is designed again from it.
3. Extrapolation.  Energies and ⟨r⟩ on the grids h, h/2, h/4 are Richardson-extrapolated
   (error series h⁴, h⁶); the change against the extrapolation without the coarsest grid is
   the error estimate.  A level whose estimate exceeds the tolerance is solved again on a finer
   design grid, and flagged, not dropped, if it still does.

Every number depends only on the cell (potential, l): no state is kept between calls except
cached critical lengths, so a cell gives the same bits whatever was solved before it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..checks import quantum_number
from ..errors import ConvergenceError
from ..labels import state_label
from . import grid as fd
from .jitcache import lazy_module
from .effective import ORIGIN_TOLERANCE
from .potential import Potential
from .problem import DECAY_LENGTHS, SAMPLES, RadialProblem, problem_for
from .status import NOT_CONVERGED, OK
from .zero_energy import MARGIN, zero_energy_problem

compiled = lazy_module("cell")
nv = lazy_module("numerov")
_potentials = lazy_module("compiled_potentials")

__all__ = ["BoundLevels", "bound_levels", "LevelSolution", "solve_level", "level_solutions", "level_on_grid",
           "DEFAULT_LEVELS", "RTOL"]

DEFAULT_LEVELS = 20  # levels returned for potentials that bind infinitely many
ROUNDOFF = 1e-14  # floor of an error estimate, relative
RTOL = 1e-9  # the accuracy the sweep promises on every level (relative)
ATTEMPTS = 8
# Gauss–Legendre panels for the exterior's moments (16 nodes each: relative error < 1e-12)
TAIL_PANELS = 24
_GAUSS = np.polynomial.legendre.leggauss(16)

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
    r: np.ndarray | None = field(default=None, repr=False)
    u: np.ndarray | None = field(default=None, repr=False)

    @property
    def n(self) -> np.ndarray:
        return self.n_r + self.l + 1

    @property
    def labels(self) -> list[str]:
        return [state_label(int(n), self.l) for n in self.n]



def bound_levels(pot: Potential, l: int, n_r_max: int | None = None, wavefunctions: bool = False,
                 rtol: float = RTOL) -> BoundLevels:
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

    Returns
    -------
    BoundLevels
    """
    l = quantum_number(l)
    if n_r_max is not None:
        n_r_max = quantum_number(n_r_max, "n_r_max")
    keep_max = -1 if n_r_max is None else n_r_max
    if pot.tail != "short" and n_r_max is None:
        keep_max = DEFAULT_LEVELS
    cell = compiled_cell(pot, l, keep_max, rtol)
    if cell is not None:
        count, solved = cell
    else:
        count, solved = _python_cell(pot, l, keep_max, rtol, wavefunctions)
    keep = len(solved)
    out = BoundLevels(
        l=l,
        energy=np.array([lv.energy for lv in solved]),
        n_r=np.arange(keep),
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
            if lv.u is None and lv.grid is not None:
                _attach_wavefunction(pot, lv)
        out.r = [lv.r for lv in solved]
        out.u = [lv.u for lv in solved]
    return out


def _python_cell(pot, l, keep_max, rtol, want_u):
    """The count and levels of a cell step by step in Python (families without compiled V)."""
    count = zero_energy_problem(pot, l).count() if pot.tail == "short" else -1
    keep = count if keep_max < 0 else (min(count, keep_max) if count >= 0 else keep_max)
    problem = problem_for(pot, l, max(keep, DEFAULT_LEVELS) if pot.tail != "short" else keep)
    return count, [_solve(problem, k, _guess(problem, k, keep), rtol, want_u) for k in range(keep)]


def _reach(pot, l, keep):
    """Farthest radius a box of the lowest ``keep`` levels may need (bohr)."""
    if math.isfinite(pot.support):
        return float(pot.support)
    _, reach = pot.exterior(l).survey_window(max(keep, DEFAULT_LEVELS, 1), DECAY_LENGTHS)
    return 1.5 * reach


def _top(pot, l, keep):
    """Top of the energy window the guesses are sought in (hartree)."""
    if pot.tail != "confining":
        return 0.0
    return 1.5 * pot.exterior(l).survey_window(max(keep, DEFAULT_LEVELS), 8.0)[0]


def compiled_cell(pot, l, keep_max, rtol=RTOL):
    """Count and levels of a cell in one compiled call (:mod:`.cell`); None if the family has no
    compiled formula.  ``keep_max``: levels wanted, −1 for all (short range only)."""
    kernel = _potentials.kernel_of(pot)
    if kernel is None:
        return None
    code, fp, tx, tcoef = kernel
    problem = RadialProblem(pot, l, 0.0)
    kind, p = problem.tail_code
    support = float(pot.support)
    count, count_status, rows = compiled.solve_cell(
        code, fp, tx, tcoef, float(pot.mass), int(l), kind, p, support, problem.jumps_at_support,
        float(pot.length_scale), float(pot.energy_scale), _reach(pot, l, keep_max), _top(pot, l, keep_max),
        int(keep_max), fd.THETA,
        fd.H_MAX, float(rtol), MARGIN, DECAY_LENGTHS, ORIGIN_TOLERANCE, SAMPLES, ATTEMPTS, ROUNDOFF)
    if count_status:
        raise ConvergenceError(f"zero-energy eigenvalue of l={l} for {pot} near threshold did not converge")
    solved = []
    exterior = pot.exterior(l)
    r_min = problem.r_min
    for k, row in enumerate(rows.tolist()):
        energy, err, status, why, R, closed = row[:6]
        if not math.isfinite(energy):
            solved.append(LevelSolution(l, k, math.nan, math.inf, math.nan, NOT_CONVERGED, compiled.REASONS[int(why)]))
            continue
        reason = f"error estimate {err:.2e} hartree exceeds rtol {rtol:g}·|E|" if status else ""
        t0, t1 = _tail(pot, l, exterior, energy, R) if closed else (0.0, 0.0)
        norm, first, uend = row[6:9], row[9:12], row[12:15]
        radii = [(first[j] + t1 * uend[j]) / (norm[j] + t0 * uend[j]) for j in range(3)]
        # Richardson over h, h/2, h/4 for an error series h⁴, h⁶ (as grid.richardson)
        radius = (radii[0] - 80.0 * radii[1] + 1024.0 * radii[2]) / 945.0
        grid = fd.MappedGrid(r_min, R, row[15], row[16], row[17], row[18], row[19], int(row[20]))
        solved.append(LevelSolution(l, k, energy, err, radius, int(status), reason, grid, tuple(row[21:24])))
    return count, solved


def _tail(pot, l, exterior, energy, R):
    """The exterior's share of the norm and of ⟨r⟩ (compiled for a short-range tail)."""
    if pot.tail == "short":
        return nv.exterior_tail_moments(int(l), float(pot.mass), float(energy), float(R), *_GAUSS, TAIL_PANELS)
    return exterior.tail_moments(energy, R)


def _attach_wavefunction(pot, lv):
    """u(r) of a solved level on its finest grid, normalised with the exterior part."""
    problem = RadialProblem(pot, lv.l, lv.grid.r_max)
    arrays = problem.arrays(lv.grid)
    e, status, _, norm, _, uend2, w = _pass(problem, arrays, problem.params(arrays), 1, lv.n_r, lv.grid_energies[2],
                                            want_u=True)
    R = lv.grid.r_max
    t0 = pot.exterior(lv.l).tail_moments(lv.energy, R)[0] if problem.box_is_closed_exactly(R) else 0.0
    n = arrays.steps(1)
    lv.r = arrays.r[: n + 1].copy()
    lv.u = _oriented(np.sqrt(np.sqrt(arrays.g2[: n + 1])) * w[: n + 1] / math.sqrt(norm + t0 * uend2))


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
    grid: fd.MappedGrid | None = None
    grid_energies: tuple = ()
    r: np.ndarray | None = field(default=None, repr=False)
    u: np.ndarray | None = field(default=None, repr=False)


def solve_level(pot: Potential, l: int, n_r: int, rtol: float = RTOL, wavefunction: bool = True) -> LevelSolution:
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
    l = quantum_number(l)
    n_r = quantum_number(n_r, "n_r")
    keep = max(n_r + 1, DEFAULT_LEVELS) if pot.tail != "short" else n_r + 1
    cell = compiled_cell(pot, l, keep, rtol)
    count, solved = cell if cell is not None else _python_cell(pot, l, keep, rtol, False)
    if n_r >= len(solved):
        raise ConvergenceError(f"level n_r={n_r}, l={l} is not bound in {pot} (it binds {count})")
    lv = solved[n_r]
    if wavefunction and lv.grid is not None and lv.u is None:
        _attach_wavefunction(pot, lv)
    return lv


def level_solutions(pot: Potential, l: int, keep: int, rtol: float = RTOL) -> list:
    """The lowest ``keep`` levels of ``l`` that are bound (fewer if fewer are), each a
    :class:`LevelSolution` with its grids, as :func:`bound_levels` solves them."""
    l = quantum_number(l)
    keep = quantum_number(keep, "keep")
    if keep == 0:
        return []
    wanted = max(keep, DEFAULT_LEVELS) if pot.tail != "short" else keep
    cell = compiled_cell(pot, l, wanted, rtol)
    _, solved = cell if cell is not None else _python_cell(pot, l, wanted, rtol, False)
    return solved[:keep]


def level_on_grid(pot: Potential, l: int, n_r: int, grid: fd.MappedGrid, energy: float):
    """The discrete eigenpair of level (n_r, l) on a grid of your choice, for matrix elements
    between levels on one common grid (then Richardson-extrapolated over ``grid.refined(f)``,
    f = 1, 2, 4, with :func:`boundscape.engine.grid.richardson`).

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
    problem = problem_for(pot, quantum_number(l), quantum_number(n_r, "n_r") + 1)
    arrays = problem.arrays(grid, refine=1)  # the nodes of ``grid`` only (stride 1)
    prm = problem.params(arrays)
    e, status, _, norm, _, uend2, w = _pass(problem, arrays, prm, 1, n_r, energy, want_u=True)
    if status != 0:
        raise ConvergenceError(f"level n_r={n_r}, l={l}: no discrete eigenvalue found on the given grid (status {status})")
    # Newton stops once its step is small, and w is joined at the energy before that step
    # (~1e-9 relative off): a second pass from the converged energy joins w at it.
    e2, status, _, norm, _, uend2, w = _pass(problem, arrays, prm, 1, n_r, e, want_u=True)
    if status == 0:
        e = e2
    R = grid.r_max
    t0 = problem.pot.exterior(l).tail_moments(e, R)[0] if problem.box_is_closed_exactly(R) else 0.0
    n = grid.n
    r = arrays.r[: n + 1].copy()
    g = np.sqrt(arrays.g2[: n + 1])
    u = np.sqrt(g) * w[: n + 1]
    scale = math.sqrt(norm + t0 * uend2)
    u = u / scale
    simpson = np.where(np.arange(n + 1) % 2 == 1, 4.0, 2.0)
    simpson[0] = simpson[-1] = 1.0
    weights = simpson * grid.h / 3.0 * g  # dr = g dt
    return e, r, _oriented(u), weights


def _oriented(u):
    head = u[: max(2, u.size // 50)]
    return u if head[np.argmax(np.abs(head))] >= 0 else -u


def _guess(problem: RadialProblem, k: int, keep: int) -> float:
    """First guess of level k: Langer-WKB below the top of the spectrum searched."""
    pot = problem.pot
    if pot.tail == "confining":
        e_top = 1.5 * pot.exterior(problem.l).survey_window(max(keep, DEFAULT_LEVELS), 8.0)[0]
    else:
        e_top = 0.0
    guess = problem.wkb_guess(k, e_top)
    if not math.isfinite(guess) or (pot.tail != "confining" and guess >= 0):
        guess = -1e-10 * pot.energy_scale  # not enough phase: a level near threshold
    return guess


def _pass(problem, arrays, prm, stride, k, start, near=None, want_u=False):
    """Level k on the grid of ``stride`` in ``arrays`` (see :func:`numerov.solve_grid`): Newton
    from ``start``, Sturm bisection from ``near`` if that fails; returns its results and w."""
    n = arrays.steps(stride)
    work = np.empty(n + 2)
    out = nv.solve_grid(arrays.a, prm, stride, n, arrays.step(stride), k, start, start if near is None else near,
                        work, want_u)
    return (*out, work)


def _solve(problem: RadialProblem, k: int, guess: float, rtol: float, want_u: bool) -> LevelSolution:
    """Level k of ``problem``: its own box and grids, redesigned until they fit the level and
    refined until the error estimate meets ``rtol``."""
    pot, l = problem.pot, problem.l
    bound = pot.tail != "confining"
    energy = guess
    theta = fd.THETA
    why = "no attempt converged"
    values = None
    for _attempt in range(ATTEMPTS):
        R = problem.box(energy)
        grid = problem.design(energy, R, theta)
        arrays = problem.arrays(grid)
        prm = problem.params(arrays)
        e1, status, _, *_ = first = _pass(problem, arrays, prm, 4, k, energy)
        if status == 1:  # deeper than this grid resolves: below its floor, e1
            energy = min(4.0 * energy, 1.2 * e1) if bound and energy < 0 else energy - pot.energy_scale
            why = "level below the grid's reach"
            continue
        if status == 4:  # not bound in this box: a larger box (or it is not resolved at all)
            if problem.box_is_closed_exactly(R) or not bound:
                why = "level not bound on its grid (within discretisation error of threshold)"
                break
            energy *= 1e-2
            why = "level not bound in its box"
            continue
        if status != 0:
            why = f"Newton iteration on the coarse grid failed (status {status})"
            theta *= 0.6
            continue
        if bound and not _fits(problem, energy, e1, R):
            energy = e1
            continue
        second = _pass(problem, arrays, prm, 2, k, e1)
        third = _pass(problem, arrays, prm, 1, k, second[0] + (second[0] - e1) / 15.0, second[0])
        if second[1] != 0 or third[1] != 0:
            why = f"Newton iteration on a finer grid failed (status {second[1]}, {third[1]})"
            theta *= 0.6
            continue
        values = (first, second, third)
        best, err = fd.richardson([v[0] for v in values])
        err = max(err, ROUNDOFF * abs(best))
        energy = best
        if err <= rtol * abs(best) or theta < 0.05:
            break
        theta *= 0.6
    if values is None:
        return LevelSolution(l, k, math.nan, math.inf, math.nan, NOT_CONVERGED, why)
    R = grid.r_max
    tail = pot.exterior(l).tail_moments(best, R) if problem.box_is_closed_exactly(R) else (0.0, 0.0)
    radii = [(v[4] + tail[1] * v[5]) / (v[3] + tail[0] * v[5]) for v in values]
    r_best, _ = fd.richardson(radii)
    status, reason = OK, ""
    if not (err <= rtol * abs(best)) or not math.isfinite(best):
        status, reason = NOT_CONVERGED, f"error estimate {err:.2e} hartree exceeds rtol {rtol:g}·|E|"
    out = LevelSolution(l, k, best, err, r_best, status, reason, grid, tuple(v[0] for v in values))
    if want_u:
        e, status_u, _, norm, _, uend2, w = _pass(problem, arrays, prm, 1, k, values[2][0], want_u=True)
        n = arrays.steps(1)
        g = np.sqrt(arrays.g2[: n + 1])
        out.r = arrays.r[: n + 1].copy()
        out.u = _oriented(np.sqrt(g) * w[: n + 1] / math.sqrt(norm + tail[0] * uend2))
    return out


def _fits(problem, designed_for, energy, R) -> bool:
    """Whether a grid designed for ``designed_for`` in the box R suits a level found at ``energy``:
    the box reaches its decay length margin and the design's κ is within 30 %."""
    if energy >= 0 or designed_for >= 0:
        return False
    if not (problem.box_is_closed_exactly(R) or problem.box(energy) <= 1.05 * R):
        return False
    ratio = math.sqrt(energy / designed_for)
    return (1 / 1.3 <= ratio <= 1.3) or problem.box_is_closed_exactly(R) and ratio < 1.3
