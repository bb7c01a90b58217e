"""The compiled side of the families: a family's formula compiled once (numba ``cfunc`` of one
explicit signature, cached on disk under :func:`..jitcache.kernel_cache_dir`) and V evaluated
at many radii through it.

The solver's kernels receive a family's compiled formula as a first-class function of type
:data:`FORMULA` and call it at every node: they are compiled once for all families, and a new
family compiles only its own formula (a fraction of a second).
"""

from __future__ import annotations

import numpy as np
from numba import cfunc, njit, types

from .. import jitcache

_saved_cache_dir = jitcache.enter()  # this module's kernels are cached by jitcache's rule

__all__ = ["FORMULA_SIGNATURE", "FORMULA", "compile_formula", "evaluate"]

f8, b1 = types.float64, types.boolean
A1, A2 = types.float64[::1], types.float64[:, ::1]
# V(r, p, x, c, continued): see family.Family.formula
FORMULA_SIGNATURE = f8(f8, A1, A1, A2, b1)
FORMULA = types.FunctionType(FORMULA_SIGNATURE)


def compile_formula(formula):
    """``formula`` compiled as a C callback of :data:`FORMULA_SIGNATURE` (cached on disk).

    A ``cfunc`` rather than an ``njit`` dispatcher: the solver's kernels take it as a
    first-class function, and handing a cfunc to them costs a third of what a dispatcher does."""
    saved = jitcache.enter()
    try:
        return cfunc(FORMULA_SIGNATURE, cache=True)(formula)
    finally:
        jitcache.leave(saved)


@njit([(FORMULA, A1, A1, A1, A2, b1)], cache=True)
def evaluate(v, r, p, x, c, continued):
    """V at every radius of ``r`` (hartree), through the compiled formula ``v``."""
    out = np.empty(r.size)
    for i in range(r.size):
        out[i] = v(r[i], p, x, c, continued)
    return out


jitcache.leave(_saved_cache_dir)
