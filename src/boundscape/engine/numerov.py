"""Compiled kernels of the radial solver: the softplus map, Numerov's recurrence, its Sturm
count, and the per-grid eigenvalue search (numba, CPU only, cached on disk).

Discrete problem.  On the uniform t grid of :mod:`.grid` the Liouville form w'' = Q w,
Q = 2μg²(V_eff − E) + F, is discretised by Numerov's formula (O(h⁴); Numerov 1924, see
Hairer, Nørsett & Wanner, Solving ODEs I, §III.10):

    a_{i+1} w_{i+1} − b_i w_i + a_{i−1} w_{i−1} = 0,   a = 1 − h²Q/12,  b = 2 + 10h²Q/12,

w_0 = 0 at r_min, and at node N (r = R) a Robin condition w' = σw imposed through a ghost node,
w_{N+1} = w_{N−1} + 2h[σ + h²(Q' + Qσ)/6] w_N (a Taylor series of w_{N±1} with w''' = (Qw)'; its
error, like Numerov's, is an even series in h from h⁴ on, which Richardson extrapolation in
h⁴, h⁶ removes).  In Y = a·w the rows are those of the symmetric tridiagonal matrix
M(E) = tridiag(−1, b/a, −1) (last diagonal symmetrised); M decreases with E, so the number of
negative pivots of its LDLᵀ factorisation — the sign changes of the outward solution — is the
number of discrete eigenvalues below E (a Sturm count).

Eigenvalue search.  Sturm bisection isolates level k; Newton's method then takes over, with the
energy correction of Cooley (Math. Comp. 15, 363 (1961)): integrate outward to the outer
turning point and inward from R, join the two there, and correct E by the residual of the
joining row over dY·M'(E)·Y.  Bound levels are corrected in κ = √(2μ|E|), in which the outer
condition is smooth down to threshold.
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit, types

from . import jitcache

_saved_cache_dir = jitcache.enter()  # this module's kernels are cached by jitcache's rule

__all__ = ["map_point", "map_nodes", "t_of_r", "assemble", "exterior_log_derivative", "sturm_count", "sturm",
           "solve_level", "solve_grid", "design_map", "wkb_energy", "outward_solution", "exterior_tail_moments", "TAIL_SHORT", "TAIL_COULOMB",
           "TAIL_CONFINING", "TAIL_FIXED"]

# Every kernel has one explicit signature: it is compiled (or loaded from the cache) once, when
# its module is imported, and calls with literal arguments from other kernels convert to it
# instead of compiling a specialisation of the whole chain below them (e.g. of solve_level for
# a literal stride 1 or want_u False: three copies, a third of the first compilation).
f8, i8, b1 = types.float64, types.int64, types.boolean
A1, A2 = types.float64[::1], types.float64[:, ::1]
# what solve_grid and solve_level return: energy, status, passes, ∫u², ∫r u², u(R)²
GRID_RESULT = types.Tuple((f8, i8, i8, f8, f8, f8))

# Outer conditions: the decaying exterior solution of a short-range, Coulomb or oscillator tail,
# or a fixed u'/u (the zero-energy problem's −l/R).
TAIL_SHORT, TAIL_COULOMB, TAIL_CONFINING, TAIL_FIXED = 0, 1, 2, 3
# Largest h²Q/12 a row may have: a = 1 − h²Q/12 must stay positive for the Sturm count.
_ROW_LIMIT = 0.9
# Largest compression of the logarithmic stretch near the origin (its knee adds to F).
C_MAX = 4


@njit([(f8,)], cache=True)
def _softplus(y):
    if y > 0.0:
        return y + math.log1p(math.exp(-y))
    return math.log1p(math.exp(y))


@njit([(f8,)], cache=True)
def _logistic(y):
    if y >= 0.0:
        return 1.0 / (1.0 + math.exp(-y))
    e = math.exp(y)
    return e / (1.0 + e)


@njit([(f8, f8, f8, f8,)], cache=True)
def map_point(beta, c, tc, t):
    """r(t) = β·ln(1 + eˢ), s = t − c·ln(1 + e^{tc−t}); returns r, g = dr/dt, g'/g, g''/g."""
    sc = _logistic(tc - t)
    s = t - c * _softplus(tc - t)
    s1 = 1.0 + c * sc
    s2 = -c * sc * (1.0 - sc)
    s3 = c * sc * (1.0 - sc) * (1.0 - 2.0 * sc)
    p = _logistic(s)
    q = _logistic(-s)  # 1 − p without cancellation
    r = beta * _softplus(s)
    g = beta * p * s1
    gp = q * s1 + s2 / s1
    gpp = q * (q - p) * s1 * s1 + 3.0 * q * s2 + s3 / s1
    return r, g, gp, gpp


