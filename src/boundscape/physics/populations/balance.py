"""A self-consistent balance between free and bound particles: total = n + B(n), where the free
density n sets the screening, the screening sets the levels, and the levels set the bound
density B(n) through Saha's law.

The residual r(n) = ln((n + B(n))/total) is −1… at n → 0 (B/n → 0) and ≥ 0 at n = total.  B
falls by a finite step each time a level is lost as n grows (the screening length shrinks), so r
can jump down but never up: a crossing from − to + is always a true, continuous root, and one
always exists.  Near the Mott density r may cross zero three times (the bound branch, an unstable
middle solution, the ionized branch) or jump across it where a level is lost.

Search: r on a grid of ln n from ln(total) downwards (``points_per_decade``), until r < 0 and the
screening no longer moves the levels by kT/10 (below that, ln B grows with ln n at a slope of at
least ~1/4 and r has no further root); every sign change refined by brentq in ln n; a change
where |r| stays finite at the refined point is a jump (a level lost), reported as such.

Where several solutions exist the model is hysteretic, and ``branch`` picks one: ``"ionized"``
(default), the largest — Mott's argument (N. F. Mott, Proc. Phys. Soc. A 62, 416 (1949); Phil.
Mag. 6, 287 (1961)): the ionized state is taken wherever the screening of all its free carriers
binds nothing it would recombine into, which is the branch a sample follows coming from high
density; or ``"bound"``, the smallest, the branch followed from the dilute side.  Every root is
reported, with whether it is stable (r crosses from − to +).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from scipy.optimize import brentq

__all__ = ["Balance", "solve_balance", "BALANCE_STATUS", "BRANCHES"]

BRANCHES = ("ionized", "bound")
BALANCE_STATUS = ("ok", "several_solutions", "truncated_level_set", "incomplete_scan", "beyond_engine_limits",
                  "no_solution")
# A sign change refined to 1e-6 in ln n whose |r| stays above COARSE_JUMP, or refined to 1e-13
# whose |r| stays above JUMP, is a jump (a level lost), not a root.
COARSE_JUMP = 1e-3
JUMP = 1e-8
# The scan stops at most this many decades below the total.
MAX_DECADES = 60


@dataclass
class Balance:
    """A self-consistent balance (the problem's units: density, energy)."""

    total: float
    kT: float
    free_density: float
    ionized_fraction: float
    bound_density: float
    solutions: tuple
    jumps: tuple
    screening_length: float
    ionization_energy: float
    log_partition_function: float
    omitted_partition_fraction: float
    level_set_status: int
    status: str
    reason: str
    conservation_residual: float
    evaluations: int = 0
    stable: tuple = field(default=())


@dataclass
class _Point:
    y: float
    r: float
    log_bound: float
    info: dict


def solve_balance(total: float, kT: float, log_bound_density, *, points_per_decade: int = 4,
                  branch: str = "ionized") -> Balance:
    """The self-consistent free density of ``total`` particles at ``kT``.

    Parameters
    ----------
    total, kT : float
        The conserved density (free + bound) and the temperature.
    log_bound_density : callable
        ``log_bound_density(n)`` → (ln B(n), info), info a dict with ``screening_length``,
        ``ionization_energy``, ``lowering`` (how far screening has moved the ground level),
        ``log_partition_function``, ``omitted_fraction`` (bound on the truncated part of U,
        relative) and ``level_set_status``; ln B = NaN if the levels are beyond the engine.
    points_per_decade : int
        Resolution of the scan in n.
    branch : {"ionized", "bound"}
        Which solution to take where there are several (see the module's docstring).

    Returns
    -------
    Balance
    """
    if branch not in BRANCHES:
        from ...errors import InputError

        raise InputError(f"branch must be one of {', '.join(BRANCHES)}, got {branch!r}")
    y_top = math.log(total)
    cache: dict[float, _Point] = {}

    def point(y):
        if y not in cache:
            log_b, info = log_bound_density(math.exp(y))
            r = np.logaddexp(y, log_b) - y_top if math.isfinite(log_b) or log_b == -math.inf else math.nan
            cache[y] = _Point(y, float(r), float(log_b), info)
        return cache[y]

    step = math.log(10.0) / points_per_decade
    scan = [point(y_top)]
    note = ""
    for k in range(1, MAX_DECADES * points_per_decade + 1):
        p = point(y_top - k * step)
        if math.isnan(p.r):
            note = (f"the scan stopped at n = {math.exp(p.y):.3g}, where the levels are beyond reach "
                    f"({p.info.get('level_set_reason', '')}): solutions at lower n may be missing")
            break
        scan.append(p)
        if p.r < 0 and scan[-2].r < 0 and p.info["lowering"] < 0.1 * kT:
            break
    scan.reverse()  # ascending n
    roots, stable, jumps = [], [], []
    if scan[-1].r == 0.0:  # nothing bound at n = total: fully ionized is a solution
        roots.append(scan[-1].y)
        stable.append(True)
    for a, b in zip(scan[:-1], scan[1:]):
        if (a.r < 0) == (b.r < 0) or b.r == 0.0:
            continue
        # coarse first: a jump (a level lost) keeps |r| ≥ ~1e-3 however close, a root does not
        y = brentq(lambda t: point(t).r, a.y, b.y, xtol=1e-6)
        if abs(point(y).r) > COARSE_JUMP:
            jumps.append(math.exp(y))
            continue
        lo, hi = (y - 2e-6, y + 2e-6)
        lo, hi = max(lo, a.y), min(hi, b.y)
        if (point(lo).r < 0) != (point(hi).r < 0):
            y = brentq(lambda t: point(t).r, lo, hi, xtol=1e-13)
        if abs(point(y).r) <= JUMP:
            roots.append(y)
            stable.append(a.r < 0)
        else:
            jumps.append(math.exp(y))
    order = np.argsort(roots)
    roots = [roots[i] for i in order]
    stable = [stable[i] for i in order]
    evaluations = len(cache)
    if not roots:
        return Balance(total, kT, math.nan, math.nan, math.nan, (), tuple(jumps), math.nan, math.nan, math.nan,
                       math.nan, -1, "beyond_engine_limits" if note else "no_solution",
                       note or "no self-consistent solution was bracketed", math.nan, evaluations)
    chosen = point(roots[-1] if branch == "ionized" else roots[0])
    n = total if chosen.y == y_top else min(math.exp(chosen.y), total)
    bound = math.exp(chosen.log_bound) if chosen.log_bound > -math.inf else 0.0
    status, reasons = "ok", []
    if len(roots) > 1:
        status = "several_solutions"
        reasons.append("self-consistent free densities " + ", ".join(f"{math.exp(y):.6g}" for y in roots)
                       + ("; the largest (the ionized branch, Mott's argument) is taken" if branch == "ionized"
                          else "; the smallest (the bound branch, followed from dilute samples) is taken"))
    if chosen.info["omitted_fraction"] > 1e-9:
        status = "truncated_level_set" if status == "ok" else status
        reasons.append(f"the level set is truncated: U may be up to {chosen.info['omitted_fraction']:.2g} larger")
    if note:
        status = "incomplete_scan"
        reasons.append(note)
    return Balance(
        total=total, kT=kT, free_density=n, ionized_fraction=n / total, bound_density=bound,
        solutions=tuple(total if y == y_top else min(math.exp(y), total) for y in roots), jumps=tuple(jumps),
        screening_length=chosen.info["screening_length"], ionization_energy=chosen.info["ionization_energy"],
        log_partition_function=chosen.info["log_partition_function"],
        omitted_partition_fraction=chosen.info["omitted_fraction"], level_set_status=chosen.info["level_set_status"],
        status=status, reason="; ".join(reasons), conservation_residual=abs(n + bound - total) / total,
        evaluations=evaluations, stable=tuple(stable))
