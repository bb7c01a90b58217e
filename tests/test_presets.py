"""Presets: physical conditions to engine inputs, against handbook formulas and the engine."""

import argparse
import json
import math

import numpy as np
import pytest
import xarray as xr
from scipy import constants as sc
from scipy.constants import physical_constants as pc

import boundscape as bs
from boundscape.engine import FAMILIES
from boundscape.cli import convert as convert_command
from boundscape.errors import InputError
from boundscape.cube import add_physical_coordinates
from boundscape.physics.presets import NO_PRESET, PRESETS, Nuclear, Plasma, Semiconductor, from_config
from boundscape.physics.units import ATOMIC

BOHR = pc["Bohr radius"][0]
HBAR_C = pc["reduced Planck constant times c in MeV fm"][0]
# Rogers, Graboske & Harwood, Phys. Rev. A 1, 1577 (1970): the Yukawa ground state is lost at
# λ = 1/(1.19061 Z μ) (value from memory).
RGH_CRITICAL = 1.19061


@pytest.mark.parametrize("T_eV, n_cm3", [(1.0, 1.0), (10.0, 1e18), (1e3, 1e22), (0.1, 1e12)])
def test_debye_length_matches_nrl_formulary(T_eV, n_cm3):
    # NRL Plasma Formulary: λ_D = 7.43e2 (T_e/eV)^{1/2} (n_e/cm^-3)^{-1/2} cm, to its 3 digits.
    lam_cm = Plasma().debye_length(n_cm3 * 1e6, T_eV) * 100
    coefficient = lam_cm / math.sqrt(T_eV / n_cm3)
    assert f"{coefficient:.3g}" == "743"


def test_ions_add_to_the_inverse_square_debye_length():
    # 1/λ_D² = Σ_s n_s q_s²/(ε₀ k T_s) (Chen, Introduction to Plasma Physics, §1.4; from memory):
    # quasi-neutral ions of charge 2 (n_i = n_e/2) at T_i = T_e/2 add 2·2 = 4 times the electrons' term.
    n, T = 1e24, 5.0
    electrons = Plasma().debye_length(n, T)
    both = Plasma(species="electrons_and_ions", screening_ion_charge=2.0, ion_temperature_ratio=0.5).debye_length(n, T)
    assert both == pytest.approx(electrons / math.sqrt(5.0), rel=1e-12)
    same = Plasma(species="electrons_and_ions").debye_length(n, T)
    assert same == pytest.approx(electrons / math.sqrt(2.0), rel=1e-12)


@pytest.mark.parametrize("species", ["electrons", "electrons_and_ions"])
def test_plasma_density_inverts_debye_length(species):
    plasma = Plasma(species=species, screening_ion_charge=3.0, screening="debye")
    n = np.logspace(18, 28, 7)
    lam = plasma.debye_length(n, 20.0)
    np.testing.assert_allclose(plasma.density_for(lam, 20.0), n, rtol=1e-12)
    engine = plasma.to_engine(2.0, 1e26, 20.0)
    assert engine.screening_length == pytest.approx(plasma.debye_length(1e26, 20.0) / BOHR, rel=1e-14)
    assert (engine.strength, engine.mass) == (2.0, 1.0)


def test_thomas_fermi_wavenumber():
    # q_TF² = (4/π) k_F/a* with k_F = (3π² n)^{1/3} (Ashcroft & Mermin, Solid State Physics, eq. 17.55
    # with a₀ -> a* in a medium; value from memory), an independent route to the same formula.
    semi = Semiconductor(effective_mass=0.067, permittivity=12.9, screening="thomas_fermi")
    n = np.array([1e22, 1e23, 1e24, 1e25])
    a_star = 12.9 / 0.067 * BOHR
    k_F = (3 * math.pi ** 2 * n) ** (1 / 3)
    q = np.sqrt(4 * k_F / (math.pi * a_star))
    np.testing.assert_allclose(semi.screening_length(n), 1 / q, rtol=1e-12)
    np.testing.assert_allclose(semi.density_for(1 / q), n, rtol=1e-11)


