"""Independent references for the woods_saxon, ion_sphere and two_yukawa families (test helpers).

Nothing here shares code with the engine (Numerov on a mapped grid, Sturm counts, Newton):

* :class:`Shooting` — scipy.integrate.solve_ivp (DOP853, an explicit Runge–Kutta method of
  order 8: Hairer, Nørsett & Wanner, Solving ODEs I, §II.5) outward from the origin's series and
  inward from the decaying WKB solution, matched by the Wronskian at the outer turning point,
  root-found in E with scipy.optimize.brentq;
* :func:`woods_saxon_s_levels` — the exact l = 0 Woods–Saxon levels in hypergeometric functions
  (mpmath.hyp2f1), derived in :func:`woods_saxon_s_condition`;
* :func:`ion_sphere_levels` — the interior integrated by DOP853 and matched at R to the
  closed-form exterior √r K_{l+½}(κr) (scipy.special.kve; Abramowitz & Stegun 10.2).
"""

from __future__ import annotations

import math

import mpmath
import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq
from scipy.special import kve

RTOL = 1e-13


def woods_saxon(r, depth, radius, a):
    """V = −V₀/(1 + e^{(r−R)/a}) as Woods & Saxon (1954) state it (scipy's expit keeps it finite)."""
    from scipy.special import expit

    return -depth * expit(-(np.asarray(r, dtype=float) - radius) / a)


def two_yukawa(r, g, lam, c, rho):
    """V = (−g e^{−r/λ} + c g e^{−r/(ρλ)})/r (Malfliet & Tjon 1969, eq. 1)."""
    r = np.asarray(r, dtype=float)
    return (-g * np.exp(-r / lam) + c * g * np.exp(-r / (rho * lam))) / r


def ion_sphere(r, Z, R):
    """V = −Z/r + Z(3 − r²/R²)/(2R) for r < R, 0 beyond (a point charge in a uniform sphere of
    the opposite charge: Gauss's law, common practice)."""
    r = np.asarray(r, dtype=float)
    return np.where(r < R, -Z / r + Z * (3.0 - r * r / R**2) / (2.0 * R), 0.0)


def series_start(l, mass, charge, r0):
    """(u, u') at r0 of the regular solution u = r^{l+1}(1 − μC r/(l + 1) + O(r²)) for V → −C/r
    (the Frobenius recurrence's first term: Bender & Orszag, ch. 3)."""
    a1 = -mass * charge / (l + 1)
    return r0 ** (l + 1) * (1 + a1 * r0), r0**l * ((l + 1) + (l + 2) * a1 * r0)


class Shooting:
    """Levels of V (a vectorised function of r, hartree) for mass μ and l by DOP853 shooting.

    ``charge`` is C of V → −C/r at the origin (0 for a finite V(0)); ``r_far`` a radius past
    which V is negligible; ``r0`` where the series starts (its next term, O(r0²), must be
    negligible against RTOL)."""

    def __init__(self, v, mass, l, charge=0.0, r0=1e-7, r_far=1e4):
        self.v, self.mass, self.l, self.charge, self.r0, self.r_far = v, mass, l, charge, r0, r_far

    def q(self, r, E):
        return 2.0 * self.mass * (self.v(r) - E) + self.l * (self.l + 1) / (r * r)

    def _integrate(self, E, start, end, y0):
        return solve_ivp(lambda r, y: (y[1], self.q(r, E) * y[0]), (start, end), y0, method="DOP853",
                         rtol=RTOL, atol=1e-300)

    def outer_turning_point(self, E):
        r = np.geomspace(self.r0, self.r_far, 40001)
        allowed = np.nonzero(self.q(r, E) < 0)[0]
        return float(r[allowed[-1]])

    def wronskian(self, E, r_match, r_end):
        out = self._integrate(E, self.r0, r_match, series_start(self.l, self.mass, self.charge, self.r0))
        # inward from the WKB decaying solution u'/u = −√q: its error dies out like
        # e^{−2κ(r_end − r_match)} ~ e^{−80} on the way in (common practice, no source)
        inn = self._integrate(E, r_end, r_match, (1.0, -math.sqrt(self.q(r_end, E))))
        (uo, duo), (ui, dui) = out.y[:, -1], inn.y[:, -1]
        nodes = int(np.count_nonzero(np.diff(np.signbit(out.y[0])))) + int(np.count_nonzero(np.diff(np.signbit(inn.y[0]))))
        return (uo * dui - duo * ui) / (math.hypot(uo, duo) * math.hypot(ui, dui)), nodes

    def level(self, guess, window=1e-6):
        """(the eigenvalue within ``window`` (relative) of ``guess``, the node count of its u)."""
        r_match = self.outer_turning_point(guess)
        r_end = r_match + 40.0 / math.sqrt(-2.0 * self.mass * guess)
        f = lambda E: self.wronskian(E, r_match, r_end)[0]
        grid = guess * (1.0 + window * np.linspace(-1.0, 1.0, 5))
        values = [f(E) for E in grid]
        change = [i for i in range(4) if np.signbit(values[i]) != np.signbit(values[i + 1])]
        assert len(change) == 1, f"no single eigenvalue within {window:g} of {guess}"
        i = change[0]
        root = brentq(f, grid[i], grid[i + 1], xtol=1e-16 * abs(guess), rtol=1e-15)
        return root, self.wronskian(root, r_match, r_end)[1]


