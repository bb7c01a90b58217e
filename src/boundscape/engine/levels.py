"""Bound levels of one central potential and one angular momentum l.

Method (see ``grid`` for the discretisation):

1. Survey.  The exact count N_b comes from the zero-energy problem (``threshold``); its
   eigenvalues are also lower estimates of the energies (its outer condition is the E = 0 one).
   Coulomb-tail and confining potentials bind infinitely many levels: the lowest ``n_r_max``
   (default 20) are surveyed in a box sized from the hydrogenic or oscillator estimate.
2. Per level.  Each level gets its own box: out to R = r_t + C/κ (r_t its outer turning point,
   κ = √(2μ|E|)) or to the end of the potential's range if that comes first, where the exact
   exterior log-derivative closes the box.  So a level near threshold, which spreads like 1/κ,
   is never squeezed, and no level pays for a box it does not need.  The outer condition depends
   on E; it is solved by Newton's method on E = eig_k(T(E)), whose derivative is the
   first-order sensitivity of the eigenvalue to the boundary row.
3. Extrapolation.  Energies and ⟨r⟩ on five refinements of the level's grid are Richardson-
   extrapolated; the change against the extrapolation without the coarsest grid is the error
   estimate, and a level whose estimate exceeds the tolerance is flagged, not dropped.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..checks import quantum_number
from ..errors import ConvergenceError
from ..labels import state_label
from . import grid as fd
from .effective import effective_potential, origin_radius
from .potential import Potential
from .status import NOT_CONVERGED, OK
from .zero_energy import zero_energy_problem

__all__ = ["BoundLevels", "bound_levels", "DEFAULT_LEVELS", "RTOL"]

DEFAULT_LEVELS = 20  # levels returned for potentials that bind infinitely many
# Box margin beyond the turning point, in decay lengths 1/κ: the density there is e^{-2C}.
DECAY_LENGTHS = 24.0
FACTORS = (2, 3, 4, 5, 6)
ROUNDOFF = 1e-14  # floor of an error estimate, relative: cancellation in E = <T> + <V>
RTOL = 1e-9  # the accuracy the sweep promises on every level (relative)


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
        Also return the grid ``r`` and the normalised u(r) of each level (finest grid; the part
        beyond the box, if any, is analytic and not sampled).
    rtol : float
        Relative tolerance on each energy; levels whose error estimate exceeds it get status 1.

    Returns
    -------
    BoundLevels
    """
    l = quantum_number(l)
    if n_r_max is not None:
        n_r_max = quantum_number(n_r_max, "n_r_max")
    if pot.tail == "short":
        problem = zero_energy_problem(pot, l)
        count = problem.count()
        keep = count if n_r_max is None else min(count, n_r_max)
        if keep:
            op, s0 = problem.operator(1)
            # rough guesses only: each level is located again on its own grid
            guesses = fd.eigenvalues_by_index(op.diagonal(s0), op.off, 0, keep - 1, pot.energy_scale, 1e-8)[0]
        else:
            guesses = np.array([])
    else:
        count = -1
        keep = DEFAULT_LEVELS if n_r_max is None else n_r_max
        guesses = _survey_infinite(pot, l, keep)

    levels = [_refine(pot, l, k, float(guesses[k]), rtol, wavefunctions) for k in range(keep)]
    out = BoundLevels(
        l=l,
        energy=np.array([lv.energy for lv in levels]),
        n_r=np.arange(keep),
        energy_error=np.array([lv.error for lv in levels]),
        mean_radius=np.array([lv.mean_radius for lv in levels]),
        status=np.array([lv.status for lv in levels], dtype=np.int8),
        reason=[lv.reason for lv in levels],
        num_bound=count,
    )
    finite = out.energy[np.isfinite(out.energy)]
    if np.any(np.diff(finite) <= 0):
        raise ConvergenceError(f"levels of l={l} came out unordered for {pot}: {out.energy}")
    if wavefunctions:
        out.r = [lv.r for lv in levels]
        out.u = [lv.u for lv in levels]
    return out


@dataclass
class _Level:
    energy: float
    error: float
    mean_radius: float
    status: int
    reason: str
    r: np.ndarray | None = None
    u: np.ndarray | None = None


def _survey_infinite(pot: Potential, l: int, keep: int) -> np.ndarray:
    """Lower levels of a Coulomb-tail or confining potential, from one box sized for the highest."""
    e_top, R = pot.exterior(l).survey_window(keep, DECAY_LENGTHS)
    v_eff = effective_potential(pot, l)
    g = fd.design_grid(v_eff, pot.mass, e_top, origin_radius(pot, l), R)
    op = fd.build_operator(g, v_eff, pot.mass)
    s = g.end_log_derivative_to_s(_exterior_log_derivative(pot, l, e_top, R))
    return fd.eigenvalues_by_index(op.diagonal(s), op.off, 0, keep - 1, pot.energy_scale, 1e-8)[0]


