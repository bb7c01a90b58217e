"""Sweeps over a trade's conditions (density × temperature, coupling × range): the configuration,
the plan's distinct engine cells, and the cube built through the workflow's own steps, held
against the engine (``bound_levels`` at the coordinate λ), the preset's screening length, the CF
checker, and ``readable``."""

from __future__ import annotations

import copy

import numpy as np
import pytest
from scipy import constants as sc

import boundscape as bs
from boundscape import sweep
from boundscape.cube import readable, write_cube
from boundscape.errors import InputError
from boundscape.physics.presets import Nuclear, Plasma
from boundscape.sweep.limits import check_limits
from workflow_steps import build_cube

BOHR = sc.physical_constants["Bohr radius"][0]
PLASMA = {"sweep": "cond", "potential": {"family": "yukawa"},
          "grid": {"strength": [1.0, 2.0],
                   "electron_density": {"start": 1e20, "stop": 1e24, "num": 9, "spacing": "log"},
                   "electron_temperature": {"start": 1.0, "stop": 100.0, "num": 5, "spacing": "log"},
                   "l": [0, 1], "n_r_max": 3},
          "resonances": True, "lines": ["1s-2p"], "tiles": {"cells": 40},
          "preset": {"kind": "plasma"}}
NUCLEAR = {"sweep": "nucl", "potential": {"family": "yukawa"},
           "grid": {"coupling": [30.0, 60.0, 120.0], "range": {"start": 0.8, "stop": 4.0, "num": 5, "spacing": "log"},
                    "l": [0, 1], "n_r_max": 2},
           "resonances": True, "preset": {"kind": "nuclear", "reduced_mass_MeV": 469.4591}}


def changed(config, **changes):
    out = copy.deepcopy(config)
    for dotted, value in changes.items():
        *head, last = dotted.split("__")
        node = out
        for key in head:
            node = node[key]
        if value is None:
            node.pop(last)
        else:
            node[last] = value
    return out


def build(directory, config):
    """The cube of ``config``, computed with the workflow's steps in this process."""
    return build_cube(directory, config)
@pytest.fixture(scope="module")
def plasma_cube(tmp_path_factory):
    return build(tmp_path_factory.mktemp("plasma"), PLASMA)


# -- the configuration ---------------------------------------------------------------------------

@pytest.mark.parametrize("config, key, words", [
    (changed(PLASMA, grid__electron_temperature=None), "grid.electron_temperature", "needs electron_temperature"),
    (changed(PLASMA, grid__screening_length=[1.0, 2.0]), "grid.screening_length", "set the screening length"),
    (changed(PLASMA, preset={"kind": "semiconductor"}), "grid.electron_density", "needs preset kind plasma"),
    (changed(PLASMA, preset={"kind": "plasma", "temperature_eV": 10.0}), "preset.temperature_eV", "remove it"),
    (changed(PLASMA, potential__family="coulomb"), "potential.family", "no screening length"),
    (changed(PLASMA, potential__family="square_well"), "potential.family", "not a screening length"),
    (changed(PLASMA, grid__strength=None), "grid.strength", "needs it"),
    (changed(PLASMA, preset={"kind": "plasma", "screening": "quantum"}), "preset.screening", "finite_temperature"),
    (changed(NUCLEAR, grid__strength=[1.0]), "grid.strength", "grid.coupling"),
    (changed(PLASMA, grid__electron_density=[1e20, -1.0]), "grid.electron_density.1", "-1"),
])
def test_a_bad_condition_sweep_is_one_line_naming_the_key(config, key, words):
    with pytest.raises(InputError) as info:
        sweep.plan(config)
    message = str(info.value)
    assert "\n" not in message and f"config key {key}" in message and words in message, message


def test_the_cell_limit_counts_every_condition_axis():
    big = changed(PLASMA, grid__electron_density={"start": 1e18, "stop": 1e26, "num": 5000, "spacing": "log"},
                  grid__electron_temperature={"start": 1, "stop": 1e3, "num": 2000, "spacing": "log"})
    with pytest.raises(InputError, match="40,000,000 cells .2 strengths x 5,000 electron density values x 2,000 electron "
                                         "temperature values x 2 l.* limits.max_cells"):
        check_limits(big)


