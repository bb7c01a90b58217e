"""What each lost state becomes past its threshold: a shape resonance (l ≥ 1) or a virtual
state (l = 0), followed continuously from the bound side.

Method
------
A pole of the S matrix is an energy at which the regular solution is purely outgoing
(Siegert 1939): the Wronskian W(k) of :mod:`.siegert` vanishes.  The outgoing solution is
the Riccati–Hankel function ĥ⁺_l(kr) beyond a short-range potential, continued to complex k;
it is imposed exactly where V ends (square well), or carried in from along a complex ray on
which it decays (exterior complex scaling in ODE form, for tails that continue analytically:
Yukawa, ECSC, Hulthén), or from the real axis where V is negligible (tables; narrow poles).
Each solution is integrated in the direction in which it dominates (:mod:`.propagation`,
fourth-order Magnus steps on a mapped grid, Richardson-extrapolated over three refinements).

Which pole is state n_r's is settled by continuity, not by a guess: the potential is scaled
(V → gV) up to the coupling g_c at which the state is bound at E = 0 — the (n_r+1)-th zero of
the zero-energy amplitude, bracketed by Sturm node counts — and the pole is followed down from
there to g = 1 by continuation (:mod:`.tracking`).  For the one-scale families
(V = Z f(r/λ)/r) scaling V at fixed λ is the same as shortening λ at fixed Z, so the path is
the physical one, λ falling from λ_c, and is computed once per (family, l, n_r) in the
dimensionless variable Zμλ, every cell reading its own point of it; for the square well
scaling the depth is the same as widening the well.  Just past threshold E_r → 0⁺, Γ → 0 with
Γ ∝ E_r^{l+½} (l ≥ 1, Wigner 1948), and κ_v → 0⁺ (l = 0).

Status
------
``ok``: found, and for a resonance Γ ≤ E_r.  ``dissolved``: Γ > E_r (the values are still
given), or the pole is out of reach (values NaN): past the reach of the exterior (a
resonance turned too far into the lower half plane; a virtual state past the branch point
κ = β/2 of an e^{−βr} tail, where the Jost function has a cut (Newton 1982, §12.1)), or a
virtual state that met a second pole and left the imaginary axis.  ``not_converged``: the
error estimate exceeds the tolerance, or the solver failed.  The reason says which.

Potentials with a Coulomb or confining tail lose no states (every state stays bound), so
there is nothing to continue: :func:`resonances` raises :class:`~boundscape.InputError`.

References
----------
A. J. F. Siegert, "On the derivation of the dispersion formula for nuclear reactions",
Phys. Rev. 56, 750 (1939).
E. P. Wigner, "On the behavior of cross sections near thresholds", Phys. Rev. 73, 1002 (1948).
R. G. Newton, *Scattering Theory of Waves and Particles*, 2nd ed. (Springer, 1982), ch. 12.
B. Simon, "The definition of molecular resonance curves by the method of exterior complex
scaling", Phys. Lett. A 71, 211 (1979).
H. M. Nussenzveig, "The poles of the S-matrix of a rectangular potential well or barrier",
Nucl. Phys. 11, 499 (1959).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from ...checks import quantum_number
from ...errors import ConvergenceError, InputError
from ...labels import state_label
from ..bound.zero_energy import count_bound
from ..limits import MAX_LOST, check_count, check_l
from ..potentials import Potential
from ..status import DISSOLVED, NOT_CONVERGED, OK
from .outgoing import CUT_TOLERANCE
from .siegert import Channel
from .tracking import Trajectory, momentum, refine, trace
from .universal import RTOL, dimensionless, universal_potential, universal_trajectory

__all__ = ["Resonances", "resonances", "DEFAULT_LOST", "RTOL", "ATOL"]

DEFAULT_LOST = 4  # states followed past the bound ones when n_r_max is not given
# ... and an absolute floor, relative to the potential's energy scale (κ: its momentum scale).
# Just past threshold a pole is as accurate as the threshold itself, not better relative to E_r:
# against the exact Hulthén virtual states κ_v = ε/2 the error stays ~4e-16 for ε = 1e-4..1e-9,
# and against the exact square well E_r's stays below 1e-14·V0.  No error is reported below it.
ATOL = 1e-14


@dataclass
class Resonances:
    """The lost states of one l, by n_r (atomic units: hartree, bohr⁻¹).

    ``energy`` is E_r of a resonance or E_v = −κ_v²/2μ of a virtual state (on the unphysical
    sheet); ``width`` is Γ (NaN for a virtual state); ``kappa`` is κ_v (NaN for a
    resonance); each has its error estimate; ``momentum`` is the pole's k (E = k²/2μ); ``critical_scaling`` is g_c, the
    factor by which V must be scaled for the state to be bound at E = 0 (λ_c/λ for the
    one-scale families)."""

    l: int
    kind: str  # "resonance" (l ≥ 1) or "virtual" (l = 0)
    n_r: np.ndarray
    energy: np.ndarray
    width: np.ndarray
    kappa: np.ndarray
    momentum: np.ndarray
    energy_error: np.ndarray
    width_error: np.ndarray
    kappa_error: np.ndarray
    critical_scaling: np.ndarray
    status: np.ndarray
    reason: list = field(default_factory=list)
    num_bound: int = 0

    @property
    def n(self) -> np.ndarray:
        return self.n_r + self.l + 1

    @property
    def labels(self) -> list[str]:
        return [state_label(int(n), self.l) for n in self.n]


def resonances(pot: Potential, l: int, n_r_max: int | None = None, *, num_bound: int | None = None,
               rtol: float = RTOL, contour_angle: float | None = None, matching_radius: float | None = None,
               tail_tolerance: float = CUT_TOLERANCE) -> Resonances:
    """Every state n_r ≥ num_bound (up to n_r_max − 1) that ``pot`` no longer binds, continued
    past its threshold: the shape resonance E_r − iΓ/2 (l ≥ 1) or the virtual state k = −iκ_v
    (l = 0).

    Parameters
    ----------
    pot : Potential
        A short-range potential (from :func:`boundscape.potential`).
    l : int
        Angular momentum quantum number, ≥ 0.
    n_r_max : int, optional
        States n_r < n_r_max (the convention of :func:`boundscape.bound_levels`); default the
        ``DEFAULT_LOST`` states after the bound ones.  Bound states are never listed.
    num_bound : int, optional
        The number of bound states of this l, if known already (``bound_levels(...).num_bound``):
        saves counting them again.  Default: :func:`boundscape.count_bound`.
    rtol : float
        Relative tolerance on each pole; a pole whose error estimate exceeds it gets status
        ``not_converged``.
    contour_angle : float, optional
        Angle of the exterior ray in degrees.  Default: the real axis for narrow poles and 30°
        for broad ones where the potential continues analytically; 0 forces the real axis.
    matching_radius : float, optional
        Where (bohr) the regular and outgoing solutions meet, l ≥ 1; default the bottom of the
        effective potential's well.  For l = 0 and the square well it is the exterior cut.
    tail_tolerance : float
        How small the left-out tail of V must be (:func:`.outgoing.exterior_cut`).

    Returns
    -------
    Resonances

    Raises
    ------
    InputError
        For a Coulomb or confining tail (no state is ever lost), or bad arguments.
    """
    l = check_l(quantum_number(l))
    if pot.tail != "short":
        raise InputError(f"family {pot.family!r} has a {pot.tail} tail: every state stays bound, so no state turns "
                         "into a resonance or virtual state; resonances need a short-range potential")
    if n_r_max is not None:
        n_r_max = quantum_number(n_r_max, "n_r_max")
    if not rtol > 0:
        raise InputError(f"rtol must be positive, got {rtol!r}")
    if matching_radius is not None and not (matching_radius > 0 and math.isfinite(matching_radius)):
        raise InputError(f"matching_radius must be positive and finite (bohr), got {matching_radius!r}")
    angle = None if contour_angle is None else float(contour_angle)
    if angle is not None and not 0.0 <= angle < 90.0:
        raise InputError(f"contour_angle must be in [0, 90) degrees, got {contour_angle!r}")
    if num_bound is None:
        num_bound = count_bound(pot, l)
    num_bound = quantum_number(num_bound, "num_bound")
    stop = num_bound + DEFAULT_LOST if n_r_max is None else n_r_max
    check_count(stop - num_bound, "states past the bound ones", MAX_LOST, "each followed from its threshold, "
                "~0.2-0.5 s; far above threshold they have long dissolved")
    scaled = dimensionless(pot) if matching_radius is None else None
    rows = []
    for n_r in range(num_bound, max(stop, num_bound)):
        if scaled is not None:
            key, g_cell, length = scaled
            base = universal_potential(key)
        else:
            g_cell, length, base = 1.0, 1.0, pot
        ch = Channel(base, l, angle=None if angle is None else math.radians(angle),
                     matching_radius=None if matching_radius is None else matching_radius / length,
                     tail_tolerance=tail_tolerance)
        try:
            if scaled is not None:
                traj = universal_trajectory(key, l, n_r, angle, tail_tolerance)
            else:
                traj = trace(ch, n_r, g_stop=g_cell, g_start=g_cell, scale=base.energy_scale)
            rows.append(_at_cell(ch, traj, g_cell, rtol, base.energy_scale, length if scaled is not None else None))
        except (ConvergenceError, ArithmeticError, ValueError) as exc:
            rows.append(_row(math.nan, math.nan, math.nan, NOT_CONVERGED, f"the solver failed: {exc}"))
        rows[-1]["n_r"] = n_r
        rows[-1]["critical_scaling"] = rows[-1]["g_c"] / g_cell
        # back from the channel's units: lengths × λ, energies × 1/(μλ²) (one-scale families)
        rows[-1]["length_unit"] = length
        rows[-1]["energy_unit"] = 1.0 / (pot.mass * length * length) if scaled is not None else 1.0
    return _assemble(pot, l, rows, num_bound)


def _row(pole, error, g_c, status, reason):
    return {"pole": pole, "error": error, "g_c": g_c, "status": status, "reason": reason}


def _at_cell(ch: Channel, traj: Trajectory | None, g: float, rtol: float, scale: float, lam: float | None):
    """The pole of one state at coupling g, read from its trajectory and refined there;
    ``lam`` is the cell's screening length for a one-scale family (None otherwise)."""
    l = ch.l
    if traj is None:  # bound on the coarse grid: within discretisation error of its threshold
        return _row(0.0 if l == 0 else 0j, 0.0, g, OK, "at threshold (within the solver's accuracy)")
    g_c = traj.g_c
    s = g_c - g
    if s <= 0:
        return _row(0.0 if l == 0 else 0j, 0.0, g_c, OK, "at threshold (within the solver's accuracy)")
    def g_dissolved():  # where Γ = E_r, from the trajectory (coarse grid): for the reason
        return traj.dissolution()

    if traj.end and (not traj.s or g < traj.g_end * (1 - 1e-12)):  # it stopped short of this cell
        return _row(math.nan, math.nan, g_c, DISSOLVED, _out_of_reach(traj, g, lam, g_dissolved()))
    # the trajectory's s counts from its own (coarse) threshold: the same distance from
    # threshold is the same point of the pole's path
    guess = traj.guess(s) if traj.s else (0.0 if l == 0 else 0j)
    scale_pole = scale if l >= 1 else math.sqrt(2.0 * ch.mass * scale)  # an energy, or for κ a momentum
    try:
        pole, err, path = refine(ch, g, guess, s, abs(traj.g_c - traj.g_c_coarse), rtol, scale)
        err = _error(l, pole, err, path, scale_pole)
    except ValueError as exc:
        g_d = g_dissolved()
        before = "" if g_d is None else f"it dissolved (Γ = E_r) where {_where(g_d, g, lam)}, then "
        return _row(math.nan, math.nan, g_c, DISSOLVED, f"out of reach: {before}{exc}")
    except ArithmeticError as exc:
        return _row(math.nan, math.nan, g_c, NOT_CONVERGED, str(exc))
    if abs(pole - guess) > 0.2 * abs(guess) + 1e-9 * scale:
        return _row(pole, err, g_c, NOT_CONVERGED, f"the refined pole moved from the tracked {guess:.6g} to {pole:.6g}")
    worst = max(abs(complex(err).real), abs(complex(err).imag))  # of E_r and Γ/2 (or κ)
    if not worst <= max(rtol * abs(pole), ATOL * scale_pole):
        return _row(pole, err, g_c, NOT_CONVERGED, f"error estimate {worst:.2e} exceeds rtol {rtol:g}·|pole| "
                    f"(and {ATOL:g} of the potential's scale)")
    if l >= 1 and -2.0 * pole.imag > pole.real:
        g_d = g_dissolved()
        where = "" if g_d is None else f"; Γ = E_r where {_where(g_d, g, lam)}"
        return _row(pole, err, g_c, DISSOLVED, f"Γ exceeds E_r{where}")
    return _row(pole, err, g_c, OK, "")