def _exterior_log_derivative(pot, l, energy, R):
    return pot.exterior(l).log_derivative(energy, R)


def _outer_turning_point(pot, l, energy, r_lo, r_hi):
    r = np.geomspace(r_lo, r_hi, 2000)
    allowed = effective_potential(pot, l)(r) < energy
    if not np.any(allowed):
        return r_lo
    return float(r[np.nonzero(allowed)[0][-1]])


def _box(pot, l, energy):
    """Outer radius for a level of this energy: turning point plus DECAY_LENGTHS/κ, capped at the range."""
    kappa = math.sqrt(2.0 * pot.mass * abs(energy)) if energy < 0 else math.sqrt(2 * pot.mass * pot.energy_scale)
    reach = pot.support if math.isfinite(pot.support) else 1e12 / pot.mass
    if pot.tail == "confining":
        return pot.exterior(l).box(energy)
    r_t = _outer_turning_point(pot, l, energy, origin_radius(pot, l), min(reach, 1e3 / kappa + 10 * pot.length_scale))
    return min(reach, r_t + DECAY_LENGTHS / kappa)


def _refine(pot: Potential, l: int, k: int, guess: float, rtol: float, want_u: bool) -> _Level:
    """One level: its own box and grid, refined until the error estimate meets ``rtol``."""
    energy = guess
    v_eff = effective_potential(pot, l)
    theta = fd.THETA
    R = _box(pot, l, energy)
    for _attempt in range(6):
        base = fd.design_grid(v_eff, pot.mass, energy, origin_radius(pot, l), R, theta=theta)
        ops = [fd.build_operator(base.refined(f), v_eff, pot.mass) for f in FACTORS]
        try:
            new, e_err, _, ys = _self_consistent(pot, l, k, ops, energy)
        except ConvergenceError as exc:
            return _Level(math.nan, math.inf, math.nan, NOT_CONVERGED, f"{exc} (grid of {base.m} points)")
        next_R = _box(pot, l, new)  # the box the solved level asks for; used by a next attempt
        box_ok = R >= pot.support or next_R <= 1.05 * R
        energy, R = new, next_R
        if not box_ok:
            continue  # the level came out shallower than the box assumed: a wider box
        if e_err <= rtol * abs(energy) or theta < 0.05:
            break
        theta *= 0.6  # not resolved to tolerance (shallow levels are the usual case): finer grid
    R = ops[0].grid.r_max  # the box the levels were solved in (the same on every grid)
    tail = pot.exterior(l).tail_moments(energy, R)
    radii = [_mean_radius(op, y, tail) for op, y in zip(ops, ys)]
    r_best, _ = fd.richardson(radii, FACTORS)
    status, reason = OK, ""
    if not (e_err <= rtol * abs(energy)) or not math.isfinite(energy):
        status = NOT_CONVERGED
        reason = f"error estimate {e_err:.2e} hartree exceeds rtol {rtol:g}·|E|"
    lv = _Level(energy, e_err, r_best, status, reason)
    if want_u:
        lv.r, lv.u = ops[-1].r, _u_of(ops[-1], ys[-1])
    return lv


