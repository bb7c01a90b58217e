"""The discretised radial problem: a mapped grid, its symmetric tridiagonal operator, and
Richardson extrapolation of what it yields.

Map.  x = α ln r + 2√(r/b) + r/β on a uniform x grid: logarithmic near the origin, where
u ~ r^{l+1} varies on the scale r; square-root through a Coulomb-like region, whose local
wavelength grows like √r (WKB); linear (spacing h·β) far out, where a level decays like e^{−κr};
α < 1 thins the logarithmic stretch near the origin, where nothing oscillates.  ``design_grid``
picks (α, b, β) and the step count for each problem from its local wavenumber.

Liouville transform.  With g = dr/dx and u(r) = g^{1/2} w(x) the radial equation becomes

    −(1/2μ) w'' + q(x) w = E ρ(x) w,   q = g²·V_eff + F/(2μ),   ρ = g²,
    F = ¾(g'/g)² − ½ g''/g,

with no first-derivative term, so the three-point difference on the uniform x grid gives a
symmetric generalised problem A w = E B w, B diagonal; y = B^{1/2} w makes it a symmetric
tridiagonal matrix, whose eigenvalues LAPACK dstebz locates; the eigenvectors come from inverse
iteration on the pencil itself (dgtsv) and the values from their Rayleigh quotients.  The
eigenvalue error is an even series in h (the coefficients are analytic in x), which Richardson
extrapolation over several refinements removes.

Ends.  Dirichlet at r_min (error ~ (r_min/a)^{2l+1}); at R a Robin condition w' = s·w chosen
by the caller (the exact exterior log-derivative), discretised with a ghost point and a
half-weight boundary row so the matrix stays symmetric (common practice, no source).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property, lru_cache

import numpy as np
from scipy.linalg import lapack



@dataclass(frozen=True)
class MappedGrid:
    """Uniform x grid on (x0, x1]: unknowns at x0 + i·h, i = 1..m; x0 is the Dirichlet end.

    The map is x = α ln r + 2√(r/b) + r/β (b or β infinite drops that term)."""

    r_min: float
    r_max: float
    beta: float  # math.inf: no linear term
    m: int
    alpha: float = 1.0
    b: float = math.inf  # math.inf: no square-root term

    @cached_property
    def x0(self):
        return float(_x_of_r(self.r_min, self.alpha, self.b, self.beta))

    @cached_property
    def x1(self):
        return float(_x_of_r(self.r_max, self.alpha, self.b, self.beta))

    @cached_property
    def h(self):
        return (self.x1 - self.x0) / self.m

    def refined(self, factor: int) -> "MappedGrid":
        return MappedGrid(self.r_min, self.r_max, self.beta, self.m * factor, self.alpha, self.b)

    def with_steps(self, m: int) -> "MappedGrid":
        return MappedGrid(self.r_min, self.r_max, self.beta, m, self.alpha, self.b)

    def nodes(self):
        """r, g = dr/dx, F (the Liouville term) at the unknowns."""
        x = self.x0 + self.h * np.arange(1, self.m + 1)
        if np.isinf(self.b) and np.isinf(self.beta):
            r = np.exp(x / self.alpha)
        else:
            # every refinement of one map starts Newton from the same interpolated table
            xt, tt = _log_radius_table(self.r_min, self.r_max, self.alpha, self.b, self.beta)
            r = _r_of_x(x, self.alpha, self.b, self.beta, start=np.interp(x, xt, tt))
        r[-1] = self.r_max  # exact end: the boundary condition is evaluated there
        g, gp_over_g, gpp_over_g = _map_derivatives(r, self.alpha, self.b, self.beta)
        F = 0.75 * gp_over_g**2 - 0.5 * gpp_over_g
        return r, g, F

    def end_log_derivative_to_s(self, dlnu_dr: float) -> float:
        """Convert u'/u at r_max into the Robin coefficient s = w'/w of the mapped problem."""
        g, gp_over_g, _ = _map_derivatives(np.array([self.r_max]), self.alpha, self.b, self.beta)
        return float(g[0] * dlnu_dr - 0.5 * gp_over_g[0])


def _x_of_r(r, alpha, b, beta):
    x = alpha * np.log(r)
    if not np.isinf(b):
        x = x + 2.0 * np.sqrt(r / b)
    if not np.isinf(beta):
        x = x + r / beta
    return x


@lru_cache(maxsize=64)
def _log_radius_table(r_min, r_max, alpha, b, beta, points=512):
    """ln r on a uniform x table of one map, for starting Newton close to the root."""
    x = np.linspace(_x_of_r(r_min, alpha, b, beta), _x_of_r(r_max, alpha, b, beta), points)
    return x, np.log(_r_of_x(x, alpha, b, beta))


def _r_of_x(x, alpha, b, beta, start=None):
    """Invert the map by Newton's method on t = ln r.  F(t) = x(e^t) − x is increasing and
    convex in t, so from a start above the root the iterates fall to it monotonically (there is
    no closed form once the square-root term is in; lambertw covers only α ln r + r/β)."""
    if np.isinf(b) and np.isinf(beta):
        return np.exp(x / alpha)
    x = np.asarray(x, dtype=float)
    sb = math.sqrt(b) if not np.isinf(b) else math.inf
    ib = 0.0 if np.isinf(beta) else 1.0 / beta

    def F(t):
        return alpha * t + 2.0 * np.exp(0.5 * t) / sb + np.exp(t) * ib - x

    if start is not None:
        # an interpolated start may lie below the root: one Newton step from below lands above
        t = np.asarray(start, dtype=float).copy()
    else:
        # t = x/α is above the root; the other terms give smaller starts where they are valid
        t = x / alpha
        xp = np.maximum(x, 1e-300)
        for cand in (2.0 * np.log(0.5 * xp * sb) if np.isfinite(sb) else None,
                     np.log(xp / ib) if ib > 0 else None):
            if cand is not None:
                t = np.where((cand < t) & (F(np.minimum(cand, 700.0)) >= 0), cand, t)
        t = np.minimum(t, 700.0)
    for _ in range(80):
        e2 = np.exp(0.5 * t)
        step = (alpha * t + 2.0 * e2 / sb + e2 * e2 * ib - x) / (alpha + e2 / sb + e2 * e2 * ib)
        t = t - step
        if np.max(np.abs(step)) < 1e-15 * max(1.0, float(np.max(np.abs(t)))):
            break
    return np.exp(t)


def _map_derivatives(r, alpha, b, beta):
    """g = dr/dx, g'/g and g''/g (derivatives in x).  With p = dx/dr:
    g'/g = −p'/p², g''/g = 3p'²/p⁴ − p''/p³."""
    r = np.asarray(r, dtype=float)
    if np.isinf(b) and np.isinf(beta):
        one = np.ones_like(r)
        return r / alpha, one / alpha, one / alpha**2
    p = alpha / r
    dp = -alpha / r**2
    ddp = 2.0 * alpha / r**3
    if not np.isinf(b):
        rb = np.sqrt(r * b)
        p = p + 1.0 / rb
        dp = dp - 0.5 / (rb * r)
        ddp = ddp + 0.75 / (rb * r * r)
    if not np.isinf(beta):
        p = p + 1.0 / beta
    return 1.0 / p, -dp / p**2, 3.0 * dp**2 / p**4 - ddp / p**3