@njit([(f8, f8, f8, f8, f8, i8, f8, i8,)], cache=True)
def map_nodes(beta, c, tc, t0, h, n, r_end, i_end):
    """Rows r, g², F = ¾(g'/g)² − ½g''/g (and room for Q's two parts, see :func:`assemble`) at
    t0 + i·h, i < n; node ``i_end`` is set to exactly ``r_end`` (the outer condition is
    evaluated there).

    With c an integer, eˢ = eᵗ/(1 + e^{tc−t})^c needs no transcendental function, and eᵗ, e^{tc−t}
    are carried from node to node by multiplication, re-anchored every 64 nodes (so their error
    stays at rounding level): one log1p per node, for r = β·ln(1 + eˢ)."""
    out = np.empty((5, n))
    ci = int(c)
    step = math.exp(h)
    et = math.exp(t0)
    etc = math.exp(tc)
    for i in range(n):
        if i % 64 == 0:
            et = math.exp(t0 + i * h)  # re-anchored now and then: the drift stays at rounding level
        eu = etc / et  # e^{tc − t}
        sc = eu / (1.0 + eu) if eu < 1e300 else 1.0  # logistic(tc − t)
        base = 1.0 + eu
        den = 1.0
        for _ in range(ci):
            den *= base
        es = et / den  # e^s
        s1 = 1.0 + c * sc
        s2 = -c * sc * (1.0 - sc)
        s3 = -s2 * (1.0 - 2.0 * sc)
        p = es / (1.0 + es)  # logistic(s)
        q = 1.0 / (1.0 + es)
        inv = 1.0 / s1
        g = beta * p * s1
        gp = q * s1 + s2 * inv
        gpp = q * (q - p) * s1 * s1 + 3.0 * q * s2 + s3 * inv
        out[0, i] = beta * math.log1p(es)
        out[1, i] = g * g
        out[2, i] = 0.75 * gp * gp - 0.5 * gpp
        et *= step
    if 0 <= i_end < n:
        out[0, i_end] = r_end
    return out


@njit([(f8, f8, f8, f8,)], cache=True)
def t_of_r(beta, c, tc, r):
    """Invert the map (one point): s from the softplus in closed form, t by Newton's method
    (s(t) is increasing and convex-concave with s' ≥ 1, so a few steps suffice)."""
    y = r / beta
    if y > 30.0:
        s = y + math.log(-math.expm1(-y))
    else:
        s = math.log(math.expm1(y))
    t = s if s >= tc else (s + c * tc) / (1.0 + c)
    for _ in range(100):
        f = t - c * _softplus(tc - t) - s
        step = f / (1.0 + c * _logistic(tc - t))
        t -= step
        if abs(step) <= 1e-15 * (1.0 + abs(t)):
            break
    return t


@njit([(A2, A1, f8, i8,)], cache=True)
def assemble(a, v, mass, l):
    """Rows 3 and 4 of ``a`` (from :func:`map_nodes`): Q0 = 2μg²V_eff + F and ρ = 2μg², so that
    Q(E) = Q0 − E·ρ; ``v`` is V at the nodes."""
    cen = l * (l + 1.0)
    for i in range(a.shape[1]):
        g2 = a[1, i]
        ri = a[0, i]
        a[4, i] = 2.0 * mass * g2
        a[3, i] = a[4, i] * v[i] + g2 * cen / (ri * ri) + a[2, i]


@njit([(i8, i8, f8, f8, f8, f8,)], cache=True)
def exterior_log_derivative(kind, l, mass, p, energy, R):
    """u'/u at R of the exterior solution (see :mod:`.exterior`, whose formulas these mirror):
    short range r·k_l(κr) ∝ e^{−z} Σ_j (l+j)!/(j!(l−j)!)(2z)^{−j}, z = κR (A&S 10.2.15);
    Coulomb −κ + Zμ/(κR) (p = Z); oscillator −μωR + (l+1)/R (p = ω); fixed: p itself."""
    if kind == TAIL_FIXED:
        return p
    if kind == TAIL_CONFINING:
        return -mass * p * R + (l + 1.0) / R
    kappa = math.sqrt(2.0 * mass * max(-energy, 0.0))
    if kind == TAIL_COULOMB:
        if kappa == 0.0:
            return 0.0
        return -kappa + p * mass / (kappa * R)
    if kappa == 0.0:
        return -l / R
    z = kappa * R
    # z^l Σ_j a_j z^{−j} = Σ_j a_j z^{l−j}: no overflow for small z
    a = 1.0
    poly = 0.0
    dpoly = 0.0
    for j in range(l + 1):
        poly += a * z ** (l - j)
        if l - j > 0:
            dpoly += a * (l - j) * z ** (l - j - 1)
        a *= (l + j + 1.0) * (l - j) / (2.0 * (j + 1.0))
    return kappa * (-1.0 - l / z + dpoly / poly)


