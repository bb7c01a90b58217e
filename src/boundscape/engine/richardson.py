"""Richardson extrapolation, the one home for every solver of the engine.

Values T(h/f) computed with steps h/f, f in ``factors``, whose error is a series in h^p, p in
``powers``, are combined as Σ w_j T_j with Σ w_j = 1 and Σ w_j f_j^{−p} = 0 for each power
(Richardson 1911; the deferred approach to the limit).  The weights are rational numbers for
integer refinement factors: they are kept as integer numerators over one denominator (exact,
from :mod:`fractions`), so that every caller — the compiled solver included — forms the same
sum in the same order.  The error estimate is the change from the extrapolation that leaves
out the coarsest grid (and its highest power).

References
----------
L. F. Richardson, "The approximate arithmetical solution by finite differences of physical
problems", Phil. Trans. R. Soc. A 210, 307 (1911).
"""

from __future__ import annotations

from fractions import Fraction
from functools import lru_cache
from math import lcm

from numba import njit, types

from . import jitcache

_saved_cache_dir = jitcache.enter()  # this module's kernel is cached by jitcache's rule

__all__ = ["FACTORS", "POWERS", "rational_weights", "extrapolate", "extrapolate_grids"]

FACTORS = (1, 2, 4)  # the solvers' grids h, h/2, h/4
POWERS = (4, 6)  # Numerov's and the symmetric Magnus integrator's even error series
f8 = types.float64


@lru_cache(maxsize=64)
def rational_weights(factors: tuple, powers: tuple) -> tuple[tuple[float, ...], float]:
    """(numerators, denominator) of the weights for steps h/f and error powers h^p: integers
    held as floats, exact for integer factors."""
    n = len(factors)
    rows = [[Fraction(1)] * n] + [[Fraction(1, f**p) for f in factors] for p in powers[: n - 1]]
    rhs = [Fraction(1)] + [Fraction(0)] * (n - 1)
    # Gaussian elimination in exact arithmetic (the system is a small Vandermonde one)
    a = [row[:] + [b] for row, b in zip(rows, rhs)]
    for i in range(n):
        pivot = next(k for k in range(i, n) if a[k][i] != 0)
        a[i], a[pivot] = a[pivot], a[i]
        for k in range(n):
            if k != i and a[k][i] != 0:
                ratio = a[k][i] / a[i][i]
                a[k] = [x - ratio * y for x, y in zip(a[k], a[i])]
    weights = [a[i][n] / a[i][i] for i in range(n)]
    denominator = lcm(*(w.denominator for w in weights))
    return tuple(float(w * denominator) for w in weights), float(denominator)


def _combine(values, factors, powers):
    numerators, denominator = rational_weights(tuple(factors), tuple(powers))
    total = numerators[0] * values[0] if numerators[0] != 1.0 else values[0]
    for w, v in zip(numerators[1:], values[1:]):
        total = total + w * v
    return total / denominator


def extrapolate(values, factors=FACTORS, powers=POWERS):
    """(extrapolated value, its change against the extrapolation without the coarsest grid).

    ``values`` are real or complex, computed with steps h/f for f in ``factors``; the change is
    signed (complex for complex values: its parts estimate the parts' errors)."""
    values = list(values)
    factors, powers = tuple(factors), tuple(powers)
    best = _combine(values, factors, powers)
    second = _combine(values[1:], factors[1:], powers[:-1]) if len(values) > 2 else values[-1]
    return best, best - second


_N3, _D3 = rational_weights(FACTORS, POWERS)
_N2, _D2 = rational_weights(FACTORS[1:], POWERS[:1])


@njit([(f8, f8, f8)], cache=True)
def extrapolate_grids(e0, e1, e2):
    """:func:`extrapolate` of values on the grids h, h/2, h/4 (error series h⁴, h⁶) inside the
    compiled solver: (best, |change|), the same sum in the same order."""
    best = (e0 + _N3[1] * e1 + _N3[2] * e2) / _D3
    second = (_N2[0] * e1 + _N2[1] * e2) / _D2
    return best, abs(best - second)


jitcache.leave(_saved_cache_dir)
