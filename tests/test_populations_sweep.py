"""Populations in a sweep (``populations: true``) and on the command line: the cube's variables
held against an independent re-sum of ``bound_levels`` per l, the textbook Saha equation in SI
from scipy.constants, Debye–Hückel's lowering, the CF checker; the CLI's JSON keys and errors.
(The library's own limits — Stewart–Pyatt, Ecker–Kröll, Planck–Larkin's series, freeze-out — are
tested in tests/test_populations_*.py and not repeated here.)"""

from __future__ import annotations

import copy
import json
import math

import numpy as np
import pytest
from scipy import constants as sc

import boundscape as bs
from boundscape import sweep
from boundscape.cli.main import main as cli_entry
from boundscape.errors import InputError
from workflow_steps import build_cube

HARTREE_EV = sc.physical_constants["Hartree energy in eV"][0]
BOHR_M = sc.physical_constants["Bohr radius"][0]
CONFIG = {"sweep": "pops", "potential": {"family": "yukawa"},
          "grid": {"strength": [1.0, 2.0],
                   "electron_density": {"start": 1e19, "stop": 1e24, "num": 6, "spacing": "log"},
                   "electron_temperature": {"start": 1.0, "stop": 100.0, "num": 3, "spacing": "log"},
                   "l": [0], "n_r_max": 2},
          "populations": True, "tiles": {"cells": 8}, "preset": {"kind": "plasma", "screening": "debye"}}
NAMES = ("bound_state_count", "partition_function", "planck_larkin_partition_function", "ionization_energy",
         "continuum_lowering", "continuum_lowering_stewart_pyatt", "continuum_lowering_ecker_kroll",
         "ionized_fraction", "level_set_status")


def build(directory, config):
    """The cube of ``config``, computed with the workflow's own steps in this process."""
    return build_cube(directory, config)
@pytest.fixture(scope="module")
def cube(tmp_path_factory):
    return build(tmp_path_factory.mktemp("pops"), CONFIG)


def resum(pot, kT):
    """U and the state count re-summed with bound_levels per l, until an l binds nothing."""
    u, count, l = 0.0, 0, 0
    while True:
        res = bs.bound_levels(pot, l)
        if res.num_bound == 0:
            return u, count
        assert res.energy.size == res.num_bound
        u += 2 * (2 * l + 1) * float(np.sum(np.exp(-np.asarray(res.energy) / kT)))
        count += 2 * (2 * l + 1) * int(res.num_bound)
        l += 1


def test_every_variable_is_over_the_conditions_with_its_units(cube):
    ds, _ = cube
    for name in NAMES:
        assert ds[name].dims == ("strength", "electron_density", "electron_temperature"), name
        assert ds[name].attrs["long_name"], name
    for name in ("ionization_energy", "continuum_lowering", "continuum_lowering_stewart_pyatt",
                 "continuum_lowering_ecker_kroll"):
        assert ds[name].attrs["units"] == "eV"
    assert "spin weight 2" in ds["ionized_fraction"].attrs["comment"]
    assert "taken as 1" in ds["ionized_fraction"].attrs["comment"]
    assert "Planck" in ds["planck_larkin_partition_function"].attrs["comment"]
    assert ds["level_set_status"].attrs["flag_meanings"].split()[:2] == ["complete", "level_not_converged"]
    assert (ds["level_set_status"] == 0).all()  # Debye-screened: every set here is complete


@pytest.mark.parametrize("z, i, j", [(1.0, 0, 2), (1.0, 3, 0), (2.0, 2, 1), (2.0, 5, 2), (1.0, 5, 0)])
def test_partition_function_is_the_resum_over_every_l_that_binds(cube, z, i, j):
    # The completeness check the issue asks for: re-sum with bound_levels per l until an l binds nothing.
    ds, _ = cube
    cell = ds.sel(strength=z).isel(electron_density=i, electron_temperature=j)
    lam = float(cell["screening_length"])
    kT = float(cell["electron_temperature"]) / HARTREE_EV
    u, count = resum(bs.potential("yukawa", z, lam, 1.0), kT)
    assert int(cell["bound_state_count"]) == count
    if count == 0:
        assert float(cell["partition_function"]) == 0.0 and float(cell["ionized_fraction"]) == 1.0
    else:
        np.testing.assert_allclose(float(cell["partition_function"]), u, rtol=1e-12)