@njit([(i8, i8, f8, f8, f8, f8, f8, f8,)], cache=True)
def _sigma_t(kind, l, mass, p, energy, R, g_end, gp_end):
    # w'/w in t at the outer node, from u'/u in r: u = g^{1/2} w
    return g_end * exterior_log_derivative(kind, l, mass, p, energy, R) - 0.5 * gp_end


@njit([(A1, A1, i8, i8, f8, f8, i8, i8, f8, f8, f8, f8, f8,)], cache=True)
def _last_excess(q0, rho, stride, n, h, energy, kind, l, mass, p, R, g_end, gp_end):
    """Symmetrised diagonal of the last row (ghost node carrying the Robin condition) minus 1,
    formed without cancellation (b/a − 2 = c/(1 − c/12) with c = h²Q): it sets Y_{N−1}/Y_N."""
    h2 = h * h
    i_m = (n - 1) * stride
    i_n = n * stride
    i_g = (n + 1) * stride
    qm = q0[i_m] - energy * rho[i_m]
    qn = q0[i_n] - energy * rho[i_n]
    qg = q0[i_g] - energy * rho[i_g]
    am = 1.0 - h2 * qm / 12.0
    an = 1.0 - h2 * qn / 12.0
    ag = 1.0 - h2 * qg / 12.0
    sig = _sigma_t(kind, l, mass, p, energy, R, g_end, gp_end)
    dq = (qg - qm) / (2.0 * h)
    cn = 2.0 * h * (sig + h2 * (dq + qn * sig) / 6.0)
    excess = h2 * qn / an + (h2 * (qg - qm) / 12.0) / am - ag * cn / an
    return excess / (1.0 + ag / am)


@njit([(A1, A1, i8, i8, f8, f8, i8, i8, f8, f8, f8, f8, f8,)], cache=True)
def sturm_count(q0, rho, stride, n, h, energy, kind, l, mass, p, R, g_end, gp_end):
    """Number of discrete eigenvalues below ``energy`` (negative pivots of M(E) = LDLᵀ)."""
    h2 = h * h
    count = 0
    piv = 1.0
    for j in range(1, n):
        i = j * stride
        cq = h2 * (q0[i] - energy * rho[i])
        d = (2.0 + 10.0 * cq / 12.0) / (1.0 - cq / 12.0)
        piv = d - (1.0 / piv if j > 1 else 0.0)
        if piv == 0.0:
            piv = -1e-300  # an exact zero pivot: count it, as LAPACK's dstebz does
        if piv < 0.0:
            count += 1
    last = 1.0 + _last_excess(q0, rho, stride, n, h, energy, kind, l, mass, p, R, g_end, gp_end)
    if last - (1.0 / piv if n > 1 else 0.0) <= 0.0:
        count += 1
    return count


@njit([(A1, A1, i8, i8, f8,)], cache=True)
def _floor_energy(q0, rho, stride, n, h):
    """Lowest energy at which every row keeps h²Q/12 ≤ _ROW_LIMIT (below it the grid cannot hold a level)."""
    h2 = h * h
    lowest = -1e300
    for j in range(1, n + 2):
        i = j * stride
        # h²(q0 − E ρ)/12 ≤ L  ⇔  E ≥ (q0 − 12L/h²)/ρ
        if rho[i] > 0.0:
            e = (q0[i] - 12.0 * _ROW_LIMIT / h2) / rho[i]
            if e > lowest:
                lowest = e
    return lowest


