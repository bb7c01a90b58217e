"""Scattering in a sweep (``scattering: true`` or ``{energies: [...]}``): the config key and its
errors, the cube's variables, units and flags, their values against outside references (named
beside each check), tiling independence, the figures, and a tiny workflow run.

The engine's scattering itself is checked in depth in test_scattering.py and
test_scattering_theorems.py; here the cube must hold the right numbers in the right places.
"""

from __future__ import annotations

import json
import math
import subprocess
import sys
from pathlib import Path

import matplotlib
import numpy as np
import pytest
import xarray as xr
import yaml
from scipy.special import spherical_jn, spherical_yn

from boundscape import sweep
from boundscape.cube.display import readable
from boundscape.errors import InputError
from boundscape.plots.scattering import inverse_length_figure, phase_shift_figure, zero_crossings
from boundscape.plots.style import RC
from workflow_steps import build_cube

REPO = Path(__file__).resolve().parents[1]
SCATTERING_VARS = ("scattering_length", "inverse_scattering_length", "effective_range", "scattering_status")
PHASE_VARS = ("phase_shift", "cross_section", "phase_shift_status")

# A square well of depth V0 = 1 hartree (μ = 1), radii R across the first two s-wave thresholds
# R_c = (n + ½)π/q, q = √2: 1.11 and 3.33 bohr.
SQUARE = {"sweep": "sq", "potential": {"family": "square_well", "mass": 1.0},
          "scattering": {"energies": [0.001, 0.05, 0.5]},
          "grid": {"strength": [1.0], "screening_length": [0.5, 1.0, 1.3, 2.0, 2.9, 3.6, 5.0], "l": [0, 1, 2],
                   "n_r_max": 2},
          "tiles": {"cells": 6}}
# Yukawa, Z = 1 and 2, λ on a log grid fine enough (ratio 1.17) that between two grid points 1/a
# passes through zero at most once; the lowest energy, 1e-8 hartree, is Levinson's E -> 0+.
YUKAWA = {"sweep": "yu", "potential": {"family": "yukawa", "mass": 1.0},
          "scattering": {"energies": [1.0e-8, 0.01, 0.3]},
          "grid": {"strength": [1.0, 2.0], "screening_length": {"start": 0.3, "stop": 12.0, "num": 25, "spacing": "log"},
                   "l": [0, 1], "n_r_max": 3},
          "tiles": {"cells": 20}}


def build(directory: Path, config: dict):
    """The cube of ``config`` through the workflow's own steps, in this process."""
    return build_cube(directory, config)[0]
@pytest.fixture(scope="module")
def square(tmp_path_factory):
    return build(tmp_path_factory.mktemp("square"), SQUARE)


@pytest.fixture(scope="module")
def yukawa(tmp_path_factory):
    return build(tmp_path_factory.mktemp("yukawa"), YUKAWA)


# -- the config key ---------------------------------------------------------------------------
def config_with(**changes):
    config = json.loads(json.dumps(SQUARE))
    config.update(changes)
    return config


@pytest.mark.parametrize("changes, words", [
    ({"potential": {"family": "coulomb"}, "grid": {"strength": [1.0], "l": [0], "n_r_max": 1}},
     ["scattering", "coulomb", "tail"]),
    ({"scattering": {"energies": [0.1, 0.1]}}, ["scattering.energies", "repeated", "0.1"]),
    ({"scattering": {"energies": {"start": 0.1, "stop": 1.0, "num": 5000}}}, ["scattering.energies", "5,000", "200"]),
    ({"scattering": {"energies": [0.1, float("inf")]}}, ["scattering.energies", "finite", "inf"]),
    ({"scattering": {"energies": {"start": 0.1, "stop": 0.1, "num": 3}}}, ["scattering.energies", "start equals stop"]),
])
def test_bad_scattering_section_is_one_line_naming_key_and_value(changes, words):
    with pytest.raises(InputError) as info:
        sweep.validate_config(config_with(**changes))
    message = str(info.value)
    assert "\n" not in message
    for word in words:
        assert word in message, message


