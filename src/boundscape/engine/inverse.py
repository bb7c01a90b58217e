"""Inverse problems: the value of one parameter of a potential at which an observable takes a
target — the energy of a named state, the scattering length, or the effective range.

Branches.  Each observable is a smooth function of the parameter between thresholds, and the
exact thresholds say which stretch belongs to which state.  For an attractive family the number
of bound states of an l grows with the strength (and with the screening length, or a well's
radius) by one at each critical value s_c(n_r) (:func:`boundscape.critical_strength`,
:func:`boundscape.critical_screening_length`), so:

* the energy of state (n_r, l) exists for s > s_c(n_r), falls monotonically from 0 there
  (Hellmann–Feynman: dE/ds = ⟨∂V/∂s⟩ < 0), and its root is bracketed by [s_c(n_r), s_hi];
* the scattering length on the branch with N bound states, s_c(N−1) < s < s_c(N) (s_c(−1) = 0),
  falls monotonically from +∞ to −∞ (δa = 2μ∫δV u₀² dr for u₀ ~ r − a; Bethe 1949): one
  root per branch, found in the smooth angle arctan(a_l^{2l+1}/L^{2l+1});
* the effective range is finite at a threshold, runs to −∞ where a passes through zero on a
  branch with bound states (r_e ≈ R − R³/3a² − 1/q²a for a well of radius R, q fixed) and to
  +∞ as the potential vanishes below the first threshold: it is fitted on the stretch of a
  branch next to a threshold — a > 0 next to the named state's threshold, or a < 0 below the
  first threshold when no state is named — as the first root from that threshold.

Every root is ``scipy.optimize.brentq`` on such a bracket, so it is the named state's and never
a neighbour's.  A target no value of the parameter reaches is an :class:`~boundscape.InputError`
that names the reachable range.

Extension point.  :class:`ControlParameter` says how a value of the parameter makes a potential,
where its thresholds lie and in which direction it binds; ``solve_for`` accepts one in place of
``"strength"`` or ``"screening_length"``.  A preset's density (which sets λ through the preset,
and binds less the denser the plasma: ``increasing=False``) plugs in there.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from ..checks import quantum_number
from ..errors import ConvergenceError, InputError
from ..labels import parse_state, state_label
from .bound import count_bound
from .continuum.scattering import RTOL, Scattering, check_scattering_input, scattering
from .control_parameters import (MAX_WKB_STATES, SEARCH_DOUBLINGS, Axis, ControlParameter, OutOfReach,
                                 control_parameter, energy_of, wkb_states)
from .status import NOT_CONVERGED, OK

__all__ = ["Fit", "solve_for"]

NUDGES = (1e-9, 1e-7, 1e-5, 1e-3, 1e-2, 1e-1)  # relative steps in from a threshold
SCAN_POINTS = 17  # samples of r_e along its stretch of a branch


@dataclass
class Fit:
    """What :func:`solve_for` found (atomic units; the parameter in the potential's own).

    ``value`` of ``parameter`` (with ``error`` from the observable's error and its slope) makes
    ``potential``; there ``observable`` is ``achieved`` (± ``achieved_error``) for ``target``.
    ``energy`` is the named state's energy there (NaN if none named), ``scattering`` the
    zero-energy scattering of its l, ``num_bound`` the exact count of that l; ``bracket`` the
    branch's stretch the root was found in."""

    parameter: str
    value: float
    error: float
    potential: object
    observable: str
    target: float
    achieved: float
    achieved_error: float
    l: int
    n_r: int | None
    energy: float
    energy_error: float
    scattering: Scattering
    num_bound: int
    bracket: tuple
    status: int
    reason: str = ""

    @property
    def state(self) -> str | None:
        return None if self.n_r is None else state_label(self.n_r + self.l + 1, self.l)


def _state(state, l):
    if state is None:
        return None, (0 if l is None else quantum_number(l))
    if isinstance(state, str):
        try:
            n, sl = parse_state(state)
        except ValueError as exc:
            raise InputError(f"state: {exc}") from None
        n_r = n - sl - 1
    else:
        try:
            n_r, sl = state
        except (TypeError, ValueError):
            raise InputError(f"state must be a label like '1s' or a pair (n_r, l), got {state!r}") from None
        n_r, sl = quantum_number(n_r, "n_r"), quantum_number(sl)
    if l is not None and quantum_number(l) != sl:
        raise InputError(f"l = {l} differs from the state's l = {sl}")
    return n_r, sl


def _angle(sc: Scattering, L: float) -> float:
    """arctan(a_l^{2l+1}/L^{2l+1}), from a_l or from 1/a_l, whichever is the smaller in units of L."""
    p = 2 * sc.l + 1
    if abs(sc.length) <= L:
        return math.atan((sc.length / L) ** p)
    x = (sc.inverse_length * L) ** p
    return math.copysign(math.pi / 2, x) - math.atan(x) if x != 0.0 else math.pi / 2


def solve_for(pot, vary, *, energy: float | None = None, scattering_length: float | None = None,
              effective_range: float | None = None, state=None, l: int | None = None, rtol: float = RTOL) -> Fit:
    """The value of one parameter at which an observable takes a target, the others fixed.

    Parameters
    ----------
    pot : Potential
        The potential whose other parameters stay fixed (its value of ``vary`` is only a start).
    vary : {"strength", "screening_length"} or ControlParameter
        The parameter: Z (a depth, g² in engine units), λ (a well's radius) in bohr, or one of
        your own (:class:`ControlParameter`, e.g. a preset's density).
    energy, scattering_length, effective_range : float
        Exactly one target: the named state's energy (hartree, < 0), the scattering length a
        (l = 0) or a_l (bohr), or the effective range r_e (bohr, l = 0).
    state : str or (int, int), optional
        The state, ``"1s"`` or (n_r, l).  Required with ``energy``.  With a scattering length it
        names the branch on which that state is the shallowest bound one (a runs over all
        reals there); without it the branch with no bound state (a < 0) or, for a > 0, with one.
        With an effective range it names the stretch next to its threshold (a > 0); without it
        the stretch below the first threshold (a < 0).
    l : int, optional
        Angular momentum of a scattering target when no state is named (default 0).
    rtol : float
        Tolerance of the observables computed along the way.

    Returns
    -------
    Fit

    Raises
    ------
    InputError
        A target no value reaches (the message names the reachable range), a missing or
        contradictory argument, or a potential without a finite count (Coulomb tail).
    """
    targets = {k: v for k, v in (("energy", energy), ("scattering_length", scattering_length),
                                 ("effective_range", effective_range)) if v is not None}
    if len(targets) != 1:
        raise InputError("give exactly one target: energy, scattering_length or effective_range")
    (observable, target), = targets.items()
    try:
        target = float(target)
    except (TypeError, ValueError):
        raise InputError(f"{observable} must be a number, got {target!r}") from None
    if not math.isfinite(target):
        raise InputError(f"{observable} must be finite, got {target!r}")
    n_r, l = _state(state, l)
    check_scattering_input(pot, l, "solve_for")
    param = control_parameter(pot, vary) if isinstance(vary, str) else vary
    if not isinstance(param, ControlParameter):
        raise InputError(f"vary must be 'strength', 'screening_length' or a ControlParameter, got {vary!r}")
    prob = Axis(param, l)
    if observable == "energy":
        if n_r is None:
            raise InputError("an energy target needs the state it belongs to (state='1s' or (n_r, l))")
        s, bracket = _fit_energy(prob, n_r, target, rtol)
    elif observable == "scattering_length":
        s, bracket = _fit_length(prob, n_r, target, rtol)
    else:
        if l != 0:
            raise InputError(f"the effective range is defined for l = 0; got l = {l}")
        s, bracket = _fit_range(prob, n_r, target, rtol)
    return _result(prob, s, bracket, observable, target, n_r, rtol)


def _fit_energy(prob, n_r, target, rtol):
    label = state_label(n_r + prob.l + 1, prob.l)
    if not target < 0.0:
        raise InputError(f"a bound state's energy is negative; got {target:g} hartree for {label}")
    lo = prob.threshold(n_r)
    if math.isinf(lo):
        raise InputError(f"{label} is never bound by this potential at any {prob.param.name}")
    kappa_t = math.sqrt(-target)
    if prob.param.limit is not None and (limit := prob.param.limit()) is not None and limit.tail != "confining":
        e_limit = energy_of(limit, prob.l, n_r)[0] if limit.tail != "short" or count_bound(limit, prob.l) > n_r else 0.0
        if target <= e_limit:
            raise OutOfReach("energy", target, (e_limit, 0.0), f"for {label} varying {prob.param.name}",
                             "the lower end is the unscreened potential's")

    def f(s):
        e = energy_of(prob.pot(s), prob.l, n_r)[0]
        return math.sqrt(max(-e, 0.0)) - kappa_t

    hi = 2.0 * lo if lo > 0 else prob.param.start
    for _ in range(SEARCH_DOUBLINGS):
        if f(hi) > 0:
            break
        if wkb_states(prob.pot(2.0 * hi), prob.l) > MAX_WKB_STATES:
            raise OutOfReach("energy", target, (energy_of(prob.pot(hi), prob.l, n_r)[0], 0.0),
                             f"for {label} varying {prob.param.name}",
                             f"beyond that the potential would bind over {MAX_WKB_STATES} states",
                             prob.param.name, prob.value(hi))
        lo, hi = hi, 2.0 * hi
    else:
        raise OutOfReach("energy", target, (energy_of(prob.pot(hi), prob.l, n_r)[0], 0.0),
                         f"for {label} varying {prob.param.name}", "", prob.param.name, prob.value(hi))
    return brentq(f, lo, hi, xtol=1e-15 * hi, rtol=1e-14, maxiter=200), (lo, hi)


def _inside(prob, k, g, observable, target):
    """An interval (lo, hi) inside branch k with g(lo) > 0 > g(hi), g decreasing along it."""
    s0, s1 = prob.branch(k)
    if math.isinf(s0):
        raise InputError(f"no value of {prob.param.name} binds {k} states of l = {prob.l}")
    hi = lo = None
    if k == 0:
        lo = s1 / 2.0
        for _ in range(2 * SEARCH_DOUBLINGS):
            if g(lo) > 0:
                break
            lo /= 4.0
        else:
            raise OutOfReach(observable, target, None, f"with no bound state of l = {prob.l}", "",
                             prob.param.name, prob.value(lo))
    else:
        for eps in NUDGES:
            if g(s0 * (1.0 + eps)) > 0:
                lo = s0 * (1.0 + eps)
                break
    if math.isinf(s1):
        hi = (lo or s0) * 2.0
        for _ in range(SEARCH_DOUBLINGS):
            if g(hi) < 0 or wkb_states(prob.pot(hi), prob.l) > MAX_WKB_STATES:
                break
            hi *= 2.0
    else:
        for eps in NUDGES:
            if g(s1 * (1.0 - eps)) < 0:
                hi = s1 * (1.0 - eps)
                break
    if lo is None or hi is None or not g(hi) < 0:
        return None
    return lo, hi


def _fit_length(prob, n_r, target, rtol):
    l, L = prob.l, _length(prob)
    p = 2 * l + 1
    k = n_r + 1 if n_r is not None else (0 if target < 0 else 1)
    theta_t = math.atan(math.copysign(abs(target / L) ** p, target))

    def g(s):
        return _angle(scattering(prob.pot(s), l, rtol=rtol), L) - theta_t

    inside = _inside(prob, k, g, "scattering_length", target)
    if inside is None:
        raise OutOfReach("scattering_length", target, None, f"on the branch with {k} bound states of l = {l}",
                         f"it lies within {NUDGES[0]:g} of a threshold, where |a| is not resolved")
    lo, hi = inside
    return brentq(g, lo, hi, xtol=1e-15 * hi, rtol=1e-14, maxiter=200), (lo, hi)


def _length(prob):
    pot = prob.param.make(prob.param.start)
    lam = pot.screening_length
    return float(lam) if math.isfinite(lam) else float(pot.length_scale)


def _fit_range(prob, n_r, target, rtol):
    L = _length(prob)
    k = 0 if n_r is None else n_r + 1

    def angle(s):
        return _angle(scattering(prob.pot(s), 0, rtol=rtol), L)

    def r_e(s):
        return scattering(prob.pot(s), 0, rtol=rtol).effective_range

    s0, s1 = prob.branch(k)
    if k == 0:
        # a < 0 from s → 0 (r_e → +∞) up to the first threshold: scan from the threshold down
        ends = (s1 * (1.0 - NUDGES[1]), s1 * 1e-4)
        side = "below the first threshold (a < 0)"
    else:
        # a > 0 from the named state's threshold up to where a = 0 (r_e → −∞)
        inside = _inside(prob, k, angle, "scattering_length", 0.0)
        if inside is None:
            raise ConvergenceError(f"no zero of the scattering length found on the branch with {k} bound s states")
        zero = brentq(angle, *inside, xtol=1e-15 * inside[1], rtol=1e-14)
        ends = (s0 * (1.0 + NUDGES[1]), zero * (1.0 - 1e-6))
        side = f"next to the threshold of {state_label(n_r + 1, 0)} (a > 0)"
    samples = np.geomspace(ends[0], ends[1], SCAN_POINTS)
    values = np.array([r_e(s) for s in samples]) - target
    change = np.nonzero(np.signbit(values[1:]) != np.signbit(values[:-1]))[0]
    if change.size == 0:
        seen = values + target
        beyond = "and to +∞ as the potential vanishes" if k == 0 else "and to −∞ where a → 0"
        raise OutOfReach("effective_range", target, (seen.min(), seen.max()), f"on the stretch {side}",
                         f"at the values sampled, {beyond}")
    i = int(change[0])
    a, b = sorted((samples[i], samples[i + 1]))
    return brentq(lambda s: r_e(s) - target, a, b, xtol=1e-15 * b, rtol=1e-14, maxiter=200), (a, b)


def _result(prob, s, bracket, observable, target, n_r, rtol):
    pot = prob.pot(s)
    l = prob.l
    sc = scattering(pot, l, rtol=rtol)
    e, e_err = energy_of(pot, l, n_r) if n_r is not None else (math.nan, math.nan)
    achieved, achieved_err = {"energy": (e, e_err), "scattering_length": (sc.length, sc.length_error),
                              "effective_range": (sc.effective_range, sc.effective_range_error)}[observable]
    # the parameter's error: the observable's, over its slope (a central difference)
    h = 1e-6 * s
    lo, hi = prob.pot(s - h), prob.pot(s + h)
    if observable == "energy":
        slope = (energy_of(hi, l, n_r)[0] - energy_of(lo, l, n_r)[0]) / (2 * h)
    elif observable == "scattering_length":
        slope = (scattering(hi, l).length - scattering(lo, l).length) / (2 * h)
    else:
        slope = (scattering(hi, 0).effective_range - scattering(lo, 0).effective_range) / (2 * h)
    error_s = abs(achieved_err / slope) if slope else math.inf
    value = prob.value(s)
    error = error_s if prob.inc else error_s / (s * s)
    reasons = []
    if sc.status != OK:
        reasons.append(sc.reason)
    if not abs(achieved - target) <= max(10 * achieved_err, 1e-9 * abs(target)):
        reasons.append(f"{observable} at the root is {achieved:.12g}, {abs(achieved - target):.2e} from the target")
    bracket = tuple(sorted(prob.value(x) for x in bracket))
    return Fit(prob.param.name, value, error, pot, observable, target, achieved, achieved_err, l, n_r, e, e_err, sc,
               sc.num_bound, bracket, NOT_CONVERGED if reasons else OK, "; ".join(reasons))