@njit([(A1, A1, A1, A1, i8, i8, f8, f8, i8, i8, f8, f8, f8, f8, f8, A1, b1,)], cache=True)
def _join(q0, rho, r, g2, stride, n, h, energy, kind, l, mass, p, R, g_end, gp_end, work, want_u):
    """One Cooley pass at ``energy``: outward to the outer turning point, inward from R.

    Returns (residual·Y_m, −Y·M'(E)·Y, nodes, ∫u² dr, ∫r u² dr, u(R)²); the joined w is left in
    ``work`` (Y/a) when ``want_u``.  Integrals by Simpson's rule in t (n even)."""
    h2 = h * h
    # joining node: the outermost classically allowed node
    m = -1
    for j in range(n - 1, 1, -1):
        i = j * stride
        if q0[i] - energy * rho[i] < 0.0:
            m = j
            break
    if m < 0:
        qmin = 1e300
        for j in range(2, n - 1):
            i = j * stride
            qv = q0[i] - energy * rho[i]
            if qv < qmin:
                qmin = qv
                m = j
        if m < 0:
            m = n // 2
    m = max(2, min(m, n - 2))
    # outward, Y_0 = 0, Y_1 = 1, summing as it goes (the sums and w of nodes 1..m).  The
    # recurrence is carried in differences, ΔY_j = ΔY_{j−1} + (b/a − 2)_j Y_j with
    # (b/a − 2) = c/(1 − c/12): the E-dependence sits in c = h²Q, which Y_{j+1} = (b/a)Y_j − Y_{j−1}
    # would add to 2 and lose to rounding on fine grids (the summed form; Blatt, J. Comput.
    # Phys. 1, 382 (1967), reference from memory).
    dm_o = norm_o = first_o = 0.0
    nodes = 0
    work[0] = 0.0
    y_prev, y, dy = 0.0, 1.0, 1.0  # Y_{j−1}, Y_j, Y_j − Y_{j−1}
    for j in range(1, m + 1):
        i = j * stride
        cq = h2 * (q0[i] - energy * rho[i])
        inv = 1.0 / (1.0 - cq / 12.0)
        w = y * inv
        work[j] = w
        wt = 4.0 if j % 2 == 1 else 2.0
        u2 = g2[i] * w * w
        dm_o += h2 * rho[i] * w * w
        norm_o += wt * u2
        first_o += wt * u2 * r[i]
        if y * y_prev < 0.0:
            nodes += 1
        dy = dy + cq * inv * y  # now Y_{j+1} − Y_j
        y_prev, y = y, y + dy
        if abs(y) > 1e150:
            y *= 1e-150
            y_prev *= 1e-150
            dy *= 1e-150
            dm_o *= 1e-300
            norm_o *= 1e-300
            first_o *= 1e-300
            for jj in range(j + 1):
                work[jj] *= 1e-150
    y_out_m, dy_out = y_prev, dy  # Y_m and Y_{m+1} − Y_m
    # inward from w_N = 1, Y_{N−1} from the last row (the sums and w of nodes N..m+1), in
    # backward differences D_j = Y_{j−1} − Y_j = D_{j+1} + (b/a − 2)_j Y_j
    i_n = n * stride
    an = 1.0 - h2 * (q0[i_n] - energy * rho[i_n]) / 12.0
    z = an  # Y_N
    dz = _last_excess(q0, rho, stride, n, h, energy, kind, l, mass, p, R, g_end, gp_end) * an  # Y_{N−1} − Y_N
    z_prev = z + dz  # Y_{N−1}
    dm_i = 0.0
    norm_i = g2[i_n] * 1.0
    first_i = norm_i * r[i_n]
    work[n] = 1.0
    for j in range(n - 1, m, -1):
        # here z = Y_{j+1}, z_prev = Y_j, dz = Y_j − Y_{j+1}
        i = j * stride
        cq = h2 * (q0[i] - energy * rho[i])
        inv = 1.0 / (1.0 - cq / 12.0)
        w = z_prev * inv
        work[j] = w
        wt = 4.0 if j % 2 == 1 else 2.0
        u2 = g2[i] * w * w
        dm_i += h2 * rho[i] * w * w
        norm_i += wt * u2
        first_i += wt * u2 * r[i]
        if z * z_prev < 0.0:
            nodes += 1
        dz = dz + cq * inv * z_prev  # now Y_{j−1} − Y_j
        z, z_prev = z_prev, z_prev + dz
        if abs(z_prev) > 1e150:
            z *= 1e-150
            z_prev *= 1e-150
            dz *= 1e-150
            dm_i *= 1e-300
            norm_i *= 1e-300
            first_i *= 1e-300
            for jj in range(j, n + 1):
                work[jj] *= 1e-150
    # now z = Y^in_{m+1}, z_prev = Y^in_m, dz = Y^in_m − Y^in_{m+1}
    scale = y_out_m / z_prev
    residual = -dz * scale - dy_out  # Y^in_{m+1} − Y^out_{m+1}, from the differences (Y_m cancels)
    if z * scale * y_out_m < 0.0:
        nodes += 1
    s2 = scale * scale
    dm = dm_o + s2 * dm_i
    norm = norm_o + s2 * norm_i
    first = first_o + s2 * first_i
    if want_u:
        for j in range(m + 1, n + 1):
            work[j] *= scale
    y_last = an * scale
    w_last = scale
    # the last row's derivative in E, by a central difference of its (scalar) closed form
    de = 1e-7 * max(abs(energy), 1e-12)
    dlast = (_last_excess(q0, rho, stride, n, h, energy + de, kind, l, mass, p, R, g_end, gp_end)
             - _last_excess(q0, rho, stride, n, h, energy - de, kind, l, mass, p, R, g_end, gp_end)) / (2.0 * de)
    dm -= dlast * y_last * y_last
    u_end2 = math.sqrt(g2[n * stride]) * w_last * w_last
    return residual * y_out_m, dm, nodes, norm * h / 3.0, first * h / 3.0, u_end2