def test_ionized_fraction_is_the_textbook_saha_equation_in_si(cube):
    # n_Z/n_{Z-1} = 2 (2π m_e k T/h²)^{3/2}/(n_e U) (Saha 1920; e.g. Griem, Principles of Plasma
    # Spectroscopy, eq. 6.2, reference from memory), in SI from scipy.constants.
    ds, _ = cube
    T_K = ds["electron_temperature"].values[None, None, :] * sc.eV / sc.k
    n_e = ds["electron_density"].values[None, :, None] * 1e6
    inverse = n_e * ds["partition_function"].values / (2.0 * (2 * math.pi * sc.m_e * sc.k * T_K / sc.h ** 2) ** 1.5)
    np.testing.assert_allclose(ds["ionized_fraction"].values, 1.0 / (1.0 + inverse), rtol=1e-10)


def test_lowering_tends_to_debye_huckel_at_the_lowest_density(cube):
    # ΔI → Z e²/(4πε₀ λ_D) where λ_D ≫ the ion's size (common practice, no source), λ_D from the cube.
    ds, _ = cube
    cell = ds.isel(electron_density=0, electron_temperature=2)
    lam_m = cell["screening_length"].values * BOHR_M
    dh_eV = ds["strength"].values * sc.e / (4 * math.pi * sc.epsilon_0 * lam_m)
    np.testing.assert_allclose(cell["continuum_lowering"].values, dh_eV, rtol=2e-3)
    np.testing.assert_allclose(cell["continuum_lowering_stewart_pyatt"].values, dh_eV, rtol=2e-3)
    # and I₀ = Z² Ry, Ry from scipy.constants
    ry_eV = sc.physical_constants["Rydberg constant times hc in eV"][0]
    np.testing.assert_allclose((cell["ionization_energy"] + cell["continuum_lowering"]).values,
                               ds["strength"].values ** 2 * ry_eV, rtol=1e-9)


def test_pressure_ionization_once_the_1s_is_lost(cube):
    # Where the set binds nothing the ion is bare: fraction 1, I = 0, ΔI = I₀ (common practice, no source).
    ds, _ = cube
    empty = ds["bound_state_count"] == 0
    assert empty.any()
    assert (ds["ionized_fraction"].where(empty) == 1).sum() == empty.sum()
    assert (ds["ionization_energy"].where(empty) == 0).sum() == empty.sum()


def test_populations_do_not_depend_on_the_tiling(cube, tmp_path):
    # common practice, no source: a cell's bits are its own, whatever tile solved it
    ds, _ = cube
    other, plan = build(tmp_path, {**CONFIG, "tiles": {"cells": 3}})
    assert len(plan.tiles) > 4
    for name in NAMES:
        np.testing.assert_array_equal(other[name].values, ds[name].values, err_msg=name)


def test_the_cube_passes_the_cf_checker(cube, tmp_path, cf_findings):
    from boundscape.cube import write_cube

    ds, _ = cube
    path = tmp_path / "pops.nc"
    write_cube(ds, path)
    assert cf_findings(path) == []


@pytest.mark.parametrize("changes, words", [
    ({"preset": None}, "needs preset.kind plasma"),
    ({"preset": {"kind": "semiconductor", "effective_mass": 0.067, "permittivity": 12.9},
      "grid": {"strength": [1.0], "carrier_density": [1e15], "temperature": [10.0], "l": [0], "n_r_max": 1}},
     "needs preset.hole_mass"),
    ({"populations": "yes"}, "populations"),
])
def test_populations_on_a_sweep_it_does_not_fit_is_one_line_naming_the_key(changes, words):
    config = copy.deepcopy(CONFIG)
    for key, value in changes.items():
        if value is None:
            config.pop(key)
            config["grid"] = {"strength": [1.0], "screening_length": [5.0], "l": [0], "n_r_max": 1}
        else:
            config[key] = value
    with pytest.raises(InputError) as info:
        sweep.plan(config)
    message = str(info.value)
    assert "\n" not in message and "populations" in message and words in message, message


def run_cli(capsys, *argv):
    assert cli_entry(["populations", *argv]) == 0
    return capsys.readouterr().out


