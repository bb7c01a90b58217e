"""The semiconductor preset swept over donor concentration × temperature (config grid keys
``donor_concentration``, cm⁻³, and ``temperature``, K): a hydrogenic donor whose screening length
at each cell is that of N_D free electrons at T (every donor ionized, the Mott reading); with
``populations: true`` the sweep adds the self-consistent freeze-out, in which the free-electron
density that screens is solved for (:func:`boundscape.physics.populations.donor_freeze_out`)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .carriers import CarrierScreening
from .semiconductor import Semiconductor

__all__ = ["DonorSemiconductor"]


@dataclass(frozen=True)
class DonorSemiconductor(Semiconductor):
    """:class:`Semiconductor` whose condition axes are the donor concentration and temperature."""

    density_name = "donor_concentration"
    condition_keys = ("donor_concentration", "temperature")
    condition_labels = {"strength": "donor charge $Z$", "donor_concentration": r"donor concentration $N_D$ (cm$^{-3}$)",
                        "temperature": "temperature $T$ (K)"}

    def condition_attributes(self):
        attrs = super().condition_attributes()
        attrs.pop("carrier_density")
        attrs["donor_concentration"] = {
            "long_name": "donor concentration", "units": "cm-3",
            "comment": "the engine's screening length at each cell is that of N_D free electrons at T (every donor "
                       "ionized); the self-consistent freeze-out, where the free density is solved for, is in the "
                       "populations variables"}
        return attrs

    def trade_criticals(self, critical_length_m, grid, strength_dim="strength"):
        # Carrier screening's loss densities, named by the donor concentration (not Semiconductor's
        # carrier density), and the Mott parameter of the loss concentration.
        out = CarrierScreening.trade_criticals(self, critical_length_m, grid, strength_dim)
        dims, loss, _ = out["loss_donor_concentration"]
        out["mott_parameter"] = (dims, np.cbrt(loss * 1e6) * self.effective.length_m, {
            "long_name": "cube root of the loss donor concentration times the effective Bohr radius, N_c^(1/3) a*",
            "units": "1",
            "comment": "every donor ionized; Mott's criterion of the metal-insulator transition is 0.25 (Mott 1961, "
                       "value from memory); NaN where the state is never bound"})
        return out