@njit([(A1, A1, i8, i8, f8, i8, f8, f8, f8, b1, f8, i8, i8, f8, f8, f8, f8, f8,)], cache=True)
def _isolate(q0, rho, stride, n, h, k, energy, lo, top, kappa_mode, scale, kind, l, mass, p, R, g_end, gp_end):
    """A bracket (e_lo, e_hi) holding level k alone (Sturm counts k and k + 1 at its ends),
    narrow enough for Newton's method: grown geometrically from ``energy``, then bisected
    (geometrically in κ).  Returns (e_lo, e_hi, status, counts): status 1 if level k lies below
    ``lo``, 4 if it is not below ``top``.  One count per step, from one call site (a smaller
    compiled kernel)."""
    e_lo, e_hi = lo, top
    c_lo, c_hi = -1, -1
    trial = energy
    step = max(abs(energy) * 0.5, 1e-3 * scale)
    at_floor = False
    at_top = False
    counts = 0
    for _ in range(400):
        ct = sturm_count(q0, rho, stride, n, h, trial, kind, l, mass, p, R, g_end, gp_end)
        counts += 1
        if ct > k:
            if at_floor:
                return e_lo, e_hi, 1, counts
            e_hi, c_hi = trial, ct
        else:
            if at_top:
                return e_lo, e_hi, 4, counts
            e_lo, c_lo = trial, ct
        if c_lo < 0:  # downward from the lowest energy counted above k
            if kappa_mode and e_hi < 0.0:
                trial = -((math.sqrt(-2.0 * mass * e_hi) * 1.6) ** 2) / (2.0 * mass)
            else:
                trial = e_hi - step
                step *= 2.0
            if trial <= lo:
                trial = lo
                at_floor = True
        elif c_hi < 0:  # upward from the highest energy counted at or below k
            if kappa_mode:
                kap = 0.25 * math.sqrt(-2.0 * mass * e_lo) if e_lo < 0.0 else 0.0
                trial = -kap * kap / (2.0 * mass)
                if kap < 1e-9 * math.sqrt(2.0 * mass * abs(lo)) or trial >= top:
                    trial = top if math.isfinite(top) else 0.0
                    at_top = True
            else:
                trial = e_lo + step
                step *= 2.0
                if trial >= top:
                    trial = top
                    at_top = True
        else:
            if kappa_mode:
                klo = math.sqrt(-2.0 * mass * e_lo)
                khi = math.sqrt(-2.0 * mass * min(e_hi, 0.0))
                narrow = klo - khi <= 0.05 * klo
                kmid = math.sqrt(klo * khi) if khi > 1e-3 * klo else 0.5 * (klo + khi)
                mid = -kmid * kmid / (2.0 * mass)
            else:
                narrow = e_hi - e_lo <= 0.02 * max(abs(e_lo), abs(e_hi))
                mid = 0.5 * (e_lo + e_hi)
            if (c_lo == k and c_hi == k + 1 and narrow) or not (e_lo < mid < e_hi):
                break
            trial = mid
    return e_lo, e_hi, 0, counts


