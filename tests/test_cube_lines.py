"""The cube's E1 lines from configured tiles to the collected file: values against the engine
and the Bohr formula, NaN exactly where a level is gone, the same bits whatever the tiling,
CF metadata, and the units a preset rewrites."""

from __future__ import annotations

import json

import numpy as np
import pytest
import xarray as xr

import boundscape as bs
from boundscape import sweep
from boundscape.cli import steps
from boundscape.cube.collect import collect

LINES = ["1s-2p", "2s-3p", "2p-3d", "2s-2p"]
CONFIG = {
    "sweep": "lines",
    "potential": {"family": "yukawa", "mass": 1.0},
    # λ from 3 bohr (only 1s bound for Z = 1) to 80 bohr
    "grid": {"strength": [1.0, 2.0], "screening_length": {"start": 3.0, "stop": 80.0, "num": 5, "spacing": "log"},
             "l": [0, 1, 2], "n_r_max": 2},
    "lines": LINES,
    "tiles": {"cells": 6},
}
LINE_ARRAYS = ("line_energy", "oscillator_strength", "einstein_A", "line_shift", "line_status")


def build(tmp_path, config):
    plan = sweep.plan(config)
    tiles = []
    for tile in plan.tiles:
        path = tmp_path / f"tile_{tile.name}.nc"
        assert steps.main(["solve-tile", "--spec", json.dumps(plan.tile_spec(tile)), "--output", str(path)]) == 0
        tiles.append(str(path))
    blocks = []
    for block in plan.critical_blocks:
        path = tmp_path / f"crit_{block.name}.nc"
        assert steps.main(["criticals", "--spec", json.dumps(plan.critical_spec(block)), "--output", str(path)]) == 0
        blocks.append(str(path))
    out = tmp_path / "levels.nc"
    collect(config, tiles, blocks, out)
    with xr.open_dataset(out) as ds:
        return ds.load(), out


@pytest.fixture(scope="module")
def cube(tmp_path_factory):
    return build(tmp_path_factory.mktemp("lines"), CONFIG)


def test_lines_are_the_engines_and_nan_where_a_level_is_gone(cube):
    ds, _ = cube
    labels = [str(v) for v in ds.line_label.values]
    assert sorted(labels) == sorted(LINES)
    assert ds.line_energy.dims == ("strength", "screening_length", "line")
    for i, z in enumerate(ds.strength.values):
        for j, lam in enumerate(ds.screening_length.values):
            found = bs.lines(bs.potential("yukawa", z, lam), 3)
            for m, label in enumerate(labels):
                if label in found.labels:
                    k = found.labels.index(label)
                    assert ds.line_energy.values[i, j, m] == found.energy[k]
                    assert ds.oscillator_strength.values[i, j, m] == found.oscillator_strength[k]
                    assert ds.einstein_A.values[i, j, m] == found.einstein_A[k]
                    assert ds.line_status.values[i, j, m] == 0
                else:
                    assert np.isnan(ds.line_energy.values[i, j, m]) and ds.line_status.values[i, j, m] == 3
            # a line is there exactly where both of its levels are in the cube
            for m, label in enumerate(labels):
                both = all(np.isfinite(ds.energy.sel(l="spd".index(s[-1]), n_r=int(s[:-1]) - "spd".index(s[-1]) - 1)
                                       .values[i, j]) for s in label.split("-"))
                assert both == np.isfinite(ds.line_energy.values[i, j, m]) or label == "2s-2p", (z, lam, label)


def test_line_shift_against_the_bohr_formula(cube):
    ds, _ = cube
    # the unscreened limit of Yukawa is −Z/r: ΔE₀ = Z²/2 (1/n² − 1/n′²) (Bohr; any QM textbook)
    labels = [str(v) for v in ds.line_label.values]
    for m, label in enumerate(labels):
        n1, n2 = (int(s[:-1]) for s in label.split("-"))
        for i, z in enumerate(ds.strength.values):
            shift = ds.line_shift.values[i, :, m]
            energy = ds.line_energy.values[i, :, m]
            if n1 == n2:  # 2s–2p is degenerate in −Z/r: no unscreened line to shift from
                assert np.all(np.isnan(shift))
                continue
            bohr = z**2 / 2 * (1 / n1**2 - 1 / n2**2)
            there = np.isfinite(energy)
            assert there.any()
            np.testing.assert_allclose(shift[there], energy[there] - bohr, rtol=0, atol=1e-10 * bohr)
            assert np.all(shift[there] < 0)  # screening lowers these lines (red shift)