def test_sweeps_over_screening_lengths_keep_their_model():
    # A configuration written before condition sweeps reads its lengths as it did: Debye (plasma),
    # Thomas-Fermi (semiconductor); a condition sweep defaults to the ideal Fermi gas at T.
    from boundscape.physics.presets import from_config

    lam_grid = {"strength": [1.0], "screening_length": [1.0, 2.0]}
    assert from_config({"kind": "plasma"}, lam_grid).screening == "debye"
    assert from_config({"kind": "semiconductor", "hole_mass": 0.5}, lam_grid).screening_species == "electrons"
    assert from_config({"kind": "plasma"}, PLASMA["grid"]).screening == "finite_temperature"
    assert from_config({"kind": "plasma", "screening": "thomas_fermi"}, lam_grid).screening == "thomas_fermi"


# -- the plan: each distinct engine cell once ---------------------------------------------------

def test_debye_screening_repeats_along_diagonals_and_is_solved_once():
    # λ_D ∝ √(T/n): on log grids of equal step (here half a decade each) every diagonal repeats one
    # length, so 9 densities × 5 temperatures hold 9 + 5 − 1 = 13 distinct lengths.
    plan = sweep.plan(changed(PLASMA, preset={"kind": "plasma", "screening": "debye"}))
    assert plan.num_cells == 2 * 9 * 5 * 2 and plan.screening_length.size == 13
    assert plan.num_engine_cells == 2 * 13 * 2
    plasma = Plasma(screening="debye")
    n = np.geomspace(1e20, 1e24, 9)[:, None] * 1e6
    t = np.geomspace(1, 100, 5)[None, :]
    np.testing.assert_allclose(plan.screening_length[plan.length_index], plasma.screening_length_at(n, t) / BOHR,
                               rtol=1e-12)
    # every condition cell is covered by exactly one engine cell of one tile
    count = np.zeros((plan.strength.size, plan.screening_length.size), int)
    for tile in plan.tiles:
        count[slice(*tile.strength_slice), list(tile.screening_length_index)] += 1
    assert np.all(count == 1)


def test_finite_temperature_lengths_are_each_their_own():
    # The Fermi gas's λ depends on n/T^{3/2} as well as T/n: no diagonal repeats to 1e-12.
    plan = sweep.plan(PLASMA)
    assert plan.screening_length.size == 45
    np.testing.assert_allclose(plan.screening_length[plan.length_index],
                               Plasma().screening_length_at(np.geomspace(1e20, 1e24, 9)[:, None] * 1e6,
                                                            np.geomspace(1, 100, 5)[None, :]) / BOHR, rtol=1e-15)


def test_distinct_lengths_group_rounding_noise_only():
    from boundscape.sweep.plan import distinct_lengths

    lengths = np.array([[1.0, 2.0], [1.0 + 1e-15, 3.0], [2.0 * (1 - 3e-16), 1.0 + 1e-9]])
    values, index = distinct_lengths(lengths)
    np.testing.assert_array_equal(values, [1.0, 1.0 + 1e-9, 2.0 * (1 - 3e-16), 3.0])
    np.testing.assert_array_equal(index, [[0, 2], [0, 3], [2, 1]])


# -- the cube --------------------------------------------------------------------------------------

def test_the_cube_runs_over_the_conditions_with_lambda_as_a_coordinate(plasma_cube):
    ds, plan = plasma_cube
    assert ds["energy"].dims == ("strength", "electron_density", "electron_temperature", "l", "n_r")
    assert ds["screening_length"].dims == ("electron_density", "electron_temperature")
    assert ds["electron_density"].attrs["units"] == "cm-3" and ds["electron_temperature"].attrs["units"] == "eV"
    np.testing.assert_allclose(ds["electron_density"], np.geomspace(1e20, 1e24, 9), rtol=1e-15)
    # the coordinate is the preset's length at each condition (the value solved), in bohr
    expected = Plasma().screening_length_at(ds["electron_density"].values[:, None] * 1e6,
                                            ds["electron_temperature"].values[None, :]) / BOHR
    np.testing.assert_allclose(ds["screening_length"], expected, rtol=1e-15)
    assert ds.attrs["screening_model"] == "finite_temperature"
    for name in ("coupling_parameter", "debye_number", "degeneracy", "screening_validity"):
        assert ds[name].dims == ("electron_density", "electron_temperature")


