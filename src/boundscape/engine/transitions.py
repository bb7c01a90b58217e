"""Electric-dipole (E1) lines between the bound levels of one central potential.

Method
------
A line joins levels (n, l) and (n′, l ± 1).  Its radial integral R = ∫ u_a r u_b dr is taken
with both levels re-solved on one common grid (:func:`.levels.level_on_grid`): the map and box
of the level with the larger box, its step the finer of the two levels' design steps (and no
more than θ of the deeper level's decay far out), its inner end the smaller of their two
origin radii.  Simpson sums on that grid refined f = 1, 2,
4 times are Richardson-extrapolated in h⁴, h⁶ (:mod:`.richardson`), as the energies are.
Where the box ends at the potential's range, the part beyond it is added in closed form:
both levels are u(R)·√(r/R)·K_{l+½}(κr)/K_{l+½}(κR) there (A&S 10.2), integrated by
:func:`.potentials.exterior.tail_integrals`.

With l the lower level's angular momentum, l′ the upper's, ΔE > 0 and μ the mass
(atomic units; μ = 1 gives the textbook form):

* absorption oscillator strength f = (2μ/3)·ΔE·max(l, l′)/(2l + 1)·R²
  (Bethe & Salpeter 1957, §59–61);
* spontaneous emission rate of upper → lower A = (4/3)·α³·ΔE³·max(l, l′)/(2l′ + 1)·R² per
  atomic unit of time ħ/E_h, which is A = 2α³ΔE²·(g_l/g_l′)·f/μ with g = 2l + 1 (spin sums
  out of both).

A line whose lower or upper level is not bound is absent.  Two levels of equal n (2s–2p) form
a line only where their splitting is resolved, ΔE above ``DEGENERATE`` times the levels' error
estimates (never for a pure Coulomb potential, where they are degenerate).

References
----------
H. A. Bethe and E. E. Salpeter, *Quantum Mechanics of One- and Two-Electron Atoms*
(Springer, 1957).
M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions* (1964), §10.2.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from scipy import constants

from ..checks import quantum_number
from ..labels import state_label
from .bound.levels import level_on_grid, level_solutions
from .bound.mapping import THETA, MappedGrid, map_point
from .potentials.exterior import GAUSS_NODES, GAUSS_WEIGHTS, TAIL_PANELS, tail_integrals
from .richardson import FACTORS, extrapolate
from .status import LEVEL_STATUS, NOT_CONVERGED, OK

__all__ = ["Lines", "lines", "einstein_A", "oscillator_strength", "wavelength_nm", "common_grid", "RTOL",
           "DEGENERATE"]

RTOL = 1e-9  # relative tolerance on each radial integral
DEGENERATE = 100.0  # a Δn = 0 line needs ΔE above this many times the levels' error estimates
ATOMIC_TIME_S = constants.hbar / constants.physical_constants["Hartree energy"][0]
ALPHA = constants.fine_structure
REFINEMENTS = FACTORS  # the common grid refined f = 1, 2, 4 times


@dataclass
class Lines:
    """E1 lines of one potential, ascending in (lower n, lower l, upper n, upper l).

    Energies in hartree, radial integrals in bohr, ``einstein_A`` in s⁻¹, ``wavelength_nm`` in
    vacuum; ``status`` holds codes of :data:`~.status.LEVEL_STATUS` and ``reason`` says why a
    line is not ok."""

    lower: list
    upper: list
    energy: np.ndarray
    wavelength_nm: np.ndarray
    radial_integral: np.ndarray
    radial_integral_error: np.ndarray
    oscillator_strength: np.ndarray
    einstein_A: np.ndarray
    status: np.ndarray
    reason: list = field(default_factory=list)

    def __len__(self) -> int:
        return len(self.lower)

    @property
    def labels(self) -> list[str]:
        return [f"{a}-{b}" for a, b in zip(self.lower, self.upper)]

    def rows(self) -> list[dict]:
        """One dict per line, in the command line's JSON form."""
        return [{"lower": self.lower[i], "upper": self.upper[i], "energy_hartree": float(self.energy[i]),
                 "wavelength_nm": float(self.wavelength_nm[i]),
                 "radial_integral_bohr": float(self.radial_integral[i]),
                 "oscillator_strength": float(self.oscillator_strength[i]),
                 "einstein_A_per_s": float(self.einstein_A[i]), "status": LEVEL_STATUS[int(self.status[i])]}
                for i in range(len(self))]