def test_the_same_bits_whatever_the_tiling(cube, tmp_path):
    ds, _ = cube
    other, _ = build(tmp_path, {**CONFIG, "tiles": {"cells": 30}})
    assert len(sweep.plan(CONFIG).tiles) != len(sweep.plan({**CONFIG, "tiles": {"cells": 30}}).tiles)
    for name in LINE_ARRAYS:
        assert ds[name].values.tobytes() == other[name].values.tobytes(), name


def test_cf_metadata_of_the_lines(cube, cf_findings):
    ds, path = cube
    assert ds.line_energy.attrs["units"] == ds.energy.attrs["units"]
    assert ds.einstein_A.attrs["units"] == "s-1" and ds.oscillator_strength.attrs["units"] == "1"
    assert ds.line_status.attrs["flag_meanings"].split() == ["ok", "not_converged", "input_rejected", "absent"]
    assert cf_findings(path) == []


def test_a_preset_in_other_units_rewrites_the_line_energies(tmp_path):
    # effective atomic units of a donor (2Ry*, a*): every energy says so, the line ones too
    config = {**CONFIG, "grid": {**CONFIG["grid"], "strength": [1.0]},
              "preset": {"kind": "semiconductor", "effective_mass": 0.067, "permittivity": 12.9,
                         "screening": "thomas_fermi", "units": "effective"}}
    ds, _ = build(tmp_path, config)
    for name in ("line_energy", "line_shift"):
        assert ds[name].attrs["units"] == ds.energy.attrs["units"] != "4.3597447222060e-18 J"
        assert ds[name].attrs["energy_unit_in_J"] == ds.energy.attrs["energy_unit_in_J"]
        assert "hartree_in_eV" not in ds[name].attrs


def test_configs_without_lines_have_no_line_dimension(tmp_path):
    config = {**CONFIG, "grid": {**CONFIG["grid"], "strength": [1.0]}}
    config.pop("lines")
    ds, _ = build(tmp_path, config)
    assert "line" not in ds.dims and "line_energy" not in ds


@pytest.mark.parametrize("bad, words", [
    (["1s-2s"], "1s-2s"),
    (["1s-2p", "2p-1s"], "twice"),
    (["2p-4f"], "4f"),
    ({"n_max": 1}, "lines.n_max"),
    (["1s2p"], "1s2p"),
])
def test_bad_lines_are_one_line_naming_the_key(bad, words):
    with pytest.raises(bs.InputError) as info:
        sweep.plan({**CONFIG, "lines": bad})
    message = str(info.value)
    assert "\n" not in message and "config key lines" in message and words in message


def test_n_max_form_lists_every_pair_of_distinct_n():
    plan = sweep.plan({**CONFIG, "grid": {**CONFIG["grid"], "n_r_max": 3}, "lines": {"n_max": 3}})
    assert plan.lines == ("1s-2p", "1s-3p", "2s-3p", "2p-3s", "2p-3d")


def test_readable_shows_line_energies_in_the_presets_units(tmp_path):
    from boundscape.cube import readable

    config = {**CONFIG, "grid": {**CONFIG["grid"], "strength": [1.0]},
              "preset": {"kind": "plasma", "species": "electrons", "temperature_eV": 20.0}}
    ds, _ = build(tmp_path, config)
    shown = readable(ds, "preset")
    assert shown.line_energy.attrs["units"] == "eV" and shown.line_shift.attrs["units"] == "eV"
    # 1 hartree = 27.211386... eV (CODATA via scipy.constants)
    from scipy.constants import physical_constants

    np.testing.assert_allclose(shown.line_energy.values, ds.line_energy.values
                               * physical_constants["Hartree energy in eV"][0], rtol=1e-14)
    assert "units" not in shown.oscillator_strength.attrs