@pytest.mark.parametrize("bad", [{"energies": [-1.0]}, {"energies": []}, {"energy": [1.0]}, "yes", 3])
def test_schema_refuses_malformed_scattering(bad):
    text = sweep.schema_error(config_with(scattering=bad))
    assert text and "scattering" in text and "\n" not in text


def test_energies_are_read_in_the_presets_energy_unit():
    # nuclear preset: MeV; the engine's unit is (ħc)²/(μc² b²), b = 1 fm; the ratio is the preset's own
    config = {"sweep": "n", "potential": {"family": "yukawa"}, "scattering": {"energies": [1.0, 10.0]},
              "grid": {"coupling_MeV_fm": [60.0], "screening_length": [1.4], "l": [0], "n_r_max": 1},
              "preset": {"kind": "nuclear", "reduced_mass_MeV": 469.459, "length_fm": 1.0}}
    plan = sweep.plan(config)
    # ħc = 197.3269804 MeV fm (CODATA 2018, value from memory): the unit is ħc²/μ = 82.942 MeV
    unit = 197.3269804**2 / 469.459
    assert np.allclose(plan.scattering["energies"], [1.0 / unit, 10.0 / unit], rtol=1e-8)
    plain = sweep.plan({**SQUARE, "scattering": {"energies": [0.5, 0.05]}})  # no preset: hartree, ascending
    assert plain.scattering["energies"] == [0.05, 0.5]
    assert sweep.plan({**SQUARE, "scattering": True}).scattering == {"energies": []}
    assert sweep.plan({k: v for k, v in SQUARE.items() if k != "scattering"}).scattering is None
    assert sweep.plan({**SQUARE, "scattering": False}).scattering is None


# -- the square well against its closed forms --------------------------------------------------
def test_square_well_scattering_length_is_closed_form(square):
    # a = R − tan(qR)/q, q = √(2μV0): matching sin(qr) to r − a at R (Sakurai, Modern Quantum
    # Mechanics, scattering chapter; Blatt & Weisskopf, Theoretical Nuclear Physics, ch. II)
    q = math.sqrt(2.0)
    R = square["screening_length"].values
    exact = R - np.tan(q * R) / q
    cube = square["scattering_length"].sel(strength=1.0, l=0).values
    assert np.allclose(cube, exact, rtol=1e-7, atol=1e-9)
    assert np.allclose(square["inverse_scattering_length"].sel(strength=1.0, l=0).values, 1 / exact, rtol=1e-7)


def test_square_well_effective_range_is_closed_form(square):
    # r_e = R − R³/(3a²) − 1/(q²a) (Blatt & Jackson, Phys. Rev. 76, 18 (1949); formula from memory)
    q = math.sqrt(2.0)
    R = square["screening_length"].values
    a = R - np.tan(q * R) / q
    exact = R - R**3 / (3 * a * a) - 1 / (q * q * a)
    assert np.allclose(square["effective_range"].sel(strength=1.0, l=0).values, exact, rtol=1e-6)
    # effective_range is an l = 0 quantity: NaN for l ≥ 1, and the comment says so
    assert np.isnan(square["effective_range"].sel(l=[1, 2]).values).all()
    assert "NaN for l >= 1" in square["effective_range"].attrs["comment"]


def test_square_well_phase_shifts_match_spherical_bessel(square):
    # δ_l from matching ĵ_l(Kr) inside to ĵ_l(kr) − tan δ ŷ_l(kr) outside, K² = 2μ(E + V0), with
    # scipy.special's spherical Bessel functions: equal to the cube's modulo π
    R = square["screening_length"].values
    for l in (0, 1, 2):
        for e in square["scattering_energy"].values:
            k, K = math.sqrt(2 * e), math.sqrt(2 * (e + 1.0))
            L = K * spherical_jn(l, K * R, derivative=True) / spherical_jn(l, K * R)
            tan = (k * spherical_jn(l, k * R, derivative=True) - L * spherical_jn(l, k * R)) / \
                  (k * spherical_yn(l, k * R, derivative=True) - L * spherical_yn(l, k * R))
            cube = square["phase_shift"].sel(strength=1.0, l=l, scattering_energy=e).values
            assert np.allclose(np.sin(cube - np.arctan(tan)), 0.0, atol=1e-7), (l, e)
            # σ_l = 4π(2l + 1) sin²δ_l / k² (the partial-wave expansion of the elastic cross section)
            sigma = square["cross_section"].sel(strength=1.0, l=l, scattering_energy=e).values
            assert np.allclose(sigma, 4 * math.pi * (2 * l + 1) * np.sin(cube) ** 2 / k**2, rtol=1e-9)