def test_semiconductor_debye_length_is_the_plasma_one_times_sqrt_permittivity():
    # λ = sqrt(ε_r ε₀ k T/(n e²)): the NRL Formulary's 7.43e2 (T/eV)^{1/2} n^{-1/2} cm times √ε_r.
    semi = Semiconductor(effective_mass=0.2, permittivity=11.7, screening="debye", temperature_K=300.0)
    n_cm3 = 1e17
    T_eV = sc.k * 300.0 / sc.e
    coefficient = semi.screening_length(n_cm3 * 1e6) * 100 / math.sqrt(11.7 * T_eV / n_cm3)
    assert f"{coefficient:.3g}" == "743"
    np.testing.assert_allclose(semi.density_for(semi.screening_length(1e23)), 1e23, rtol=1e-12)


def test_semiconductor_mappings_share_the_one_scale_variable():
    # Effective units (Z=1, μ=1, λ in a*) and true atomic units (Z=1/ε_r, μ=μ*, λ in bohr) give the
    # same Z·μ·λ and the same energy unit Z²μ hartree = (μ*/ε_r²) hartree (one-scale law).
    semi = Semiconductor(effective_mass=0.067, permittivity=12.9)
    eff = semi.to_engine(3e23, units="effective")
    atomic = semi.to_engine(3e23, units="atomic")
    assert eff.strength * eff.mass * eff.screening_length == pytest.approx(
        atomic.strength * atomic.mass * atomic.screening_length, rel=1e-12)
    assert eff.units.energy_J == pytest.approx(atomic.strength ** 2 * atomic.mass * pc["Hartree energy"][0], rel=1e-9)


def test_semiconductor_mappings_agree_on_the_engine():
    semi = Semiconductor(effective_mass=0.067, permittivity=12.9)
    eff = semi.to_engine(1e22, units="effective")
    atomic = semi.to_engine(1e22, units="atomic")
    e_eff = bs.bound_levels(bs.potential("yukawa", eff.strength, eff.screening_length, eff.mass), 0).energy
    e_atomic = bs.bound_levels(bs.potential("yukawa", atomic.strength, atomic.screening_length, atomic.mass), 0).energy
    assert len(e_eff) == len(e_atomic) > 0
    np.testing.assert_allclose(e_eff * eff.units.energy_J, e_atomic * pc["Hartree energy"][0], rtol=1e-8)


def test_nuclear_one_scale_variable_equals_true_atomic_units():
    # μ g² λ/(ħc)² against Z μ λ in true atomic units: Z = g²/(α ħc), μ/mₑ, λ/a₀ (CODATA via scipy).
    nuc = Nuclear(reduced_mass_MeV=469.4591)
    g2, lam = 45.0, 1.4
    Z = g2 / (sc.alpha * HBAR_C)
    mu = 469.4591 / pc["electron mass energy equivalent in MeV"][0]
    lam_bohr = lam * 1e-15 / BOHR
    assert nuc.dimensionless(g2, lam) == pytest.approx(Z * mu * lam_bohr, rel=1e-9)
    engine = nuc.to_engine(g2, lam)
    assert engine.strength * engine.mass * engine.screening_length == pytest.approx(Z * mu * lam_bohr, rel=1e-9)
    np.testing.assert_allclose(nuc.coupling_MeV_fm(engine.strength), g2, rtol=1e-12)


def test_nuclear_first_bound_state_threshold():
    # A first bound state appears at 2μg²λ/ħ² = 2/1.19061 ≈ 1.6798 (Rogers, Graboske & Harwood 1970).
    nuc = Nuclear(reduced_mass_MeV=469.4591)
    g2 = 40.0
    engine = nuc.to_engine(g2, 1.0)
    lam_c = bs.critical_screening_length("yukawa", engine.strength, 0, 0, mass=engine.mass)
    range_fm = lam_c * engine.units.length_m / 1e-15
    assert 2 * nuc.dimensionless(g2, range_fm) == pytest.approx(2 / RGH_CRITICAL, rel=5e-6)
    assert f"{2 * nuc.dimensionless(g2, range_fm):.5g}" == "1.6798"


