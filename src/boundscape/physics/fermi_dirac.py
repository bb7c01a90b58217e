"""Complete Fermi–Dirac integrals F_{1/2} and F_{−1/2}, and their inversion, for ideal-gas screening.

F_j(η) = 1/Γ(j+1) ∫₀^∞ t^j/(e^{t−η} + 1) dt = −Li_{j+1}(−e^η), normalised so that F_j → e^η as
η → −∞ (non-degenerate) and F_j → η^{j+1}/Γ(j+2) as η → +∞ (degenerate); dF_j/dη = F_{j−1}.

An ideal Fermi gas of spin-and-valley degeneracy g and mass m at temperature T holds
n = g n_Q F_{1/2}(η), n_Q = (m k_B T/2πħ²)^{3/2}, and ∂n/∂μ = g n_Q F_{−1/2}(η)/(k_B T), so its
screening wavenumber is q² = (e²/ε) ∂n/∂μ = (e² n/ε k_B T)·F_{−1/2}(η)/F_{1/2}(η): Debye's where
the ratio is 1, Thomas–Fermi's 3e²n/(2εE_F) where it tends to 3/(2η).

The integrals come from mpmath's polylogarithm (``mpmath.fp.polylog``, double precision, about
0.1 ms a call; ``mpmath.polylog`` at 20 digits where its double-precision series overflows), read at the Chebyshev nodes of eleven segments of −1 ≤ η ≤ 32 once per process;
outside that range the two limiting series are exact to double precision (η ≤ −1: the series in
e^η, 40 terms; η ≥ 32: Sommerfeld's expansion to η⁻¹⁶, whose error there is of order e^{−η}).
Chebyshev interpolation of these entire-in-a-strip functions converges geometrically; tests hold
the result against ``mpmath.polylog`` at 30 digits and against both series.

References
----------
Blakemore, *Solid State Electronics* 25, 1067 (1982) (the normalised F_j and its limits);
Ashcroft & Mermin, *Solid State Physics*, ch. 2 (Sommerfeld expansion) and ch. 17 (screening).
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np
from numpy.polynomial import chebyshev
from scipy.optimize import elementwise
from scipy.special import gamma, zeta

__all__ = ["fermi_dirac", "eta_of_occupation", "screening_ratio", "series_nondegenerate", "series_degenerate",
           "ORDERS"]

ORDERS = (0.5, -0.5)
# Where each representation is used: the series in e^η below LOW, Sommerfeld above HIGH,
# Chebyshev pieces between.
LOW, HIGH = -1.0, 32.0
SEGMENTS = 11
DEGREE = 24
SERIES_TERMS = 40      # e^{−40} ≈ 4e-18: the series in e^η is complete to double precision at η ≤ −1
SOMMERFELD_TERMS = 8   # up to η^{−16}


def series_nondegenerate(j: float, eta, terms: int = SERIES_TERMS):
    """F_j(η) = Σ_{k≥1} (−1)^{k+1} e^{kη}/k^{j+1}, the series of −Li_{j+1}(−z) in z = e^η (η < 0)."""
    z = np.exp(np.asarray(eta, dtype=float))
    k = np.arange(1, terms + 1)
    signs = (-1.0) ** (k + 1) / k ** (j + 1)
    return np.sum(signs * z[..., None] ** k, axis=-1)


def series_degenerate(j: float, eta, terms: int = SOMMERFELD_TERMS):
    """Sommerfeld's expansion F_j(η) ≈ η^{j+1}/Γ(j+2)·[1 + Σ_k 2(1 − 2^{1−2k}) ζ(2k)
    Γ(j+2)/Γ(j+2−2k) η^{−2k}] (asymptotic, η ≫ 1)."""
    eta = np.asarray(eta, dtype=float)
    k = np.arange(1, terms + 1)
    coefficients = 2 * (1 - 2.0 ** (1 - 2 * k)) * zeta(2 * k) * gamma(j + 2) / gamma(j + 2 - 2 * k)
    return eta ** (j + 1) / gamma(j + 2) * (1 + np.sum(coefficients * eta[..., None] ** (-2.0 * k), axis=-1))


@lru_cache(maxsize=None)
def _pieces(j: float):
    """Chebyshev interpolants of F_j on the segments of [LOW, HIGH] (mpmath at their nodes)."""
    import mpmath

    def one(x):
        try:
            return -mpmath.fp.polylog(j + 1, -math.exp(x)).real
        except ArithmeticError:  # fp's series overflows at a few arguments (|z| ≈ 48 for j = -1/2)
            with mpmath.workdps(20):
                return -float(mpmath.re(mpmath.polylog(j + 1, -mpmath.exp(x))))

    def exact(eta):
        return np.array([one(float(x)) for x in np.atleast_1d(eta)])

    edges = np.linspace(LOW, HIGH, SEGMENTS + 1)
    return edges, [chebyshev.Chebyshev.interpolate(exact, DEGREE, domain=(a, b)) for a, b in zip(edges[:-1], edges[1:])]


def fermi_dirac(j: float, eta):
    """The complete Fermi–Dirac integral F_j(η) for j = 1/2 or −1/2 (normalised; see the module).

    Parameters
    ----------
    j : {0.5, -0.5}
    eta : float or array_like
        Reduced chemical potential μ/(k_B T).

    Returns
    -------
    ndarray
        F_j(η), relative error about 1e-14.
    """
    if j not in ORDERS:
        raise ValueError(f"F_j is provided for j in {ORDERS}, got {j!r}")
    eta = np.asarray(eta, dtype=float)
    out = np.empty(eta.shape)
    low, high = eta <= LOW, eta >= HIGH
    out[low] = series_nondegenerate(j, eta[low])
    out[high] = series_degenerate(j, eta[high])
    middle = ~(low | high)
    if middle.any():
        edges, pieces = _pieces(j)
        which = np.clip(np.searchsorted(edges, eta[middle]) - 1, 0, SEGMENTS - 1)
        values = np.empty(which.shape)
        for s in np.unique(which):
            values[which == s] = pieces[s](eta[middle][which == s])
        out[middle] = values
    return out


def _log_occupation_gap(eta, target):
    return np.log(fermi_dirac(0.5, eta)) - target


def eta_of_occupation(log_occupation):
    """η at which F_{1/2}(η) = exp(``log_occupation``): the reduced chemical potential of a gas
    whose occupation n/(g n_Q) is given (its logarithm, so that 1e-30 and 1e30 are equally easy).

    Bracketed root (``scipy.optimize.elementwise.find_root``): F_{1/2}(η) < e^η for every η, and
    F_{1/2}(η) > η^{3/2}/Γ(5/2) for η > 0, so [y, max(y, (Γ(5/2) e^y)^{2/3}) + 1] brackets it.
    """
    y = np.asarray(log_occupation, dtype=float)
    # Γ(5/2) e^y overflows past y ≈ 709; there the Sommerfeld bracket is taken in logs.
    degenerate = np.exp(np.minimum((math.log(gamma(2.5)) + y) * 2 / 3, 700.0))
    lo, hi = y - 1e-9 * (1 + np.abs(y)), np.maximum(y, degenerate) + 1.0
    result = elementwise.find_root(_log_occupation_gap, (lo, hi), args=(y,))
    return np.asarray(result.x, dtype=float)


def screening_ratio(log_occupation):
    """F_{−1/2}(η)/F_{1/2}(η) at the η of :func:`eta_of_occupation`: the factor by which an ideal
    Fermi gas of that occupation screens less than a classical one (1 non-degenerate, → 3/(2η)
    degenerate)."""
    eta = eta_of_occupation(log_occupation)
    return fermi_dirac(-0.5, eta) / fermi_dirac(0.5, eta)
