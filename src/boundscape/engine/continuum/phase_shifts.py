"""Phase shifts δ_l(E) on their continuous branch, and partial cross sections.

Definition
----------
Beyond the range R of a short-range potential the regular solution at E = k²/2μ > 0 is
u ∝ ĵ_l(kr) cos δ_l − ŷ_l(kr) sin δ_l ~ sin(kr − lπ/2 + δ_l), with the Riccati–Bessel functions
ĵ_l(z) = z j_l(z), ŷ_l(z) = z y_l(z) (DLMF 10.49; from ``scipy.special.jv``/``yv``).
δ_l is only defined mod π by that; the branch reported is the continuous one with δ_l → 0 as
E → ∞, on which Levinson's theorem reads δ_l(0⁺) = N_b π, N_b the number of bound states of that
l — except for l = 0 with a state exactly at threshold (a = ±∞, a "half-bound" state), where
δ₀(0⁺) = (N_b + ½)π (Levinson 1949; Newton, *Scattering Theory of Waves and Particles*, §12.2).
The partial cross section is σ_l = 4π(2l + 1) sin²δ_l / k².

Method
------
The regular solution of :mod:`.regular`, energies within a factor 16 of each other sharing a
grid that resolves the largest of their momenta and reaches as far as the smallest needs (where
the tail left out moves δ by < 1e-13 rad).  Writing u = α[ĵ_l(kr) cos δ(r) − ŷ_l(kr) sin δ(r)] with u′/k = α[ĵ_l′ cos δ(r) −
ŷ_l′ sin δ(r)] (the variable-phase form; Calogero, *Variable Phase Approach to Potential
Scattering*, 1967), the Wronskian W(ĵ_l, ŷ_l) = 1 gives

    α cos δ = u ŷ_l′ − (u′/k) ŷ_l,      α sin δ = −(2μ/k) ∫₀^R V u ĵ_l(kr) dr,

the second from (α sin δ)′ = −(2μV/k) u ĵ_l: an integral that keeps its digits however small δ is
(Wigner's k^{2l+1} regime), where reading it from u and u′ at R, α sin δ = u ĵ_l′ − (u′/k) ĵ_l,
would cancel (that reading serves where |sin δ| > 0.1: it needs no Bessel function at the nodes).  That fixes δ
mod 2π (α > 0).  The branch: with ĵ_l = M sin φ, ŷ_l = −M cos φ (φ(0) = 0, continuous,
φ′ = 1/M² > 0) the solution is u = αM sin(φ + δ(r)), and φ + δ(r) crosses each multiple of π
upwards, once at every node of u.  So φ(kR) + δ(R) lies in [N π, (N + 1)π), N the nodes of u
on (0, R], and φ(kR) in [m π, (m + 1)π), m the zeros of j_l on (0, kR]: δ_l = (N − m)π + (an
angle in (−π, π) from the two remainders), continuous in E, → 0 as E → ∞ (where the potential's
share of the phase vanishes) and N_b π at 0⁺ (Sturm: the zero-energy solution has N_b nodes).
δ is Richardson-extrapolated over the grids h, h/2, h/4 like a level, with the change against
the two-grid extrapolation as its error; the grid's step is halved while an energy misses
``rtol`` (up to three times).

A Coulomb tail would need the regular and irregular Coulomb functions F_l(η, kr), G_l(η, kr)
in place of ĵ_l and ŷ_l (``mpmath.coulombf``/``coulombg``; DLMF 33.2), and phase shifts measured
relative to the Coulomb phase σ_l = arg Γ(l + 1 + iη): not implemented, such potentials are
refused.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from scipy.special import jv, yv

from ...errors import InputError
from ..bound.zero_energy import count_bound
from ..richardson import extrapolate
from ..status import NOT_CONVERGED, OK
from .regular import REFINEMENTS, STRIDES, continuum_grid
from .scattering import RTOL, check_scattering_input

__all__ = ["PhaseShifts", "phase_shifts", "EnergyTooHigh", "riccati_bessel", "riccati_phase", "MAX_ENERGIES"]

MAX_ENERGIES = 10_000  # energies per call
BATCH_SPAN = 16.0  # energies within this factor share a grid (a factor 4 in momentum)
SMALL = 0.1  # below this |sin δ| the integral gives α sin δ (reading it at R would lose digits)
ROUNDOFF = 1e-14  # floor of an error estimate, relative to δ mod π


class EnergyTooHigh(InputError):
    """An energy whose solution a grid of :data:`.regular.MAX_STEPS` steps does not resolve for
    this potential; ``energy`` is it, in hartree (a caller may say it in its own unit)."""

    def __init__(self, energy: float, why: str):
        self.energy, self.why = energy, why
        super().__init__(f"energy {energy:g} hartree needs too fine a grid for this potential: {why}")


@dataclass
class PhaseShifts:
    """δ_l at each energy (atomic units: hartree, bohr⁻¹, bohr²), in the order given.

    ``phase_shift`` is δ_l in radians on the continuous branch with δ_l(∞) = 0;
    ``cross_section`` is σ_l = 4π(2l + 1) sin²δ_l/k²; ``momentum`` is k = √(2μE); each with
    its error estimate; ``status`` per energy 0 (ok) or 1 (not converged, ``reason`` says why)."""

    l: int
    energy: np.ndarray
    momentum: np.ndarray
    phase_shift: np.ndarray
    phase_shift_error: np.ndarray
    cross_section: np.ndarray
    cross_section_error: np.ndarray
    num_bound: int
    status: np.ndarray
    reason: list = field(default_factory=list)


def riccati_bessel(l: int, z):
    """(ĵ_l, ĵ_l′, ŷ_l, ŷ_l′) at z > 0: ĵ_l(z) = z j_l(z) = √(πz/2) J_{l+½}(z), ŷ_l likewise with
    Y (DLMF 10.47.3-4; ``scipy.special.jv``/``yv``, whose ufuncs cost a fraction of
    ``spherical_jn``'s wrapper), and f_l′ = (l+1)/z·f_l − f_{l+1} (DLMF 10.51.2)."""
    z = np.asarray(z, dtype=float)
    root = np.sqrt(0.5 * np.pi * z)
    j0, j1 = root * jv(l + 0.5, z), root * jv(l + 1.5, z)
    y0, y1 = root * yv(l + 0.5, z), root * yv(l + 1.5, z)
    return j0, (l + 1) / z * j0 - j1, y0, (l + 1) / z * y0 - y1


def riccati_phase(l: int, z: float) -> float:
    """The continuous phase φ of ĵ_l = M sin φ, ŷ_l = −M cos φ at z > 0 (φ(0⁺) = 0, increasing).

    m π ≤ φ < (m + 1)π with m the zeros of j_l on (0, z], counted as sign changes on samples
    less than π apart (the zeros of ĵ_l are more than π apart: ĵ_l″ = (l(l+1)/z² − 1)ĵ_l, Sturm
    comparison with sin z); the remainder is atan2(ĵ_l, −ŷ_l) mod π."""
    jz, _, yz, _ = riccati_bessel(l, z)
    rest = math.atan2(float(jz), float(-yz)) % math.pi
    if z <= 1.0:
        return rest  # below the first zero of every j_l (π for l = 0)
    samples = np.append(np.arange(1.0, z, 2.0), z)
    signs = np.signbit(jv(l + 0.5, samples))
    return math.pi * int(np.count_nonzero(signs[1:] != signs[:-1])) + rest


def _batches(e, todo):
    """``todo`` split into batches of energies within a factor BATCH_SPAN of each other: one grid
    each, resolving its highest momentum and reaching as far as its lowest needs."""
    order = todo[np.argsort(e[todo])]
    out, start = [], 0
    for j in range(1, order.size + 1):
        if j == order.size or e[order[j]] > BATCH_SPAN * e[order[start]]:
            out.append(order[start:j])
            start = j
    return out


def _energies(energies) -> np.ndarray:
    try:
        e = np.atleast_1d(np.asarray(energies, dtype=float))
    except (TypeError, ValueError):
        raise InputError(f"energies must be numbers (hartree), got {energies!r}") from None
    if e.ndim != 1 or e.size == 0:
        raise InputError(f"energies must be a non-empty list of numbers (hartree), got {energies!r}")
    if e.size > MAX_ENERGIES:
        raise InputError(f"{e.size} energies asked for; at most {MAX_ENERGIES} per call")
    bad = e[~(np.isfinite(e) & (e > 0))]
    if bad.size:
        raise InputError(f"energies must be positive and finite (E > 0 is the continuum), got {bad[0]:g} hartree")
    return e


def _at_energy(cg, energy, mass, l):
    """δ_l at ``energy`` on the grids h, h/2, h/4 (module docstring), each as (n, ε) with
    δ = nπ + ε: ε = arctan(tan δ) keeps the digits of a small δ mod π that nπ + ε would round
    away (σ_l depends on ε alone)."""
    k = math.sqrt(2.0 * mass * energy)
    R = cg.R
    jR, djR, yR, dyR = riccati_bessel(l, k * R)
    phi = riccati_phase(l, k * R)
    m = math.floor(phi / math.pi)  # any split φ = mπ + rest serves: δ below does not depend on it
    rest = phi - m * math.pi
    sols = [cg.solve(stride, energy) for stride in STRIDES]
    parts = [(sol.u_end * dyR - sol.du_end / k * yR, sol.u_end * djR - sol.du_end / k * jR) for sol in sols]
    if abs(parts[0][1]) < SMALL * math.hypot(*parts[0]):
        # a small δ mod π: α sin δ from its integral, where u and u′ at R would cancel
        r_fine = cg.arrays.r[: cg.potential.size]
        vj = cg.potential * np.sqrt(0.5 * np.pi * k * r_fine) * jv(l + 0.5, k * r_fine)  # V ĵ_l(kr), finest nodes
        parts = [(c, -(2.0 * mass / k) * float(np.sum(sol.weights * vj[::s] * sol.u)))
                 for (c, _), sol, s in zip(parts, sols, STRIDES)]
    out = []
    for (cos_part, sin_part), sol in zip(parts, sols):
        delta = (sol.nodes - m) * math.pi - rest + (rest + math.atan2(sin_part, cos_part)) % math.pi
        eps = math.atan(sin_part / cos_part) if cos_part != 0.0 else math.pi / 2
        out.append((round((delta - eps) / math.pi), eps))
    # on one branch: every grid's ε relative to the first grid's n (ε may cross ±π/2 between grids)
    n = out[0][0]
    return n, [eps + (nf - n) * math.pi for nf, eps in out]


def phase_shifts(pot, l: int, energies, *, rtol: float = RTOL, num_bound: int | None = None) -> PhaseShifts:
    """δ_l(E) in radians on the continuous branch with δ_l(∞) = 0, and σ_l(E).

    Parameters
    ----------
    pot : Potential
        A short-range potential (:func:`boundscape.potential`).
    l : int
        Angular momentum, 0 ≤ l ≤ :data:`.scattering.MAX_L`.
    energies : array_like
        Energies E > 0 in hartree (at most :data:`MAX_ENERGIES`).
    rtol : float
        Tolerance on δ_l relative to |δ_l mod π| (in [−π/2, π/2), what sin δ_l and σ_l depend
        on: so σ_l is good to about 2 rtol); the grid's step is halved while an energy misses it
        (up to 3 times), and its status is ``not_converged`` if it still does (also where δ_l
        mod π is zero to rounding, which no relative tolerance can meet).
    num_bound : int, optional
        The exact count of bound states of this l, if known; default :func:`boundscape.count_bound`.

    Returns
    -------
    PhaseShifts
        δ_l(0⁺) = N_b π by Levinson's theorem (N_b + ½ for l = 0 with a state exactly at
        threshold); σ_l = 4π(2l + 1) sin²δ_l/k² in bohr².

    Notes
    -----
    The exterior is the Riccati–Bessel pair (short-range potentials only): a Coulomb tail would
    need the Coulomb functions F_l, G_l (``mpmath.coulombf``, ``coulombg``) and phase shifts
    relative to the Coulomb phase; such potentials raise :class:`~boundscape.InputError`.

    Raises
    ------
    InputError
        For a Coulomb or confining tail, l out of range, energies that are not positive, too
        many, or so high (or a potential so deep) that the grid would exceed its size limit (the
        message says which).
    """
    l = check_scattering_input(pot, l, "a phase shift")
    e = _energies(energies)
    if not (isinstance(rtol, (int, float)) and rtol > 0):
        raise InputError(f"rtol must be a positive number, got {rtol!r}")
    mass = float(pot.mass)
    turns = np.zeros(e.size)  # δ = turns·π + best
    best = np.full(e.size, math.nan)
    error = np.full(e.size, math.inf)
    todo = np.arange(e.size)
    for refine in REFINEMENTS:
        for batch in _batches(e, todo):
            try:
                cg = continuum_grid(pot, l, float(e[batch].max()), float(e[batch].min()), refine=refine)
            except ValueError as exc:
                if refine == 1:
                    raise EnergyTooHigh(float(e[batch].max()), str(exc)) from None
                continue  # a finer grid is too large: keep what the coarser one gave
            for i in batch:
                n, eps = _at_energy(cg, float(e[i]), mass, l)
                value, change = extrapolate(eps)
                turns[i], best[i] = n, value
                error[i] = max(abs(change), ROUNDOFF * abs(value))
        todo = todo[~(error[todo] <= rtol * np.abs(best[todo]))]
        if not todo.size:
            break
    k = np.sqrt(2.0 * mass * e)
    weight = 4.0 * math.pi * (2 * l + 1) / (k * k)
    sigma = weight * np.sin(best) ** 2
    sigma_error = weight * np.abs(np.sin(2.0 * best)) * error
    delta = turns * np.pi + best
    failed = ~(error <= rtol * np.abs(best))
    reason = [f"error estimate {err:.2e} rad exceeds rtol {rtol:g}·|δ mod π|" if bad else ""
              for err, bad in zip(error, failed)]
    if num_bound is None:
        num_bound = count_bound(pot, l)
    return PhaseShifts(l, e, k, delta, error, sigma, sigma_error, int(num_bound),
                       np.where(failed, NOT_CONVERGED, OK).astype(np.int8), reason)
