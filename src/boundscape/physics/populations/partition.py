"""Internal partition functions of a bound particle: over a complete level set, with energies
measured from the (screened) continuum, and Planck–Larkin's over unscreened hydrogen-like levels.

Every energy here is in one unit (hartree in atomic units; the effective unit of a
semiconductor's problem) and kT in the same unit; a temperature array gives an array.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.special import logsumexp, zeta

from ...checks import positive

__all__ = ["partition_function", "log_partition_function", "omitted_partition_bound", "bound_state_count",
           "planck_larkin_partition_function", "log_planck_larkin_partition_function", "SPIN_WEIGHT"]

# Spin states of a bound spin-½ particle: a level (n, l) holds 2(2l + 1) states.
SPIN_WEIGHT = 2


def _weights(levels, spin_weight):
    return spin_weight * (2 * np.asarray(levels.l) + 1).astype(float)


def log_partition_function(levels, kT, *, spin_weight: float = SPIN_WEIGHT):
    """ln U, U = Σ over the set's levels of g (2l + 1) e^{−E_nl/kT}, E < 0 from the continuum.

    Parameters
    ----------
    levels : LevelSet
        From :func:`boundscape.level_set` (``energy``, ``l``); levels whose energy is NaN (not
        converged) are left out, and flagged by the set's ``status``.
    kT : float or array_like
        Temperature in the levels' energy unit.
    spin_weight : float
        g, the spin states per orbital (2 for a spin-½ particle; 1 for an orbital sum).

    Returns
    -------
    float or ndarray
        −inf where the set holds no level (nothing bound: U = 0).  Computed as a log-sum-exp, so
        that e^{|E|/kT} never overflows.
    """
    kT = positive("kT", kT)
    energy = np.asarray(levels.energy, dtype=float)
    keep = np.isfinite(energy)
    energy, weights = energy[keep], _weights(levels, spin_weight)[keep]
    kTs = np.atleast_1d(kT)
    if energy.size == 0:
        out = np.full(kTs.shape, -np.inf)
    else:
        out = logsumexp(-energy[None, :] / kTs[:, None], b=weights[None, :], axis=1)
    return out.reshape(np.shape(kT)) if np.ndim(kT) else float(out[0])


def partition_function(levels, kT, *, spin_weight: float = SPIN_WEIGHT):
    """U = Σ over the set's bound levels of g (2l + 1) e^{−E_nl/kT}, E_nl < 0 measured from the
    screened continuum (the internal partition function whose Saha balance is
    n_Z/n_{Z−1} = N_e/(n_e U); see :mod:`.saha`).  Overflows to inf where kT ≪ |E_1s|: use
    :func:`log_partition_function` there.  A truncated set gives a lower bound, and
    :func:`omitted_partition_bound` bounds what it leaves out."""
    with np.errstate(over="ignore"):
        return np.exp(log_partition_function(levels, kT, spin_weight=spin_weight))


def omitted_partition_bound(levels, kT, *, spin_weight: float = SPIN_WEIGHT):
    """An upper bound on the part of U a truncated set leaves out: Σ_l g(2l + 1)(N_l − kept_l)
    e^{−floor_l/kT}, with the set's exact counts N_l and the floor under every omitted level of l
    (:class:`boundscape.LevelSet`).  0 for a complete set; inf where the counts are not known (a
    Coulomb tail binds infinitely many levels, and its U diverges)."""
    kT = positive("kT", kT)
    if not levels.counts_known:
        return np.full(np.shape(kT), np.inf) if np.ndim(kT) else math.inf
    ls = np.arange(levels.counts.size)
    missing = (levels.counts - levels.kept).astype(float)
    some = missing > 0
    if not np.any(some):
        return np.zeros(np.shape(kT)) if np.ndim(kT) else 0.0
    kTs = np.atleast_1d(kT)
    with np.errstate(over="ignore"):
        out = np.sum(spin_weight * (2 * ls[some] + 1) * missing[some]
                     * np.exp(-levels.omitted_floor[some][None, :] / kTs[:, None]), axis=1)
    return out.reshape(np.shape(kT)) if np.ndim(kT) else float(out[0])


def bound_state_count(levels, *, spin_weight: float = SPIN_WEIGHT) -> int:
    """Σ over every bound (n_r, l) of g (2l + 1) — the exact counts, solved or not (−1 where
    they are not known: infinitely many, or beyond the engine's limits)."""
    if not levels.counts_known:
        return -1
    ls = np.arange(levels.counts.size)
    return int(round(np.sum(spin_weight * (2 * ls + 1) * levels.counts)))


# -- Planck–Larkin ------------------------------------------------------------------------------

# Terms n ≤ N are summed one by one while x_n = x_1/n² ≥ this; the rest in closed form.
_SERIES_FROM = 0.05


def _log_planck_larkin_one(x1: float) -> float:
    """ln Σ_n 2n²(e^{x_n} − 1 − x_n), x_n = x1/n².

    Terms with x_n ≥ 0.05 are summed one by one; beyond them 2n²(e^{x_n} − 1 − x_n) =
    Σ_{k≥2} 2 x1^k n^{2−2k}/k!, and Σ_{n>N} n^{2−2k} is the Hurwitz zeta ζ(2k − 2, N + 1)
    (scipy.special.zeta), so the tail is a rapidly converging series in k (ratio ≤ 0.05/k).
    Everything is scaled by e^{−x1}, so no term overflows at low temperature."""
    if x1 > 1500.0:
        # the n ≥ 2 terms are below e^{−3·x1/4}·x1² of the first: nothing a double can hold
        return x1 + math.log(2.0)
    N = int(math.floor(math.sqrt(x1 / _SERIES_FROM)))
    n = np.arange(1, N + 1, dtype=float)
    x = x1 / n ** 2
    # 2n²(e^{x} − 1 − x) e^{−x1} = 2n² e^{x−x1}(1 − (1 + x)e^{−x}); x ≥ 0.05, so no cancellation
    head = np.sum(2 * n ** 2 * np.exp(x - x1) * (-np.expm1(-x) - x * np.exp(-x)))
    tail, k = 0.0, 2
    log_x1 = math.log(x1)
    while k < 200:
        term = 2.0 * math.exp(k * log_x1 - math.lgamma(k + 1) - x1) * float(zeta(2 * k - 2, N + 1))
        tail += term
        if term <= 1e-17 * (head + tail):
            break
        k += 1
    return x1 + math.log(head + tail) if head + tail > 0 else -math.inf


def log_planck_larkin_partition_function(nuclear_charge, kT, *, mass: float = 1.0):
    """ln U_PL, U_PL = Σ_{n≥1} 2n² (e^{x_n} − 1 − x_n), x_n = I_n/kT, I_n = Z²μ/(2n²) (hartree).

    Summed to convergence: one by one while x_n ≥ 0.05, the rest in closed form with Hurwitz
    zeta functions (see :func:`_log_planck_larkin_one`); relative error ~1e-15.

    Parameters
    ----------
    nuclear_charge : float
        Z of the hydrogen-like ion (the levels are the unscreened −Z²μ/(2n²)).
    kT : float or array_like
        Temperature (hartree).
    mass : float
        Reduced mass μ (electron masses).

    References
    ----------
    M. Planck, Ann. Phys. 75, 673 (1924); A. I. Larkin, Sov. Phys. JETP 11, 1363 (1960);
    W. Ebeling, W. D. Kraeft, D. Kremp, *Theory of Bound States and Ionization Equilibrium in
    Plasmas and Solids* (Akademie-Verlag, Berlin 1976), ch. 2 (references from memory).  The
    −1 − x_n removes the terms a bound-state sum shares with the scattering states' second virial
    coefficient, so the sum converges without any cut-off.
    """
    Z = positive("nuclear_charge", nuclear_charge)
    mu = positive("mass", mass)
    kT = positive("kT", kT)
    x1 = Z * Z * mu / 2.0 / np.atleast_1d(kT)
    out = np.array([_log_planck_larkin_one(float(x)) for x in x1.ravel()]).reshape(x1.shape)
    return out.reshape(np.shape(kT)) if np.ndim(kT) else float(out[0])


def planck_larkin_partition_function(nuclear_charge, kT, *, mass: float = 1.0):
    """U_PL = Σ_{n≥1} 2n²(e^{x_n} − 1 − x_n), x_n = Z²μ/(2n² kT): the Planck–Larkin partition
    function over the unscreened hydrogen-like levels, for comparison with the screened set's
    U (see :func:`log_planck_larkin_partition_function` for the references and the summation).
    Overflows to inf where x_1 > ~700: use the logarithm there."""
    with np.errstate(over="ignore"):
        return np.exp(log_planck_larkin_partition_function(nuclear_charge, kT, mass=mass))