def test_cli_json_keys_and_values_are_the_cubes(cube, capsys):
    ds, _ = cube
    cell = ds.sel(strength=2.0).isel(electron_density=3, electron_temperature=1)
    out = json.loads(run_cli(capsys, "--preset", "plasma", "--nuclear-charge", "2", "--density",
                             repr(float(cell["electron_density"])), "--temperature",
                             repr(float(cell["electron_temperature"])), "--screening", "debye", "--format", "json"))
    for key, name in [("partition_function", "partition_function"), ("ionized_fraction", "ionized_fraction"),
                      ("continuum_lowering_eV", "continuum_lowering"), ("ionization_energy_eV", "ionization_energy"),
                      ("continuum_lowering_stewart_pyatt_eV", "continuum_lowering_stewart_pyatt"),
                      ("continuum_lowering_ecker_kroll_eV", "continuum_lowering_ecker_kroll"),
                      ("planck_larkin_partition_function", "planck_larkin_partition_function")]:
        np.testing.assert_allclose(out[key], float(cell[name]), rtol=1e-11, err_msg=key)
    assert out["bound_state_count"] == int(cell["bound_state_count"])
    assert out["level_set_status"] == "complete"
    assert out["potential"]["conditions"]["screening_model"] == "debye"


def test_with_screening_ions_the_published_models_see_them_too(tmp_path, capsys):
    config = copy.deepcopy(CONFIG)
    config["grid"].update(strength=[2.0], electron_density=[1e21, 1e23], electron_temperature=[10.0])
    config["preset"] = {"kind": "plasma", "species": "electrons_and_ions", "screening_ion_charge": 2.0}
    ds, _ = build(tmp_path, config)
    capsys.readouterr()  # the steps' progress lines
    cell = ds.isel(strength=0, electron_density=1, electron_temperature=0)
    out = json.loads(run_cli(capsys, "--preset", "plasma", "--nuclear-charge", "2", "--density", "1e23",
                             "--temperature", "10", "--species", "electrons_and_ions", "--screening-ion-charge", "2",
                             "--format", "json"))
    for key in ("continuum_lowering_stewart_pyatt_eV", "continuum_lowering_ecker_kroll_eV", "continuum_lowering_eV",
                "ionized_fraction"):
        np.testing.assert_allclose(out[key], float(cell[key.removesuffix("_eV")]), rtol=1e-11, err_msg=key)
    assert "z* = 2" in ds["continuum_lowering_stewart_pyatt"].attrs["comment"]
    # electrons and ions screen more than electrons alone: SP's lowering is larger (Stewart & Pyatt 1966)
    alone = json.loads(run_cli(capsys, "--preset", "plasma", "--nuclear-charge", "2", "--density", "1e23",
                               "--temperature", "10", "--format", "json"))
    assert out["continuum_lowering_stewart_pyatt_eV"] > alone["continuum_lowering_stewart_pyatt_eV"]


def test_cli_semiconductor_json_is_charge_neutral(capsys):
    out = json.loads(run_cli(capsys, "--preset", "semiconductor", "--effective-mass", "0.067", "--permittivity",
                             "12.9", "--donor-concentration", "1e16", "--temperature-K", "20", "--format", "json"))
    for key in ("donor_concentration_cm-3", "free_density_cm-3", "ionized_fraction", "ionization_energy_meV",
                "continuum_lowering_meV", "screening_length_nm", "status"):
        assert key in out, key
    # charge neutrality without compensation: n = N_D⁺ = f N_D (Sze & Ng §1.4, reference from memory)
    np.testing.assert_allclose(out["free_density_cm-3"], out["ionized_fraction"] * out["donor_concentration_cm-3"],
                               rtol=1e-12)
    # the unscreened donor binding is Ry μ*/ε_r² (hydrogenic donor; common practice, no source)
    ry_meV = sc.physical_constants["Rydberg constant times hc in eV"][0] * 1e3
    np.testing.assert_allclose(out["unscreened_ionization_energy_meV"], ry_meV * 0.067 / 12.9 ** 2, rtol=1e-9)