def test_a_cells_energies_are_bound_levels_at_its_coordinate(plasma_cube):
    ds, _ = plasma_cube
    for z, i, j in [(1.0, 0, 0), (2.0, 4, 2), (1.0, 6, 4), (2.0, 8, 1)]:
        lam = float(ds["screening_length"].isel(electron_density=i, electron_temperature=j))
        for l in (0, 1):
            cell = ds.sel(strength=z, l=l).isel(electron_density=i, electron_temperature=j)
            res = bs.bound_levels(bs.potential("yukawa", z, lam, 1.0), l, n_r_max=3)
            stored = cell["energy"].values
            np.testing.assert_array_equal(stored[:res.energy.size], res.energy)
            assert np.isnan(stored[res.energy.size:]).all()
            assert int(cell["num_bound"]) == res.num_bound


def test_the_cube_does_not_depend_on_the_tiling(plasma_cube, tmp_path):
    ds, _ = plasma_cube
    other, plan = build(tmp_path, changed(PLASMA, tiles={"cells": 7}))
    assert len(plan.tiles) > 10
    for name in ("energy", "energy_error", "mean_radius", "num_bound", "resonance_energy", "line_energy",
                 "critical_screening_length", "loss_electron_density", "screening_validity"):
        np.testing.assert_array_equal(other[name].values, ds[name].values, err_msg=name)


def test_loss_densities_give_back_each_critical_length(plasma_cube):
    # At the stored loss density the preset's screening length equals the stored λ_c, at each T;
    # a state is bound below it and lost above it in the cube's own cells.
    ds, _ = plasma_cube
    plasma = Plasma()
    loss = ds["loss_electron_density"]
    assert loss.dims == ("strength", "l", "n_r", "electron_temperature") and loss.attrs["units"] == "cm-3"
    for t in ds["electron_temperature"].values:
        for z in ds["strength"].values:
            lam_c = ds["critical_screening_length"].sel(strength=z).values
            n = loss.sel(strength=z, electron_temperature=t).values
            ok = np.isfinite(n)
            np.testing.assert_allclose(plasma.screening_length_at(n[ok] * 1e6, t) / BOHR, lam_c[ok], rtol=1e-10)
            energy = ds["energy"].sel(strength=z, electron_temperature=t).values  # (n_e, l, n_r)
            density = ds["electron_density"].values[:, None, None]
            bound = np.isfinite(energy)
            assert not (bound & (density > n[None])).any() and not (~bound & (density < n[None])).any()
    flags = ds["loss_electron_density_validity"].attrs["flag_meanings"].split()
    assert flags[0] == "ok" and "strongly_coupled" in flags


def test_the_cube_passes_the_cf_checker_with_cm3(plasma_cube, tmp_path, cf_findings):
    ds, _ = plasma_cube
    path = tmp_path / "cond.nc"
    write_cube(ds, path)
    assert cf_findings(path) == []


def test_readable_converts_every_energy_length_and_wavenumber(plasma_cube):
    # Every variable whose units are a scaled J, m or m-1 (the engine's) comes back in eV, nm, 1/nm.
    ds, _ = plasma_cube
    engine = {name for name, var in ds.variables.items()
              if str(var.attrs.get("units", "")).endswith((" J", " m", " m)"))}
    assert {"energy", "energy_error", "mean_radius", "critical_screening_length", "screening_length",
            "resonance_energy", "resonance_width", "virtual_state_kappa", "dissolution_screening_length",
            "line_energy", "line_shift"} <= engine
    shown = readable(ds, "preset")
    hartree_eV = sc.physical_constants["Hartree energy in eV"][0]
    for name in engine:
        units = shown[name].attrs["units"]
        assert units in ("eV", "nm", "1/nm"), (name, units)
        factor = {"eV": hartree_eV, "nm": BOHR * 1e9, "1/nm": 1 / (BOHR * 1e9)}[units]
        np.testing.assert_allclose(shown[name].values, ds[name].values * factor, rtol=1e-14, err_msg=name)
    assert shown["electron_density"].attrs["units"] == "cm-3"  # densities stay as stored


