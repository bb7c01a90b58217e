"""The radial equation u'' = Q(r)·u carried along a path in the complex r plane.

Used where the energy is complex (resonance poles) or the coupling varies (threshold
couplings); the bound-level solver does not use it.

Path.  A path is a chain of straight segments r(t) = t₀ + (t − t₀)·e^{iθ}, t ∈ [t₀, t₁]
(θ = 0 on the real axis, θ > 0 on a ray into the upper half plane).  Each segment is mapped
to a uniform grid in x = α ln t + 2√(t/b) + t/β, the map of the bound-level grid: logarithmic
near the origin, square-root through a Coulomb-like region (its local wavelength grows like
√r), linear far out.

Step.  y = (u, du/dr) obeys dy/dx = (dr/dx)·A(r)·y with A = [[0, 1], [Q, 0]]; one step of the
fourth-order Magnus integrator with the two Gauss–Legendre nodes (Iserles & Nørsett 1999;
Blanes, Casas, Oteo & Ros 2009, eq. (253)) is

    Ω = (h/2)(A₁ + A₂) − (√3/12) h² [A₁, A₂],     y(x + h) = exp(Ω)·y(x).

Ω is traceless, so exp(Ω) = cosh(s)·1 + sinh(s)/s·Ω with s² = −det Ω, in closed form for
every step at once (no Python loop over steps), exact where Q is constant, and of determinant
one, so a step back is the adjugate.  The method is symmetric, so its global error is an even
series h⁴, h⁶, … (Hairer, Lubich & Wanner, *Geometric Numerical Integration*, 2nd ed., II.3),
which Richardson extrapolation (:mod:`..richardson`) removes.  The steps' product is formed by pairwise multiplication,
log₂(n) array operations.

References
----------
A. Iserles and S. P. Nørsett, "On the solution of linear differential equations in Lie groups",
Phil. Trans. R. Soc. A 357, 983 (1999).
S. Blanes, F. Casas, J. A. Oteo and J. Ros, "The Magnus expansion and some of its
applications", Phys. Rep. 470, 151 (2009).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = ["RadialMap", "Segment", "step_matrices", "chain", "chain_inward", "running", "MAGNUS_ORDER"]

MAGNUS_ORDER = 4
GAUSS = np.array([0.5 - math.sqrt(3.0) / 6.0, 0.5 + math.sqrt(3.0) / 6.0])


@dataclass(frozen=True)
class RadialMap:
    """x(t) = α ln t + 2√(t/b) + t/β, written with 1/b and 1/β (zero drops that term)."""

    alpha: float
    inv_b: float
    inv_beta: float

    def x(self, t):
        t = np.asarray(t, dtype=float)
        return self.alpha * np.log(t) + 2.0 * np.sqrt(t * self.inv_b) + t * self.inv_beta

    def dt_dx(self, t):
        t = np.asarray(t, dtype=float)
        return 1.0 / (self.alpha / t + np.sqrt(self.inv_b / t) + self.inv_beta)

    def t(self, x, t_lo: float, t_hi: float):
        """The inverse map: Newton's method in ln t, started from a tabulated inverse."""
        table_t = np.geomspace(t_lo, t_hi, 129)
        y = np.interp(x, self.x(table_t), np.log(table_t))
        a, ib, ibeta = self.alpha, self.inv_b, self.inv_beta
        for _ in range(30):
            t = np.exp(y)
            root_t = np.sqrt(t * ib)
            dy = (a * y + 2.0 * root_t + t * ibeta - x) / (a + root_t + t * ibeta)
            y = y - dy
            if float(np.max(np.abs(dy))) < 1e-14:
                break
        return np.exp(y)


@dataclass(frozen=True)
class Segment:
    """r(t) = start + (t − start)·e^{iθ} for t from ``start`` to ``end``, ``steps`` coarse steps."""

    start: float
    end: float
    steps: int
    angle: float = 0.0

    def gauss_points(self, rmap: RadialMap, factor: int = 1):
        """Step h in x, and r and dr/dx at the two Gauss nodes of every step, shape (n, 2)."""
        n = self.steps * factor
        xa, xb = rmap.x(np.array([self.start, self.end]))
        h = (xb - xa) / n
        x = (xa + h * np.arange(n))[:, None] + h * GAUSS
        t = rmap.t(x.ravel(), self.start, self.end).reshape(n, 2)
        dt = rmap.dt_dx(t)
        if self.angle == 0.0:
            return h, t, dt
        turn = complex(math.cos(self.angle), math.sin(self.angle))
        return h, self.start + (t - self.start) * turn, dt * turn


def step_matrices(h, dr_dx, q) -> np.ndarray:
    """exp(Ω) of every step (shape (n, 2, 2), complex), from the step h in x (one, or one per
    step) and dr/dx and Q at the Gauss nodes (shape (n, 2))."""
    d1, d2 = dr_dx[:, 0], dr_dx[:, 1]
    a = -(math.sqrt(3.0) / 12.0) * h * h * d1 * d2 * (q[:, 1] - q[:, 0])
    b = 0.5 * h * (d1 + d2)
    c = 0.5 * h * (d1 * q[:, 0] + d2 * q[:, 1])
    s2 = (a * a + b * c).astype(complex)
    s = np.sqrt(s2)
    small = np.abs(s) < 1e-3
    # sinh(s)/s by its series where s is small (both are even in s: the root's branch is irrelevant)
    sinhc = np.where(small, 1.0 + s2 / 6.0 * (1.0 + s2 / 20.0), np.sinh(s) / np.where(small, 1.0, s))
    cosh = np.cosh(s)
    out = np.empty((a.size, 2, 2), dtype=complex)
    out[:, 0, 0] = cosh + sinhc * a
    out[:, 0, 1] = sinhc * b
    out[:, 1, 0] = sinhc * c
    out[:, 1, 1] = cosh - sinhc * a
    return out


def chain(m: np.ndarray) -> np.ndarray:
    """The product m[n−1]·…·m[1]·m[0] (the first step applied first), by pairwise products."""
    while m.shape[0] > 1:
        if m.shape[0] % 2:
            m = np.concatenate([m, np.eye(2, dtype=m.dtype)[None]])
        m = m[1::2] @ m[0::2]
    return m[0]


def chain_inward(m: np.ndarray) -> np.ndarray:
    """The propagator from the far end of the steps back to their start: the product of the
    inverses, last step first.  The inverse of a step of determinant one is its adjugate."""
    inv = np.empty_like(m)
    inv[:, 0, 0], inv[:, 1, 1] = m[:, 1, 1], m[:, 0, 0]
    inv[:, 0, 1], inv[:, 1, 0] = -m[:, 0, 1], -m[:, 1, 0]
    return chain(inv[::-1])


def running(m: np.ndarray, y0) -> np.ndarray:
    """y after each step (shape (n, 2)), from y0 before the first: a prefix product in
    log₂(n) doubling passes (Hillis & Steele 1986)."""
    p = m.copy()
    shift = 1
    while shift < p.shape[0]:
        p[shift:] = p[shift:] @ p[:-shift]
        shift *= 2
    return p @ np.asarray(y0, dtype=complex)