def _error(l: int, pole, err, path, scale: float):
    """The error estimate of a pole: Richardson's, per part where the exterior is real and the
    parts are carried apart (with a factor 2 of margin on Γ/2, whose estimate was found close to
    its true error just past threshold against the exact square well); |δE| for both parts on
    a complex ray, whose arithmetic mixes them; and at least what the exterior cut leaves and
    ATOL·``scale`` (an energy, or for κ a momentum), carried along the threshold law to Γ."""
    floor = max(path.cut_error * abs(pole), ATOL * scale)
    if l == 0:
        return max(abs(err), floor)
    if path.angle == 0.0:
        # an uncertainty δE along the pole's path moves Γ/2 ∝ E_r^{l+½} by (l+½)(Γ/2E_r)·δE
        along = (l + 0.5) * abs(pole.imag) / max(pole.real, 1e-300) * ATOL * scale
        return complex(max(abs(err.real), floor), max(2 * abs(err.imag), path.cut_error * abs(pole), along))
    both = max(abs(err), floor)
    return complex(both, both)


def _where(g_x: float, g: float, lam: float | None) -> str:
    """A coupling of a trajectory as a screening length (one-scale families: λ ∝ g at fixed Z)
    or as a factor on the cell's potential."""
    return f"V is scaled by {g_x / g:.5g}" if lam is None else f"λ ≈ {lam * g_x / g:.5g} bohr"


