"""Following one pole of the S matrix from its threshold as the potential weakens.

The state with n_r nodes is bound at E = 0 at the threshold coupling g_c (V → g_c·V,
:meth:`.siegert.Channel.threshold`).  Below it the pole leaves the origin of the k plane:

* l ≥ 1: into the fourth quadrant, a shape resonance E = E_r − iΓ/2, with E_r ≈ c·(g_c − g)
  and Γ ∝ E_r^{l+½} (Wigner's threshold law: the barrier's transmission at low energy);
* l = 0: down the negative imaginary axis, a virtual state k = −iκ_v, κ_v ∝ g_c − g.

A trajectory follows the pole in s = g_c − g by natural-parameter continuation (Allgower &
Georg, *Introduction to Numerical Continuation Methods*, 2003, ch. 2): a predictor from the
points behind it — power laws in s for l ≥ 1 (fitted in ln s), a polynomial in s for κ — and
a corrector, the secant method on W (:func:`secant`) on the coarse grid.  A step
is accepted if the corrector lands near the prediction (else it is shortened), so the pole
followed is the one continued from the bound state, never a neighbour.  Steps grow
geometrically from s = 10⁻³·g_c, which samples the threshold law evenly in ln s.  It ends at
a requested coupling or where the pole passes out of reach of the exterior (:mod:`.siegert`).

The values at a cell are then solved again from the trajectory's guess on three refinements
and Richardson-extrapolated (:func:`refine`).
"""

from __future__ import annotations

import cmath
import math
from dataclasses import dataclass, field

import numpy as np
from scipy.optimize import brentq

from ..richardson import extrapolate
from .siegert import FACTORS, Channel

__all__ = ["Trajectory", "trace", "refine", "FIRST_STEP", "LOWEST_COUPLING"]

FIRST_STEP = 1e-3  # s of the first point, relative to g_c
LOWEST_COUPLING = 1e-3  # a trajectory stops where the potential is this fraction of g_c·V
MAX_RATIO = 2.0  # the most s grows in one step
MIN_RATIO = 1.003  # a step shortened below this ends the trajectory: the pole is lost


@dataclass
class Trajectory:
    """Points (s, pole) of one pole, s = g_c − g measured from the coarse grid's own threshold.

    The pole is E (complex, l ≥ 1) or κ (real, k = iκ, l = 0) in the channel's units."""

    l: int
    g_c: float  # the threshold coupling, extrapolated
    g_c_coarse: float  # the threshold on the coarse grid the trajectory is solved on
    s: list = field(default_factory=list)
    pole: list = field(default_factory=list)
    end: str = ""  # why it stopped before the coupling asked for ("" if it got there)
    end_at: float = math.nan  # the coupling at which it stopped, if it stopped early
    g_dissolved: float | None = None  # where Γ = E_r on the way (l ≥ 1), if it got there

    @property
    def g_end(self) -> float:
        return self.g_c - (self.s[-1] if self.s else 0.0)  # s is a distance from threshold (see guess)

    def guess(self, s: float):
        """The pole at distance s from threshold, interpolated (a start for :func:`refine`)."""
        pts_s = np.array(self.s)
        if s <= pts_s[0]:
            return _power_law(self.l, pts_s[0], self.pole[0], s)
        nearest = sorted(np.argsort(np.abs(np.log(pts_s / s)))[:3])
        return _predict(self.l, [pts_s[j] for j in nearest], [self.pole[j] for j in nearest], s)

    def dissolution(self) -> float | None:
        """The coupling at which Γ first reaches E_r on the trajectory (l ≥ 1), or None (found
        on the coarse grid, to ~1e-5; :func:`.resonances.dissolution_screening_length` refines it)."""
        return self.g_dissolved

    def _crossing(self):
        """The trajectory's points either side of Γ = E_r, or None."""
        if self.l == 0:
            return None
        over = [p.real > 0 and -2.0 * p.imag > p.real for p in self.pole]
        for j in range(1, len(over)):
            if over[j] and not over[j - 1]:
                return j - 1, j
        return None


def _power_law(l, s0, p0, s):
    """Scale a first point down to s < s0 along the threshold laws."""
    if l == 0:
        return p0 * s / s0
    return complex(p0.real * s / s0, p0.imag * (s / s0) ** (l + 0.5))


