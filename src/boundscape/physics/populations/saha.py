"""The Saha balance between a bound and an ionized species, and the free carriers' statistics.

Units: any of the package's unit systems whose energy unit is ħ²/(m L²) (atomic units; a
semiconductor's effective atomic units), so that h = 2π and a density of states per volume is
(m kT/2π)^{3/2} in L⁻³ with m in the system's mass unit.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.integrate import quad
from scipy.optimize import brentq
from scipy.special import expit

from ...checks import positive
from ...errors import InputError

__all__ = ["effective_density_of_states", "log_saha_ratio", "saha_ratio", "ionized_fraction", "fermi_dirac_half",
           "reduced_chemical_potential", "STATISTICS", "ELECTRON_SPIN_WEIGHT"]

# A free electron's spin states (the factor 2 of Saha's equation).
ELECTRON_SPIN_WEIGHT = 2
STATISTICS = ("boltzmann", "fermi_dirac")


def effective_density_of_states(kT, mass=1.0, *, spin_weight=ELECTRON_SPIN_WEIGHT):
    """N = g (2π m kT/h²)^{3/2} = g (m kT/2π)^{3/2} in units with ħ = 1: the free carriers'
    effective density of states (Sze & Ng, *Physics of Semiconductor Devices*, 3rd ed., §1.4,
    N_C = 2(2π m* kT/h²)^{3/2}; the factor of Saha's equation).  g = 2 for electrons' spin."""
    return spin_weight * (positive("mass", mass) * positive("kT", kT) / (2.0 * math.pi)) ** 1.5


def log_saha_ratio(log_partition, electron_density, kT, *, electron_mass=1.0):
    """ln(n_Z/n_{Z−1}) of Saha's balance hydrogen-like ⇄ bare,

        n_Z/n_{Z−1} = 2 (2π m_e kT/h²)^{3/2} / (n_e U),

    with U the hydrogen-like ion's partition function with energies from the continuum
    (:func:`.partition.log_partition_function`, bound electron's spin included), the bare
    nucleus's partition function taken as 1 and the free electron's spin weight 2.  A log, so that
    neither e^{I/kT} nor the ratio overflows; ``log_partition`` = −inf (nothing bound) gives +inf.

    References
    ----------
    M. N. Saha, Phil. Mag. 40, 472 (1920); in this form e.g. Griem, *Principles of Plasma
    Spectroscopy* (1997), eq. (6.2) (reference from memory).
    """
    n_e = positive("electron_density", electron_density)
    return (np.log(effective_density_of_states(kT, electron_mass)) - np.log(n_e)
            - np.asarray(log_partition, dtype=float))[()]


def saha_ratio(log_partition, electron_density, kT, *, electron_mass=1.0):
    """n_Z/n_{Z−1} (see :func:`log_saha_ratio`); inf where nothing is bound."""
    with np.errstate(over="ignore"):
        return np.exp(log_saha_ratio(log_partition, electron_density, kT, electron_mass=electron_mass))


def ionized_fraction(log_partition, electron_density, kT, *, electron_mass=1.0):
    """n_Z/(n_Z + n_{Z−1}) from Saha's balance (:func:`log_saha_ratio`), the logistic function of
    its log (no overflow at either end): 1 where nothing is bound."""
    return expit(log_saha_ratio(log_partition, electron_density, kT, electron_mass=electron_mass))[()]


# -- free carriers: Fermi–Dirac or Boltzmann ---------------------------------------------------

def fermi_dirac_half(eta: float) -> float:
    """The complete Fermi–Dirac integral F_{1/2}(η) = (2/√π) ∫₀^∞ √t dt/(1 + e^{t−η}), normalised
    so that F_{1/2} → e^η as η → −∞ (Blakemore, Solid-State Electron. 25, 1067 (1982); reference
    from memory), by scipy.integrate.quad: scipy has no Fermi–Dirac integral, and this keeps
    mpmath a test-only dependency."""
    eta = float(eta)
    if eta < 0:  # F/e^η, a smooth integrand of order one
        value = quad(lambda t: math.sqrt(t) * math.exp(-t) / (1.0 + math.exp(eta - t)), 0.0, math.inf,
                     epsabs=0.0, epsrel=1e-13, limit=200)[0]
        return 2.0 / math.sqrt(math.pi) * value * math.exp(eta)
    top = eta + 60.0  # beyond the step the integrand falls like e^{η−t}
    value = quad(lambda t: math.sqrt(t) / (1.0 + math.exp(t - eta)), 0.0, top, points=[eta], epsabs=0.0,
                 epsrel=1e-13, limit=200)[0]
    return 2.0 / math.sqrt(math.pi) * value


def reduced_chemical_potential(density, kT, mass=1.0, *, statistics="fermi_dirac", spin_weight=ELECTRON_SPIN_WEIGHT):
    """η = μ/kT (μ from the band edge, or the continuum) of an ideal gas of free carriers of this
    density: n = N F_{1/2}(η) (``fermi_dirac``) or n = N e^η (``boltzmann``), N from
    :func:`effective_density_of_states`.  F_{1/2} is inverted with brentq on a bracket from its
    two limits, e^η ≥ F_{1/2}(η) ≥ η^{3/2}/Γ(5/2)."""
    if statistics not in STATISTICS:
        raise InputError(f"statistics must be one of {', '.join(STATISTICS)}, got {statistics!r}")
    ratio = positive("density", density) / effective_density_of_states(kT, mass, spin_weight=spin_weight)
    low = math.log(ratio)
    if statistics == "boltzmann":
        return low
    if low < -40.0:  # F_{1/2}(η) = e^η(1 − e^η/2^{3/2} + …): below 1e-17 relative off
        return low + ratio / 2 ** 1.5
    high = max(low, (math.gamma(2.5) * ratio) ** (2.0 / 3.0)) + 1.0
    return brentq(lambda eta: math.log(fermi_dirac_half(eta)) - low, low, high, xtol=1e-14)