def _toy_cube(mass=1.0):
    # Coordinates only: the physical coordinates depend on nothing else.
    lam = ("screening_length", np.geomspace(1, 100, 5), {"units": f"{BOHR!r} m", "length_unit_in_m": BOHR})
    return xr.Dataset(coords={"strength": [1.0, 2.0], "screening_length": lam}, attrs={"mass": mass})


@pytest.mark.parametrize("screening", ["debye", "finite_temperature"])
def test_physical_coordinates_plasma(screening):
    # The density coordinate is in cm-3 and gives back each screening length in the preset's model.
    plasma = Plasma(temperature_eV=10.0, screening=screening)
    ds = add_physical_coordinates(_toy_cube(), plasma)
    lam = ds["screening_length"].values
    np.testing.assert_allclose(ds["screening_length_nm"], lam * BOHR * 1e9, rtol=1e-14)
    np.testing.assert_allclose(plasma.screening_length_at(ds["electron_density"].values * 1e6, 10.0), lam * BOHR,
                               rtol=1e-12)
    assert ds["electron_density"].attrs["units"] == "cm-3"
    if screening == "debye":  # NRL Plasma Formulary: λ_D = 7.43e2 (T/eV)^{1/2} (n/cm^-3)^{-1/2} cm
        coefficient = lam * BOHR * 100 / np.sqrt(10.0 / ds["electron_density"].values)
        assert {f"{c:.3g}" for c in coefficient} == {"743"}


def test_physical_coordinates_semiconductor_and_nuclear():
    semi = Semiconductor(effective_mass=0.067, permittivity=12.9, units_choice="atomic")
    ds = add_physical_coordinates(_toy_cube(mass=0.067), semi)
    np.testing.assert_allclose(ds["donor_charge"], [12.9, 25.8])
    with pytest.raises(InputError, match="potential.mass"):
        add_physical_coordinates(_toy_cube(mass=1.0), semi)
    eff = add_physical_coordinates(_toy_cube(), Semiconductor(effective_mass=0.067, permittivity=12.9))
    # Effective units: lengths in a* = (ε_r/μ*) a₀ as a UDUNITS scaled unit (Yu & Cardona §4.2).
    assert float(eff["screening_length"].attrs["units"].split()[0]) == pytest.approx(12.9 / 0.067 * BOHR, rel=1e-12)
    nuc = Nuclear(reduced_mass_MeV=469.4591)
    ds = add_physical_coordinates(_toy_cube(), nuc)
    np.testing.assert_allclose(ds["coupling"], np.array([1.0, 2.0]) * HBAR_C ** 2 / 469.4591, rtol=1e-9)
    np.testing.assert_allclose(ds["screening_length_fm"], ds["screening_length"].values, rtol=1e-14)


def test_config_sections():
    assert isinstance(from_config({"kind": "nuclear", "reduced_mass_MeV": 100.0}), Nuclear)
    assert from_config({"kind": "semiconductor", "units": "atomic"}).units_choice == "atomic"
    assert from_config(None) is NO_PRESET and from_config({}) is NO_PRESET
    with pytest.raises(InputError, match="preset.kind"):
        from_config({"kind": "stellar"})
    with pytest.raises(InputError, match="preset plasma"):
        from_config({"kind": "plasma", "colour": 3})
    with pytest.raises(InputError, match="species"):
        Plasma(species="ions")


def _convert(*argv):
    parser = argparse.ArgumentParser(prog="boundscape")
    convert_command.register(parser.add_subparsers(dest="command"))
    args = parser.parse_args(["convert", *argv])
    return args.func(args)