@dataclass
class Operator:
    """Symmetric tridiagonal T = B^{-1/2} A B^{-1/2} on one grid, plus what is needed to undo B."""

    grid: MappedGrid
    r: np.ndarray
    g: np.ndarray
    diag_base: np.ndarray  # T's diagonal without the Robin term
    off: np.ndarray
    weight: np.ndarray  # B's diagonal (half at the boundary row)
    mass: float
    potential_term: np.ndarray  # q, with the boundary row's half weight
    a_diag: np.ndarray  # A's diagonal without the Robin term (A, B unsymmetrised: well scaled)
    a_off: float  # A's (constant) off-diagonal

    def diagonal(self, s: float) -> np.ndarray:
        """T's diagonal with the Robin condition w' = s·w at the outer end."""
        d = self.diag_base.copy()
        h = self.grid.h
        d[-1] += -s / (2.0 * self.mass * h) / self.weight[-1]
        return d

    def rayleigh(self, s: float, y: np.ndarray) -> float:
        """Eigenvalue from its eigenvector as a Rayleigh quotient, with the kinetic energy written
        as a sum of squared differences.  Bisection on T resolves an eigenvalue only to
        ~eps·max|T_ii| ~ eps/(μh²r²), which for a level near threshold is not small against |E|;
        this form has no cancellation between large terms, and its error is quadratic in that
        of the eigenvector (variational)."""
        w = y / np.sqrt(self.weight)
        h = self.grid.h
        dw = np.diff(w, prepend=0.0)  # w_0 = 0: Dirichlet at r_min
        kinetic = float(dw @ dw) / (2.0 * self.mass * h * h)
        potential = float((self.potential_term * w) @ w)
        boundary = -s / (2.0 * self.mass * h) * w[-1] ** 2
        return (kinetic + potential + boundary) / float(y @ y)

    def eigenvector(self, s: float, shift: float, iterations: int = 2, scale: float = 1.0) -> np.ndarray:
        """Eigenvector for the eigenvalue nearest ``shift``, by inverse iteration on the
        unsymmetrised pencil (A − σB) x = B x_old with LAPACK dgtsv.

        LAPACK's dstein on T fails here: it perturbs close shifts by ~eps·‖T‖, and the log map
        makes ‖T‖ ~ 1/(h² r_min²) ~ 1e30, while A and B have no such range."""
        # The shift is kept 1e-12 (relative) off the eigenvalue: an exact eigenvalue can make a
        # pivot exactly zero, and an offset δ costs the Rayleigh quotient only ~(δ/gap)².
        offset = 1e-12 * max(abs(shift), 1e-6 * scale)
        a = self.a_diag.copy()
        a[-1] += -s / (2.0 * self.mass * self.grid.h)
        d = a - (shift + offset) * self.weight
        off = np.full(d.size - 1, self.a_off)
        x = np.ones((d.size, 1))
        for _ in range(iterations):
            for _attempt in range(3):
                _, _, _, xn, info = lapack.dgtsv(off, d, off, self.weight[:, None] * x)
                if info == 0 and np.all(np.isfinite(xn)):
                    break
                offset *= 1000.0
                d = a - (shift + offset) * self.weight
            else:
                raise np.linalg.LinAlgError("inverse iteration failed: singular shifted pencil")
            x = xn / np.max(np.abs(xn))
        y = x[:, 0] * np.sqrt(self.weight)
        return y / np.linalg.norm(y)

    def end_sensitivity(self, y_end: float) -> float:
        """∂(eigenvalue)/∂s for an eigenvector with last component y_end (first-order perturbation)."""
        return -(y_end**2) / (2.0 * self.mass * self.grid.h * self.weight[-1])