# ---------------------------------------------------------------------------------------------
# Woods–Saxon, l = 0, exactly.  With y = 1/(1 + e^{(r−R)/a}) (dy/dr = −y(1 − y)/a) the s-wave
# equation u'' + (2μV₀ y − κ²) u = 0, E = −κ²/2μ, becomes
#     y(1 − y) d/dy[y(1 − y) du/dy] + a²(2μV₀ y − κ²) u = 0,
# with exponents ±κa at y = 0 (r → ∞), ±ika at y = 1 (k² = 2μ(V₀ + E)) and 0, 1 at y = ∞.  The
# solution that decays as r → ∞ is
#     u = y^ν (1 − y)^{ika} ₂F₁(ν + ika, ν + ika + 1; 2ν + 1; y),    ν = κa,
# real (Euler's transformation, DLMF 15.8.1, maps ika → −ika), and a level is a zero of u at
# r = 0, y₀ = 1/(1 + e^{−R/a}).  (The s-wave Woods–Saxon problem is solvable in closed form:
# S. Flügge, Practical Quantum Mechanics (Springer 1971), the Woods–Saxon problem; the
# derivation above is redone here and checked against DOP853 shooting in the tests.)

def woods_saxon_s_condition(E, depth, radius, a, mass=1.0, dps=40):
    """(u(0) up to a positive factor, its imaginary part relative to its size: should vanish)."""
    with mpmath.workdps(dps):
        E, depth, radius, a, mass = (mpmath.mpf(x) for x in (E, depth, radius, a, mass))
        nu = mpmath.sqrt(-2 * mass * E) * a
        ika = 1j * mpmath.sqrt(2 * mass * (depth + E)) * a
        one_minus_y0 = mpmath.exp(-radius / a) / (1 + mpmath.exp(-radius / a))
        y0 = 1 / (1 + mpmath.exp(-radius / a))
        value = one_minus_y0**ika * mpmath.hyp2f1(nu + ika, nu + ika + 1, 2 * nu + 1, y0)
        return float(value.real), float(abs(value.imag) / max(abs(value), mpmath.mpf(10) ** (-dps)))


def woods_saxon_s_levels(depth, radius, a, mass=1.0, scan=2000):
    """Every l = 0 level, ascending: sign changes of u(0) on a scan in E, then brentq."""
    s = np.linspace(0.0, 1.0, scan + 1)[1:-1]
    energies = -depth * (1.0 - s) ** 2  # dense near threshold, where the levels crowd
    values = [woods_saxon_s_condition(E, depth, radius, a, mass)[0] for E in energies]
    roots = []
    for i in range(len(energies) - 1):
        if np.signbit(values[i]) != np.signbit(values[i + 1]):
            roots.append(brentq(lambda E: woods_saxon_s_condition(E, depth, radius, a, mass)[0],
                                energies[i], energies[i + 1], xtol=1e-15 * depth, rtol=1e-15))
    return np.array(roots)


# ---------------------------------------------------------------------------------------------
# The ion sphere: V = 0 beyond R exactly, so the exterior is r·k_l(κr) ∝ √r K_{l+½}(κr).

def exterior_log_derivative(l, kappa, R):
    """u'/u at R of u = √r K_{l+½}(κr) (A&S 10.2; K'_ν = −K_{ν−1} − ν K_ν/z, A&S 9.6.26)."""
    nu, z = l + 0.5, kappa * R
    return 0.5 / R - kappa * (kve(nu - 1.0, z) / kve(nu, z) + nu / z)


def ion_sphere_mismatch(E, Z, R, l, mass=1.0, r0=1e-7):
    """u' − (exterior u'/u)·u at R of the interior solution started from the origin's series."""
    sol = solve_ivp(lambda r, y: (y[1], (l * (l + 1) / r**2 + 2.0 * mass * (float(ion_sphere(r, Z, R)) - E)) * y[0]),
                    (r0, R), series_start(l, mass, Z, r0), method="DOP853", rtol=RTOL, atol=1e-300)
    u, du = sol.y[:, -1]
    return (du - exterior_log_derivative(l, math.sqrt(-2.0 * mass * E), R) * u) / math.hypot(u, du)


def ion_sphere_level_near(E, Z, R, l, mass=1.0, window=1e-6):
    """The exact level within ``window`` (relative) of ``E``."""
    return brentq(ion_sphere_mismatch, E * (1 + window), E * (1 - window), args=(Z, R, l, mass),
                  xtol=1e-300, rtol=1e-15)


def ion_sphere_zero_energy_slope(Z, R, l, mass=1.0, r0=1e-7):
    """(A up to a positive factor, nodes) of the E = 0 solution: beyond R, u = A r^{l+1} + B r^{−l},
    and (2l + 1)A R^{l+1} = R u' + l u at R; a state is lost where A crosses zero."""
    sol = solve_ivp(lambda r, y: (y[1], (l * (l + 1) / r**2 + 2.0 * mass * float(ion_sphere(r, Z, R))) * y[0]),
                    (r0, R), series_start(l, mass, Z, r0), method="DOP853", rtol=RTOL, atol=1e-300)
    u, du = sol.y[:, -1]
    nodes = int(np.count_nonzero(np.diff(np.signbit(sol.y[0]))))
    return (R * du + l * u) / math.hypot(R * du, u), nodes


def ion_sphere_count(Z, R, l, mass=1.0):
    """Bound states of l: nodes of the E = 0 solution (Sturm oscillation, Courant & Hilbert vol. 1
    ch. VI), those inside R plus one beyond it where A and u(R) differ in sign."""
    sol = solve_ivp(lambda r, y: (y[1], (l * (l + 1) / r**2 + 2.0 * mass * float(ion_sphere(r, Z, R))) * y[0]),
                    (1e-7, R), series_start(l, mass, Z, 1e-7), method="DOP853", rtol=RTOL, atol=1e-300)
    u, du = sol.y[:, -1]
    nodes = int(np.count_nonzero(np.diff(np.signbit(sol.y[0]))))
    return nodes + int(np.signbit(R * du + l * u) != np.signbit(u))