@pytest.fixture(scope="module")
def nuclear_cube(tmp_path_factory):
    return build(tmp_path_factory.mktemp("nuclear"), NUCLEAR)


def test_nuclear_sweep_over_coupling_and_range(nuclear_cube):
    # Dimensions g² (MeV fm) and range (fm); the engine's strength g²μc²b/(ħc)² and λ are coordinates.
    ds, _ = nuclear_cube
    nuclear = Nuclear(reduced_mass_MeV=469.4591)
    assert ds["energy"].dims == ("coupling", "range", "l", "n_r")
    assert ds["coupling"].attrs["units"] == "MeV fm" and ds["range"].attrs["units"] == "fm"
    np.testing.assert_allclose(ds["strength"], nuclear.strength_for(ds["coupling"].values), rtol=1e-15)
    np.testing.assert_allclose(ds["screening_length"], ds["range"].values, rtol=1e-15)  # b = 1 fm
    # The critical coupling at each range, and the one-scale threshold 2μg²_cλ/ħ² = 2/1.19061 of the
    # Yukawa ground state (Rogers, Graboske & Harwood, Phys. Rev. A 1, 1577 (1970); value from memory).
    hbar_c = sc.physical_constants["reduced Planck constant times c in MeV fm"][0]
    g2_c = ds["critical_coupling"].sel(l=0, n_r=0).values
    assert ds["critical_coupling"].dims == ("range", "l", "n_r") and ds["critical_coupling"].attrs["units"] == "MeV fm"
    np.testing.assert_allclose(2 * 469.4591 * g2_c * ds["range"].values / hbar_c ** 2, 2 / 1.19061, rtol=5e-6)
    for j, r in enumerate(ds["range"].values):
        engine = bs.critical_strength("yukawa", float(ds["screening_length"][j]), 1, 0, mass=1.0)
        assert float(ds["critical_coupling"].sel(range=r, l=1, n_r=0)) == pytest.approx(
            float(nuclear.coupling_MeV_fm(engine)), rel=1e-12)
    assert not any(name.startswith(("coupling_parameter", "screening_validity")) for name in ds.data_vars)
    meanings = ds["critical_coupling_flag"].attrs["flag_meanings"].split()
    flags = np.array(meanings)[ds["critical_coupling_flag"].values]
    g2 = ds["critical_coupling"].values
    inside = np.isfinite(g2) & (g2 >= 30.0 * (1 - 1e-12)) & (g2 <= 120.0 * (1 + 1e-12))
    np.testing.assert_array_equal(flags == "within_grid", inside)
    assert set(flags[np.isfinite(g2) & (g2 > 120.0)]) <= {"above_grid"}


def test_readable_reads_a_nuclear_cube_in_MeV_and_fm(nuclear_cube):
    # The engine's energy unit (ħc)²/(μc² fm²) ≈ 82.9 MeV (ħc from CODATA via scipy): a resonance read
    # in it as MeV would be 83 times off; readable converts every energy, length and wavenumber.
    ds, _ = nuclear_cube
    unit_MeV = sc.physical_constants["reduced Planck constant times c in MeV fm"][0] ** 2 / 469.4591
    shown = readable(ds, "preset")
    for name in ("energy", "resonance_energy", "resonance_width"):
        assert shown[name].attrs["units"] == "MeV"
        np.testing.assert_allclose(shown[name].values, ds[name].values * unit_MeV, rtol=1e-12, err_msg=name)
    for name in ("critical_screening_length", "dissolution_screening_length", "screening_length", "mean_radius"):
        assert shown[name].attrs["units"] == "fm"
        np.testing.assert_allclose(shown[name].values, ds[name].values, rtol=1e-14, err_msg=name)  # b = 1 fm
    assert shown["virtual_state_kappa"].attrs["units"] == "1/fm"
    np.testing.assert_allclose(shown["virtual_state_kappa"].values, ds["virtual_state_kappa"].values, rtol=1e-14)
    assert np.isfinite(ds["resonance_energy"].values).any()
    assert ds["virtual_state_kappa"].attrs["units"] == "1/(1e-15 m)"  # no 999999999999999.9 m-1