@pytest.mark.parametrize("argv, words", [
    (["--preset", "nuclear", "--reduced-mass", "400"], "--preset plasma or --preset semiconductor"),
    (["--nuclear-charge", "1", "--density", "1e22", "--temperature", "10"], "needs --preset"),
    (["--preset", "plasma", "--nuclear-charge", "1", "--temperature", "10"], "--density"),
    (["--preset", "plasma", "--nuclear-charge", "1", "--density", "-1", "--temperature", "10"], "-1"),
    (["--preset", "plasma", "--nuclear-charge", "1", "--density", "1e22", "--temperature", "10",
      "--donor-concentration", "1e16"], "--donor-concentration"),
    (["--preset", "semiconductor", "--effective-mass", "0.067", "--permittivity", "12.9", "--temperature-K", "4"],
     "--donor-concentration"),
    (["--preset", "semiconductor", "--effective-mass", "0.067", "--permittivity", "12.9",
      "--donor-concentration", "1e16"], "--temperature-K"),
])
def test_cli_bad_input_is_one_line(capsys, argv, words):
    assert cli_entry(["populations", *argv]) != 0
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and words in err, err


def test_population_figures_render_from_the_cube_alone(cube, tmp_path):
    import matplotlib

    matplotlib.use("Agg")
    from boundscape.plots.populations import figure_list, population_figures
    from boundscape.plots.style import save

    ds, plan = cube
    figures = population_figures(ds)
    assert [stem for stem, _ in figures] == [stem for stem, *_ in figure_list(plan)]
    for stem, fig in figures:
        for path in save(fig, tmp_path / stem):
            assert path.stat().st_size > 1000
        labels = [ax.get_xlabel() for ax in fig.axes if ax.get_xlabel()]
        assert any("$n_e$" in text for text in labels), labels  # mathtext subscripts, never n_e in ASCII
    # the ionization map's colours are the stored fractions, untouched (plots never recompute)
    mesh = figures[0][1].axes[0].collections[0]
    np.testing.assert_array_equal(np.asarray(mesh.get_array()).ravel(), ds["ionized_fraction"].values[0].T.ravel())


# -- a semiconductor donor sweep --------------------------------------------------------------------

DONORS = {"sweep": "donors", "potential": {"family": "yukawa"},
          "grid": {"strength": [1.0], "donor_concentration": {"start": 1e14, "stop": 1e18, "num": 5, "spacing": "log"},
                   "temperature": [4.0, 77.0], "l": [0], "n_r_max": 1},
          "populations": True, "tiles": {"cells": 3},
          "preset": {"kind": "semiconductor", "effective_mass": 0.067, "permittivity": 12.9}}


@pytest.fixture(scope="module")
def donor_cube(tmp_path_factory):
    return build(tmp_path_factory.mktemp("donors"), DONORS)


def test_donor_sweep_is_over_donor_concentration_and_temperature(donor_cube):
    ds, plan = donor_cube
    assert len(plan.tiles) > 1  # each condition solved in the one tile that holds its engine cell
    for name in ("free_electron_density", "ionized_fraction", "ionization_energy", "continuum_lowering",
                 "partition_function", "balance_status"):
        assert ds[name].dims == ("strength", "donor_concentration", "temperature"), name
    assert ds["donor_concentration"].attrs["units"] == "cm-3" and ds["temperature"].attrs["units"] == "K"
    assert ds["ionization_energy"].attrs["units"] == "meV" and ds["free_electron_density"].attrs["units"] == "cm-3"
    assert "not_solved" not in [ds["balance_status"].attrs["flag_meanings"].split()[int(v)]
                                for v in ds["balance_status"].values.ravel()]


def test_donor_sweep_is_charge_neutral_in_every_cell(donor_cube):
    # n = N_D⁺ = (N_D⁺/N_D) N_D without compensation (Sze & Ng §1.4, reference from memory)
    ds, _ = donor_cube
    n_d = ds["donor_concentration"].values[None, :, None]
    np.testing.assert_allclose(ds["free_electron_density"].values, ds["ionized_fraction"].values * n_d, rtol=1e-12)
    assert ((ds["ionized_fraction"] > 0) & (ds["ionized_fraction"] <= 1)).all()


def test_donors_are_ionized_above_the_concentration_where_the_1s_is_lost(donor_cube):
    # Mott: where N_D free electrons bind no 1s, the ionized branch is the only consistent one (Mott 1949).
    ds, _ = donor_cube
    loss = ds["loss_donor_concentration"].sel(l=0).isel(n_r=0, strength=0).values  # per temperature
    for j, n_c in enumerate(loss):
        beyond = ds["donor_concentration"].values > n_c
        assert beyond.any()
        np.testing.assert_array_equal(ds["ionized_fraction"].values[0, beyond, j], 1.0)