def test_convert_command_json(capsys):
    assert _convert("plasma", "--density", "1", "--temperature", "1", "--format", "json") == 0
    rows = {(r["quantity"], r["unit"]): r["value"] for r in json.loads(capsys.readouterr().out)}
    # NRL Plasma Formulary: 7.43e2 cm at T_e = 1 eV, n_e = 1 cm^-3.
    assert f"{rows[('Debye length', 'm')] * 100:.3g}" == "743"
    assert _convert("nuclear", "--reduced-mass", "469.4591", "--coupling", "45", "--range", "1.4",
                    "--format", "json") == 0
    rows = {r["quantity"]: r["value"] for r in json.loads(capsys.readouterr().out)}
    assert rows["2μ g² λ/ħ²"] == pytest.approx(2 * 469.4591 * 45 * 1.4 / HBAR_C ** 2, rel=1e-12)


def test_convert_command_table(capsys):
    assert _convert("unit", "1", "hartree", "eV") == 0
    out = capsys.readouterr().out
    assert out.split()[-2] == f"{pc['Hartree energy in eV'][0]:.10g}"
    assert _convert("semiconductor", "--effective-mass", "0.067", "--permittivity", "12.9", "--density", "1e17") == 0
    out = capsys.readouterr().out
    assert "effective Bohr radius a*" in out and "atomic units: strength" in out
    with pytest.raises(InputError, match="--density must be positive"):
        _convert("plasma", "--density", "-1", "--temperature", "1")


def _cube_with(preset, mass=1.0, config_yaml="sweep: unit\n"):
    # A real cube model (boundscape.cube.build_cube) with one level, read under a preset.
    from boundscape.cube import build_cube

    shape = (1, 2, 1, 1)
    levels = {"energy": np.full(shape, -0.5), "energy_error": np.full(shape, 1e-12), "mean_radius": np.full(shape, 1.5),
              "num_bound": np.ones(shape[:3], np.int32), "status": np.zeros(shape[:3], np.int8), "reasons": []}
    criticals = {"critical_screening_length": np.full((1, 1, 1), 0.84), "critical_flag": np.zeros((1, 1, 1), np.int8),
                 "reasons": []}
    provenance = {"sweep": "unit", "family": "yukawa", "mass": mass, "config_yaml": config_yaml,
                  "config_sha256": "0" * 64, "version": "0", "git_commit": None, "history": "test"}
    ds = build_cube({"strength": [1.0], "screening_length": [10.0, 20.0], "l": [0], "n_r_max": 1}, levels, criticals,
                    provenance=provenance)
    return add_physical_coordinates(ds, preset)


def _all_attrs(ds):
    return {**ds.attrs, **{f"{name}:{key}": value for name, var in ds.variables.items()
                           for key, value in var.attrs.items()}}


@pytest.mark.parametrize("preset", [Semiconductor(effective_mass=0.067, permittivity=12.9),
                                    Nuclear(reduced_mass_MeV=469.4591)], ids=["semiconductor", "nuclear"])
def test_metadata_describes_the_units_stored(preset):
    ds = _cube_with(preset)
    attrs = _all_attrs(ds)
    # Nothing left that claims hartree, bohr or electron masses.
    for key, value in attrs.items():
        assert not key.split(":")[-1].startswith(("hartree", "bohr")), key
        if isinstance(value, str) and key.split(":")[-1] in ("comment", "mass_units", "long_name"):
            assert "atomic units: energies in hartree" not in value and value != "electron masses", key
    if isinstance(preset, Semiconductor):
        # 2Ry* = (μ*/ε_r²) hartree, a* = (ε_r/μ*) a₀ (Yu & Cardona, §4.2): ~10.96 meV and ~10.19 nm for GaAs.
        energy_eV = 0.067 / 12.9 ** 2 * pc["Hartree energy in eV"][0]
        length_m = 12.9 / 0.067 * BOHR
        assert ds.attrs["mass_units"].startswith("mu* = 0.067")
        assert "charge number" in ds.strength.attrs["long_name"] or "donor" in ds.strength.attrs["long_name"]
    else:
        energy_eV = HBAR_C ** 2 / 469.4591 * 1e6
        length_m = 1e-15
        assert "charge number" not in ds.strength.attrs["long_name"] and "g^2" in ds.strength.attrs["long_name"]
    for name in ("energy", "energy_error"):
        assert ds[name].attrs["energy_unit_in_eV"] == pytest.approx(energy_eV, rel=1e-9)
        assert float(ds[name].attrs["units"].split()[0]) == pytest.approx(energy_eV * sc.e, rel=1e-9)
    for name in ("mean_radius", "screening_length", "critical_screening_length"):
        assert ds[name].attrs["length_unit_in_m"] == pytest.approx(length_m, rel=1e-12)
    # A ~5 meV donor level read with the cube's own factor is ~5 meV, not ~13 eV.
    assert ds.attrs["energy_unit_in_eV"] == pytest.approx(energy_eV, rel=1e-9)


