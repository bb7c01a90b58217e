"""Ionization energy and continuum lowering: this model's (from the screened 1s level), and the
published models of Stewart & Pyatt (1966) and Ecker & Kröll (1963) for the same plasma.

Atomic units throughout (hartree, bohr, bohr⁻³, e²/4πε₀ = 1); the same formulas hold in a
semiconductor's effective atomic units, where e²/(4πε₀ε_r) = 1.  Z is the charge the electron
sees once the ion is ionized: for a hydrogen-like ion, its nuclear charge.
"""

from __future__ import annotations

import math

import numpy as np

from ...checks import positive

__all__ = ["ionization_energy", "unscreened_ionization_energy", "continuum_lowering", "debye_length",
           "debye_huckel_lowering", "ion_sphere_radius", "ion_sphere_lowering", "stewart_pyatt_lowering",
           "ecker_kroll_lowering", "ecker_kroll_critical_density"]


def _nonnegative(name, value):
    array = np.asarray(value, dtype=float)
    if not np.all(np.isfinite(array)) or np.any(array < 0):
        from ...errors import InputError

        raise InputError(f"{name} must be zero or positive and finite, got {value!r}")
    return array if array.ndim else float(array)


def ionization_energy(levels) -> float:
    """I = −E_1s, the binding of the lowest s level (n_r = 0, l = 0) of a level set (hartree).

    0 where the set is complete and binds no s level (the 1s is lost: the continuum has come down
    to it); NaN where the set does not say (its count of s states is not known)."""
    ground = (np.asarray(levels.l) == 0) & (np.asarray(levels.n_r) == 0)
    if np.any(ground):
        return float(-np.asarray(levels.energy)[ground][0])
    if levels.counts.size and levels.counts[0] == 0:
        return 0.0
    return math.nan


def unscreened_ionization_energy(nuclear_charge, mass=1.0):
    """I₀ = Z²μ/2 (hartree), the hydrogen-like ion's 1s binding without screening (Bethe &
    Salpeter 1957, eq. 2.11)."""
    return positive("nuclear_charge", nuclear_charge) ** 2 * positive("mass", mass) / 2.0


def continuum_lowering(levels, nuclear_charge, mass=1.0) -> float:
    """ΔI = I₀ − I: how far screening has lowered the ionization energy (hartree), with I₀ =
    Z²μ/2 and I from :func:`ionization_energy` (ΔI = I₀ once the 1s is lost)."""
    return unscreened_ionization_energy(nuclear_charge, mass) - ionization_energy(levels)


def debye_length(electron_density, kT, *, z_star=0.0):
    """Classical Debye length λ_D (bohr): λ_D⁻² = 4π n_e (1 + z*)/kT, the electrons and, with
    z* = Σ Z_i² n_i/n_e (= ⟨Z_i²⟩/⟨Z_i⟩ in a quasi-neutral plasma), ions at the same temperature.
    z* = 0: electrons alone.

    References
    ----------
    NRL Plasma Formulary (2019), p. 28: λ_D = 7.43×10² (T/eV)^{1/2} (n/cm⁻³)^{−1/2} cm for
    electrons; Stewart & Pyatt (1966), eq. (4), with the ions (reference from memory).
    """
    n = positive("electron_density", electron_density)
    kT = positive("kT", kT)
    z_star = _nonnegative("z_star", z_star)
    return 1.0 / np.sqrt(4.0 * math.pi * n * (1.0 + z_star) / kT)


def debye_huckel_lowering(nuclear_charge, screening_length):
    """ΔI_DH = Z e²/(4πε₀ λ_D) = Z/λ (hartree): the potential of the screening cloud at the ion,
    the low-density limit of every lowering model (common practice; e.g. Griem, *Principles of
    Plasma Spectroscopy*, 1997, §5.7, reference from memory)."""
    return positive("nuclear_charge", nuclear_charge) / positive("screening_length", screening_length)


def ion_sphere_radius(nuclear_charge, electron_density):
    """a_Z = (3Z/(4π n_e))^{1/3} (bohr): the sphere that holds the Z electrons neutralising the ion."""
    return (3.0 * positive("nuclear_charge", nuclear_charge)
            / (4.0 * math.pi * positive("electron_density", electron_density))) ** (1.0 / 3.0)