# -- the cube's variables, units and flags ---------------------------------------------------
def test_variables_dimensions_units_and_flags(square):
    cells = ("strength", "screening_length", "l")
    for name in SCATTERING_VARS:
        assert square[name].dims == cells
    for name in PHASE_VARS:
        assert square[name].dims == cells + ("scattering_energy",)
    assert square["scattering_length"].attrs["units"] == square["critical_screening_length"].attrs["units"]
    assert square["effective_range"].attrs["length_unit_in_m"] == pytest.approx(5.29177210544e-11, rel=1e-12)
    assert square["phase_shift"].attrs["units"] == "rad"
    assert square["scattering_energy"].attrs["units"] == square["energy"].attrs["units"]
    # CF flags: values and meanings side by side (CF conventions §3.5), every cell ok here
    for flag in ("scattering_status", "phase_shift_status"):
        attrs = square[flag].attrs
        assert len(attrs["flag_values"]) == len(attrs["flag_meanings"].split())
        assert attrs["flag_meanings"].split()[0] == "ok"
        assert (square[flag].values == 0).all()


def test_nuclear_cube_reads_in_fm_and_MeV(tmp_path):
    config = {"sweep": "n", "potential": {"family": "yukawa"}, "scattering": {"energies": [1.0, 10.0]},
              "grid": {"coupling_MeV_fm": [60.0, 100.0], "screening_length": [1.0, 1.4], "l": [0], "n_r_max": 1},
              "preset": {"kind": "nuclear", "reduced_mass_MeV": 469.459, "length_fm": 1.0}}
    shown = readable(build(tmp_path, config), "preset")
    assert np.allclose(shown["scattering_energy"].values, [1.0, 10.0], rtol=1e-12)
    assert shown["scattering_energy"].attrs["units"] == "MeV"
    assert shown["scattering_length"].attrs["units"] == "fm"
    assert shown["inverse_scattering_length"].attrs["units"] == "1/fm"
    assert shown["cross_section"].attrs["units"] == "fm^2"


def test_condition_sweep_holds_each_engine_cells_values(tmp_path):
    # a plasma sweep over n_e x T_e: each condition holds what the engine gives at its screening length
    import boundscape as bs

    config = {"sweep": "pl", "potential": {"family": "yukawa"}, "scattering": {"energies": [1.0, 10.0]},
              "grid": {"strength": [1.0], "electron_density": {"start": 1e22, "stop": 1e24, "num": 3, "spacing": "log"},
                       "electron_temperature": [10.0, 100.0], "l": [0, 1], "n_r_max": 1},
              "preset": {"kind": "plasma", "species": "electrons"}}
    ds = build(tmp_path, config)
    assert ds["scattering_length"].dims == ("strength", "electron_density", "electron_temperature", "l")
    ev = 1.0 / 27.211386245981  # hartree per eV (CODATA 2018, value from memory)
    assert np.allclose(ds["scattering_energy"].values, [ev, 10 * ev], rtol=1e-10)
    for n in ds["electron_density"].values:
        for t in ds["electron_temperature"].values:
            cell = ds.sel(strength=1.0, electron_density=n, electron_temperature=t)
            pot = bs.potential("yukawa", 1.0, float(cell["screening_length"]), 1.0)
            for l in (0, 1):
                direct = bs.scattering(pot, l)
                assert float(cell["scattering_length"].sel(l=l)) == direct.length
                shifts = bs.phase_shifts(pot, l, ds["scattering_energy"].values)
                assert np.array_equal(cell["phase_shift"].sel(l=l).values, shifts.phase_shift)


def test_cube_does_not_depend_on_the_tiling(tmp_path, square):
    other = build(tmp_path, {**SQUARE, "tiles": {"cells": 1}})
    for name in SCATTERING_VARS + PHASE_VARS:
        assert np.array_equal(other[name].values, square[name].values, equal_nan=True), name