def oscillator_strength(delta_e, radial, l_lower: int, l_upper: int, mass: float = 1.0):
    """Absorption f = (2μ/3)·ΔE·max(l, l′)/(2l + 1)·R² (atomic units; l the lower level's)."""
    return 2.0 * mass / 3.0 * delta_e * max(l_lower, l_upper) / (2 * l_lower + 1) * np.square(radial)


def einstein_A(delta_e, radial, l_lower: int, l_upper: int):
    """Spontaneous rate upper → lower, A = (4/3)α³ΔE³·max(l, l′)/(2l′ + 1)·R² (s⁻¹)."""
    rate = 4.0 / 3.0 * ALPHA**3 * np.power(delta_e, 3) * max(l_lower, l_upper) / (2 * l_upper + 1) * np.square(radial)
    return rate / ATOMIC_TIME_S


def wavelength_nm(delta_e):
    """Vacuum wavelength hc/ΔE of a line of ΔE hartree, in nm."""
    joules = np.asarray(delta_e, dtype=float) * constants.physical_constants["Hartree energy"][0]
    with np.errstate(divide="ignore"):
        return constants.h * constants.c / joules * 1e9


def lines(pot, n_max: int, l_max: int | None = None, pairs=None, rtol: float = RTOL) -> Lines:
    """Every E1 line (Δl = ±1) between bound levels with n ≤ ``n_max`` (n = n_r + l + 1).

    Parameters
    ----------
    pot : Potential
        From :func:`boundscape.potential`.
    n_max : int
        Highest principal quantum number of either level, ≥ 2.
    l_max : int, optional
        Highest angular momentum of either level (default n_max − 1).
    pairs : iterable of ((n, l), (n′, l′)), optional
        Only these pairs of levels (each within n_max); the sweep asks for its configured lines.
    rtol : float
        Relative tolerance on the energies and on the radial integrals (relative to the larger
        of |R| and √(⟨r⟩⟨r′⟩), so that a vanishing integral is judged on the levels' size);
        lines that miss it get status ``not_converged``.

    Returns
    -------
    Lines
    """
    n_max = quantum_number(n_max, "n_max")
    l_top = n_max - 1 if l_max is None else min(quantum_number(l_max, "l_max"), n_max - 1)
    wanted = None if pairs is None else {frozenset(p) for p in pairs}
    levels = {}
    for l in range(l_top + 1):
        for lv in level_solutions(pot, l, n_max - l, rtol):
            if math.isfinite(lv.energy):
                levels[(lv.n_r + l + 1, l)] = lv
    candidates = []
    for (n, l), a in levels.items():
        for (n2, l2), b in levels.items():
            if l2 != l + 1 or (wanted is not None and frozenset(((n, l), (n2, l2))) not in wanted):
                continue
            lo, hi = (a, b) if a.energy < b.energy else (b, a)
            gap = hi.energy - lo.energy
            if n == n2 and not gap > DEGENERATE * (a.error + b.error):
                continue
            candidates.append((lo, hi))
    candidates.sort(key=lambda p: (p[0].n_r + p[0].l, p[0].l, p[1].n_r + p[1].l, p[1].l))
    cache = {}
    rows = [_line(pot, lo, hi, cache, rtol) for lo, hi in candidates]
    de = np.array([r[0] for r in rows], dtype=float)
    radial = np.array([r[1] for r in rows], dtype=float)
    f = np.array([oscillator_strength(d, x, lo.l, hi.l, pot.mass) for d, x, (lo, hi) in zip(de, radial, candidates)])
    a_rate = np.array([einstein_A(d, x, lo.l, hi.l) for d, x, (lo, hi) in zip(de, radial, candidates)])
    return Lines(
        lower=[state_label(lo.n_r + lo.l + 1, lo.l) for lo, _ in candidates],
        upper=[state_label(hi.n_r + hi.l + 1, hi.l) for _, hi in candidates],
        energy=de, wavelength_nm=wavelength_nm(de), radial_integral=radial,
        radial_integral_error=np.array([r[2] for r in rows], dtype=float),
        oscillator_strength=f.reshape(-1), einstein_A=a_rate.reshape(-1),
        status=np.array([r[3] for r in rows], dtype=np.int8), reason=[r[4] for r in rows])


