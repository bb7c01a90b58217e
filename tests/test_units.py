"""Unit conversions against CODATA (scipy.constants) and handbook values."""

import math

import numpy as np
import pytest
from scipy import constants as sc
from scipy.constants import physical_constants as pc

from boundscape.errors import InputError
from boundscape.physics.units import (ATOMIC, BOHR_UDUNITS, HARTREE_UDUNITS, convert, effective_atomic_units,
                              nuclear_units, quantity_of)


def test_atomic_energy_unit_is_the_hartree():
    # ħ²/(mₑ a₀²) = E_h: CODATA's own definition of the atomic unit of energy (scipy.constants).
    assert ATOMIC.energy_J == pytest.approx(pc["Hartree energy"][0], rel=1e-9)
    # e²/(4πε₀) = E_h a₀: the coupling unit of atomic units is the Coulomb constant times e².
    assert ATOMIC.coupling_J_m == pytest.approx(sc.e ** 2 / (4 * math.pi * sc.epsilon_0), rel=1e-9)


def test_hartree_in_eV_and_rydberg():
    # CODATA 2022 via scipy.constants: 1 hartree = 27.211386245981 eV = 2 Ry.
    assert convert(1.0, "hartree", "eV") == pytest.approx(pc["Hartree energy in eV"][0], rel=1e-12)
    assert convert(1.0, "hartree", "Ry") == pytest.approx(2.0, rel=1e-11)
    # 1 eV = 1e-6 MeV by the SI prefixes.
    assert convert(1.0, "eV", "MeV") == pytest.approx(1e-6, rel=1e-14)


def test_lengths_and_densities():
    # a₀ = 0.0529177210544 nm (CODATA 2022; value from memory, to the digits shown).
    assert convert(1.0, "bohr", "nm") == pytest.approx(0.0529177210544, rel=1e-11)
    assert convert(1.0, "fm", "bohr") == pytest.approx(1e-15 / pc["Bohr radius"][0], rel=1e-14)
    assert convert(1.0, "cm-3", "m-3") == pytest.approx(1e6, rel=1e-14)
    assert convert(1.0, "bohr-3", "cm-3") == pytest.approx((pc["Bohr radius"][0] * 100) ** -3, rel=1e-12)


def test_temperature_as_energy():
    # 1 eV / k_B = 11604.518 K (NRL Plasma Formulary gives 1.1604e4 K per eV).
    assert convert(1.0, "eV_temperature", "K") == pytest.approx(1.1604e4, rel=1e-4)


def test_mass_units():
    # mₑc² = 0.51099895069 MeV (CODATA 2022 via scipy.constants).
    assert convert(1.0, "me", "MeV/c2") == pytest.approx(pc["electron mass energy equivalent in MeV"][0], rel=1e-9)


def test_udunits_strings_carry_the_constants():
    assert float(HARTREE_UDUNITS.split()[0]) == pc["Hartree energy"][0]
    assert BOHR_UDUNITS == f"{pc['Bohr radius'][0]!r} m"


def test_effective_atomic_units_formulas():
    # a* = (ε_r/μ*) a₀ and Ry* = (μ*/ε_r²) Ry (Yu & Cardona, Fundamentals of Semiconductors, §4.2).
    mu, eps = 0.067, 12.9
    eff = effective_atomic_units(mu, eps)
    assert eff.length_m == pytest.approx(eps / mu * pc["Bohr radius"][0], rel=1e-12)
    rydberg_eV = pc["Rydberg constant times hc in eV"][0]
    assert eff.energy_eV / 2 == pytest.approx(mu / eps ** 2 * rydberg_eV, rel=1e-9)
    # GaAs-like numbers: a* ≈ 10.2 nm, Ry* ≈ 5.48 meV (common practice, no source).
    assert eff.length_m * 1e9 == pytest.approx(10.19, abs=0.01)
    assert eff.energy_eV / 2 * 1e3 == pytest.approx(5.478, abs=0.001)


def test_nuclear_energy_unit():
    # (ħc)²/(μc² b²) with ħc = 197.3269804 MeV fm (CODATA via scipy.constants).
    mu = 938.27208816 / 2  # half the proton mass in MeV/c² (value from memory)
    units = nuclear_units(mu, 1.0)
    hbar_c = pc["reduced Planck constant times c in MeV fm"][0]
    assert units.energy_J / (sc.mega * sc.e) == pytest.approx(hbar_c ** 2 / mu, rel=1e-9)
    assert units.coupling_J_m / (sc.mega * sc.e * 1e-15) == pytest.approx(hbar_c ** 2 / mu, rel=1e-9)


def test_arrays_convert_elementwise():
    x = np.array([1.0, 2.0, 4.0])
    np.testing.assert_allclose(convert(x, "bohr", "m"), x * pc["Bohr radius"][0], rtol=1e-14)


@pytest.mark.parametrize("args, words", [
    ((1.0, "hartree", "nm"), "cannot convert energy"),
    ((1.0, "furlong", "m"), "unknown unit 'furlong'"),
])
def test_bad_units_name_the_problem(args, words):
    with pytest.raises(InputError, match=words):
        convert(*args)


def test_bad_effective_parameters():
    with pytest.raises(InputError, match="permittivity"):
        effective_atomic_units(0.067, -1.0)
    with pytest.raises(InputError, match="reduced_mass_MeV"):
        nuclear_units(float("nan"))
    assert quantity_of("MeV") == "energy"


def test_udunits_converts_the_hartree_with_an_older_electron_volt():
    # What the README says beside the cube's units: UDUNITS-2 (through cf-units) turns the
    # hartree's CODATA 2022 joules into 27.2113744 eV, not CODATA's 27.211386246 eV.
    cf_units = pytest.importorskip("cf_units")
    udunits_eV = cf_units.Unit(HARTREE_UDUNITS).convert(1.0, cf_units.Unit("eV"))
    assert f"{udunits_eV:.9g}" == "27.2113744"
    assert pc["Hartree energy in eV"][0] == pytest.approx(27.211386246, rel=1e-11)