def build_operator(grid: MappedGrid, v_eff, mass: float) -> Operator:
    """Assemble T for −(1/2μ)u'' + V_eff u = E u on ``grid``; ``v_eff`` is a callable of r (hartree)."""
    r, g, F = grid.nodes()
    h = grid.h
    rho = g * g
    q = rho * v_eff(r) + F / (2.0 * mass)
    kin = 1.0 / (mass * h * h)
    a_diag = kin + q
    weight = rho.copy()
    # Boundary row halved (trapezoid weight), keeping A symmetric with the ghost-point Robin term.
    a_diag[-1] = 0.5 * kin + 0.5 * q[-1]
    weight[-1] = 0.5 * rho[-1]
    sw = np.sqrt(weight)
    diag = a_diag / weight
    off = (-0.5 * kin) / (sw[:-1] * sw[1:])
    qw = q.copy()
    qw[-1] *= 0.5
    return Operator(grid, r, g, diag, off, weight, mass, qw, a_diag, -0.5 * kin)


def _abstol(scale: float) -> float:
    # LAPACK's default tolerance is relative to ‖T‖, which the log map near r → 0 makes ~1e30.
    return max(4e-16 * scale, 1e-300)


def eigenvalues_by_index(diag, off, lo: int, hi: int, scale: float = 1.0, rtol: float = 4e-16):
    """Eigenvalues lo..hi (0-based, ascending) of a symmetric tridiagonal matrix, to an absolute
    tolerance ~1e-16·``scale`` (times rtol/4e-16).

    Direct LAPACK (dstebz): eigh_tridiagonal's checks cost more than the bisection here."""
    m, w, iblock, isplit, info = lapack.dstebz(diag, off, 2, 0.0, 0.0, lo + 1, hi + 1,
                                               _abstol(scale * rtol / 4e-16), "B")
    if info != 0 or m != hi - lo + 1:
        raise np.linalg.LinAlgError(f"dstebz failed (info={info}, found {m} of {hi - lo + 1})")
    return w[:m], iblock[:m], isplit


def eigenvalue_near(diag, off, k: int, guess: float, delta: float, rtol: float = 4e-16):
    """Eigenvalue number k (0-based), searched by bisection in a window guess ± delta.

    A window makes bisection start from a width ~delta instead of the Gershgorin width ~‖T‖,
    which saves two thirds of the iterations.  Falls back to the index search if k is not in it."""
    a, b = guess - delta, guess + delta
    scale = max(abs(guess), delta) * rtol / 4e-16
    for _ in range(8):
        below = count_below(diag, off, a)
        if below > k:
            a -= 4 * (b - a)
            continue
        m, w, iblock, isplit, info = lapack.dstebz(diag, off, 1, a, b, 0, 0, _abstol(scale), "B")
        if info == 0 and below <= k < below + m:
            j = k - below
            return w[j:j + 1], iblock[j:j + 1], isplit
        b += 4 * (b - a)
    return eigenvalues_by_index(diag, off, k, k, scale)