def _self_consistent(pot, l, k, ops, energy):
    """Solve E = Ê_k(s(E)): Ê_k(s) is the eigenvalue extrapolated over the grids at a fixed outer
    condition s, and s depends on E through the exterior solution.

    The extrapolation is done at fixed s because only there is the error an even series in h
    (s(E) is not analytic in E at threshold).  The unknown is κ = √(2μ|E|), in which the
    condition is smooth down to κ = 0 (an l = 0 level's E vanishes quadratically in the distance
    to threshold, κ only linearly): ψ(κ) = Ê_k(s(κ)) + κ²/2μ increases with κ, ψ(0) < 0 for a
    bound level.  Newton's method, its derivative from the first-order sensitivity of the
    eigenvalue to the boundary row, safeguarded by a bracket.  Deep levels, whose boundary row
    does not matter, take one step.  A confining tail has no κ: one step at the guess."""
    R = ops[0].grid.r_max
    scale = pot.energy_scale
    mass = pot.mass
    confining = pot.tail == "confining"
    kappa = 0.0 if confining else math.sqrt(2.0 * mass * max(-energy, 1e-300))
    lo, hi = 0.0, math.inf
    guesses = None
    for _ in range(60):
        e_now = energy if confining else -kappa * kappa / (2.0 * mass)
        s = ops[0].grid.end_log_derivative_to_s(_exterior_log_derivative(pot, l, e_now, R))
        values, ys = [], []
        for i, op in enumerate(ops):
            if guesses is None:
                # first pass: locate on the coarsest grid by bisection, then follow it to finer
                # grids by inverse iteration from the previous grid's value
                guess = values[-1] if values else e_now
                e_i, y = _eigenpair(op, k, s, guess, scale, locate=not values)
            else:
                e_i, y = _eigenpair(op, k, s, guesses[i], scale, locate=False)
            values.append(e_i)
            ys.append(y)
        guesses = values
        extrap, err = fd.richardson(values, FACTORS)
        err = max(err, ROUNDOFF * abs(extrap))  # two extrapolants can agree by chance
        op = ops[-1]
        if confining:
            return extrap, err, s, ys
        dlog_dk = _dlog_dkappa(pot, l, kappa, R)
        sens = op.end_sensitivity(ys[-1][-1]) * op.g[-1]  # ∂eig/∂(u'/u at R)
        if abs(sens * dlog_dk) * kappa < 1e-13 * abs(extrap):
            return extrap, err, s, ys  # the outer condition does not matter
        psi = extrap + kappa * kappa / (2.0 * mass)
        if psi < 0:
            lo = max(lo, kappa)
        else:
            hi = min(hi, kappa)
        dpsi = sens * dlog_dk + kappa / mass
        new = kappa - psi / dpsi if dpsi > 0 else math.nan
        if not (lo < new < hi):
            new = 0.5 * (lo + hi) if math.isfinite(hi) else 2.0 * max(lo, kappa, 1e-12)
        e_new = -new * new / (2.0 * mass)
        # E = Ê(s(E)) holds, to the extrapolation's error or the Rayleigh quotient's roundoff
        settled = abs(psi) <= max(10.0 * err, 1e-13 * abs(e_now), 1e-15 * scale)
        if settled and (abs(new - kappa) <= 1e-14 * new or abs(e_new - e_now) <= 1e-3 * err):
            return extrap, err, s, ys
        kappa = new
    raise ConvergenceError(f"level n_r={k}, l={l}: outer boundary iteration did not converge (last κ={kappa:.6g})")


def _dlog_dkappa(pot, l, kappa, R):
    """d(u'/u at R)/dκ of the exterior solution, by a central difference."""
    dk = 1e-6 * kappa + 1e-12
    up = _exterior_log_derivative(pot, l, -((kappa + dk) ** 2) / (2 * pot.mass), R)
    down_k = max(kappa - dk, 0.0)
    down = _exterior_log_derivative(pot, l, -(down_k**2) / (2 * pot.mass), R)
    return (up - down) / (kappa + dk - down_k)


def _eigenpair(op: fd.Operator, k: int, s: float, guess: float, scale: float, locate: bool = True):
    """Eigenvalue k (as a Rayleigh quotient) and eigenvector of T with outer condition s.

    With ``locate`` the eigenvalue is first bracketed by bisection (to a loose tolerance: the
    Rayleigh quotient supplies the digits); otherwise ``guess`` is trusted as a shift close to
    eigenvalue k, and the node count of the result checks that trust."""
    if not locate:
        y = op.eigenvector(s, guess, iterations=2, scale=scale)
        e = op.rayleigh(s, y)
        y = op.eigenvector(s, e, iterations=1, scale=scale)  # one Rayleigh-quotient step
        e2 = op.rayleigh(s, y)
        # trusted only if the Rayleigh step barely moved it (a shift far from eigenvalue k gives
        # a mixture whose quotient lies between eigenvalues) and the node count is k
        if abs(e2 - e) <= 1e-8 * max(abs(e2), 1e-6 * scale) and fd.node_count(y) == k:
            return e2, y
    diag = op.diagonal(s)
    delta = 0.05 * abs(guess) + 1e-9 * scale
    w, _, _ = fd.eigenvalue_near(diag, op.off, k, guess, delta, rtol=1e-8)
    y = op.eigenvector(s, float(w[0]), scale=scale)
    e = op.rayleigh(s, y)
    y = op.eigenvector(s, e, iterations=1, scale=scale)
    return op.rayleigh(s, y), y


def _mean_radius(op: fd.Operator, y, tail):
    """⟨r⟩ = ∫ r u² / ∫ u², the part beyond R from the exterior solution's moments ``tail``."""
    h = op.grid.h
    w_end = y[-1] / math.sqrt(op.weight[-1])
    u_end2 = op.g[-1] * w_end * w_end
    t0, t1 = tail
    norm = h * float(y @ y) + u_end2 * t0
    first = h * float((y * y) @ op.r) + u_end2 * t1
    return first / norm


def _u_of(op: fd.Operator, y):
    w = y / np.sqrt(op.weight)
    u = np.sqrt(op.g) * w
    norm = op.grid.h * float(y @ y)
    u = u / math.sqrt(norm)
    return u if u[np.argmax(np.abs(u[: max(2, u.size // 50)]))] >= 0 else -u