def _predict(l, ss, ps, s):
    """Extrapolate the pole to s from points (ss, ps): for l ≥ 1 E_r and Γ as power series in
    ln s (exact for the threshold laws), otherwise (and for κ) a polynomial in s."""
    n = len(ss)
    if l >= 1 and n >= 2 and all(p.real > 0 and p.imag < 0 for p in ps):
        x = np.log(ss)
        deg = min(n - 1, 2)
        e_r = math.exp(np.polyval(np.polyfit(x, np.log([p.real for p in ps]), deg), math.log(s)))
        half_width = math.exp(np.polyval(np.polyfit(x, np.log([-p.imag for p in ps]), deg), math.log(s)))
        return complex(e_r, -half_width)
    deg = min(n - 1, 2)
    if l == 0:
        return float(np.polyval(np.polyfit(ss, ps, deg), s))
    re = np.polyval(np.polyfit(ss, [p.real for p in ps], deg), s)
    im = np.polyval(np.polyfit(ss, [p.imag for p in ps], deg), s)
    return complex(re, min(im, 0.0))


def momentum(l: int, mass: float, pole) -> complex:
    """k of a pole variable: √(2μE) on the principal branch (l ≥ 1), iκ (l = 0)."""
    if l == 0:
        return 1j * float(pole)
    return cmath.sqrt(2.0 * mass * complex(pole))


def solve(channel: Channel, g: float, guess, factor: int = 1, path=None, scale: float = 1.0):
    """The pole nearest ``guess`` at coupling g on the grid refined by ``factor``.

    Returns (pole, path) or raises ``ValueError`` (out of reach) / ``ArithmeticError`` (the
    secant method did not converge).  Without a ``path`` one is designed for the guess's
    momentum, and redesigned once if the pole lands far from it; a given path is kept."""
    l, mass = channel.l, channel.mass
    fixed = path is not None
    for attempt in range(1 if fixed else 2):
        if path is None:
            path = channel.pole_path(g, momentum(l, mass, guess))
        if l == 0:
            def f(kappa):
                return path.wronskian(1j * kappa, factor).real
            x1 = guess * (1.0 + 1e-7) + (1e-9 * math.sqrt(2 * mass * scale) if guess == 0 else 0.0)
        else:
            def f(energy):
                return path.wronskian(cmath.sqrt(2.0 * mass * energy), factor)
            x1 = guess * (1.0 + 1e-7) + (1e-9 * scale if guess == 0 else 0.0)
        root = secant(f, guess, x1)
        if not np.isfinite(root) or not _is_root(f, root):
            raise ArithmeticError(f"the secant method did not converge from {guess}")
        k_new, k_old = momentum(l, mass, root), momentum(l, mass, guess)
        if not fixed and attempt == 0 and abs(k_new - k_old) > 0.25 * max(abs(k_new), abs(k_old)):
            path, guess = None, root
            continue
        return (float(root) if l == 0 else complex(root)), path
    return (float(root) if l == 0 else complex(root)), path


def secant(f, x0, x1, maxiter: int = 40):
    """The secant method, stopped at the noise floor of f and returning its best iterate.

    Written out because ``scipy.optimize.newton`` stops on a relative step, which a complex
    root with a tiny imaginary part (Γ ≪ E_r) reaches only once f is noise, where its steps
    wander; here the iteration ends when the steps stop shrinking, and the iterate with the
    smallest |f| is returned (the secant method itself: e.g. Press et al., Numerical Recipes,
    3rd ed., §9.2)."""
    f0, f1 = f(x0), f(x1)
    best_x, best_f = (x1, abs(f1)) if abs(f1) <= abs(f0) else (x0, abs(f0))
    last = math.inf
    for _ in range(maxiter):
        if f1 == f0 or f1 == 0:
            break
        x0, x1 = x1, x1 - f1 * (x1 - x0) / (f1 - f0)
        f0, f1 = f1, f(x1)
        if abs(f1) < best_f:
            best_x, best_f = x1, abs(f1)
        step = abs(x1 - x0)
        if step <= 4e-16 * abs(x1) or (step >= last and step <= 1e-8 * abs(x1)):
            break
        last = step
    return best_x


def _is_root(f, z) -> bool:
    """Whether f vanishes at z against its own change nearby (the secant method can also stop
    where its steps stall, e.g. at a minimum of |f| left by two merged roots)."""
    dz = 1e-4 * abs(z) if z != 0 else 1e-12
    here = abs(f(z))
    return here <= 1e-2 * abs(f(z + dz) - f(z)) or here == 0.0