def _out_of_reach(traj: Trajectory, g: float, lam: float | None, g_d: float | None) -> str:
    before = "" if g_d is None else f"it dissolved (Γ = E_r) where {_where(g_d, g, lam)}, then "
    if not traj.end:
        return f"out of reach: {before}it is past the end of its trajectory"
    at = "" if not math.isfinite(traj.end_at) else f" (where {_where(traj.end_at, g, lam)})"
    return f"out of reach: {before}{traj.end}{at}"


def _assemble(pot: Potential, l: int, rows, num_bound: int) -> Resonances:
    n = len(rows)
    kind = "virtual" if l == 0 else "resonance"
    energy, width, kappa, err_e, err_w, err_k = (np.full(n, math.nan) for _ in range(6))
    k = np.full(n, complex(math.nan, math.nan))
    g_c = np.array([row["critical_scaling"] for row in rows], dtype=float)
    for i, row in enumerate(rows):
        lam, e_unit = row["length_unit"], row["energy_unit"]
        pole = row["pole"]
        if isinstance(pole, float) and math.isnan(pole):
            continue
        if l == 0:
            kappa_v = -float(pole) / lam  # k = iκ, κ < 0: κ_v = −κ
            kappa[i] = kappa_v
            k[i] = -1j * kappa_v
            energy[i] = -kappa_v * kappa_v / (2.0 * pot.mass)
            err_k[i] = row["error"] / lam
            err_e[i] = abs(kappa_v) * err_k[i] / pot.mass  # δE = κ δκ/μ
        else:
            e = complex(pole) * e_unit
            energy[i], width[i] = e.real, -2.0 * e.imag
            k[i] = momentum(l, pot.mass, e)
            err = complex(row["error"]) * e_unit
            err_e[i], err_w[i] = abs(err.real), 2.0 * abs(err.imag)
    return Resonances(
        l=l, kind=kind, n_r=np.array([row["n_r"] for row in rows], dtype=int), energy=energy, width=width,
        kappa=kappa, momentum=k, energy_error=err_e, width_error=err_w, kappa_error=err_k, critical_scaling=g_c,
        status=np.array([row["status"] for row in rows], dtype=np.int8), reason=[row["reason"] for row in rows],
        num_bound=num_bound)