def test_plasma_strength_is_the_nuclear_charge_and_institution_comes_from_config():
    ds = _cube_with(Plasma())
    assert ds.strength.attrs["long_name"] == "nuclear charge Z of the hydrogen-like ion"
    assert ds.energy.attrs["energy_unit_in_eV"] == pc["Hartree energy in eV"][0]  # atomic units: still true
    assert "institution" not in ds.attrs
    named = _cube_with(NO_PRESET, config_yaml="sweep: unit\ninstitution: Example Plasma Laboratory\n")
    assert named.attrs["institution"] == "Example Plasma Laboratory"


# ---------------------------------------------------------------------------------------------
# One class answers every question: the registry, the null preset, the trades' new answers.

EVERY_PRESET = [Plasma(), Plasma(species="electrons_and_ions", temperature_eV=3.0),
                Semiconductor(effective_mass=0.067, permittivity=12.9),
                Semiconductor(effective_mass=0.2, permittivity=11.7, screening="debye", temperature_K=77.0),
                Semiconductor(effective_mass=0.067, permittivity=12.9, hole_mass=0.5),
                Nuclear(reduced_mass_MeV=469.4591), Nuclear(reduced_mass_MeV=938.0, length_fm=2.0), NO_PRESET,
                # the variants a family's own reading gives (physics/presets/ion_sphere.py, nuclear_depth.py)
                Plasma(ion_sphere_charge=2.0).for_family(FAMILIES["ion_sphere"]),
                Nuclear(reduced_mass_MeV=469.4591).for_family(FAMILIES["woods_saxon"])]


@pytest.mark.parametrize("preset", EVERY_PRESET, ids=repr)
def test_every_preset_answers_every_question(preset):
    # Nothing a caller asks is left to NotImplementedError: adding a preset that forgets an
    # answer fails here.
    units = preset.unit_system(1.0)
    assert units.length_m > 0 and units.energy_J > 0
    length_name, energy_name = preset.unit_names()
    assert length_name and energy_name
    attrs = {"long_name": "charge number Z", "units": "1"}
    assert preset.strength_label(attrs) and preset.strength_text(2.0, attrs)
    np.testing.assert_array_equal(np.shape(preset.strength_values(np.array([1.0, 2.0]))), (2,))
    assert preset.sweep_mass(None, {}) > 0
    coords = preset.physical_coordinates(np.array([1.0, 2.0]), np.array([1e-9, 1e-8]))
    assert all(set(dims) <= {"strength", "screening_length"} and attrs["units"] for dims, _, attrs in coords.values())
    columns = preset.critical_length_columns(1.0, 5.0)
    assert all(math.isfinite(v) for v in columns.values())
    shown = preset.command_line_reading()
    assert set(shown) == {"units", "energy_unit", "energy_factor", "length_unit", "length_factor", "description"}
    strength, text = preset.strength_input(50.0)
    assert strength > 0 and text
    assert preset.has_condition_map == (preset.density_name is not None)
    # A sweep over the trade's conditions: each condition gets a positive engine length.
    if preset.condition_keys:
        axes = {key: np.array([1e17, 1e19]) if "density" in key else np.array([3.0, 30.0])
                for key in preset.condition_keys}
        grid = preset.condition_grid(np.array([1.0, 2.0]), axes)
        assert grid.engine_length.shape == tuple(v.size for v in grid.length_values)
        assert np.all(grid.engine_length > 0) and np.all(grid.engine_strength > 0)
        assert set(grid.attributes) >= {grid.strength_dim, *grid.length_dims}
        assert all(preset.condition_labels[name] for name in grid.length_dims)
    if preset.validity_flags is not None:
        names, reasons = preset.validity_flags
        assert names[0] == "ok" and set(reasons) == set(names)
        valid = preset.validity(np.array([1e20, 1e26]), np.array([preset.reference_temperature]))
        assert valid.flag.shape == (2,) and np.all(valid.coupling_parameter > 0)
        lam_c = np.full((1, 1, 2), 5e-9)
        criticals = preset.trade_criticals(lam_c, None)
        (name, (dims, values, attrs)), *_ = criticals.items()
        assert name == f"loss_{preset.density_name}" and attrs["units"] == "cm-3" and np.all(values > 0)
    if preset.kind is None:
        assert preset.shown_energy_unit() == (None, None) and coords == {} and columns == {}
    else:
        # The trade's units against the cube's: the factor is the cube unit's size in the trade's unit.
        name, factor = preset.shown_energy_unit()
        assert (name, factor) == (preset.energy_unit.name, units.energy_J / preset.energy_unit.size)
        assert isinstance(preset, PRESETS[preset.kind])  # the kind's class, or a family's variant of it
        assert f"critical_screening_length_{preset.length_unit.name}" in columns


