"""What :func:`.inverse.solve_for` may vary: a parameter of a potential, where its thresholds lie
and in which direction it binds, seen along the branches between thresholds.

The built-in parameters are the strength (Z, a depth, g² in engine units) and the screening
length (or a well's radius), whose thresholds are the engine's critical values
(:func:`boundscape.critical_strength`, :func:`boundscape.critical_screening_length`).  Any other
(a preset's density, later) is a :class:`ControlParameter`: how a value makes a potential, and
optionally its thresholds (else they are found from the exact counts and the zero of 1/a) and
its direction (a density binds less the larger it is).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np
from scipy.optimize import brentq

from ..errors import InputError
from .bound import bound_levels, count_bound, critical_screening_length, critical_strength
from .continuum.scattering import scattering

__all__ = ["OutOfReach", "ControlParameter", "control_parameter", "Axis", "energy_of", "wkb_states",
           "MAX_WKB_STATES", "SEARCH_DOUBLINGS"]

MAX_WKB_STATES = 2000  # an upward search stops before the potential binds more states than this
SEARCH_DOUBLINGS = 40


class OutOfReach(InputError):
    """A target no value of the parameter reaches.  The message is in atomic units; the fields
    let a caller say it in its own: ``observable`` ("energy", "scattering_length",
    "effective_range"), ``target``, the ``reachable`` range (low, high) where known, ``where``
    (the state or branch), a ``note``, and the ``parameter`` value a search stopped at, if any."""

    UNITS = {"energy": "hartree", "scattering_length": "bohr", "effective_range": "bohr"}

    def __init__(self, observable, target, reachable=None, where="", note="", parameter=None, parameter_value=None):
        self.observable, self.target, self.reachable = observable, target, reachable
        self.where, self.note, self.parameter, self.parameter_value = where, note, parameter, parameter_value
        super().__init__(self.describe())

    def describe(self, unit: str | None = None, factor: float = 1.0, parameter_text: str | None = None) -> str:
        """The message with the observable in ``unit`` (``factor`` from atomic units) and the
        parameter value said as ``parameter_text``."""
        unit = unit or self.UNITS[self.observable]
        name = self.observable.replace("_", " ")
        text = f"{name} {self.target * factor:.10g} {unit} is out of reach {self.where}".rstrip()
        if self.reachable is not None:
            low, high = (x * factor for x in self.reachable)
            text += f": there it runs over ({low:.10g}, {high:.10g}) {unit}"
        if self.parameter_value is not None:
            text += f" up to {parameter_text or f'{self.parameter} = {self.parameter_value:.6g}'}"
        return text + (f" ({self.note})" if self.note else "")


@dataclass(frozen=True)
class ControlParameter:
    """A parameter that :func:`solve_for` may vary.

    Attributes
    ----------
    name : str
        How results name it (``"strength"``, ``"screening_length"``, ``"electron_density"``).
    make : callable
        value → :class:`~boundscape.Potential` (the other parameters fixed).
    threshold : callable, optional
        (l, n_r) → the value at which state (n_r, l) is bound at E = 0 (``math.inf`` if never);
        default: found from the exact counts (:func:`boundscape.count_bound`) and the zero of 1/a.
    increasing : bool
        True if more states are bound at larger values (strength, screening length); False if at
        smaller ones (a screening density).
    limit : callable, optional
        () → the potential as the value runs to the end where it binds most (e.g. the
        unscreened one), or None: bounds the energies a state can reach.
    start : float
        A typical value (where a threshold search starts).
    """

    name: str
    make: Callable[[float], object]
    threshold: Callable[[int, int], float] | None = None
    increasing: bool = True
    limit: Callable[[], object] | None = None
    start: float = 1.0


def control_parameter(pot, name: str) -> ControlParameter:
    """The built-in parameters of ``pot``: ``"strength"`` (Z, a depth, g² in engine units) or
    ``"screening_length"`` (λ, or a well's radius, bohr), the others fixed at ``pot``'s."""
    own = dict(pot.own)
    if name == "strength":
        def threshold(l, n_r):
            return critical_strength(pot.family, pot.screening_length, l, n_r, pot.mass, **own)

        screened = pot.uses_screening_length
        return ControlParameter("strength", lambda s: pot.with_(strength=s), threshold if screened else None,
                                start=pot.strength)
    if name == "screening_length":
        if not pot.uses_screening_length:
            raise InputError(f"family {pot.family!r} has no screening length to vary")

        def threshold(l, n_r):
            return critical_screening_length(pot.family, pot.strength, l, n_r, pot.mass, **own)

        return ControlParameter("screening_length", lambda s: pot.with_(screening_length=s), threshold,
                                limit=pot.unscreened, start=pot.screening_length)
    raise InputError(f"vary must be 'strength', 'screening_length' or a ControlParameter, got {name!r}")


class Axis:
    """One parameter, for one l, seen through s, in which binding grows (s = value, or 1/value):
    the branch with k bound states is threshold(k − 1) < s < threshold(k), threshold(−1) = 0."""

    def __init__(self, param: ControlParameter, l: int):
        self.param, self.l = param, l
        self.inc = param.increasing

    def value(self, s):
        return s if self.inc else 1.0 / s

    def pot(self, s):
        return self.param.make(self.value(s))

    def threshold(self, n_r: int) -> float:
        """s at which state (n_r, l) is bound at E = 0 (``math.inf`` if never)."""
        if self.param.threshold is None:
            return self._counted_threshold(n_r)
        t = float(self.param.threshold(self.l, n_r))
        if self.inc:
            return t
        return math.inf if t == 0.0 else (0.0 if math.isinf(t) else 1.0 / t)

    def _counted_threshold(self, n_r: int) -> float:
        # generic, in s: bracket on the exact count, then the zero of 1/a between
        start = self.param.start if self.inc else 1.0 / self.param.start

        def bound(s):
            return count_bound(self.pot(s), self.l) > n_r

        lo = hi = start
        for _ in range(SEARCH_DOUBLINGS):
            if bound(hi):
                break
            if wkb_states(self.pot(2.0 * hi), self.l) > MAX_WKB_STATES:
                return math.inf  # not bound before the potential binds thousands of other states
            lo, hi = hi, 2.0 * hi
        else:
            return math.inf
        while bound(lo):
            hi, lo = lo, lo / 2.0
            if lo < start * 2.0**-SEARCH_DOUBLINGS:
                return 0.0
        for _ in range(60):  # to adjacent counts n_r and n_r + 1, where 1/a crosses zero once
            mid = math.sqrt(lo * hi)
            if bound(mid):
                hi = mid
            else:
                lo = mid
            if hi - lo < 1e-3 * hi:
                break
        return brentq(lambda s: scattering(self.pot(s), self.l).inverse_length, lo, hi, xtol=1e-15 * hi, rtol=1e-14)

    def branch(self, k: int) -> tuple[float, float]:
        """(lower, upper) ends in s of the branch with k bound states of l."""
        return (0.0 if k == 0 else self.threshold(k - 1)), self.threshold(k)


def energy_of(pot, l, n_r):
    """(E, error) of state n_r of ``pot``, or (0, 0) if it is not bound."""
    res = bound_levels(pot, l, n_r_max=n_r + 1)
    if res.energy.size <= n_r:  # (num_bound is −1 for a Coulomb tail, which binds them all)
        return 0.0, 0.0
    return float(res.energy[n_r]), float(res.energy_error[n_r])


def wkb_states(pot, l) -> float:
    """(1/π)∫√(2μ max(−V_eff, 0)) dr: roughly how many states of l ``pot`` binds (a cost guard)."""
    r = np.geomspace(1e-6 * pot.length_scale, float(pot.support), 4000)
    v_eff = pot(r) + l * (l + 1) / (2.0 * pot.mass * r * r)
    k = np.sqrt(2.0 * pot.mass * np.maximum(-v_eff, 0.0))
    return float(np.sum(0.5 * (k[1:] + k[:-1]) * np.diff(r))) / math.pi