# -- the sweep's physics: 1/a at the losses, Levinson -----------------------------------------
def test_inverse_length_changes_sign_at_each_stored_loss(yukawa):
    x = yukawa["screening_length"].values
    checked = 0
    for z in yukawa["strength"].values:
        for l in yukawa["l"].values:
            inverse = yukawa["inverse_scattering_length"].sel(strength=z, l=l).values
            count = yukawa["num_bound"].sel(strength=z, l=l).values
            for n_r in yukawa["n_r"].values:
                lost = float(yukawa["critical_screening_length"].sel(strength=z, l=l, n_r=n_r))
                if not x[0] < lost < x[-1]:
                    continue
                j = int(np.searchsorted(x, lost)) - 1  # x[j] < λ_c < x[j + 1]
                # below λ_c the state is not bound and a < 0; above, one more state and a > 0
                assert count[j + 1] == count[j] + 1 == n_r + 1, (z, l, n_r)
                assert inverse[j] < 0 < inverse[j + 1], (z, l, n_r, inverse[j], inverse[j + 1])
                checked += 1
    assert checked >= 5
    # and at the published 1s critical length of the Yukawa potential, λ_c = 0.83990 bohr for
    # Z = 1 (Rogers, Graboske & Harwood, Phys. Rev. A 1, 1577 (1970); value from memory)
    j = int(np.searchsorted(x, 0.83990)) - 1
    inverse = yukawa["inverse_scattering_length"].sel(strength=1.0, l=0).values
    assert inverse[j] < 0 < inverse[j + 1]


def test_levinson_across_the_sweep(yukawa):
    # Levinson's theorem, δ_l(0⁺) − δ_l(∞) = N_b π (Levinson, Kgl. Danske Vid. Selsk. Mat.-fys.
    # Medd. 25, no. 9 (1949)); at E = 1e-8 hartree, k = 1.4e-4/bohr, δ_0 = N_b π − k a + O(k³)
    e = float(yukawa["scattering_energy"].values[0])
    delta = yukawa["phase_shift"].sel(scattering_energy=e).values / math.pi
    count = yukawa["num_bound"].values
    assert np.isfinite(delta).all()
    assert np.array_equal(np.round(delta), count)
    k = math.sqrt(2 * e)
    a = yukawa["scattering_length"].values
    near = np.abs(k * a) < 0.01  # not within k|a| of a threshold
    assert near.sum() > 0.8 * near.size
    assert np.all(np.abs(delta - count)[near] < 0.01)


# -- figures -----------------------------------------------------------------------------------
def test_inverse_length_figure_puts_each_zero_on_its_loss(yukawa):
    with matplotlib.rc_context(RC):
        fig, data = inverse_length_figure(yukawa)
    step = math.log(yukawa["screening_length"].values[1] / yukawa["screening_length"].values[0])
    assert len(data["zeros"]) >= 3
    for (row, name), (lost, zero) in data["zeros"].items():
        assert abs(math.log(zero / lost)) < step, (row, name, lost, zero)
    gids = {artist.get_gid() for ax in fig.axes for artist in ax.get_children()}
    assert {"zero:1s", "loss:1s", "zero:2p"} <= gids
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    FigureCanvasAgg(fig)
    renderer = fig.canvas.get_renderer()
    for ax in fig.axes:  # every loss named once, no two names overlapping (common practice, no source)
        labels = [t for t in ax.texts if (t.get_gid() or "").startswith("label:")]
        lines = [line for line in ax.get_lines() if (line.get_gid() or "").startswith("loss:")]
        assert sorted(t.get_gid()[6:] for t in labels) == sorted(line.get_gid()[5:] for line in lines)
        boxes = [t.get_window_extent(renderer) for t in labels]
        assert not [(a, b) for i, a in enumerate(boxes) for b in boxes[i + 1:] if a.overlaps(b)]
    for ax in fig.axes:  # mathtext, never an ASCII underscore in a label
        assert "_" not in ax.get_title() and ("_" not in ax.get_ylabel() or "$" in ax.get_ylabel())


