"""The nuclear physicist's working wells, each one class (see :mod:`.family`): the Woods–Saxon
well and the Malfliet–Tjon sum of two Yukawas (an attraction and a shorter-ranged repulsive
core).  In atomic units here; a preset reads them in MeV and fm.

References
----------
R. D. Woods and D. S. Saxon, "Diffuse surface optical model for nucleon-nuclei scattering",
Phys. Rev. 95, 577 (1954).
R. A. Malfliet and J. A. Tjon, "Solution of the Faddeev equations for the triton problem using
local two-particle interactions", Nucl. Phys. A127, 161 (1969).
"""

from __future__ import annotations

import math

import numpy as np

from ...checks import positive
from ...errors import InputError
from .builtin import DepthWell
from .cell_potential import Potential
from .family import TAIL_EXPONENT, Family, Parameter, register

__all__ = ["WoodsSaxon", "TwoYukawa", "MALFLIET_TJON_III"]

# Malfliet–Tjon III (the ³S₁ set): V_R = 1438.720 MeV fm, μ_R = 3.11 fm⁻¹, V_A = 626.885 MeV fm,
# μ_A = 1.55 fm⁻¹ (Malfliet & Tjon 1969, table 1; value from memory).  As this family's ratios:
# c = V_R/V_A and ρ = μ_A/μ_R; with g = V_A, λ = 1/μ_A and ħ²/m = 41.47 MeV fm² it binds the
# deuteron by about 2.23 MeV (tests/test_families_two_yukawa.py).
MALFLIET_TJON_III = {"core_strength": 1438.720 / 626.885, "core_range": 1.55 / 3.11}


def _positive(name, value):
    return positive(name, value)


def _not_negative(name, value):
    if value is None or isinstance(value, (bool, np.bool_)):
        raise InputError(f"{name} must be a number, got {value!r}")
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be a number, got {value!r}") from None
    if not math.isfinite(number) or number < 0:
        raise InputError(f"{name} must be zero or positive and finite, got {number:g}")
    return number


@register
class WoodsSaxon(DepthWell):
    """The Woods–Saxon well, V(r) = −V₀ / (1 + e^{(r−R)/a}) (Woods & Saxon 1954).

    strength = V₀, the depth (hartree); screening_length = R, the half-depth radius (bohr); own
    parameter ``diffuseness`` = a (bohr), the surface thickness (V falls from 0.9 V₀ to 0.1 V₀
    over 4 ln 3 · a ≈ 4.4 a).  Its tail is exponential, V ≈ −V₀ e^{−(r−R)/a}: a state is lost as
    V₀ or R falls, and the support is R + 50a, beyond which |V| < e⁻⁵⁰ V₀.  As a → 0 it becomes
    the square well of depth V₀ and radius R.

    Not declared ``analytic``: the Fermi function has poles at r = R + iπa(2k + 1), and the 30°
    exterior ray of the resonance solver (:mod:`..continuum.siegert`), started at the bottom
    r_m of the effective potential's well, sweeps past the first of them whenever
    R − r_m > √3·πa ≈ 5.4a — always as a → 0, and for wide wells with thin surfaces — and
    the solver has no way of telling: past a pole the continued solution is another function.
    Resonances are followed on the real axis instead, as for tables (narrow ones to full
    accuracy; broad ones lose digits or are reported out of reach).
    """

    name, formula_text = "woods_saxon", "-V0/(1+exp((r-R)/a))"
    display_name = "Woods–Saxon"
    parameters = (Parameter("diffuseness", "bohr", "surface diffuseness a of the Woods-Saxon well", None,
                            _positive),)
    strength_meaning, length_meaning = "depth V0 (hartree)", "radius R (bohr), where V = -V0/2"
    strength_long_name, strength_dimension = "well depth V0", "energy"
    strength_symbol = "V0"
    length_kind = "well_radius"
    length_long_name = "radius of the Woods-Saxon well"  # where V = -V0/2; figures add the symbol R

    @staticmethod
    def formula(r, p, x, c, continued):
        # p = (V₀, R, μ, a).  The Fermi function written so that exp never overflows: e^{−t}
        # beyond the radius.  Smooth everywhere, so ``continued`` changes nothing.
        t = (r - p[1]) / p[3]
        if t > 0.0:
            e = math.exp(-t)
            return -p[0] * e / (1.0 + e)
        return -p[0] / (1.0 + math.exp(t))

    def support(self, pot):
        return float(pot.screening_length + TAIL_EXPONENT * pot.params["diffuseness"])

    def critical_strength_start(self, screening_length, mass, params):
        width = screening_length + params["diffuseness"]
        return 1.0 / (2 * mass * width * width)


@register
class TwoYukawa(Family):
    """Two Yukawas, an attraction and a repulsive core (the Malfliet–Tjon form):

        V(r) = (−g e^{−r/λ} + c·g e^{−r/(ρλ)}) / r        (Malfliet & Tjon 1969, eq. 1)

    strength = g, the attraction's strength (V·r → −g as r → 0 without a core; ħc = 1 reads it
    in hartree·bohr); screening_length = λ, the attraction's range (bohr); own parameters
    ``core_strength`` = c (repulsion over attraction, ≥ 0) and ``core_range`` = ρ (the core's
    range over the attraction's).  With c and ρ fixed it is one-scale, V = g·f(r/λ)/r, so
    E(g, λ, μ) = g²μ·E(1, gμλ, 1) exactly.  The defaults are the ratios of Malfliet–Tjon III
    (:data:`MALFLIET_TJON_III`, c ≈ 2.295, ρ ≈ 0.498); c = 0 is the Yukawa potential.
    """

    name, formula_text = "two_yukawa", "(-g exp(-r/λ) + c g exp(-r/(ρλ)))/r"
    display_name = "two-Yukawa (Malfliet–Tjon)"
    one_scale, analytic = True, True
    parameters = (Parameter("core_strength", "1", "strength of the repulsive core over the attraction's, c",
                            MALFLIET_TJON_III["core_strength"], _not_negative),
                  Parameter("core_range", "1", "range of the repulsive core over the attraction's, rho",
                            MALFLIET_TJON_III["core_range"], _positive))
    strength_meaning = "g, the attraction's strength (hartree bohr)"
    length_meaning = "range λ of the attraction (bohr)"
    strength_long_name = "strength g of the attractive Yukawa"
    strength_symbol = coupling_symbol = "g"  # Malfliet–Tjon's V_A, in MeV fm under the nuclear preset
    # length_long_name stays "screening length": λ screens the attraction (and, times ρ, the core)

    @staticmethod
    def formula(r, p, x, c, continued):
        # p = (g, λ, μ, c, ρ)
        return p[0] * (p[3] * np.exp(-r / (p[4] * p[1])) - np.exp(-r / p[1])) / r

    def support(self, pot):
        return TAIL_EXPONENT * pot.screening_length * max(1.0, pot.params["core_range"])

    def critical_length_start(self, strength, mass, params):
        # the core cancels the attraction inside ~ρλ·ln c/(1 − ρ): start a little further out
        return (1.0 + params["core_strength"]) / (strength * mass)

    def unscreened(self, pot):
        """λ → ∞ at fixed ρ: −g(1 − c)/r, a Coulomb potential if c < 1; None (nothing bound) else."""
        charge = pot.strength * (1.0 - pot.params["core_strength"])
        return Potential("coulomb", charge, math.inf, pot.mass) if charge > 0 else None
