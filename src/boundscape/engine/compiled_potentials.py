"""The built-in families' V(r) as compiled code, so that a whole cell is solved without
returning to Python (:mod:`.cell`).

Each formula mirrors :meth:`Family.evaluate` in :mod:`.families` (a test checks they agree);
a family without a code here is solved through the Python path of :mod:`.levels`.  A table is
passed as its cubic spline (breakpoints and the 4 × (m−1) coefficients of scipy's CubicSpline
in r·V, evaluated by Horner's rule).
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit, types

from . import jitcache

_saved_cache_dir = jitcache.enter()  # this module's kernels are cached by jitcache's rule

__all__ = ["kernel_of", "potential_at", "CODES"]

CODES = {"coulomb": 1, "yukawa": 2, "ecsc": 3, "hulthen": 4, "square_well": 5, "harmonic": 6, "tabulated": 7}
f8, i8, b1 = types.float64, types.int64, types.boolean
A1, A2 = types.float64[::1], types.float64[:, ::1]
_NO_TABLE = (np.zeros(2), np.zeros((4, 1)))


def kernel_of(pot):
    """(code, parameters, spline breakpoints, spline coefficients) of ``pot``, or None when its
    family has no compiled formula.  Parameters: Z, λ, μ, screened, Coulomb charge of the table."""
    code = CODES.get(pot.family)
    if code is None or type(pot.info).__module__ != "boundscape.engine.families":
        return None  # a family added elsewhere (or one that overrides a built-in) runs in Python
    x, c = _NO_TABLE
    charge = 0.0
    if code == 7:
        spline = pot.table._spline
        x, c = np.ascontiguousarray(spline.x, dtype=float), np.ascontiguousarray(spline.c, dtype=float)
        charge = pot.table.coulomb_charge
    lam = pot.screening_length if math.isfinite(pot.screening_length) else 1e300
    params = np.array([pot.strength, lam, pot.mass, float(pot.screened), charge])
    return code, params, x, c


@njit([(f8, A1, A2, f8,)], cache=True)
def _table(r, x, c, charge):
    if r > x[-1]:
        return -charge / r
    rr = max(r, x[0])
    lo, hi = 0, x.size - 2
    while lo < hi:  # the interval x[i] ≤ rr < x[i+1] (the last one closed)
        mid = (lo + hi + 1) // 2
        if x[mid] <= rr:
            lo = mid
        else:
            hi = mid - 1
    d = rr - x[lo]
    return (((c[0, lo] * d + c[1, lo]) * d + c[2, lo]) * d + c[3, lo]) / r


@njit([(i8, A1, A1, A2, f8, b1,)], cache=True)
def potential_at(code, prm, x, c, r, continued):
    """V(r) in hartree of family ``code``; ``continued``: the interior formula past the support."""
    Z, lam = prm[0], prm[1]
    if code == 1:
        return -Z / r
    if code == 2:
        return -Z * math.exp(-r / lam) / r
    if code == 3:
        t = r / lam
        return -Z * math.exp(-t) * math.cos(t) / r
    if code == 4:
        t = r / lam
        return -(Z / lam) * math.exp(-t) / (-math.expm1(-t))
    if code == 5:
        return -Z if (continued or r <= lam) else 0.0
    if code == 6:
        return prm[2] * 0.5 * Z * Z * r * r
    v = Z * _table(r, x, c, prm[4])
    if prm[3] != 0.0:
        v *= math.exp(-r / lam)
    return v


jitcache.leave(_saved_cache_dir)
