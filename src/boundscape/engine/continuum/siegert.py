"""The Siegert condition of one potential and l, and its zero-energy limit.

For the potential scaled by a coupling g (V → gV) and a complex momentum k (E = k²/2μ),

    W(k) = u_reg(r_m)·u_out'(r_m) − u_reg'(r_m)·u_out(r_m)

is the Wronskian, at a matching radius r_m, of the regular solution (u ~ r^{l+1} at the
origin, carried outwards) and the purely outgoing one (carried inwards from the exterior of
:mod:`.outgoing`).  It vanishes exactly at the poles of the S matrix: bound states
(k = iκ, κ > 0), virtual states (k = iκ, κ < 0) and resonances (Re k > 0 > Im k) (Siegert
1939; Newton, *Scattering Theory of Waves and Particles*, 2nd ed., ch. 12).  Each solution is
carried in the direction in which it dominates: outwards from the origin to the well, inwards
through the barrier from outside, so neither the growth under the barrier nor that of e^{ikr}
past it costs digits.  For l ≥ 1, r_m is the bottom of the effective potential's well; for
l = 0 (no barrier) the regular solution is carried to the exterior cut.

At E = 0 the same paths give the zero-energy solution A r^{l+1} + B r^{−l} beyond the range of
the potential and its node count (Sturm), hence the threshold couplings g_c at which the state
with n_r nodes is bound at E = 0 (A(g_c) = 0): where each bound state turns into a resonance
or a virtual state.

References
----------
A. J. F. Siegert, Phys. Rev. 56, 750 (1939).
R. G. Newton, *Scattering Theory of Waves and Particles*, 2nd ed. (Springer, 1982), ch. 12.
"""

from __future__ import annotations

import cmath
import math
from dataclasses import dataclass, field

import numpy as np
from scipy.optimize import brentq

from ...errors import ConvergenceError
from ..bound.mapping import origin_radius
from ..richardson import extrapolate
from .outgoing import (CUT_TOLERANCE, TailCorrection, analytic_potential, exterior_cut, is_compact,
                       outgoing_log_derivative)
from .propagation import RadialMap, Segment, chain, chain_inward, running, step_matrices

__all__ = ["Channel", "Contour", "FACTORS", "RAY_ANGLE", "NARROW_GROWTH", "MAX_CUT_ERROR"]

ALPHA = 0.5  # the map's logarithmic weight: thin near the origin, where u ~ r^{l+1} does not oscillate
STEP = 0.4  # coarse step in x; a step spans at most ~STEP radians of the local phase
MIN_STEPS = 16
FACTORS = (1, 2, 4)  # refinements of the coarse grid for Richardson extrapolation; the error
# estimate (that of the two finer grids alone) was found 10-100x above the true error against
# the exact square-well poles, and a pole that misses its tolerance is redone on finer grids
# the E = 0 path of a compact well is short (few coarse steps): one refinement more, which takes
# the square well's thresholds from 4e-11 to 1e-13 of the exact ones
THRESHOLD_FACTORS = (2, 4, 8)
RAY_ANGLE = math.radians(30.0)  # the exterior ray's angle, where the tail has a continuation
NARROW_GROWTH = 10.0  # below this round-off amplification the real axis serves (narrow poles)
MAX_CUT_ERROR = 1e-6  # a pole whose exterior cut leaves more relative error in W is out of reach
SAMPLES = 400  # of the potential along a path, to place the cut, the well and the map


