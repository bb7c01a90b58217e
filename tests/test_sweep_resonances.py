"""States past their threshold in a sweep (``resonances: true``): the config key, the tiles, the
cube's variables and units, tiling independence, the workflow's trajectory step and the figures.

The values themselves are the engine's (``boundscape.resonances``, checked against the exact
square-well poles, Wigner's threshold law and Breit–Wigner phase shifts in test_resonances.py):
here the cube must hold exactly what direct engine calls give.
"""

from __future__ import annotations

import math
import subprocess
import sys
from pathlib import Path

import matplotlib
import numpy as np
import pytest
import yaml

import boundscape as bs
from boundscape import sweep
from boundscape.cube import add_physical_coordinates, open_cube, write_cube
from boundscape.cube.collect import collect
from boundscape.errors import InputError
from boundscape.physics.presets import Nuclear, Semiconductor
from boundscape.plots.resonance_fan import resonance_fan
from boundscape.plots.style import RC
from boundscape.plots.threshold_map import threshold_map
from boundscape.sweep.resonance_tiles import BOUND, RESONANCE_FLAGS
from workflow_steps import solve_parts

REPO = Path(__file__).resolve().parents[1]
# Yukawa, Z = 1 and 2, λ from 2.2 to 12 bohr: λ = 4.4 and 8.7 lie just below the 2p and 3p
# thresholds of Z = 1 (λ_c ≈ 4.54 and 8.87 bohr, Rogers, Graboske & Harwood, Phys. Rev. A 1,
# 1577 (1970); values from memory) and 2.2, 4.4 below those of Z = 2 (half: the one-scale law).
CONFIG = {"sweep": "past", "potential": {"family": "yukawa", "mass": 1.0}, "resonances": True,
          "grid": {"strength": [1.0, 2.0], "screening_length": [2.2, 3.0, 4.4, 6.0, 8.7, 12.0],
                   "l": [0, 1], "n_r_max": 2},
          "tiles": {"cells": 4}}
PAST = ("resonance_energy", "resonance_width", "virtual_state_kappa", "resonance_status",
        "dissolution_screening_length", "dissolution_screening_length_flag")


def build(directory: Path, config: dict, shared_trajectories=True):
    """The cube of ``config`` through the workflow's own steps, in this process (its path)."""
    config, plan, tiles, blocks = solve_parts(directory, config, trajectories=shared_trajectories)
    collect(config, tiles, blocks, directory / "levels.nc")
    return directory / "levels.nc"
def load(path):
    with open_cube(path) as ds:
        return ds.load()


@pytest.fixture(scope="module")
def cube_path(tmp_path_factory):
    return build(tmp_path_factory.mktemp("past"), CONFIG)


@pytest.fixture(scope="module")
def cube(cube_path):
    return load(cube_path)


# --- configuration -------------------------------------------------------------------------

def test_resonances_default_off_and_bad_values_are_one_line():
    config = {k: v for k, v in CONFIG.items() if k != "resonances"}
    assert sweep.validate_config(config)["resonances"] is False
    assert "resonances" not in sweep.plan(config).engine  # a sweep without them keeps its tiles' params
    for bad, shown in (("yes", "'yes'"), (1, "1"), (None, "None")):
        with pytest.raises(InputError) as err:
            sweep.validate_config({**config, "resonances": bad})
        assert str(err.value) == f"config key resonances: got {shown}; expected true or false"


def test_a_coulomb_tail_refuses_resonances_in_one_line():
    config = {"sweep": "c", "potential": {"family": "coulomb"}, "resonances": True,
              "grid": {"strength": [1.0], "l": [0], "n_r_max": 2}}
    with pytest.raises(InputError) as err:
        sweep.validate_config(config)
    assert str(err.value).startswith("config key resonances: family coulomb has a coulomb tail")
    assert "\n" not in str(err.value)


# --- the cube ------------------------------------------------------------------------------

def test_cube_has_the_variables_with_cf_attributes(cube):
    for name in PAST:
        assert name in cube, name
        assert cube[name].attrs["long_name"]
        assert "standard_name" not in cube[name].attrs  # CF has none for these quantities
    assert cube["resonance_energy"].dims == ("strength", "screening_length", "l", "n_r")
    assert cube["dissolution_screening_length"].dims == ("strength", "l", "n_r")
    assert cube["resonance_energy"].attrs["units"] == cube["energy"].attrs["units"]
    assert cube["resonance_width"].attrs["units"] == cube["energy"].attrs["units"]
    assert cube["dissolution_screening_length"].attrs["units"] == cube["critical_screening_length"].attrs["units"]
    # κ_v per bohr: the inverse of the bohr the lengths are in (scipy.constants' Bohr radius), to the
    # 15 digits the factor is written with; the unit string keeps the length's digits, 1/(L m)
    bohr = float(cube["screening_length"].attrs["length_unit_in_m"])
    assert math.isclose(cube["virtual_state_kappa"].attrs["wavenumber_unit_in_per_m"], 1.0 / bohr, rel_tol=1e-14)
    assert cube["virtual_state_kappa"].attrs["units"] == f"1/({bohr!r} m)"
    assert "-kappa_v^2/(2 mu)" in cube["virtual_state_kappa"].attrs["comment"]
    flags = cube["resonance_status"].attrs
    assert flags["flag_meanings"].split() == list(RESONANCE_FLAGS)
    assert list(flags["flag_values"]) == list(range(len(RESONANCE_FLAGS)))
    assert cube["resonance_status"].dtype == np.int8


