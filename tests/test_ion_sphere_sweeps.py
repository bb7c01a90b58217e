"""The ion_sphere family in plasma sweeps: the density sets the ion-sphere radius, the Wigner–Seitz
radius (3Z_i/(4π n_e))^{1/3} of ions of charge Z_i = ``preset.ion_sphere_charge`` (common
practice), in a sweep over (n_e, T_e) and as the density coordinate of a sweep over radii.  Held
against the engine at that radius, the formula by hand, Γ_i by hand (Ichimaru 1982), the CF
checker's conventions as test_conditions checks them, and the condition map."""

from __future__ import annotations

import math

import matplotlib
import numpy as np
import pytest
from scipy import constants as sc

import boundscape as bs
from boundscape import sweep
from boundscape.errors import InputError
from test_conditions import build, changed

matplotlib.use("Agg")

BOHR = sc.physical_constants["Bohr radius"][0]
Z_I = 2.0
ION_SPHERE = {"sweep": "ionsphere", "potential": {"family": "ion_sphere"},
              "grid": {"strength": [2.0, 3.0],
                       "electron_density": {"start": 1e22, "stop": 1e25, "num": 4, "spacing": "log"},
                       "electron_temperature": [10.0, 300.0], "l": [0, 1], "n_r_max": 2},
              "tiles": {"cells": 40}, "preset": {"kind": "plasma", "ion_sphere_charge": Z_I}}


def radius_bohr(density_cm3, charge=Z_I):
    """(3Z_i/(4π n_e))^{1/3} in bohr (Wigner–Seitz radius of the ions; common practice)."""
    return (3 * charge / (4 * math.pi * np.asarray(density_cm3) * 1e6)) ** (1 / 3) / BOHR


@pytest.fixture(scope="module")
def ion_sphere_cube(tmp_path_factory):
    return build(tmp_path_factory.mktemp("ionsphere"), ION_SPHERE)


def test_the_cells_are_the_family_at_the_wigner_seitz_radius(ion_sphere_cube):
    ds, plan = ion_sphere_cube
    density = ds["electron_density"].values
    radius = ds["screening_length"].transpose("electron_density", "electron_temperature").values
    # R depends on n_e only: the same at both temperatures, and the formula's
    assert np.allclose(radius, radius_bohr(density)[:, None], rtol=1e-13, atol=0)
    for i, j in [(0, 0), (3, 1)]:
        z = float(ds["strength"][1])
        ref = bs.bound_levels(bs.potential("ion_sphere", z, float(radius[i, j])), 0)
        found = ds["energy"].sel(strength=z, l=0).isel(electron_density=i, electron_temperature=j).values
        found = found[np.isfinite(found)]
        assert found.size == ref.num_bound and np.array_equal(found, ref.energy[:found.size])
    assert ds.attrs["screening_model"] == "ion_sphere" and ds.attrs["ion_sphere_charge"] == Z_I


def test_validity_is_the_ions_coupling(ion_sphere_cube):
    ds, _ = ion_sphere_cube
    flag = ds["screening_validity"].transpose("electron_density", "electron_temperature").values
    assert list(ds["screening_validity"].attrs["flag_meanings"].split()) == ["ok", "weakly_coupled"]
    n = ds["electron_density"].values[:, None] * 1e6
    t = ds["electron_temperature"].values[None, :]
    # Γ_i = Z_i² e²/(4πε₀ R k_B T) by hand (Ichimaru, Rev. Mod. Phys. 54, 1017 (1982))
    gamma = Z_I ** 2 * sc.e ** 2 / (4 * math.pi * sc.epsilon_0 * radius_bohr(n / 1e6) * BOHR * t * sc.electron_volt)
    assert np.array_equal(flag, (gamma < 1).astype(np.int8))
    assert flag.min() == 0 and flag.max() == 1  # both occur in this sweep


def test_loss_densities_invert_the_critical_radius(ion_sphere_cube):
    ds, _ = ion_sphere_cube
    for z in ds["strength"].values:
        r_c = bs.critical_screening_length("ion_sphere", float(z), 0, 1) * BOHR
        loss = ds["loss_electron_density"].sel(strength=z, l=0, n_r=1).values  # one per temperature
        assert np.allclose(loss, 3 * Z_I / (4 * math.pi * r_c ** 3) / 1e6, rtol=1e-12)
    assert "ion-sphere radius" in ds["loss_electron_density"].attrs["comment"]


def test_the_condition_map_draws(ion_sphere_cube):
    from boundscape.cube.physical import preset_of
    from boundscape.plots.condition_maps import condition_threshold_map

    ds, _ = ion_sphere_cube
    preset, _ = preset_of(ds)
    assert preset.screening_length_at(1e28, 10.0) == pytest.approx(radius_bohr(1e22) * BOHR, rel=1e-13)
    fig, data = condition_threshold_map(ds, 0, preset)
    assert fig.axes and data["curves"]
    import matplotlib.pyplot as plt

    plt.close(fig)


def test_a_sweep_over_radii_reads_each_radius_as_a_density(tmp_path):
    config = changed(ION_SPHERE, grid__electron_density=None, grid__electron_temperature=None,
                     grid__strength=[2.0])
    config["grid"]["screening_length"] = [2.0, 4.0, 8.0]
    ds, _ = build(tmp_path, config)
    # n_e = 3Z_i/(4π R³) (the Wigner–Seitz radius inverted), in cm⁻³
    expected = 3 * Z_I / (4 * math.pi * (np.array([2.0, 4.0, 8.0]) * BOHR) ** 3) / 1e6
    assert np.allclose(ds["electron_density"].values, expected, rtol=1e-12)
    assert "ion-sphere radius" in ds["electron_density"].attrs["long_name"]
    assert "ion_sphere_radius_nm" in ds.coords
    # the condition map reads the density as the radius it sets: R(n_e) at every temperature
    from boundscape.cube.physical import preset_of
    from boundscape.plots.conditions import condition_map

    preset, settings = preset_of(ds)
    fig, data = condition_map(ds, preset, settings)
    assert fig is not None
    assert np.allclose(data["screening_length"], radius_bohr(data["density_cm3"])[None, :], rtol=1e-12)
    import matplotlib.pyplot as plt

    plt.close(fig)


@pytest.mark.parametrize("config, words", [
    (changed(ION_SPHERE, preset={"kind": "plasma"}), "needs preset.ion_sphere_charge"),
    (changed(ION_SPHERE, potential={"family": "yukawa"}), "ion_sphere_charge applies to family ion_sphere only"),
    (changed(ION_SPHERE, potential={"family": "square_well"}, preset={"kind": "plasma"}), "not a screening length"),
])
def test_refusals_name_the_key(config, words):
    with pytest.raises(InputError, match=words):
        sweep.validate_config(config)


def test_the_cube_passes_the_cf_checker(ion_sphere_cube, tmp_path, cf_findings):
    from boundscape.cube import write_cube

    ds, _ = ion_sphere_cube
    path = tmp_path / "ionsphere.nc"
    write_cube(ds, path)
    assert cf_findings(path) == []