@dataclass
class Contour:
    """One path for one coupling: inner segments from the origin to r_m, an outer segment from
    r_m to the exterior cut (carried inwards), and the map that grids them."""

    channel: "Channel"
    g: float
    rmap: RadialMap
    inner: list
    outer: Segment | None
    r_match: float
    r_end: complex
    growth: float  # round-off amplification of the outgoing solution along the outer segment
    cut_error: float = 0.0  # relative error the exterior cut leaves in W (tail left out, round-off)
    tail: TailCorrection | None = None  # l = 0: the tail beyond the cut, to first order
    _points: dict = field(default_factory=dict, repr=False)

    @property
    def angle(self) -> float:
        return self.outer.angle if self.outer is not None else 0.0

    def points(self, factor: int):
        """(h, dr/dx, V, l(l+1)/r²) at the Gauss nodes of the inner and outer steps (cached)."""
        if factor not in self._points:
            ch = self.channel
            parts = []
            for seg in self.inner:
                h, r, d = seg.gauss_points(self.rmap, factor)
                parts.append((np.full(r.shape[0], h), r, d))
            inner = [np.concatenate(a) for a in zip(*parts)]
            out = None
            if self.outer is not None:
                h, r, d = self.outer.gauss_points(self.rmap, factor)
                out = (np.full(r.shape[0], h), r, d)
            self._points[factor] = tuple(
                None if p is None else (p[0], p[2], ch.v(p[1]), ch.centrifugal / (p[1] * p[1])) for p in (inner, out))
        return self._points[factor]

    def _steps(self, part, energy):
        h, d, v, cent = part
        return step_matrices(h, d, cent + 2.0 * self.channel.mass * (self.g * v - energy))

    def regular_start(self):
        """(u, u') of the regular solution at the first node, to first order in the potential."""
        ch = self.channel
        r0 = self.inner[0].start
        l = ch.l
        return np.array([1.0, (l + 1) / r0 + ch.mass * self.g * r0 * float(np.real(ch.v(np.array([r0]))[0])) / (l + 1)],
                        dtype=complex)

    def wronskian(self, k: complex, factor: int = 1) -> complex:
        """W(k) at coupling g on the grid refined by ``factor`` (analytic in k)."""
        energy = k * k / (2.0 * self.channel.mass)
        inner, outer = self.points(factor)
        with np.errstate(over="ignore", invalid="ignore"):
            return self._wronskian(k, energy, inner, outer)

    def _wronskian(self, k, energy, inner, outer):
        y_reg = chain(self._steps(inner, energy)) @ self.regular_start()
        l = self.channel.l
        if outer is None and self.tail is not None:
            y_out = self.tail.outgoing(k, self.g)
        elif outer is None:
            y_out = np.array([1.0, outgoing_log_derivative(l, k, self.r_match)])
        else:
            scale = cmath.exp(1j * k * (self.r_end - self.r_match))
            y_out = chain_inward(self._steps(outer, energy)) @ (scale * np.array([1.0, outgoing_log_derivative(l, k, self.r_end)]))
        w = complex(y_reg[0] * y_out[1] - y_reg[1] * y_out[0])
        if not cmath.isfinite(w):
            raise ArithmeticError(f"the Wronskian overflowed at k = {k:.6g}")
        return w

    def amplitude(self, factor: int = 1) -> float:
        """A of :meth:`zero_energy` alone (no node count: one product, no running one)."""
        inner, _ = self.points(factor)
        y = (chain(self._steps(inner, 0.0)) @ self.regular_start()).real
        l = self.channel.l
        R = self.inner[-1].end
        return float((y[1] + l * y[0] / R) / ((2 * l + 1) * R**l))

    def zero_energy(self, factor: int = 1):
        """(A, node count) of the zero-energy solution at coupling g; A is the coefficient of
        r^{l+1} beyond the end R of the path (u ~ r^{l+1} at the origin, so A is continuous in g),
        and one node lies beyond R when A and u(R) differ in sign."""
        inner, _ = self.points(factor)
        y = running(self._steps(inner, 0.0), self.regular_start()).real
        u = y[:, 0]
        l = self.channel.l
        R = self.inner[-1].end
        A = (y[-1, 1] + l * u[-1] / R) / ((2 * l + 1) * R**l)
        nodes = int(np.count_nonzero(np.signbit(u[1:]) != np.signbit(u[:-1])))
        return A, nodes + int(A * u[-1] < 0)