@njit([(A1, A1, A1, A1, i8, i8, f8, i8, f8, f8, f8, b1, b1, f8, i8, i8, f8, f8, f8, f8, f8, A1, b1,)], cache=True)
def solve_level(q0, rho, r, g2, stride, n, h, k, energy, lo, hi, locate, kappa_mode, scale,
                kind, l, mass, p, R, g_end, gp_end, work, want_u):
    """Eigenvalue k (0-based) of the discrete problem on one grid (nodes every ``stride``-th
    of the arrays, ``n`` steps of ``h``).

    ``locate``: isolate level k by Sturm bisection first, starting at ``energy`` within the
    bracket (lo, hi) (±inf: unknown); otherwise ``energy`` is trusted as a start close to it.
    ``kappa_mode``: Newton in κ = √(−2μE) (bound levels); else in E.

    Returns (energy, status, passes, ∫u² dr, ∫r u² dr, u(R)²) (the integrals over the box, of
    the joined solution in its own normalisation): status 0 converged, 1 level k lies below the
    grid's floor (energy is then the floor, an upper bound), 2
    Newton did not settle, 3 wrong node count, 4 no level k below the
    grid's top (hi, or threshold).
    ``work`` (≥ n + 2) holds the joined w when ``want_u``."""
    passes = 0
    floor = _floor_energy(q0, rho, stride, n, h)
    if lo < floor:
        lo = floor
    top = hi
    if kappa_mode and top > 0.0:
        top = 0.0
    if locate:
        if energy <= lo or energy >= top:
            if math.isfinite(top):
                energy = lo + 0.5 * (top - lo) if lo > -1e299 else top - 1.0
            else:
                energy = lo + 1.0
        e_lo, e_hi, status, spent = _isolate(q0, rho, stride, n, h, k, energy, lo, top, kappa_mode, scale, kind, l,
                                             mass, p, R, g_end, gp_end)
        passes += spent
        if status != 0:
            return (e_lo if status == 1 else energy), status, passes, 0.0, 0.0, 0.0
        lo, hi = e_lo, e_hi
        if kappa_mode:
            klo = math.sqrt(-2.0 * mass * e_lo)
            khi = math.sqrt(-2.0 * mass * min(e_hi, 0.0))
            kmid = 0.5 * (klo + khi)
            energy = -kmid * kmid / (2.0 * mass)
        else:
            energy = 0.5 * (e_lo + e_hi)
    # Newton (Cooley's correction), safeguarded by the bracket
    norm = 0.0
    first = 0.0
    uend2 = 0.0
    last_step = 1e300
    status = 2
    for it in range(60):
        num, den, nodes, norm, first, uend2 = _join(q0, rho, r, g2, stride, n, h, energy, kind, l, mass, p, R,
                                                g_end, gp_end, work, want_u)
        passes += 1
        # ΔE = −λ/λ' with λ = Y·M·Y/Y·Y = −residual·Y_m/Y·Y and λ' = Y·M'·Y/Y·Y = −den/Y·Y
        de = -num / den if den != 0.0 else 0.0
        if kappa_mode and energy < 0.0:
            kap = math.sqrt(-2.0 * mass * energy)
            knew = kap - mass * de / kap if kap > 0.0 else 0.0
            new = -knew * knew / (2.0 * mass) if knew > 0.0 else 0.5 * energy
            if knew <= 0.0:
                new = 0.25 * energy
        else:
            new = energy + de
        if not (lo < new < hi) or (kappa_mode and new >= 0.0):
            # out of the bracket: halve it with a Sturm count
            mid = 0.5 * (lo + hi) if (math.isfinite(lo) and math.isfinite(hi)) else energy + 0.5 * de
            if not (math.isfinite(lo) and math.isfinite(hi)):
                return energy, 2, passes, norm, first, uend2
            cm = sturm_count(q0, rho, stride, n, h, mid, kind, l, mass, p, R, g_end, gp_end)
            passes += 1
            if cm > k:
                hi = mid
            else:
                lo = mid
            energy = mid
            last_step = 1e300
            continue
        step = abs(new - energy)
        energy = new
        # relative to |E| (with a floor for eigenvalues near zero in E mode): stop once a step is
        # both small and a thousandth of the one before (Newton's quadratic contraction: the
        # next one would be at roundoff), or at roundoff, or when steps stop shrinking there
        # (E mode serves the zero-energy problem, whose μ near zero decide counts and critical
        # parameters: there only roundoff ends the iteration)
        size = abs(energy) if kappa_mode else abs(energy) + 1e-4 * scale
        quick = 1e-9 if kappa_mode else 1e-13
        if (step <= quick * size and step <= 1e-3 * last_step) or step <= 4e-16 * size or (
                step <= 1e-8 * size and step >= 0.5 * last_step):
            # after isolation the bracket's Sturm counts identify the level; else its nodes must
            status = 0 if (nodes == k or (locate and lo < energy < hi)) else 3
            break
        last_step = step
    if status == 2 and locate and math.isfinite(lo) and math.isfinite(hi):
        # Newton did not settle inside an isolating bracket (two close levels can pull Cooley's
        # correction astray): bisect on Sturm counts to roundoff, then one pass for the sums
        for _ in range(200):
            mid = 0.5 * (lo + hi)
            if not (lo < mid < hi) or hi - lo <= 4e-16 * max(abs(lo), abs(hi), 1e-300):
                break
            if sturm_count(q0, rho, stride, n, h, mid, kind, l, mass, p, R, g_end, gp_end) > k:
                hi = mid
            else:
                lo = mid
            passes += 1
        energy = 0.5 * (lo + hi)
        num, den, nodes, norm, first, uend2 = _join(q0, rho, r, g2, stride, n, h, energy, kind, l, mass, p, R,
                                                    g_end, gp_end, work, want_u)
        passes += 1
        status = 0  # the Sturm counts at the bracket's ends identify level k
    return energy, status, passes, norm, first, uend2


