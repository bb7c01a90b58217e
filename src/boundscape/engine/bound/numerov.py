"""Compiled kernels of Numerov's method on one grid: the recurrence, its Sturm count, and one
Cooley pass of the eigenvalue search (numba, CPU only, cached on disk; the search itself is
:mod:`.search`).

Discrete problem.  On the uniform t grid of :mod:`.mapping` the Liouville form w'' = Q w,
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
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit, types

from .. import jitcache
from ..potentials.exterior import log_derivative

_saved_cache_dir = jitcache.enter()  # this module's kernels are cached by jitcache's rule

__all__ = ["assemble", "sturm_count", "floor_energy", "last_excess", "join", "outward_solution", "GRID_RESULT",
           "f8", "i8", "b1", "A1", "A2"]

# Every kernel has one explicit signature: it is compiled (or loaded from the cache) once, when
# its module is imported, and calls with literal arguments from other kernels convert to it
# instead of compiling a specialisation of the whole chain below them (e.g. of
# search.grid_eigenvalue for a literal stride 1 or want_u False: three copies, a third of the
# first compilation).
f8, i8, b1 = types.float64, types.int64, types.boolean
A1, A2 = types.float64[::1], types.float64[:, ::1]
# what solve_grid and grid_eigenvalue return: energy, status, passes, ∫u², ∫r u², u(R)²
GRID_RESULT = types.Tuple((f8, i8, i8, f8, f8, f8))

# Largest h²Q/12 a row may have: a = 1 − h²Q/12 must stay positive for the Sturm count.
_ROW_LIMIT = 0.9


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


@njit([(i8, i8, f8, f8, f8, f8, f8, f8,)], cache=True)
def _sigma_t(kind, l, mass, p, energy, R, g_end, gp_end):
    # w'/w in t at the outer node, from u'/u in r: u = g^{1/2} w
    return g_end * log_derivative(kind, l, mass, p, energy, R) - 0.5 * gp_end


@njit([(A1, A1, i8, i8, f8, f8, i8, i8, f8, f8, f8, f8, f8,)], cache=True)
def last_excess(q0, rho, stride, n, h, energy, kind, l, mass, p, R, g_end, gp_end):
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
    last = 1.0 + last_excess(q0, rho, stride, n, h, energy, kind, l, mass, p, R, g_end, gp_end)
    if last - (1.0 / piv if n > 1 else 0.0) <= 0.0:
        count += 1
    return count


@njit([(A1, A1, i8, i8, f8,)], cache=True)
def floor_energy(q0, rho, stride, n, h):
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
def join(q0, rho, r, g2, stride, n, h, energy, kind, l, mass, p, R, g_end, gp_end, work, want_u):
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
    dz = last_excess(q0, rho, stride, n, h, energy, kind, l, mass, p, R, g_end, gp_end) * an  # Y_{N−1} − Y_N
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
    dlast = (last_excess(q0, rho, stride, n, h, energy + de, kind, l, mass, p, R, g_end, gp_end)
             - last_excess(q0, rho, stride, n, h, energy - de, kind, l, mass, p, R, g_end, gp_end)) / (2.0 * de)
    dm -= dlast * y_last * y_last
    u_end2 = math.sqrt(g2[n * stride]) * w_last * w_last
    return residual * y_out_m, dm, nodes, norm * h / 3.0, first * h / 3.0, u_end2


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


jitcache.leave(_saved_cache_dir)