def _line(pot, lo, hi, cache, rtol):
    """(ΔE, |R|, error of R, status, reason) of one line."""
    de = hi.energy - lo.energy
    grid = common_grid(lo.grid, hi.grid, math.sqrt(2.0 * pot.mass * -lo.energy) if lo.energy < 0 else 0.0)
    values = []
    for f in REFINEMENTS:
        g = grid.refined(f)
        ra, ua, wa, ea, ta = _on_grid(pot, lo, g, cache)
        _, ub, _, eb, tb = _on_grid(pot, hi, g, cache)
        inside = float(np.sum(wa * ra * ua * ub))
        tail = _tail_overlap(pot, lo.l, hi.l, ea, eb, g.r_max) * ua[-1] * ub[-1] if ta else 0.0
        values.append(inside + tail)
    best, err = extrapolate(values)
    err = abs(err)
    status, reason = OK, ""
    if lo.status != OK or hi.status != OK:
        status, reason = NOT_CONVERGED, "a level of the line is not converged"
    elif not err <= rtol * max(abs(best), math.sqrt(abs(lo.mean_radius * hi.mean_radius))):
        status, reason = NOT_CONVERGED, f"radial integral error estimate {err:.2e} exceeds rtol {rtol:g}"
    return de, abs(best), err, status, reason


def _on_grid(pot, lv, grid, cache):
    key = (lv.l, lv.n_r, grid)
    if key not in cache:
        e, r, u, w = level_on_grid(pot, lv.l, lv.n_r, grid, lv.energy)
        closed = pot.reaches_support(grid.r_max)
        cache[key] = (r, u, w, e, closed)
    return cache[key]


def common_grid(a: MappedGrid, b: MappedGrid, kappa: float = 0.0) -> MappedGrid:
    """One grid for two levels: the map and box of the one with the larger box, its start moved
    down to the smaller of their two inner ends, and the finer of their two steps — finer still
    where the deeper level (decay constant ``kappa``) would decay by more than THETA per step at
    the box's end, where the larger box's map is coarsest."""
    base, other = (a, b) if (a.r_max, -a.h) >= (b.r_max, -b.h) else (b, a)
    h = min(base.h, other.h)
    g_end = map_point(base.beta, base.c, base.tc, base.t1)[1]
    if kappa > 0:
        h = min(h, THETA / (kappa * g_end))
    t0 = base.t0
    r_start = min(base.r_min, other.r_min)
    if r_start < base.r_min:
        # far below the knee r ≈ β·e^{(1+c)t − c·tc}: jump there, then step back until r(t0) ≤ r_start
        target = (math.log(r_start / base.beta) + base.c * base.tc) / (1.0 + base.c)
        t0 -= max(0, math.floor((t0 - target) / h)) * h
    while map_point(base.beta, base.c, base.tc, t0)[0] > r_start * (1 + 1e-12):
        t0 -= h
    n = int(math.ceil((base.t1 - t0) / h - 1e-9))
    n += n % 2
    r0 = float(map_point(base.beta, base.c, base.tc, t0)[0])
    return MappedGrid(r0, base.r_max, base.beta, base.c, base.tc, t0, base.t1, n)


def _tail_overlap(pot, l_a, l_b, e_a, e_b, R):
    """∫_R^∞ r·φ_a φ_b dr with φ = u/u(R) the short-range exterior of each level (zero for the
    Coulomb and oscillator tails, whose boxes reach past any part that counts)."""
    if pot.tail != "short" or e_a >= 0 or e_b >= 0:
        return 0.0
    return tail_integrals(int(l_a), int(l_b), float(pot.mass), float(e_a), float(e_b), float(R), GAUSS_NODES,
                          GAUSS_WEIGHTS, TAIL_PANELS)[1]
