"""The engine's critical screening length against an independent zero-energy integration.

At threshold (E = 0) a state of angular momentum l is lost where the regular zero-energy solution
stops growing outside the potential: beyond its range u = A r^{l+1} + B r^{−l}, and the critical
parameter is the root of A (common practice, no source).  Here A is found by integrating the
zero-energy radial equation u'' = [2μV(r) + l(l+1)/r²] u with scipy.integrate.solve_ivp (DOP853,
an explicit Runge–Kutta method of order 8: Hairer, Nørsett & Wanner, Solving ODEs I, §II.5) from
the origin's series out to 40 λ, where V < e^{−40}/r, and the root in λ by scipy.optimize.brentq.
It shares nothing with the engine (Numerov on a mapped grid, Sturm counts, Newton).
"""

import math

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

import boundscape as bs


def ecsc_outer_slope(lam, Z=1.0, mu=1.0):
    """(u'(R), nodes) of the l = 0 zero-energy solution of V = −Z e^{−r/λ} cos(r/λ)/r, R = 40 λ.

    For l = 0, u = A r + B beyond the range, so A = u'(R).  Start at r0 from u = r − μZ r² (the
    regular series of u'' = 2μV u with V → −Z/r; its next term is O(r0³))."""
    r0 = 1e-8 * lam

    def rhs(r, y):
        x = r / lam
        return (y[1], 2.0 * mu * (-Z * math.exp(-x) * math.cos(x) / r) * y[0])

    sol = solve_ivp(rhs, (r0, 40.0 * lam), [r0 - mu * Z * r0 * r0, 1.0 - 2.0 * mu * Z * r0], method="DOP853",
                    rtol=1e-13, atol=1e-300, dense_output=False)
    assert sol.success
    u = sol.y[0]
    nodes = int(np.count_nonzero(np.sign(u[1:]) != np.sign(u[:-1])))
    return sol.y[1, -1], nodes


def test_ecsc_critical_length_l0_nr3_agrees_with_dop853():
    engine = bs.critical_screening_length("ecsc", strength=1.0, l=0, n_r=3, mass=1.0)
    # the independent root, bracketed ±1 % around the engine's value
    independent = brentq(lambda lam: ecsc_outer_slope(lam)[0], 0.99 * engine, 1.01 * engine, xtol=1e-14, rtol=1e-14)
    assert abs(engine - independent) <= 1e-9 * independent
    # the root is the loss of n_r = 3: the zero-energy solution has as many nodes as there are bound
    # states (Sturm's oscillation theorem, common practice, no source), 4 above it and 3 below
    assert ecsc_outer_slope(1.01 * engine)[1] == 4
    assert ecsc_outer_slope(0.99 * engine)[1] == 3