def test_no_preset_is_atomic_units_and_leaves_a_cube_alone():
    ds = _cube_with(NO_PRESET)
    assert NO_PRESET.unit_system(1.0) is ATOMIC and NO_PRESET.condition_axes is None
    xr.testing.assert_identical(add_physical_coordinates(ds, NO_PRESET), ds)
    assert "preset" not in ds.attrs and ds.energy.attrs["energy_unit_in_eV"] == pc["Hartree energy in eV"][0]


def test_debye_number_matches_nrl_formulary():
    # NRL Plasma Formulary (2019), p. 28: N_D = (4π/3) n λ_D³ = 1.72e9 T^{3/2} n^{-1/2} (T in eV,
    # n in cm⁻³), to its 3 digits; below N_D = 1 the screening sphere is empty and the cell flagged.
    plasma = Plasma()
    for T_eV, n_cm3 in [(1.0, 1e12), (100.0, 1e20)]:
        n = n_cm3 * 1e6
        number = plasma.debye_number(n, plasma.debye_length(n, T_eV))
        assert f"{number / (T_eV ** 1.5 / math.sqrt(n_cm3)):.3g}" == "1.72e+09"
        assert plasma.validity(n, T_eV).debye_number == pytest.approx(number, rel=1e-12)
    valid = Plasma(screening="debye").validity(np.array([1e24, 1e30]), 10.0)
    assert valid.debye_number[0] > 1 > valid.debye_number[1] and valid.flag[0] == 0 and valid.flag[1] != 0


def test_degenerate_density_is_where_the_fermi_energy_meets_k_t():
    # E_F = ħ²(3π²n)^{2/3}/(2m*mₑ) (Ashcroft & Mermin, Solid State Physics, ch. 2, with m -> m*mₑ;
    # value from memory) equals k_B T at the semiconductor's validity density.
    semi = Semiconductor(effective_mass=0.067, permittivity=12.9)
    for T in (4.2, 77.0, 300.0):
        n = float(semi.degenerate_density(T))
        fermi = sc.hbar ** 2 * (3 * math.pi ** 2 * n) ** (2 / 3) / (2 * 0.067 * sc.m_e)
        assert fermi == pytest.approx(sc.k * T, rel=1e-12)
        # k_B T/E_F, the cube's degeneracy, is 1 there
        assert float(semi.validity(n, T).degeneracy) == pytest.approx(1.0, rel=1e-12)
    assert NO_PRESET.validity(1.0, 1.0) is None and Nuclear().validity(1.0, 1.0) is None