def node_count(y) -> int:
    """Sign changes of an eigenvector, ignoring components at rounding level."""
    big = np.abs(y) > 1e-9 * np.max(np.abs(y))
    v = y[big]
    return int(np.count_nonzero(np.signbit(v[1:]) != np.signbit(v[:-1])))


def count_below(diag, off, value: float) -> int:
    """Number of eigenvalues below ``value`` (Sturm count; the loose tolerance stops bisection early)."""
    big = float(np.max(np.abs(diag)) + 2.0 * np.max(np.abs(off)) + abs(value) + 1.0)
    m, *_ , info = lapack.dstebz(diag, off, 1, -big, value, 0, 0, big, "E")
    if info != 0:
        raise np.linalg.LinAlgError(f"dstebz count failed (info={info})")
    return int(m)


def richardson(values, factors=(1, 2, 4)) -> tuple[float, float]:
    """Extrapolate values computed with steps h/f for f in ``factors`` to h → 0, assuming an
    error series in h², h⁴, …; return (estimate, error estimate).  The error estimate is the
    change from the extrapolation that uses one grid fewer (the finest ones)."""
    v = np.asarray(values, dtype=float)
    best = float(richardson_weights(tuple(factors)) @ v)
    second = float(richardson_weights(tuple(factors[1:])) @ v[1:])
    return best, abs(best - second)


@lru_cache(maxsize=64)
def richardson_weights(factors) -> np.ndarray:
    # Solve Σ w_j = 1, Σ w_j (1/f_j)^{2p} = 0 for p = 1..n-1 (Richardson 1911).
    t = 1.0 / np.asarray(factors, dtype=float) ** 2
    A = np.vander(t, len(t), increasing=True).T
    rhs = np.zeros(len(t))
    rhs[0] = 1.0
    return np.linalg.solve(A, rhs)


# Largest phase (or decay) per coarse step, and largest coarse step: with three grids the
# residual error is ~ θ⁶/(4⁶·2·10⁴) relative (from the series of (2 − 2cos kh)/h²), ≈ 1e-11.
THETA = 0.3
H_MAX = 0.1


def design_grid(v_eff, mass: float, energy: float, r_min: float, R: float,
                theta: float = THETA, h_max: float = H_MAX) -> MappedGrid:
    """Choose the map (α, b, β) and the coarse number of steps so that the local wavenumber in x,
    |2μ g²(V_eff − E) + F|^{1/2}, is resolved to ``theta`` per step everywhere on [r_min, R],
    with as few steps as possible.  The square-root term follows a Coulomb-like region, whose
    local wavelength grows like √r (WKB); the linear term an exponential tail."""
    r = np.geomspace(r_min, R, 240)
    two_mu_ve = 2.0 * mass * (v_eff(r) - energy)
    a, b, beta = _CANDIDATES
    b = b * R
    beta = beta * R
    ok = (b > 4 * r_min) & (beta > 4 * r_min)
    a, b, beta = a[ok, None], b[ok, None], beta[ok, None]
    # all candidates at once: p = dx/dr and its derivatives, with 1/b = 0 and 1/β = 0 for ∞
    ib, ibeta = 1.0 / b, 1.0 / beta
    root = np.sqrt(ib / r)
    p = a / r + root + ibeta
    dp = -a / r**2 - 0.5 * root / r
    ddp = 2.0 * a / r**3 + 0.75 * root / r**2
    g = 1.0 / p
    gp, gpp = -dp / p**2, 3.0 * dp**2 / p**4 - ddp / p**3
    rate = np.sqrt(np.max(np.abs(g * g * two_mu_ve + 0.75 * gp**2 - 0.5 * gpp), axis=1))
    length = (a[:, 0] * math.log(R / r_min) + 2.0 * (np.sqrt(R * ib[:, 0]) - np.sqrt(r_min * ib[:, 0]))
              + (R - r_min) * ibeta[:, 0])
    m = np.ceil(np.maximum(np.maximum(length * rate / theta, length / h_max), 16)).astype(int)
    i = int(np.argmin(m))
    return MappedGrid(r_min, R, float(beta[i, 0]), int(m[i]), float(a[i, 0]), float(b[i, 0]))


def _candidate_maps():
    # (α, b/R, β/R) tried by design_grid; ∞ drops the term
    grid = [(alpha, b, beta) for alpha in (1.0, 0.5, 0.25)
            for b in (math.inf, 1e-2, 1e-3, 1e-4)
            for beta in (math.inf, 1.0, 1e-1)]
    return tuple(np.array(col, dtype=float) for col in zip(*grid))


_CANDIDATES = _candidate_maps()