def _tail_span(t, v, j, kappa) -> float:
    """How far past the cut t[j] the tail's integrals must reach: until |V|·e^{2κs} has fallen
    by e^{−60} from its largest value beyond the cut (the samples reach 4× past the potential's
    range), and no further than where e^{κs} nears overflow."""
    s = t[j:] - t[j]
    with np.errstate(divide="ignore"):
        log_f = np.log(np.abs(v[j:]) + 1e-300) + 2.0 * kappa * s
    keep = np.nonzero(log_f >= np.max(log_f) - 60.0)[0]
    span = float(s[keep[-1]]) if keep.size else float(s[-1])
    return max(min(span, 300.0 / max(kappa, 1e-300)), 1e-12 * t[j])


class Channel:
    """One potential and l: builds paths for a coupling and momentum, counts states at E = 0
    and finds threshold couplings.

    Parameters
    ----------
    pot : Potential
        A short-range potential.
    l : int
        Angular momentum.
    angle : float, optional
        Exterior ray angle (radians) for broad poles; None: :data:`RAY_ANGLE` where the tail
        continues analytically, the real axis for narrow poles.  0 forces the real axis.
    matching_radius : float, optional
        r_m for l ≥ 1 (bohr); default the bottom of the effective potential's well.
    tail_tolerance : float
        How small the neglected tail must be (:func:`.outgoing.exterior_cut`).
    """

    def __init__(self, pot, l: int, *, angle: float | None = None, matching_radius: float | None = None,
                 tail_tolerance: float = CUT_TOLERANCE):
        self.pot, self.l, self.mass = pot, l, pot.mass
        self.centrifugal = float(l * (l + 1))
        self.compact = is_compact(pot)
        self.v_complex = None if self.compact else analytic_potential(pot)
        self.support = pot.support
        self.angle, self.matching_radius, self.tail_tolerance = angle, matching_radius, tail_tolerance
        lam = pot.screening_length
        self.variation_length = min(lam, self.support) if math.isfinite(lam) else pot.length_scale
        self.r_origin = origin_radius(pot, l)

    # --- the potential -------------------------------------------------------------------
    def v(self, r):
        r = np.asarray(r)
        if np.iscomplexobj(r):
            if self.v_complex is None:
                raise ValueError("this potential has no analytic continuation to complex r")
            with np.errstate(all="ignore"):
                return np.asarray(self.v_complex(r), dtype=complex)
        return self.pot(r)

    def _real_sample(self, g, t_hi):
        t = np.geomspace(self.r_origin / max(g, 1.0), t_hi, SAMPLES)
        return t, self.pot(t)

    def _far(self):
        return self.support if math.isfinite(self.support) else 1e3 * self.variation_length

    def _map(self, g, k, samples):
        inv_b = max(2.0 * self.mass * g * float(np.max(np.abs(v) * np.abs(r))) for r, v in samples)
        return RadialMap(ALPHA, max(inv_b, 1e-300), abs(k) + 1.0 / self.variation_length)

    @staticmethod
    def _segment(rmap, a, b, angle=0.0):
        n = max(MIN_STEPS, math.ceil(float(np.diff(rmap.x(np.array([a, b])))[0]) / STEP))
        return Segment(a, b, n, angle)

    # --- paths -----------------------------------------------------------------------------
    def zero_path(self, g: float) -> Contour:
        """The E = 0 path: the origin to where gV is negligible against the centrifugal term."""
        r0 = self.r_origin / max(g, 1.0)
        if self.compact:
            R = self.support
            t, v = self._real_sample(g, R)
        else:
            t, v = self._real_sample(g, self._far())
            j, _, _ = exterior_cut(np.abs(g * v), t, t, self.mass, 0.0, 0.0, tolerance=self.tail_tolerance)
            R = float(t[j if j is not None else -1])
        rmap = self._map(g, 0.0, [(t[t <= R], v[t <= R])])
        return Contour(self, g, rmap, [self._segment(rmap, r0, R)], None, R, R, 1.0)

    def well_bottom(self, g: float) -> float | None:
        """The radius of the lowest local minimum of gV + l(l+1)/2μr² (the matching radius for
        l ≥ 1), or None if it has none: a state can be held only behind a barrier, by a well
        whose bottom may lie above zero."""
        t, v = self._real_sample(g, self._far())
        v_eff = g * v + self.centrifugal / (2 * self.mass * t * t)
        inner = np.nonzero((v_eff[1:-1] < v_eff[:-2]) & (v_eff[1:-1] <= v_eff[2:]))[0] + 1
        if inner.size == 0:
            return None
        return float(t[inner[np.argmin(v_eff[inner])]])

    def pole_path(self, g: float, k: complex) -> Contour:
        """A path for poles near momentum k at coupling g.

        Raises ``ValueError`` if no exterior reaches k (the reason in the message)."""
        r0 = self.r_origin / max(g, 1.0)
        l, mass = self.l, self.mass
        far = self._far()
        if self.compact:
            t, v = self._real_sample(g, self.support)
            rmap = self._map(g, k, [(t, v)])
            return Contour(self, g, rmap, [self._segment(rmap, r0, self.support)], None, self.support, self.support, 1.0)
        if l == 0:
            # no barrier: carry the regular solution to the cut; the outgoing wave grows past the
            # well like e^{|κ|r} for a virtual state, which the amplification measures
            t, v = self._real_sample(g, 4.0 * far)
            kappa = abs(k)
            free = np.nonzero(2 * mass * g * np.abs(v) > kappa * kappa)[0]
            t_ref = float(t[free[-1]]) if free.size else float(t[0])
            # the tail beyond the cut enters to second order (TailCorrection): the cut moves in to
            # where the third order is negligible, and the growth it costs in round-off with it
            j, growth, cut_error = exterior_cut(np.abs(g * v), t, t, mass, k, 0.0, t_ref=t_ref,
                                                tolerance=self.tail_tolerance, corrected=True)
            if j is None:
                raise ValueError("the potential's tail decays no faster than the outgoing wave grows "
                                 "(past the branch point of an exponential tail, κ = half its decay rate)")
            if cut_error > MAX_CUT_ERROR:
                raise ValueError(f"the virtual state is too deep for the potential's tail: cutting it leaves a "
                                 f"relative error {cut_error:.1e} (the wave grows by {growth:.1e} across it)")
            R = float(t[j])
            rmap = self._map(g, k, [(t[: j + 1], v[: j + 1])])
            tail = TailCorrection(self.pot, mass, R, _tail_span(t, v, j, kappa))
            return Contour(self, g, rmap, [self._segment(rmap, r0, R)], None, R, R, growth, cut_error, tail)
        r_m = self.matching_radius if self.matching_radius is not None else self.well_bottom(g)
        if r_m is None:
            raise ValueError("the effective potential has no well left to hold the state")
        t_in, v_in = self._real_sample(g, r_m)
        real = self._outer_on(g, k, r_m, 4.0 * max(far, r_m), 0.0)
        angle = self.angle
        if angle is None:
            angle = 0.0 if (real is not None and real[2] <= NARROW_GROWTH) or self.v_complex is None else RAY_ANGLE
        if angle == 0.0:
            outer = real
            if outer is None:
                raise ValueError("the potential's tail is not negligible anywhere on the real axis for this pole")
        else:
            if self.v_complex is None:
                raise ValueError("a complex exterior needs an analytic potential; this one has none")
            if cmath.phase(k) + angle < math.radians(5.0):
                raise ValueError(f"the pole (arg k = {math.degrees(cmath.phase(k)):.1f}°) is past the reach of the "
                                 f"{math.degrees(angle):.0f}° exterior ray")
            outer = self._outer_on(g, k, r_m, r_m + 4.0 * max(far, r_m), angle)
            if outer is None:
                raise ValueError(f"the potential does not fall off along the {math.degrees(angle):.0f}° exterior ray")
        t_end, samples, growth, cut_error = outer
        if cut_error > MAX_CUT_ERROR:
            raise ValueError(f"the pole is too broad for this exterior: cutting the tail leaves a relative error "
                             f"{cut_error:.1e}")
        if abs((k * cmath.exp(1j * angle)).imag) * (t_end - r_m) > 300.0:
            # the step products would hold e^{±|Im k|·length}: beyond ~e^{300} they overflow
            raise ValueError("the pole is too far from the real axis for an exterior this long")
        rmap = self._map(g, k, [(t_in, v_in), samples])
        turn = cmath.exp(1j * angle)
        return Contour(self, g, rmap, [self._segment(rmap, r0, r_m)], self._segment(rmap, r_m, t_end, angle), r_m,
                    r_m + (t_end - r_m) * turn, growth, cut_error)

    def _outer_on(self, g, k, r_m, t_hi, angle):
        """(t at the cut, (|r|, V) samples up to it, amplification, cut error) on a ray, or None."""
        t = r_m + np.geomspace(1e-3 * r_m, t_hi - r_m, SAMPLES)
        t = np.concatenate([[r_m], t])
        r = r_m + (t - r_m) * cmath.exp(1j * angle) if angle else t
        v = self.v(r)
        j, growth, cut_error = exterior_cut(np.abs(g * v), t, np.abs(r), self.mass, k, angle,
                                            tolerance=self.tail_tolerance)
        if j is None:
            return None
        return float(t[max(j, 1)]), (np.abs(r[: j + 1]), v[: j + 1]), growth, cut_error

    # --- counts and thresholds -----------------------------------------------------------------
    def count(self, g: float) -> int:
        """Bound states of gV for this l: nodes of the zero-energy solution (Sturm)."""
        return self.zero_path(g).zero_energy()[1]

    def threshold(self, n_r: int, g_start: float = 1.0) -> float:
        """The coupling g_c at which the state with n_r nodes is bound at E = 0.

        Bracketed by node counts (each on its own grid), then the root of A(g) on one fixed
        path, Richardson-extrapolated over :data:`THRESHOLD_FACTORS` (``scipy.optimize.brentq``).
        Returns ``math.inf`` if the state is not bound below g = 1e9·g_start."""
        counts = {}

        def count(g):
            if g not in counts:
                counts[g] = self.count(g)
            return counts[g]

        grow = 1.7  # not 2: thresholds at simple fractions (Hulthén's n²/2) must not be bracket ends
        lo = hi = g_start
        if count(g_start) > n_r:
            while count(lo) > n_r:
                hi, lo = lo, lo / grow
                if lo < 1e-12 * g_start:
                    return 0.0
        else:
            while count(hi) <= n_r:
                lo, hi = hi, hi * grow
                if hi > 1e9 * g_start:
                    return math.inf
        for _ in range(200):
            if count(lo) == n_r and count(hi) == n_r + 1:
                break
            mid = math.sqrt(lo * hi)
            if count(mid) <= n_r:
                lo = mid
            else:
                hi = mid
        path = self.zero_path(hi)

        def amplitude(g):
            path.g = g  # one fixed grid, so that A(g) is smooth for brentq
            return extrapolate([path.amplitude(f) for f in THRESHOLD_FACTORS], THRESHOLD_FACTORS)[0].real

        a_lo, a_hi = amplitude(lo), amplitude(hi)
        if a_lo == 0.0:
            return lo
        if not a_lo * a_hi < 0:
            raise ConvergenceError(f"l={self.l}, n_r={n_r}: the zero-energy amplitude does not change sign between "
                                   f"couplings {lo:.6g} and {hi:.6g}")
        return brentq(amplitude, lo, hi, xtol=1e-15 * hi, rtol=4e-15, maxiter=200)
