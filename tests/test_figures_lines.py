"""Line figures drawn from a real cube: the plotted data must be the cube's data, and the
conversions on the axes must agree with handbook formulas."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants

from boundscape import plots
from boundscape.cube import preset_of
from boundscape.plots.line_maps import line_shift_map, line_survival_chart
from test_cube_lines import build
from test_figures import _tick_label_overlaps

pytestmark = pytest.mark.filterwarnings("error")
CONFIG = {"sweep": "linefig", "potential": {"family": "yukawa", "mass": 1.0},
          "grid": {"strength": [1.0, 2.0, 4.0], "screening_length": {"start": 1.0, "stop": 200.0, "num": 8,
                                                                      "spacing": "log"},
                   "l": [0, 1, 2], "n_r_max": 2},
          "lines": ["1s-2p", "2s-3p", "2p-3d"], "tiles": {"cells": 100},
          "preset": {"kind": "plasma", "species": "electrons", "temperature_eV": 20.0}}


@pytest.fixture(scope="module")
def cube(tmp_path_factory):
    return build(tmp_path_factory.mktemp("linefig"), CONFIG)[0]


def test_shift_map_shows_the_stored_shift_and_the_upper_levels_loss_curve(cube):
    ds = cube
    for m, label in enumerate(ds.line_label.values):
        fig, data = line_shift_map(ds, m)
        energy, shift = ds.line_energy.isel(line=m).values, ds.line_shift.isel(line=m).values
        np.testing.assert_array_equal(data["relative_shift"], shift / (energy - shift))
        (drawn,) = [line for line in fig.axes[0].get_lines() if line.get_gid() == f"loss:{label}"]
        upper = str(ds.line_upper.values[m])
        n, l = int(upper[:-1]), "spdf".index(upper[-1])
        stored = ds.critical_screening_length.sel(l=l, n_r=n - l - 1).values
        np.testing.assert_array_equal(drawn.get_xydata()[:, 1], stored)
        # one-scale law λ_c ∝ 1/Z (E(Z, λ) = Z² E(1, Zλ)): slope −1 on log–log axes
        x, y = drawn.get_xydata().T
        np.testing.assert_allclose(np.diff(np.log(y)) / np.diff(np.log(x)), -1.0, atol=1e-7)
        assert _tick_label_overlaps(fig) == []


def test_survival_chart_in_densities_and_nanometres(cube):
    ds = cube
    fig, data = line_survival_chart(ds, preset_of(ds)[0])
    # λ = hc/ΔE with ΔE in joules (scipy.constants, CODATA)
    hartree = constants.physical_constants["Hartree energy"][0]
    wavelength = constants.h * constants.c / (ds.line_energy.isel(screening_length=-1).values * hartree) * 1e9
    np.testing.assert_allclose(data["wavelength_nm"], wavelength, rtol=1e-14)
    # Debye length of the electrons λ_D² = ε₀ k_B T_e/(n_e e²) (any plasma text, e.g. Chen,
    # Introduction to Plasma Physics, §1.4), solved for n_e at the larger λ_c of the line's levels
    bohr = constants.physical_constants["Bohr radius"][0]
    kT = 20.0 * constants.electron_volt
    for m, upper in enumerate(ds.line_upper.values):
        upper = str(upper)
        n, l = int(upper[:-1]), "spdf".index(upper[-1])
        lam_c = ds.critical_screening_length.sel(l=l, n_r=n - l - 1).values * bohr
        n_e = constants.epsilon_0 * kT / (constants.e**2 * lam_c**2) * 1e-6
        np.testing.assert_allclose(data["threshold"][:, m], n_e, rtol=1e-10)
    drawn = {line.get_gid(): line for line in fig.axes[0].get_lines() if (line.get_gid() or "").startswith("line:")}
    assert set(drawn) == {f"line:{v}" for v in ds.line_label.values}
    assert "density" in fig.axes[0].get_xlabel() and "nm" in fig.axes[0].get_ylabel()
    assert _tick_label_overlaps(fig) == []


def test_survival_chart_without_a_preset_is_in_screening_lengths(cube):
    fig, data = line_survival_chart(cube)
    assert "screening length" in fig.axes[0].get_xlabel()
    upper = str(cube.line_upper.values[0])
    n, l = int(upper[:-1]), "spdf".index(upper[-1])
    np.testing.assert_array_equal(data["threshold"][:, 0], cube.critical_screening_length.sel(l=l, n_r=n - l - 1).values)


def test_render_writes_the_line_figures(cube, tmp_path):
    written = [p.name for p in plots.render_all(cube, tmp_path)]
    for label in cube.line_label.values:
        assert f"line_shift_{label}.png" in written
    assert "line_survival.png" in written