def test_nan_where_bound_and_values_where_lost(cube):
    status = cube["resonance_status"].values
    bound = status == BOUND
    n_r = cube["n_r"].values[None, None, None, :]
    # bound exactly where n_r < num_bound, and then the level's energy is stored instead
    np.testing.assert_array_equal(bound, n_r < cube["num_bound"].values[..., None])
    assert np.isfinite(cube["energy"].values[bound]).all()
    for name in ("resonance_energy", "resonance_width", "virtual_state_kappa"):
        assert np.isnan(cube[name].values[bound]).all(), name
    s_wave, p_wave = cube.sel(l=0), cube.sel(l=1)
    assert np.isnan(s_wave["resonance_width"].values).all()  # a virtual state has no width
    assert np.isnan(p_wave["virtual_state_kappa"].values).all()
    ok = p_wave["resonance_status"].values == RESONANCE_FLAGS.index("ok")
    assert ok.any(), "the grid crosses the 2p threshold: some cell must hold a narrow 2p resonance"
    e_r, width = p_wave["resonance_energy"].values[ok], p_wave["resonance_width"].values[ok]
    assert (e_r > 0).all() and (width > 0).all() and (width <= e_r).all()
    # l = 0: E_v = -κ_v²/2μ, the stated convention (μ = 1 here)
    kappa = s_wave["virtual_state_kappa"].values
    has = np.isfinite(kappa)
    assert has.any()
    np.testing.assert_allclose(s_wave["resonance_energy"].values[has], -kappa[has] ** 2 / 2, rtol=1e-15)


@pytest.mark.parametrize("strength, lam, l", [(1.0, 4.4, 1), (1.0, 8.7, 1), (2.0, 2.2, 1), (2.0, 4.4, 1),
                                              (1.0, 3.0, 0), (2.0, 12.0, 0)])
def test_cube_values_equal_direct_engine_calls(cube, strength, lam, l):
    cell = cube.sel(strength=strength, l=l).sel(screening_length=lam, method="nearest")
    pot = bs.potential("yukawa", strength, float(cell["screening_length"]), 1.0)
    res = bs.resonances(pot, l, n_r_max=2)
    for k, n_r in enumerate(res.n_r):
        got = cell.sel(n_r=n_r)
        assert int(got["resonance_status"]) == int(res.status[k])
        for name, want in (("resonance_energy", res.energy[k]), ("resonance_width", res.width[k]),
                           ("virtual_state_kappa", res.kappa[k])):
            if int(res.status[k]) == RESONANCE_FLAGS.index("not_converged"):
                want = math.nan
            np.testing.assert_array_equal(float(got[name]), want, err_msg=f"{name} n_r={n_r}")


def test_dissolution_lengths_follow_the_engine_and_the_one_scale_law(cube):
    lam_d = cube["dissolution_screening_length"]
    for strength in (1.0, 2.0):
        for n_r in (0, 1):
            want = bs.dissolution_screening_length("yukawa", strength, 1, n_r, mass=1.0)
            assert float(lam_d.sel(strength=strength, l=1, n_r=n_r)) == want
    # V = Z f(r/λ)/r at μ = 1: λ_d Z is the same at every Z, like λ_c (exact scaling of the
    # radial equation; common practice, no source)
    np.testing.assert_allclose(lam_d.sel(strength=2.0, l=1).values * 2, lam_d.sel(strength=1.0, l=1).values,
                               rtol=1e-9)
    assert (lam_d.sel(l=1).values < cube["critical_screening_length"].sel(l=1).values).all()
    assert np.isnan(lam_d.sel(l=0).values).all()
    flag = cube["dissolution_screening_length_flag"].attrs["flag_meanings"].split()
    assert (cube["dissolution_screening_length_flag"].sel(l=0).values == flag.index("virtual_state")).all()


def test_cf_checker_finds_nothing(cube_path, cf_findings):
    assert cf_findings(cube_path) == []