def trace(channel: Channel, n_r: int, g_stop: float, g_start: float = 1.0, scale: float = 1.0) -> Trajectory | None:
    """The trajectory of state n_r from its threshold down to the coupling ``g_stop``, and for
    l ≥ 1 the coupling on it at which Γ reaches E_r (``scipy.optimize.brentq`` on the coarse grid).

    Returns None if the state is bound at ``g_stop`` on the coarse grid (within discretisation
    error of its threshold); ``scale`` is a typical energy, for starting values."""
    traj = _follow(channel, n_r, g_stop, g_start, scale)
    pair = None if traj is None else traj._crossing()
    if pair is not None:
        def excess(g):
            s = traj.g_c - g
            pole, _ = solve(channel, g, traj.guess(s), scale=scale)
            return -2.0 * pole.imag - pole.real

        i, j = pair
        g_hi, g_lo = traj.g_c - traj.s[i], traj.g_c - traj.s[j]
        try:
            traj.g_dissolved = brentq(excess, g_lo, g_hi, xtol=1e-12 * g_hi)
        except (ValueError, ArithmeticError):  # a pole out of reach or lost inside the bracket
            traj.g_dissolved = 0.5 * (g_lo + g_hi)
    return traj


def _follow(channel: Channel, n_r: int, g_stop: float, g_start: float, scale: float) -> Trajectory | None:
    """The continuation itself (see :func:`trace`)."""
    g_c = channel.threshold(n_r, g_start)
    if not math.isfinite(g_c):
        return Trajectory(channel.l, g_c, g_c, end="the state is not bound however strong the potential")
    g_c_coarse = _coarse_threshold(channel, g_c)
    traj = Trajectory(channel.l, g_c, g_c_coarse)
    s_stop = g_c_coarse - g_stop
    s_floor = (1.0 - LOWEST_COUPLING) * g_c_coarse
    s_target = min(s_stop, s_floor)
    if s_target <= 0:
        return None
    l = channel.l
    s_prev, p_prev = 0.0, (0.0 if l == 0 else 0j)
    s = min(FIRST_STEP * g_c_coarse, s_target)
    ratio = MAX_RATIO
    slope = None
    reach, reach_at = "", math.nan  # why (and where) the last step tried was out of reach
    while True:
        hist_s, hist_p = [0.0] + traj.s, [p_prev * 0] + traj.pole
        try:
            if traj.s:
                pred = _predict(l, hist_s[-3:], hist_p[-3:], s)
            else:
                pred = s * slope if slope is not None else None
                if slope is None:
                    slope = _threshold_slope(channel, g_c_coarse, scale)
                    pred = s * slope
            pole, _ = solve(channel, g_c_coarse - s, pred, scale=scale)
            ok = _accept(l, pole, pred, p_prev)
        except ValueError as exc:  # out of reach there: a shorter step may still reach
            reach, reach_at = str(exc), g_c_coarse - s
            ok = False
        except ArithmeticError:
            ok = False
        if ok:
            reach = ""
            traj.s.append(s)
            traj.pole.append(pole)
            s_prev, p_prev = s, pole
            if s >= s_target:
                if s_target < s_stop:
                    traj.end, traj.end_at = f"followed down to {LOWEST_COUPLING:g}·g_c", g_c_coarse - s
                return traj
            s = min(s_prev * ratio, s_target) if ratio > 1 else s_target
            ratio = min(ratio * 1.25, MAX_RATIO)
            continue
        ratio = math.sqrt(ratio if s_prev > 0 else MAX_RATIO)
        if s_prev == 0.0:
            s = s / 4.0
            if s < 1e-9 * g_c_coarse:
                traj.end, traj.end_at = "the pole could not be started from its threshold", g_c_coarse
                return traj
            continue
        if ratio < MIN_RATIO and reach:
            traj.end, traj.end_at = reach, reach_at
            return traj
        if ratio < MIN_RATIO:
            traj.end_at = g_c_coarse - s_prev
            if l == 0 and any(_no_real_root_near(channel, g_c_coarse - s_try, p_prev)
                              for s_try in (s, s_prev + 0.02 * (s_prev + s))):
                traj.end = "the virtual state met a second virtual pole and the pair left the imaginary axis"
            else:
                kind = "virtual state" if l == 0 else "resonance"
                traj.end = f"the {kind} could not be followed further"
            return traj
        s = min(s_prev * ratio, s_target)


