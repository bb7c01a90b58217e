"""Screening of a point charge by free carriers: the screening length of a mixture of species at a
density and temperature, in three models, its inverse (the density at which it takes a given
value), and where the model holds.

Each species s has charge q_s, a density n_s = x_s n and a temperature T_s = τ_s T proportional to
the conditions (n, T) a sweep runs over.  Linear (static, long-wavelength) screening sums
λ⁻² = Σ_s (q_s²/ε) ∂n_s/∂μ_s over them, ε = ε_r ε₀:

* ``debye``: classical carriers, ∂n/∂μ = n/(k_B T) (Debye–Hückel; NRL Plasma Formulary, p. 28);
* ``thomas_fermi``: a degenerate gas at T = 0, ∂n/∂μ = 3n/(2E_F), E_F = ħ²(6π²n/g)^{2/3}/(2m)
  (Ashcroft & Mermin, *Solid State Physics*, ch. 17);
* ``finite_temperature``: the ideal Fermi gas at T, ∂n/∂μ = (n/k_B T)·F_{−1/2}(η)/F_{1/2}(η)
  (:mod:`.fermi_dirac`), which tends to the first where the gas is classical and to the second
  where it is degenerate.

A species marked ``classical`` (a plasma's ions, whose thermal wavelength is at least √(m_p/m_e)
≈ 43 times the electrons') is screened as a classical gas in every model.

Validity: all three are mean-field (linear-response) models of a weakly coupled gas.  A cell is
flagged, first reason first, where the carriers are strongly coupled (their Coulomb energy at the
mean spacing exceeds both k_B T and E_F), where Debye screening is applied to a degenerate gas
(k_B T < E_F) or Thomas–Fermi screening to a classical one, or where the screening sphere holds
fewer than one carrier.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy import constants as sc

from .fermi_dirac import screening_ratio

__all__ = ["MODELS", "MODEL_DESCRIPTIONS", "VALIDITY_FLAGS", "VALIDITY_REASONS", "Species", "Carriers", "Validity"]

MODELS = ("finite_temperature", "debye", "thomas_fermi")
MODEL_DESCRIPTIONS = {
    "finite_temperature": "ideal Fermi gas at T: lambda^-2 = sum_s (q_s^2/eps) dn_s/dmu_s, dn/dmu = (n/k_B T) "
                          "F_-1/2(eta)/F_1/2(eta) (complete Fermi-Dirac integrals, mpmath polylog)",
    "debye": "classical (Debye-Hueckel): lambda^-2 = sum_s q_s^2 n_s/(eps k_B T_s)",
    "thomas_fermi": "degenerate gas at T = 0 (Thomas-Fermi): lambda^-2 = sum_s 3 q_s^2 n_s/(2 eps E_F,s)",
}

# CF flag_values are the positions here; one flag per cell, the first that applies in this order.
VALIDITY_FLAGS = ("ok", "strongly_coupled", "debye_model_on_degenerate_gas", "thomas_fermi_model_on_classical_gas",
                  "few_carriers_in_screening_sphere")
VALIDITY_REASONS = {
    "ok": "weakly coupled, many carriers in the screening sphere, the model fits the gas's degeneracy",
    "strongly_coupled": "the carriers' Coulomb energy at their mean spacing exceeds both k_B T and E_F: linear "
                        "(mean-field) screening fails",
    "few_carriers_in_screening_sphere": "fewer than one carrier within the screening length, (4 pi/3) n lambda^3 "
                                        "< 1: a screening cloud is not defined",
    "debye_model_on_degenerate_gas": "Debye screening on a degenerate gas, k_B T < E_F: use finite_temperature "
                                     "(or thomas_fermi)",
    "thomas_fermi_model_on_classical_gas": "Thomas-Fermi screening on a non-degenerate gas, k_B T > E_F: use "
                                           "finite_temperature (or debye)",
}


@dataclass(frozen=True)
class Species:
    """One kind of screening carrier.

    Attributes
    ----------
    name : str
    charge : float
        |q_s| in units of e.
    mass_kg : float
        Its (density-of-states) mass.
    degeneracy : float
        Spin (× valley) degeneracy g.
    density_ratio, temperature_ratio : float
        n_s/n and T_s/T.
    classical : bool
        Screened as a classical gas in every model.
    """

    name: str
    charge: float
    mass_kg: float
    degeneracy: float = 2.0
    density_ratio: float = 1.0
    temperature_ratio: float = 1.0
    classical: bool = False

    def quantum_density(self, kT):
        """g n_Q = g (m k_B T/2πħ²)^{3/2}, m⁻³, at the species' own k_B T (J)."""
        return self.degeneracy * (self.mass_kg * kT / (2 * math.pi * sc.hbar ** 2)) ** 1.5

    def fermi_energy(self, n):
        """E_F = ħ²(6π² n/g)^{2/3}/(2m), J, of the species at density n (m⁻³)."""
        return sc.hbar ** 2 * (6 * math.pi ** 2 * n / self.degeneracy) ** (2 / 3) / (2 * self.mass_kg)