@pytest.mark.parametrize("preset", [Semiconductor(effective_mass=0.26, permittivity=11.7),
                                    Nuclear(reduced_mass_MeV=469.4591)], ids=["semiconductor", "nuclear"])
def test_a_preset_rewrites_their_units_as_the_levels(cube, preset, tmp_path):
    out = add_physical_coordinates(cube, preset)
    for name in ("resonance_energy", "resonance_width"):
        for key in ("units", "energy_unit_in_J", "energy_unit_in_eV"):
            assert out[name].attrs[key] == out["energy"].attrs[key], (name, key)
        assert "hartree_in_eV" not in out[name].attrs
    for key in ("units", "length_unit_in_m"):
        assert out["dissolution_screening_length"].attrs[key] == out["critical_screening_length"].attrs[key]
    length_m = float(out["critical_screening_length"].attrs["length_unit_in_m"])
    assert math.isclose(out["virtual_state_kappa"].attrs["wavenumber_unit_in_per_m"], 1.0 / length_m, rel_tol=1e-14)
    # no float artefact in the unit: 1/(1e-15 m), not 999999999999999.9 m-1
    assert out["virtual_state_kappa"].attrs["units"] == f"1/({length_m!r} m)" and "99999" not in str(
        out["virtual_state_kappa"].attrs["wavenumber_unit_in_per_m"])
    assert "bohr_in_m" not in out["virtual_state_kappa"].attrs
    write_cube(out, tmp_path / "preset.nc")  # and it still writes


# --- determinism ---------------------------------------------------------------------------

def test_bit_identical_across_tilings_and_without_shared_trajectories(cube, tmp_path):
    other = load(build(tmp_path / "wide", {**CONFIG, "tiles": {"cells": 10}}, shared_trajectories=False))
    for name in PAST + ("energy", "num_bound"):
        np.testing.assert_array_equal(other[name].values, cube[name].values, err_msg=name)


@pytest.mark.workflow
def test_workflow_traces_once_and_gives_the_same_cube(cube, tmp_path):
    (tmp_path / "sweep.yaml").write_text(yaml.safe_dump({**CONFIG, "tiles": {"cells": 7}}))
    run = subprocess.run([sys.executable, "-m", "snakemake", "results/past/levels.nc", "--snakefile",
                          str(REPO / "workflow" / "Snakefile"), "--directory", str(tmp_path), "--configfile",
                          str(tmp_path / "sweep.yaml"), "--cores", "2"], capture_output=True, text=True, timeout=600)
    assert run.returncode == 0, run.stderr[-3000:]
    results = tmp_path / "results" / "past"
    assert (results / "resonance_trajectories.json").is_file()
    assert "(past threshold" in (results / "logs" / "solve_tile_0000.log").read_text()
    ds = load(results / "levels.nc")
    for name in PAST:
        np.testing.assert_array_equal(ds[name].values, cube[name].values, err_msg=name)


# --- figures -------------------------------------------------------------------------------

def test_threshold_map_draws_the_stored_dissolution_lines(cube):
    with matplotlib.rc_context(RC):
        fig, _ = threshold_map(cube, 1)
    z = cube["strength"].values
    lines = {line.get_gid(): line for ax in fig.axes for line in ax.get_lines() if line.get_gid()}
    for n_r in (0, 1):
        line = lines[f"dissolution:{n_r}"]
        np.testing.assert_array_equal(line.get_xdata(), z)
        np.testing.assert_array_equal(line.get_ydata(), cube["dissolution_screening_length"].sel(l=1, n_r=n_r).values)
    fig.canvas.draw()
    with matplotlib.rc_context(RC):
        fig0, _ = threshold_map(cube, 0)  # l = 0: virtual states, no band
    assert not [line for ax in fig0.axes for line in ax.get_lines() if (line.get_gid() or "").startswith("dissolution")]


def test_resonance_fan_draws_the_stored_resonances(cube, tmp_path):
    with matplotlib.rc_context(RC):
        fig, data = resonance_fan(cube)
        fig.savefig(tmp_path / "fan.png")
    assert data["resonances"], "some cell past the 2p threshold must be drawn"
    lam = cube["screening_length"].values
    for (z, name), (x, e_r, width) in data["resonances"].items():
        n_r = int(name[0]) - 2  # "2p" -> n_r 0 (l = 1)
        cell = cube.sel(strength=z, l=1, n_r=n_r)
        keep = np.isfinite(cell["resonance_energy"].values) & np.isfinite(cell["resonance_width"].values)
        np.testing.assert_array_equal(x, lam[keep])
        np.testing.assert_array_equal(e_r, cell["resonance_energy"].values[keep])
        np.testing.assert_array_equal(width, cell["resonance_width"].values[keep])
    assert (tmp_path / "fan.png").stat().st_size > 10_000
