"""One potential and one l as the solver sees them: V_eff sampled once, the box of a level,
the code of the outer condition, a level's grid arrays, and WKB first guesses.

Box.  A level of energy E < 0 gets R = r_t + DECAY_LENGTHS/κ (r_t its outer turning point,
κ = √(2μ|E|)), or the end of the potential's range if that comes first — there the exterior
solution (:mod:`.exterior`) closes the box exactly.  The density left beyond R is e^{−2C}
relative; C = 20 keeps it ~4e-18 (a probe found 16 too few for 1e-9 on every level: the
turning-point region decays more slowly than e^{−κr}).  A potential that jumps at its support
(the square well) always ends its box there.

Guesses.  Langer's WKB condition ∫√(2μ(E − V_L)) dr = π(n_r + ½), V_L = V + (l + ½)²/(2μr²)
(Langer, Phys. Rev. 51, 669 (1937)), exact for the Coulomb and oscillator problems and within
a few per cent elsewhere, gives each level's first box and grid; the level is then located
exactly on that grid by Sturm counts, so a poor guess costs time, never a wrong level.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from . import grid as fd
from .jitcache import lazy_module
from .effective import origin_radius
from .potential import Potential

__all__ = ["RadialProblem", "DECAY_LENGTHS", "SAMPLES"]

DECAY_LENGTHS = 20.0
SAMPLES = 256  # log-spaced samples of V_eff, for boxes, grid design and guesses
nv = lazy_module("numerov")
_TAIL_NAMES = ("short", "coulomb", "confining")  # in the order of numerov.TAIL_SHORT, _COULOMB, _CONFINING


@dataclass
class RadialProblem:
    """The radial equation of ``pot`` for angular momentum ``l``, prepared for the solver.

    ``reach`` is the farthest radius any box of this problem may need (bohr)."""

    pot: Potential
    l: int
    reach: float

    @cached_property
    def r_min(self) -> float:
        return origin_radius(self.pot, self.l)

    @cached_property
    def samples(self):
        """(r, V_eff, Langer's V_L, Δln r) on SAMPLES log-spaced radii from r_min to the reach."""
        r = np.geomspace(self.r_min, max(self.reach, 4.0 * self.r_min), SAMPLES)
        v = self.pot(r)
        mu, l = self.pot.mass, self.l
        return (r, v + l * (l + 1) / (2.0 * mu * r * r), v + (l + 0.5) ** 2 / (2.0 * mu * r * r),
                math.log(r[1] / r[0]))

    @property
    def tail_code(self) -> tuple[int, float]:
        """(kind, parameter) of the outer condition for the compiled kernels."""
        pot = self.pot
        kind = _TAIL_NAMES.index(pot.tail)
        if kind == nv.TAIL_COULOMB:
            return kind, float(pot.coulomb_charge)
        if kind == nv.TAIL_CONFINING:
            return kind, float(pot.strength)
        return kind, 0.0

    @property
    def jumps_at_support(self) -> bool:
        return bool(self.pot.breakpoints) and math.isfinite(self.pot.support)

    def turning_point(self, energy: float) -> float:
        """Outermost radius where V_eff < E, interpolated between samples."""
        r, veff, _, _ = self.samples
        allowed = np.nonzero(veff < energy)[0]
        if allowed.size == 0:
            return float(r[0])
        j = int(allowed[-1])
        if j + 1 >= r.size:
            return float(r[-1])
        f = (energy - veff[j]) / (veff[j + 1] - veff[j])
        return float(r[j] + f * (r[j + 1] - r[j]))

    def box(self, energy: float) -> float:
        """Outer radius R for a level of this energy."""
        pot = self.pot
        if pot.tail == "confining":
            return pot.exterior(self.l).box(energy)
        support = pot.support
        if self.jumps_at_support:
            return float(support)
        if energy >= 0:
            return float(support) if math.isfinite(support) else self.reach
        kappa = math.sqrt(2.0 * pot.mass * -energy)
        R = self.turning_point(energy) + DECAY_LENGTHS / kappa
        return float(min(support, R)) if math.isfinite(support) else R

    def box_is_closed_exactly(self, R: float) -> bool:
        """True where R is at the end of the potential's range (the exterior part then counts)."""
        return math.isfinite(self.pot.support) and R >= self.pot.support * (1 - 1e-12)

    def design(self, energy: float, R: float, theta: float = fd.THETA) -> fd.MappedGrid:
        r, veff, _, _ = self.samples
        if R > r[-1] * (1 + 1e-9):
            self.reach = R
            self.__dict__.pop("samples", None)
            r, veff, _, _ = self.samples
        return fd.design_grid(r, veff, self.pot.mass, self.l, energy, self.r_min, R,
                              0.1 * self.pot.length_scale, theta)

    def arrays(self, grid: fd.MappedGrid, refine: int = fd.REFINE) -> fd.GridArrays:
        pot = self.pot
        return fd.build_arrays(grid, pot, lambda r: pot.info.continued(pot, r), pot.mass, self.l, refine)

    def params(self, arrays: fd.GridArrays, tail: tuple[int, float] | None = None) -> np.ndarray:
        """The parameter vector of :func:`numerov.solve_grid` for ``arrays`` (outer condition
        ``tail``, default the problem's own; a fixed condition is solved in E, others in κ)."""
        kind, p = tail or self.tail_code
        pot = self.pot
        kappa_mode = kind in (nv.TAIL_SHORT, nv.TAIL_COULOMB)
        return np.array([pot.mass, self.l, kind, p, arrays.grid.r_max, arrays.g_end, arrays.gp_end,
                         pot.energy_scale, float(kappa_mode), -math.inf, math.inf])

    def wkb_guess(self, n_r: int, e_top: float) -> float:
        """Langer-WKB energy of level n_r below ``e_top`` (NaN if there is not enough phase)."""
        r, _, vl, dln = self.samples
        e_lo = float(np.min(vl))
        if not e_lo < e_top:
            return math.nan
        return float(nv.wkb_energy(r, vl, self.pot.mass, math.pi * (n_r + 0.5), e_lo, e_top, 40, dln))


def problem_for(pot: Potential, l: int, levels: int) -> RadialProblem:
    """The problem prepared to hold the lowest ``levels`` levels (sets its reach)."""
    if math.isfinite(pot.support):
        reach = float(pot.support)
    else:
        _, reach = pot.exterior(l).survey_window(max(levels, 1), DECAY_LENGTHS)
        reach = 1.5 * reach
    return RadialProblem(pot, l, reach)