@dataclass(frozen=True)
class Validity:
    """Where a screening model holds, per condition (arrays of the conditions' shape).

    ``coupling_parameter`` Γ = e²/(4πε a k_B T) with a = (3/4πn)^{1/3}; ``debye_number``
    N_D = (4π/3) n λ_D³ with the classical Debye length of all species; ``degeneracy`` k_B T/E_F of
    the first species; ``flag`` the index into :data:`VALIDITY_FLAGS`."""

    coupling_parameter: np.ndarray
    debye_number: np.ndarray
    degeneracy: np.ndarray
    flag: np.ndarray


@dataclass(frozen=True)
class Carriers:
    """The screening carriers of a medium of relative permittivity ``permittivity``: ``species``,
    the first of which sets the coupling and the degeneracy reported."""

    species: tuple[Species, ...]
    permittivity: float = 1.0

    @property
    def epsilon(self) -> float:
        return self.permittivity * sc.epsilon_0

    def _term(self, s: Species, n, kT, model):
        # (q²/ε) ∂n_s/∂μ_s of one species, m⁻², broadcasting n (m⁻³) and kT (J).
        n_s, kT_s = s.density_ratio * n, s.temperature_ratio * kT
        classical = (s.charge * sc.e) ** 2 * n_s / (self.epsilon * kT_s)
        if s.classical or model == "debye":
            return classical
        if model == "thomas_fermi":
            return 1.5 * (s.charge * sc.e) ** 2 * n_s / (self.epsilon * s.fermi_energy(n_s))
        return classical * screening_ratio(np.log(n_s / s.quantum_density(kT_s)))

    def inverse_square_length(self, n, kT, model: str):
        """λ⁻² (m⁻²) at density n (m⁻³) and k_B T (J), broadcast together."""
        n, kT = np.broadcast_arrays(np.asarray(n, dtype=float), np.asarray(kT, dtype=float))
        return sum(self._term(s, n, kT, model) for s in self.species)

    def screening_length(self, n, kT, model: str):
        """λ (m) at density n (m⁻³) and k_B T (J)."""
        return 1.0 / np.sqrt(self.inverse_square_length(n, kT, model))

    def debye_length(self, n, kT):
        """The classical Debye length of all species (m), whatever the model."""
        return self.screening_length(n, kT, "debye")

    def density_at(self, screening_length, kT, model: str):
        """The density n (m⁻³) at which λ(n, T) equals ``screening_length`` (m): λ⁻² grows
        monotonically with n in every model (∂n/∂μ does), so the root is unique."""
        lam, kT = np.broadcast_arrays(np.asarray(screening_length, dtype=float), np.asarray(kT, dtype=float))
        target = 1.0 / lam ** 2
        # Debye's λ⁻² is linear in n: its density starts the bracket, in ln n.
        classical = target / self.inverse_square_length(1.0, kT, "debye")
        if model == "debye":
            return classical
        return _increasing_root(lambda log_n, kT: np.log(self.inverse_square_length(np.exp(log_n), kT, model)),
                                np.log(target), np.log(classical), kT)

    def validity(self, n, kT, model: str) -> Validity:
        """Γ, N_D, k_B T/E_F and the flag of :data:`VALIDITY_FLAGS` at each (n, k_B T)."""
        n, kT = np.broadcast_arrays(np.asarray(n, dtype=float), np.asarray(kT, dtype=float))
        first = self.species[0]
        n_1, kT_1 = first.density_ratio * n, first.temperature_ratio * kT
        spacing = (3 / (4 * math.pi * n_1)) ** (1 / 3)
        coulomb = (first.charge * sc.e) ** 2 / (4 * math.pi * self.epsilon * spacing)
        fermi = first.fermi_energy(n_1)
        debye = self.debye_length(n, kT)
        lam = self.screening_length(n, kT, model)
        flag = np.zeros(n.shape, np.int8)

        def mark(where, name):
            flag[(flag == 0) & where] = VALIDITY_FLAGS.index(name)

        mark(coulomb > np.maximum(kT_1, fermi), "strongly_coupled")
        if model == "debye":
            mark(kT_1 < fermi, "debye_model_on_degenerate_gas")
        elif model == "thomas_fermi":
            mark(kT_1 > fermi, "thomas_fermi_model_on_classical_gas")
        mark(4 * math.pi / 3 * n_1 * lam ** 3 < 1.0, "few_carriers_in_screening_sphere")
        return Validity(coulomb / kT_1, 4 * math.pi / 3 * n_1 * debye ** 3, kT_1 / fermi, flag)


def _increasing_root(f, target, guess, *args):
    """x with f(x, *args) = target for an increasing f, elementwise, near ``guess`` (``args``
    broadcast with ``target``, as ``find_root`` passes each element its own): the bracket is grown
    by steps of 4 in x (f grows at least like x/3 here, so a few steps do) and the root found by
    ``scipy.optimize.elementwise.find_root``."""
    from scipy.optimize import elementwise

    target, guess, *args = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (target, guess, *args)))
    lo, hi = guess - 4.0, guess + 4.0
    for _ in range(100):
        low, high = f(lo, *args) > target, f(hi, *args) < target
        if not (low.any() or high.any()):
            break
        lo, hi = np.where(low, lo - 4.0, lo), np.where(high, hi + 4.0, hi)
    result = elementwise.find_root(lambda x, t, *rest: f(x, *rest) - t, (lo, hi), args=(target, *args))
    return np.exp(np.asarray(result.x, dtype=float))