def ion_sphere_lowering(nuclear_charge, electron_density):
    """ΔI_IS = (3/2) Z e²/(4πε₀ a_Z) (hartree): the ion-sphere model, Stewart–Pyatt's
    high-density limit (Stewart & Pyatt 1966, eq. (28); reference from memory)."""
    return 1.5 * nuclear_charge / ion_sphere_radius(nuclear_charge, electron_density)


def stewart_pyatt_lowering(nuclear_charge, electron_density, kT, *, z_star=0.0, screening_length=None):
    """Stewart–Pyatt continuum lowering (hartree),

        ΔI_SP = kT/(2(z* + 1)) · [(1 + 3(z* + 1) Z e²/(4πε₀ λ_D kT))^{2/3} − 1],

    which tends to Debye–Hückel's Z/λ_D at low density and to the ion-sphere (3/2) Z/a_Z at high
    density (with λ_D of the same z*: the (z* + 1) then cancel).

    Parameters
    ----------
    nuclear_charge : float
        Z, the charge the electron sees once ionized.
    electron_density : float or array_like
        n_e (bohr⁻³).
    kT : float or array_like
        Electron (= ion) temperature (hartree).
    z_star : float
        z* = ⟨Z_i²⟩/⟨Z_i⟩ of the ions that screen; 0 for electron screening alone (as the plasma
        preset's default species).
    screening_length : float, optional
        λ_D (bohr); default :func:`debye_length` of (n_e, kT, z*).

    References
    ----------
    J. C. Stewart and K. D. Pyatt, Jr., "Lowering of ionization potentials in plasmas",
    Astrophys. J. 144, 1203 (1966) (the formula as commonly quoted; reference from memory).
    """
    Z = positive("nuclear_charge", nuclear_charge)
    kT = positive("kT", kT)
    z_star = _nonnegative("z_star", z_star)
    lam = debye_length(electron_density, kT, z_star=z_star) if screening_length is None \
        else positive("screening_length", screening_length)
    y = 3.0 * (z_star + 1.0) * Z / (lam * kT)
    # (1 + y)^{2/3} − 1 without cancellation at small y
    out = kT / (2.0 * (z_star + 1.0)) * np.expm1(2.0 / 3.0 * np.log1p(y))
    return out if np.ndim(out) else float(out)


def ecker_kroll_critical_density(nuclear_charge, kT):
    """n_crit = (3/4π)(kT/(Z² e²/4πε₀))³ (bohr⁻³): where Ecker–Kröll switch from the
    Debye–Hückel to the interparticle-distance branch (reference from memory)."""
    Z = positive("nuclear_charge", nuclear_charge)
    return 3.0 / (4.0 * math.pi) * (positive("kT", kT) / Z ** 2) ** 3


def ecker_kroll_lowering(nuclear_charge, electron_density, kT, *, ion_density=None, z_star=0.0,
                         screening_length=None, constant=1.0):
    """Ecker–Kröll continuum lowering (hartree):

        ΔI_EK = Z e²/(4πε₀ λ_D)                        for n ≤ n_crit,
        ΔI_EK = C Z e²/(4πε₀) (4π n/3)^{1/3}            for n > n_crit,

    with n = n_e + n_i the density of all free particles and n_crit from
    :func:`ecker_kroll_critical_density`; C = 1 in the original (the branches need not meet at
    n_crit).

    Parameters
    ----------
    nuclear_charge : float
    electron_density, kT : float or array_like
        n_e (bohr⁻³) and the temperature (hartree).
    ion_density : float or array_like, optional
        n_i (bohr⁻³); default n_e (singly charged ions).
    z_star, screening_length
        As for :func:`stewart_pyatt_lowering` (the Debye branch's λ_D).
    constant : float
        C of the high-density branch.

    References
    ----------
    G. Ecker and W. Kröll, "Lowering of the ionization energy for a plasma in thermodynamic
    equilibrium", Phys. Fluids 6, 62 (1963) (reference from memory).
    """
    Z = positive("nuclear_charge", nuclear_charge)
    n_e = positive("electron_density", electron_density)
    kT = positive("kT", kT)
    n_i = n_e if ion_density is None else _nonnegative("ion_density", ion_density)
    lam = debye_length(n_e, kT, z_star=z_star) if screening_length is None \
        else positive("screening_length", screening_length)
    total = n_e + n_i
    dense = positive("constant", constant) * Z * (4.0 * math.pi * total / 3.0) ** (1.0 / 3.0)
    out = np.where(total > ecker_kroll_critical_density(Z, kT), dense, Z / lam)
    return out if out.ndim else float(out)
