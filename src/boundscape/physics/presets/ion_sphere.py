"""The ion-sphere radius a plasma's density sets, and where the ion-sphere model holds.

Under the plasma preset the ``ion_sphere`` family's length R is not a screening length: it is the
Wigner–Seitz radius of the plasma's ions.  With ions of charge Z_i, quasi-neutrality gives their
density n_i = n_e/Z_i, and the sphere holding one ion, (4π/3) R³ n_i = 1, has

    R = (3 Z_i / (4π n_e))^{1/3}

(the ion-sphere radius of Salzmann, *Atomic Physics in Hot Plasmas*, Oxford 1998, ch. 2, and of
Stewart & Pyatt, ApJ 144, 1203 (1966); references from memory, the formula common practice).

The choice of Z_i.  By default Z_i is the nuclear charge Z of the ion itself (``--nuclear-charge``):
the family's cloud of Z electrons, uniform inside R, then has exactly the plasma's electron density
n_e, so the sphere is the neutral cell of a plasma of such nuclei and the family's formula and the
radius agree.  ``--ion-sphere-charge`` (config ``preset.ion_sphere_charge``) names another Z_i — the
plasma's mean ionisation, or Z − 1 for the radiator's net charge as Stewart & Pyatt count it — and
the cloud's density 3Z/(4πR³) then differs from n_e by Z/Z_i; the conditions print it.

Validity.  The ion-sphere model is the strong-coupling limit: each ion's neighbours are kept at a
distance and its sphere screens it completely.  It holds where the ions' coupling parameter

    Γ_i = Z_i² e² / (4πε₀ R k_B T_i) ≥ 1

(Ichimaru, Rev. Mod. Phys. 54, 1017 (1982) for Γ; the threshold 1 common practice, no source);
below it the plasma is weakly coupled and Debye–Hückel screening (family ``yukawa``) is the model.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy import constants as sc

from ...checks import positive
from ..units import convert

__all__ = ["IonSphereRadius", "ION_SPHERE_FLAGS", "ION_SPHERE_REASONS"]

ION_SPHERE_FLAGS = ("ok", "weakly_coupled")
ION_SPHERE_REASONS = {
    "ok": "strongly coupled ions, Gamma_i >= 1: the ion-sphere model holds",
    "weakly_coupled": "weakly coupled ions, Gamma_i < 1: the ion-sphere model is a strong-coupling model; "
                      "Debye-Hueckel screening (family yukawa) is the model here"}


@dataclass(frozen=True)
class IonSphereRadius:
    """The ion-sphere radius of a plasma of electron density n_e whose ions carry charge Z_i.

    Parameters
    ----------
    ion_charge : float
        Z_i, the charge of the ions whose Wigner–Seitz radius is R.
    nuclear_charge : float or None
        Z of the ion in its sphere (its cloud holds Z electrons); ``None`` if not known.
    temperature_eV : float
        The electron temperature T_e (eV); the ions are at ``ion_temperature_ratio`` × T_e.
    ion_temperature_ratio : float
        T_i/T_e.
    """

    ion_charge: float
    nuclear_charge: float | None
    temperature_eV: float
    ion_temperature_ratio: float = 1.0

    def __post_init__(self):
        positive("ion-sphere charge Z_i", self.ion_charge)

    def radius_m(self, electron_density_m3):
        """R = (3Z_i/(4π n_e))^{1/3} (m) for n_e in m⁻³."""
        return np.cbrt(3 * self.ion_charge / (4 * math.pi * np.asarray(electron_density_m3, dtype=float)))

    def density_m3(self, radius_m):
        """The electron density (m⁻³) whose ion-sphere radius is ``radius_m``."""
        return 3 * self.ion_charge / (4 * math.pi * np.asarray(radius_m, dtype=float) ** 3)

    def coupling(self, electron_density_m3):
        """Γ_i = Z_i² e²/(4πε₀ R k_B T_i)."""
        kT = self.ion_temperature_ratio * self.temperature_eV * sc.electron_volt
        return self.ion_charge ** 2 * sc.e ** 2 / (4 * math.pi * sc.epsilon_0 * self.radius_m(electron_density_m3) * kT)

    def validity(self, electron_density_m3) -> str:
        return ION_SPHERE_FLAGS[int(float(self.coupling(electron_density_m3)) < 1.0)]

    # -- the command line -------------------------------------------------------------------
    def command_line_length(self, value, units):
        """The engine's R (in ``units``) of an electron density ``value`` in cm⁻³."""
        return float(self.radius_m(convert(positive("--density", value), "cm-3", "m-3"))) / units.length_m

    def command_line_conditions(self, value):
        n = convert(value, "cm-3", "m-3")
        radius = float(self.radius_m(n))
        flag = self.validity(n)
        out = {"electron_density_cm-3": float(value), "electron_temperature_eV": float(self.temperature_eV),
               "screening_model": "ion_sphere", "ion_sphere_charge": float(self.ion_charge),
               "ion_sphere_radius_nm": radius / sc.nano, "ion_sphere_radius_bohr": radius / sc.physical_constants[
                   "Bohr radius"][0], "ion_coupling_parameter": float(self.coupling(n))}
        if self.nuclear_charge is not None and self.nuclear_charge != self.ion_charge:
            # the family's cloud holds Z electrons inside R: its density is n_e Z/Z_i
            out["cloud_electron_density_cm-3"] = float(value) * self.nuclear_charge / self.ion_charge
        out.update(screening_validity=flag, screening_validity_reason=ION_SPHERE_REASONS[flag])
        return out

    def critical_columns(self, critical_radius_m):
        """The electron density above which a state of critical radius ``critical_radius_m`` is
        lost (the sphere shrinks as n_e grows), and the model's validity there."""
        if not (np.isfinite(critical_radius_m) and critical_radius_m > 0):
            return {"loss_electron_density_cm-3": float("nan"), "screening_validity": ""}
        n = float(self.density_m3(critical_radius_m))
        return {"loss_electron_density_cm-3": float(convert(n, "m-3", "cm-3")), "screening_validity": self.validity(n)}