def test_donor_cell_equals_the_command_line(donor_cube, capsys):
    ds, _ = donor_cube
    cell = ds.isel(strength=0, donor_concentration=1, temperature=1)
    out = json.loads(run_cli(capsys, "--preset", "semiconductor", "--effective-mass", "0.067", "--permittivity",
                             "12.9", "--donor-concentration", repr(float(cell["donor_concentration"])),
                             "--temperature-K", repr(float(cell["temperature"])), "--format", "json"))
    np.testing.assert_allclose(out["free_density_cm-3"], float(cell["free_electron_density"]), rtol=1e-11)
    np.testing.assert_allclose(out["ionization_energy_meV"], float(cell["ionization_energy"]), rtol=1e-11)
    np.testing.assert_allclose(out["continuum_lowering_meV"], float(cell["continuum_lowering"]), rtol=1e-9)


def test_the_donor_cube_passes_the_cf_checker(donor_cube, tmp_path, cf_findings):
    from boundscape.cube import write_cube

    ds, _ = donor_cube
    write_cube(ds, tmp_path / "donors.nc")
    assert cf_findings(tmp_path / "donors.nc") == []


def test_exciton_sweep_over_the_pair_density(tmp_path, capsys):
    config = {**copy.deepcopy(DONORS), "sweep": "excitons"}
    config["grid"] = {"strength": [1.0], "carrier_density": [1e14, 1e16, 1e18], "temperature": [10.0], "l": [0],
                      "n_r_max": 1}
    config["preset"]["hole_mass"] = 0.5
    ds, _ = build(tmp_path, config)
    capsys.readouterr()
    for name in ("free_pair_density", "ionized_fraction", "ionization_energy", "balance_status"):
        assert ds[name].dims == ("strength", "carrier_density", "temperature"), name
    # pairs are conserved: the free ones are the ionized fraction of all (common practice, no source)
    np.testing.assert_allclose(ds["free_pair_density"].values,
                               ds["ionized_fraction"].values * ds["carrier_density"].values[None, :, None], rtol=1e-12)
    cell = ds.isel(strength=0, carrier_density=1, temperature=0)
    out = json.loads(run_cli(capsys, "--preset", "semiconductor", "--effective-mass", "0.067", "--hole-mass", "0.5",
                             "--permittivity", "12.9", "--pair-density", "1e16", "--temperature-K", "10",
                             "--format", "json"))
    np.testing.assert_allclose(out["free_density_cm-3"], float(cell["free_pair_density"]), rtol=1e-11)
    assert ds["ionized_fraction"].values[0, -1, 0] == 1.0  # 1e18 cm-3 of pairs bind no exciton: a plasma


@pytest.mark.parametrize("preset, words", [
    ({"hole_mass": 0.5}, "remove preset.hole_mass"),
    ({"units": "atomic"}, "units: effective"),
])
def test_donor_populations_it_cannot_solve_are_one_line(preset, words):
    config = copy.deepcopy(DONORS)
    config["preset"].update(preset)
    if "units" in preset:
        config["potential"]["mass"] = 0.067
    with pytest.raises(InputError) as info:
        sweep.plan(config)
    message = str(info.value)
    assert "\n" not in message and "config key populations" in message and words in message, message


def test_donor_figure_renders_from_the_cube_alone(donor_cube, tmp_path):
    import matplotlib

    matplotlib.use("Agg")
    from boundscape.plots.populations import figure_list, population_figures
    from boundscape.plots.style import save

    ds, plan = donor_cube
    figures = population_figures(ds)
    assert [stem for stem, _ in figures] == [stem for stem, *_ in figure_list(plan)] == ["donor_freeze_out"]
    fig = figures[0][1]
    assert any("$N_D$" in ax.get_xlabel() for ax in fig.axes)
    # the curves are the stored fractions, untouched
    np.testing.assert_array_equal(fig.axes[0].lines[0].get_ydata(), ds["ionized_fraction"].values[0, :, 0])
    assert all(path.stat().st_size > 1000 for path in save(fig, tmp_path / "donor_freeze_out"))