def _no_real_root_near(channel: Channel, g: float, kappa: float) -> bool:
    """Whether W(iκ) keeps one sign for κ within a factor 2 of ``kappa`` at coupling g: two
    virtual poles have merged and moved off the imaginary axis (Nussenzveig 1959)."""
    try:
        path = channel.pole_path(g, 1j * kappa)
        values = np.array([path.wronskian(1j * x).real for x in np.linspace(2.0 * kappa, 0.5 * kappa, 41)])
    except (ValueError, ArithmeticError):
        return False
    return bool(np.all(values > 0) or np.all(values < 0))


def _accept(l, pole, pred, prev):
    """A corrected pole is the one followed if it is on the right side of threshold and near
    the prediction, against the step it made."""
    if l >= 1 and not (pole.real > 0 and pole.imag <= 1e-14 * abs(pole)):
        return False
    if l == 0 and not pole < 0:
        return False
    return abs(pole - pred) <= 0.3 * abs(pole - prev) + 1e-13 * abs(pole)


def _threshold_slope(channel: Channel, g_c: float, scale: float):
    """d(pole)/ds at threshold, s = g_c − g, by the implicit function theorem on W(pole, g):
    −(∂W/∂g)/(∂W/∂pole)·(−1), from central differences at (pole = 0, g_c).

    W is smooth there in E for l ≥ 1 (the branch point enters at order E^{l+½}) and in κ for
    l = 0, so the linear start is good to a few per cent a thousandth of g_c away."""
    l, mass = channel.l, channel.mass
    path = channel.pole_path(g_c, 0.0)
    dg = 1e-6 * g_c
    d = 1e-6 * (math.sqrt(2 * mass * scale) if l == 0 else scale)

    def w(pole, g):
        path.g = g
        return path.wronskian(momentum(l, mass, pole))

    w_g = (w(0.0, g_c + dg) - w(0.0, g_c - dg)) / (2 * dg)
    w_p = (w(d if l == 0 else complex(d), g_c) - w(-d if l == 0 else complex(-d), g_c)) / (2 * d)
    slope = w_g / w_p  # pole ≈ −(∂W/∂g)(g − g_c)/(∂W/∂pole) = s·(∂W/∂g)/(∂W/∂pole)
    return float(slope.real) if l == 0 else complex(slope.real, 0.0)


def _coarse_threshold(channel: Channel, g_c: float) -> float:
    """The threshold on the coarse grid (the trajectory's own zero of s)."""
    path = channel.zero_path(g_c * (1 + 1e-3))

    def amplitude(g):
        path.g = g
        return path.amplitude(1)

    lo, hi = g_c * (1 - 1e-3), g_c * (1 + 1e-3)
    if amplitude(lo) * amplitude(hi) >= 0:
        return g_c
    return brentq(amplitude, lo, hi, xtol=1e-15 * hi, rtol=4e-15)


def refine(channel: Channel, g: float, guess, distance: float, coarse_shift: float, tolerance: float,
           scale: float = 1.0):
    """The pole at coupling g from ``guess``, on three refinements (f, 2f, 4f)·FACTORS[0],
    Richardson-extrapolated; f doubles (up to 32) until the error estimate meets ``tolerance``.
    The estimate is complex for a resonance (its parts estimate E_r's and Γ/2's errors).

    The first f is chosen so that the coarsest grid's own threshold shift (``coarse_shift``/f⁴)
    stays well below the distance to threshold.  Returns (pole, error estimate, path)."""
    base = 1
    while coarse_shift / base**4 > 1e-2 * distance:
        base *= 2
        if base > 32:  # ~1e-10 of g_c from threshold: closer than these grids resolve
            raise ArithmeticError(f"the cell lies {distance:.1e} from its threshold coupling, closer than the "
                                  "grids resolve")
    values, path, current = {}, None, guess
    while True:
        factors = tuple(base * f for f in FACTORS)
        for f in factors:
            if f not in values:
                # the first solve designs the path; the finer ones keep it, so that only h changes
                current, path = solve(channel, g, current, factor=f, path=path, scale=scale)
                values[f] = current
        best, err = extrapolate([values[f] for f in factors], factors)
        if abs(err) <= tolerance * abs(best) or base >= 32:
            return (best.real if channel.l == 0 else best), (abs(err) if channel.l == 0 else err), path
        base *= 2
