"""The plasma preset read for the ``ion_sphere`` family: the radius R its density sets, and where
the ion-sphere model holds.

Under the plasma preset the ``ion_sphere`` family's length R is not a screening length: it is the
Wigner–Seitz radius of the plasma's ions.  With ions of charge Z_i, quasi-neutrality gives their
density n_i = n_e/Z_i, and the sphere holding one ion, (4π/3) R³ n_i = 1, has

    R = (3 Z_i / (4π n_e))^{1/3}

(the ion-sphere radius of Salzmann, *Atomic Physics in Hot Plasmas*, Oxford 1998, ch. 2, and of
Stewart & Pyatt, ApJ 144, 1203 (1966); references from memory, the formula common practice).

The choice of Z_i.  On the command line Z_i is by default the nuclear charge Z of the ion itself
(``--nuclear-charge``): the family's cloud of Z electrons, uniform inside R, then has exactly the
plasma's electron density n_e, so the sphere is the neutral cell of a plasma of such nuclei and
the family's formula and the radius agree.  ``--ion-sphere-charge`` (config
``preset.ion_sphere_charge``, which a sweep must give: it sweeps several Z) names another Z_i —
the plasma's mean ionisation, or Z − 1 for the radiator's net charge as Stewart & Pyatt count it —
and the cloud's density 3Z/(4πR³) then differs from n_e by Z/Z_i; the command line prints it.

Validity.  The ion-sphere model is the strong-coupling limit: each ion's neighbours are kept at a
distance and its sphere screens it completely.  It holds where the ions' coupling parameter

    Γ_i = Z_i² e² / (4πε₀ R k_B T_i) ≥ 1      (= Z_i^{5/3} Γ_e T_e/T_i)

(Ichimaru, Rev. Mod. Phys. 54, 1017 (1982) for Γ; the threshold 1 common practice, no source);
below it the plasma is weakly coupled and Debye–Hückel screening (family ``yukawa``) is the model.
The electrons' Γ_e, N_D and k_B T/E_F are reported as for the screening families.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np
from scipy import constants as sc

from ...checks import positive
from ..screening import Validity
from ..units import BOHR_M, convert
from .plasma import Plasma

__all__ = ["IonSpherePlasma", "ION_SPHERE_FLAGS", "ION_SPHERE_REASONS"]

ION_SPHERE_FLAGS = ("ok", "weakly_coupled")
ION_SPHERE_REASONS = {
    "ok": "strongly coupled ions, Gamma_i >= 1: the ion-sphere model holds",
    "weakly_coupled": "weakly coupled ions, Gamma_i < 1: the ion-sphere model is a strong-coupling model; "
                      "Debye-Hueckel screening (family yukawa) is the model here"}


@dataclass(frozen=True)
class IonSpherePlasma(Plasma):
    """The plasma preset whose condition (n_e, T_e) sets the ion-sphere radius R of family
    ``ion_sphere``, ions of charge ``ion_sphere_charge`` = Z_i (given: see the module's notes).

    Every question the cube, the figures and the command line ask of a plasma is answered with
    R in place of the screening length: :meth:`screening_length_at` is R(n_e) (whatever T_e),
    :meth:`loss_density` its inverse, :meth:`validity` flags Γ_i < 1."""

    nuclear_charge: float | None = None  # the ion's own Z, where one is given (the command line)

    def __post_init__(self):
        super().__post_init__()
        positive("plasma ion_sphere_charge", self.ion_sphere_charge)

    # -- the physics ------------------------------------------------------------------------
    def radius_m(self, electron_density_m3):
        """R = (3Z_i/(4π n_e))^{1/3} (m) for n_e in m⁻³."""
        return np.cbrt(3 * self.ion_sphere_charge / (4 * math.pi * np.asarray(electron_density_m3, dtype=float)))

    def ion_coupling(self, electron_density_m3, temperature_eV):
        """Γ_i = Z_i² e²/(4πε₀ R k_B T_i), T_i = ``ion_temperature_ratio`` × T_e."""
        kT = self.ion_temperature_ratio * self.kT(temperature_eV)
        return self.ion_sphere_charge ** 2 * sc.e ** 2 / (4 * math.pi * sc.epsilon_0 * self.radius_m(
            electron_density_m3) * kT)

    def screening_length_at(self, density_m3, temperature):
        # the family's length at (n_e, T_e): R, the same at every temperature
        n, _ = np.broadcast_arrays(np.asarray(density_m3, dtype=float), np.asarray(temperature, dtype=float))
        return self.radius_m(n)

    def loss_density(self, screening_length_m, temperature=None):
        # the density above which R is below a state's critical radius: (4π/3) R³ n_e = Z_i
        return 3 * self.ion_sphere_charge / (4 * math.pi * np.asarray(screening_length_m, dtype=float) ** 3)

    def validity(self, density_m3, temperature):
        electrons = super().validity(density_m3, temperature)
        weak = np.asarray(self.ion_coupling(density_m3, temperature) < 1.0)
        return Validity(electrons.coupling_parameter, electrons.debye_number, electrons.degeneracy,
                        weak.astype(np.int8))

    @property
    def validity_flags(self):
        return ION_SPHERE_FLAGS, ION_SPHERE_REASONS

    # -- what the cube and figures ask ------------------------------------------------------
    @property
    def density_note(self):
        return f"ion sphere of ions of charge Z_i = {self.ion_sphere_charge:g}"

    def cube_attributes(self, cube_mass=1.0):
        return {**super().cube_attributes(cube_mass), "screening_model": "ion_sphere",
                "screening_model_description": "ion-sphere model: R = (3 Z_i/(4 pi n_e))^(1/3), the Wigner-Seitz "
                                               "radius of ions of charge Z_i; holds for strongly coupled ions, "
                                               "Gamma_i >= 1", "ion_sphere_charge": float(self.ion_sphere_charge)}

    def physical_coordinates(self, strength, screening_length_m, cube_mass=1.0, dims=("screening_length",)):
        coords = super().physical_coordinates(strength, screening_length_m, cube_mass, dims)
        unit = self.length_unit.name
        if f"screening_length_{unit}" in coords:
            d, values, _ = coords.pop(f"screening_length_{unit}")
            coords[f"ion_sphere_radius_{unit}"] = (d, values, {"long_name": f"ion-sphere radius in {unit}",
                                                              "units": unit})
        if "electron_density" in coords:
            d, values, attrs = coords["electron_density"]
            coords["electron_density"] = (d, values, {**attrs, "long_name": (
                f"electron density whose ion-sphere radius (3 Z_i/(4 pi n_e))^(1/3) this is, Z_i = "
                f"{self.ion_sphere_charge:g}")})
        return coords

    def trade_criticals(self, critical_length_m, grid, strength_dim="strength"):
        out = super().trade_criticals(critical_length_m, grid, strength_dim)
        name = f"loss_{self.density_name}"
        dims, values, attrs = out[name]
        out[name] = (dims, values, {**attrs, "comment": "where the ion-sphere radius (3 Z_i/(4 pi n_e))^(1/3) equals "
                                                        "the state's critical radius; NaN where the state is never "
                                                        "bound"})
        dims, values, attrs = out[f"{name}_validity"]
        out[f"{name}_validity"] = (dims, values, {
            "long_name": f"whether the ion-sphere model holds at {name}", "flags": ION_SPHERE_FLAGS,
            "comment": "; ".join(f"{key}: {why}" for key, why in ION_SPHERE_REASONS.items())})
        return out

    @property
    def condition_axes(self):
        return replace(super().condition_axes, validity_label="weakly coupled ions, ion sphere fails (hatched)")

    # -- the command line -------------------------------------------------------------------
    def command_line_conditions(self, value):
        n = convert(value, "cm-3", "m-3")
        t = self.temperature_eV
        radius = float(self.radius_m(n))
        flag = ION_SPHERE_FLAGS[int(self.validity(n, t).flag)]
        out = {"electron_density_cm-3": float(value), "electron_temperature_eV": float(t),
               "screening_model": "ion_sphere", "ion_sphere_charge": float(self.ion_sphere_charge),
               "ion_sphere_radius_nm": radius / sc.nano, "ion_sphere_radius_bohr": radius / BOHR_M,
               "ion_coupling_parameter": float(self.ion_coupling(n, t))}
        if self.nuclear_charge is not None and self.nuclear_charge != self.ion_sphere_charge:
            # the family's cloud holds Z electrons inside R: its density is n_e Z/Z_i
            out["cloud_electron_density_cm-3"] = float(value) * self.nuclear_charge / self.ion_sphere_charge
        out.update(screening_validity=flag, screening_validity_reason=ION_SPHERE_REASONS[flag])
        return out

    def critical_columns(self, critical_length_m):
        if not (np.isfinite(critical_length_m) and critical_length_m > 0):
            return {"loss_electron_density_cm-3": float("nan"), "screening_validity": ""}
        n = float(self.loss_density(critical_length_m))
        flag = ION_SPHERE_FLAGS[int(self.validity(n, self.temperature_eV).flag)]
        return {"loss_electron_density_cm-3": float(convert(n, "m-3", "cm-3")), "screening_validity": flag}


Plasma.length_variants["ion_sphere_radius"] = IonSpherePlasma