@pytest.mark.parametrize("preset", [Plasma(species="electrons_and_ions", screening_ion_charge=2.0),
                                    Semiconductor(effective_mass=0.2, permittivity=11.7, screening="debye"),
                                    Semiconductor(effective_mass=0.067, permittivity=12.9)], ids=repr)
def test_loss_density_inverts_the_screening_length(preset):
    # A state of critical length λ_c is lost above the density whose screening length is λ_c.
    for temperature in (preset.reference_temperature, 4 * preset.reference_temperature):
        lam = np.geomspace(1e-9, 1e-6, 4)
        density = preset.loss_density(lam, temperature)
        np.testing.assert_allclose(preset.screening_length_at(density, temperature), lam, rtol=1e-12)
    np.testing.assert_array_equal(preset.loss_density(lam), preset.loss_density(lam, preset.reference_temperature))


def test_loss_table_columns_follow_the_preset():
    # The loss density (the command line's, and the cube's) is where the preset's screening length
    # equals λ_c (NRL Debye length, via test_debye_length_matches_nrl_formulary), in cm⁻³.
    plasma = Plasma(temperature_eV=10.0, screening="debye")
    columns = plasma.critical_length_columns(1.0, 20.0)
    assert list(columns) == ["critical_screening_length_nm"]
    assert columns["critical_screening_length_nm"] == pytest.approx(20.0 * BOHR * 1e9, rel=1e-14)
    columns = plasma.critical_columns(20.0 * BOHR)
    n_m3 = columns["loss_electron_density_cm-3"] * 1e6
    assert plasma.debye_length(n_m3, 10.0) == pytest.approx(20.0 * BOHR, rel=1e-12)
    assert columns["screening_validity"] in ("ok", "strongly_coupled", "few_carriers_in_screening_sphere",
                                             "debye_model_on_degenerate_gas")
    assert math.isnan(plasma.critical_columns(math.inf)["loss_electron_density_cm-3"])
    (dims, loss, _), (_, flag, flag_attrs) = plasma.trade_criticals(np.full((1, 1, 1), 20.0 * BOHR), None).values()
    assert dims == ("strength", "l", "n_r") and loss[0, 0, 0] * 1e6 == pytest.approx(n_m3, rel=1e-12)
    assert flag_attrs["flags"][int(flag[0, 0, 0])] == columns["screening_validity"]
    nuclear = Nuclear(reduced_mass_MeV=469.4591).critical_length_columns(1.0, 1.4)
    assert list(nuclear) == ["critical_screening_length_fm", "two_mu_g2_lambda_over_hbar2"]
    name, g2 = Nuclear(reduced_mass_MeV=469.4591).table_strength(1.0)
    assert name == "coupling_MeV_fm" and g2 == pytest.approx(HBAR_C ** 2 / 469.4591, rel=1e-12)
    assert nuclear["two_mu_g2_lambda_over_hbar2"] == pytest.approx(2 * 469.4591 * g2 * 1.4 / HBAR_C ** 2, rel=1e-12)


def test_grid_axes_and_sweep_mass_are_the_presets_rules():
    from boundscape.sweep import validate_config

    config = {"sweep": "t", "potential": {"family": "yukawa"}, "grid": {
        "coupling_MeV_fm": [40.0], "screening_length": [1.0, 2.0], "l": [0], "n_r_max": 1}}
    with pytest.raises(InputError, match="grid.coupling_MeV_fm: .* needs preset kind nuclear"):
        validate_config({**config, "preset": {"kind": "plasma"}})
    assert validate_config({**config, "preset": {"kind": "nuclear"}})["potential"]["mass"] == 1.0
    assert Plasma(reduced_mass=0.9).sweep_mass(None, {"reduced_mass": 0.9}) == 0.9
    assert Plasma(reduced_mass=0.9).sweep_mass(None, {}) == 1.0  # not given: the sweep's own mass
    with pytest.raises(InputError, match="potential.mass"):
        Semiconductor(units_choice="atomic").sweep_mass(1.0, {})