def test_figures_of_a_sweep_without_screening_length(tmp_path):
    # an unscreened short-range table (a Gaussian well −S exp(−r²)) swept over its strength S
    r = np.linspace(0.01, 8.0, 400)
    np.savetxt(tmp_path / "gauss.csv", np.c_[r, -np.exp(-r * r)], delimiter=",", header="r,V", comments="")
    ds = build(tmp_path / "cube", {"sweep": "tab", "potential": {"family": "tabulated", "table": str(tmp_path / "gauss.csv")},
                                   "scattering": {"energies": [0.01, 0.1]},
                                   "grid": {"strength": {"start": 0.5, "stop": 20, "num": 12, "spacing": "log"},
                                            "l": [0], "n_r_max": 2}})
    with matplotlib.rc_context(RC):
        fig, _ = inverse_length_figure(ds)
        phase_shift_figure(ds)
    rings = [line for ax in fig.axes for line in ax.get_lines() if (line.get_gid() or "").startswith("zero:")]
    count = ds["num_bound"].sel(l=0).values.ravel()
    assert len(rings) == int(count[-1] - count[0]) >= 1  # one ring per state gained along the strength


def test_zero_crossings_skips_a_through_infinity():
    # 1/a through ±∞ (a = 0) without a change of count is not a lost state
    x = np.array([1.0, 2.0, 4.0, 8.0])
    assert zero_crossings(x, np.array([-1.0, 1.0, -1.0, 1.0]), np.array([0, 1, 1, 2])) == \
        [(0, pytest.approx(math.sqrt(2.0))), (1, pytest.approx(math.sqrt(32.0)))]


def test_phase_shift_figure_marks_levinson_counts(yukawa):
    with matplotlib.rc_context(RC):
        fig, data = phase_shift_figure(yukawa)
    assert data["curves"]
    for key, (energy, delta) in data["curves"].items():
        assert abs(delta[0] - data["counts"][key]) < 0.5  # the lowest energy is near δ(0⁺)/π
    assert fig.axes[0].get_ylabel() == "$\\delta_l / \\pi$"


# -- the workflow -------------------------------------------------------------------------------
@pytest.mark.workflow
def test_workflow_runs_a_tiny_sweep_with_scattering(tmp_path, cf_findings_or_none):
    config = {"sweep": "wsc", "potential": {"family": "yukawa", "mass": 1.0},
              "scattering": {"energies": [0.01, 0.1]},
              "grid": {"strength": [1.0], "screening_length": [0.6, 1.0, 3.0], "l": [0, 1], "n_r_max": 2},
              "tiles": {"cells": 3}}
    (tmp_path / "sweep.yaml").write_text(yaml.safe_dump(config))
    figures = tmp_path / "results" / "wsc" / "figures"
    targets = ["results/wsc/levels.nc", "results/wsc/figures/inverse_scattering_length.png",
               "results/wsc/figures/phase_shifts.png"]
    run = subprocess.run([sys.executable, "-m", "snakemake", *targets, "--snakefile",
                          str(REPO / "workflow" / "Snakefile"), "--directory", str(tmp_path), "--configfile",
                          str(tmp_path / "sweep.yaml"), "--cores", "2"], capture_output=True, text=True, timeout=900)
    assert run.returncode == 0, run.stderr[-3000:]
    cube = tmp_path / "results" / "wsc" / "levels.nc"
    with xr.open_dataset(cube) as ds:
        for name in SCATTERING_VARS + PHASE_VARS:
            assert name in ds and "long_name" in ds[name].attrs
        for name in ("scattering_length", "inverse_scattering_length", "effective_range", "cross_section"):
            assert ds[name].attrs["units"]
        assert ds["scattering_energy"].attrs["units"] and "flag_meanings" in ds["scattering_status"].attrs
        assert np.isfinite(ds["scattering_length"].values).all()
    for png in ("inverse_scattering_length.png", "phase_shifts.png"):
        assert (figures / png).stat().st_size > 10_000
    if cf_findings_or_none is not None:
        assert cf_findings_or_none(cube) == []


@pytest.fixture
def cf_findings_or_none(request):
    """The CF checker of conftest.py where it is installed, else None (the rest of the test runs)."""
    try:
        return request.getfixturevalue("cf_findings")
    except pytest.skip.Exception:
        return None