@njit([(A2, A1, i8, i8, f8, f8,)], cache=True)
def sturm(a, prm, stride, n, h, energy):
    """:func:`sturm_count` on the arrays of :func:`map_nodes` and the parameters of :func:`solve_grid`."""
    return sturm_count(a[3], a[4], stride, n, h, energy, int(prm[2]), int(prm[1]), prm[0], prm[3], prm[4],
                       prm[5], prm[6])


@njit([(A2, A1, i8, i8, f8, i8, f8, f8, A1, b1,)], cache=True)
def solve_grid(a, prm, stride, n, h, k, start, near, work, want_u):
    """Level k on the grid of every ``stride``-th node of ``a``: Newton's method from ``start``,
    and if that does not settle on a level with k nodes, Sturm bisection from ``near`` first.

    ``prm`` = (μ, l, tail kind, tail parameter, R, g(R), g'/g(R), energy scale, κ mode, lo, hi).
    Returns (energy, status, passes, ∫u² dr, ∫r u² dr, u(R)²) as :func:`solve_level`."""
    mass, l, kind, p, R, g_end, gp_end, scale = prm[0], int(prm[1]), int(prm[2]), prm[3], prm[4], prm[5], prm[6], prm[7]
    kappa_mode = prm[8] != 0.0
    lo, hi = prm[9], prm[10]
    spent = 0
    for attempt in range(2):  # one call site: the kernel is compiled (and inlined) once
        out = solve_level(a[3], a[4], a[0], a[1], stride, n, h, k, start if attempt == 0 else near, lo, hi,
                          attempt == 1, kappa_mode, scale, kind, l, mass, p, R, g_end, gp_end, work, want_u)
        spent += out[2]
        if out[1] == 0 or attempt == 1:
            return out[0], out[1], spent, out[3], out[4], out[5]
    return out[0], out[1], spent, out[3], out[4], out[5]


@njit([(A1, A1, i8, i8, f8, f8,)], cache=True)
def outward_solution(q0, rho, stride, n, h, energy):
    """The outward Numerov solution w_0..w_N at ``energy`` (w_0 = 0), scaled to max |w| = 1."""
    h2 = h * h
    y = np.zeros(n + 1)
    w = np.zeros(n + 1)
    y[1] = 1e-300
    for j in range(1, n):
        i = j * stride
        cq = h2 * (q0[i] - energy * rho[i])
        d = (2.0 + 10.0 * cq / 12.0) / (1.0 - cq / 12.0)
        y[j + 1] = d * y[j] - y[j - 1]
        if abs(y[j + 1]) > 1e250:
            for jj in range(j + 2):
                y[jj] *= 1e-250
    big = 0.0
    for j in range(n + 1):
        i = j * stride
        w[j] = y[j] / (1.0 - h2 * (q0[i] - energy * rho[i]) / 12.0)
        if abs(w[j]) > big:
            big = abs(w[j])
    for j in range(n + 1):
        w[j] /= big
    return w


@njit([(A1, A1, f8, f8, i8, f8, f8, f8, f8, A1, f8,)], cache=True)
def design_map(rs, veff, energy, mass, l, r_min, R, theta, h_max, betas, r_core):
    """Choose β among ``betas``, the inner compression c and the coarse step h for the map, so
    that the local wavenumber |Q|^{1/2} in t is resolved to ``theta`` per step on [r_min, R].

    Samples (rs, veff) of V_eff; outside the inner knee r_core the map is the softplus
    (g = β(1 − e^{−r/β}), F = (1 − p²)/4); inside it the logarithmic stretch is compressed by
    1 + c, where Q → (l + ½)²(1 + c)² and nothing oscillates.  Returns (β, c, tc, t0, t1, n)."""
    best = 1e300
    best_beta = betas[0]
    best_h = h_max
    best_c = 0.0
    inner = math.log(max(r_core, r_min) / r_min)  # the logarithmic stretch below the knee
    for b in range(betas.size):
        beta = betas[b]
        kmax = 0.0
        for j in range(rs.size):
            rj = rs[j]
            if rj < r_core or rj > R:
                continue
            p = -math.expm1(-rj / beta)
            g = beta * p
            F = 0.25 * (1.0 - p * p)
            qv = abs(2.0 * mass * g * g * (veff[j] - energy) + F)
            if qv > kmax * kmax:
                kmax = math.sqrt(qv)
        h = min(theta / kmax, h_max) if kmax > 0.0 else h_max
        # below the knee Q → (l + ½)²(1 + c)²: compress as far as θ allows
        c = float(max(0, min(int(theta / (h * (l + 0.5)) - 1.0), C_MAX)))
        y = R / beta
        s1 = y + math.log(-math.expm1(-y)) if y > 30.0 else math.log(math.expm1(y))
        y0 = max(r_core, r_min) / beta
        s0 = y0 + math.log(-math.expm1(-y0)) if y0 > 30.0 else math.log(math.expm1(y0))
        steps = ((s1 - s0) + inner / (1.0 + c)) / h
        if steps < best:
            best = steps
            best_beta = beta
            best_h = h
            best_c = c
    beta = best_beta
    h = best_h
    c = best_c
    y0 = r_core / beta
    tc = y0 + math.log(-math.expm1(-y0)) if y0 > 30.0 else math.log(math.expm1(y0))
    if r_core <= r_min * 4.0:
        c = 0.0
    t0 = t_of_r(beta, c, tc, r_min)
    t1 = t_of_r(beta, c, tc, R)
    n = int(math.ceil((t1 - t0) / h))
    n = max(16, n + (n % 2))
    return beta, c, tc, t0, t1, n


@njit([(A1, A1, f8, f8, f8,)], cache=True)
def _action(rs, vlanger, mass, e, dln):
    total = 0.0
    for j in range(rs.size):
        k2 = 2.0 * mass * (e - vlanger[j])
        if k2 > 0.0:
            total += math.sqrt(k2) * rs[j]
    return total * dln


@njit([(A1, A1, f8, f8, f8, f8, i8, f8,)], cache=True)
def wkb_energy(rs, vlanger, mass, phase, e_lo, e_hi, iterations, dln):
    """Energy at which ∫√(2μ(E − V_L)) dr = ``phase`` (Langer's V_L; a sum in ln r over the
    log-spaced samples, step ``dln``), by bisection in [e_lo, e_hi]; NaN if even e_hi gives less phase."""
    if _action(rs, vlanger, mass, e_hi, dln) < phase:
        return math.nan
    a, b = e_lo, e_hi
    for _ in range(iterations):
        mid = 0.5 * (a + b)
        if _action(rs, vlanger, mass, mid, dln) < phase:
            a = mid
        else:
            b = mid
    return 0.5 * (a + b)


@njit([(i8, f8, f8, f8, A1, A1, i8,)], cache=True)
def exterior_tail_moments(l, mass, energy, R, nodes, weights, panels):
    """∫_R^∞ (u/u(R))² dr and ∫_R^∞ r (u/u(R))² dr of the short-range exterior solution
    u ∝ e^{−z} z^{−l} Σ_j a_j z^{l−j} (z = κr, A&S 10.2.15), by Gauss–Legendre (``nodes``,
    ``weights`` on [−1, 1]) on ``panels`` equal panels in v, where 2κ(r − R) = ε(eᵛ − 1), out to
    R + 35/κ ((u/u(R))² < e^{−70} there).  Mirrors :meth:`.exterior.ShortRange.tail_moments`
    (scipy's kve and quad), which a test compares."""
    kappa = math.sqrt(2.0 * mass * max(-energy, 0.0))
    if kappa == 0.0:
        return 0.0, 0.0
    z0 = kappa * R
    # the decay e^{−s} and, near threshold (ε = 2κR), the power-law shape (R/r)^{2l} both vary
    # on a scale of order one in v
    eps = min(1.0, 2.0 * z0)
    v_max = math.log1p(70.0 / eps)
    width = v_max / panels

    def poly(z):
        a = 1.0
        total = 0.0
        for j in range(l + 1):
            total += a * z ** (l - j)
            a *= (l + j + 1.0) * (l - j) / (2.0 * (j + 1.0))
        return total

    p0 = poly(z0)
    t0 = 0.0
    t1 = 0.0
    for panel in range(panels):
        mid = (panel + 0.5) * width
        for q in range(nodes.size):
            v = mid + 0.5 * width * nodes[q]
            ev = math.exp(v)
            sv = eps * (ev - 1.0)
            r = R + sv / (2.0 * kappa)
            ratio = math.exp(-0.5 * sv) * (z0 / (kappa * r)) ** l * poly(kappa * r) / p0
            f = ratio * ratio * eps * ev / (2.0 * kappa) * 0.5 * width * weights[q]  # dr = ε eᵛ dv / 2κ
            t0 += f
            t1 += f * r
    return t0, t1


jitcache.leave(_saved_cache_dir)
