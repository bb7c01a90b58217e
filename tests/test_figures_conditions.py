"""Figures of sweeps over a trade's conditions, drawn from real cubes: what each figure plots is
the cube's data (counts, energies, loss densities, shifts), every line drawn has its legend entry,
and the cells where the screening model fails are the ones hatched."""

from __future__ import annotations

import numpy as np
import pytest
from matplotlib.collections import PatchCollection
from scipy import constants as sc

from boundscape import labels, plots
from boundscape.cube import preset_of
from boundscape.plots.line_maps import line_shift_map
from boundscape.plots.line_survival import line_loss_density, line_survival_chart
from test_conditions import PLASMA, build, changed
from test_figures import _tick_label_overlaps

pytestmark = pytest.mark.filterwarnings("error")
HARTREE_EV = sc.physical_constants["Hartree energy in eV"][0]
CONFIG = changed(PLASMA, grid__strength=[1.0, 2.0, 3.0], lines=["1s-2p", "2p-3d"], grid__l=[0, 1, 2])


@pytest.fixture(scope="module")
def cube(tmp_path_factory):
    return build(tmp_path_factory.mktemp("figcond"), CONFIG)[0]


def _legend_labels(fig):
    legends = list(fig.legends) + [ax.get_legend() for ax in fig.axes if ax.get_legend() is not None]
    return {text.get_text() for legend in legends for text in legend.get_texts()}


def _hatched_cells(ax, x_edges, y_edges):
    # The (x, y) cell indices the hatched rectangles cover.
    covered = np.zeros((x_edges.size - 1, y_edges.size - 1), bool)
    for collection in ax.collections:
        if isinstance(collection, PatchCollection) and collection.get_gid() == "invalid":
            for path in collection.get_paths():
                (x0, y0), (x1, y1) = path.vertices.min(axis=0), path.vertices.max(axis=0)
                xs = np.sqrt(x_edges[1:] * x_edges[:-1])
                ys = np.sqrt(y_edges[1:] * y_edges[:-1])
                covered |= ((xs > x0) & (xs < x1))[:, None] & ((ys > y0) & (ys < y1))[None, :]
    return covered


def test_threshold_maps_over_density_and_temperature(cube):
    ds = cube
    preset = preset_of(ds)[0]
    x_edges = plots.style.cell_edges(ds["electron_density"].values)
    y_edges = plots.style.cell_edges(ds["electron_temperature"].values)
    invalid = ds["screening_validity"].values != 0
    assert invalid.any() and (~invalid).any()
    for l in ds["l"].values:
        fig, data = plots.threshold_map(ds, int(l), preset)
        panels = [ax for ax in fig.axes if ax.get_title().startswith("Z = ")]
        assert len(panels) == 3
        for ax, z in zip(panels, ds["strength"].values):
            np.testing.assert_array_equal(data["count"][float(z)], ds["num_bound"].sel(strength=z, l=l).values)
            np.testing.assert_array_equal(_hatched_cells(ax, x_edges, y_edges), invalid)
            for line in ax.get_lines():
                if not (line.get_gid() or "").startswith("loss:"):
                    continue
                n, letter = int(line.get_gid()[5:-1]), line.get_gid()[-1]
                k = labels.LETTERS.index(letter)
                loss = ds["loss_electron_density"].sel(strength=z, l=k, n_r=n - k - 1).values
                ok = np.isfinite(loss)
                np.testing.assert_array_equal(line.get_xydata()[:, 0], loss[ok])
                np.testing.assert_array_equal(line.get_xydata()[:, 1], ds["electron_temperature"].values[ok])
        assert {"density above which the state is lost", plots.style.INVALID_LABEL} <= _legend_labels(fig)
        assert _tick_label_overlaps(fig) == []


def test_binding_energies_against_density(cube):
    ds = cube
    preset = preset_of(ds)[0]
    fig, data = plots.level_fan(ds, preset=preset)
    assert data["lines"]
    x = ds["electron_density"].values
    for ((z, t), name), (xs, ys) in data["lines"].items():
        k = labels.LETTERS.index(name[-1])
        energy = ds["energy"].sel(strength=z, electron_temperature=t, l=k, n_r=int(name[:-1]) - k - 1).values
        keep = np.isfinite(energy)
        np.testing.assert_array_equal(xs, x[keep])
        np.testing.assert_array_equal(ys, -energy[keep])
    for ((z, t), name), where in data["critical"].items():
        k = labels.LETTERS.index(name[-1])
        assert where == float(ds["loss_electron_density"].sel(strength=z, electron_temperature=t, l=k,
                                                              n_r=int(name[:-1]) - k - 1))
    assert "electron density" in fig.get_supxlabel()
    assert f"$n_r$ = {ds.sizes['n_r'] - 1}" in _legend_labels(fig)


def test_one_temperature_or_one_strength_gives_curves(tmp_path):
    # A single-row map says little: the figure is each state's binding energy against the axis.
    ds = build(tmp_path, changed(CONFIG, grid__electron_temperature=[20.0], grid__strength=[2.0], lines=None,
                                 resonances=False))[0]
    preset = preset_of(ds)[0]
    fig, data = plots.threshold_map(ds, 0, preset)
    drawn = {name for (_, name) in data["lines"]}
    assert drawn and drawn <= _legend_labels(fig)  # a legend entry for every line drawn
    for ((z, t), name), (xs, ys) in data["lines"].items():
        energy = ds["energy"].sel(strength=z, electron_temperature=t, l=0, n_r=int(name[:-1]) - 1).values
        np.testing.assert_array_equal(ys, -energy[np.isfinite(energy)])
    lam = build(tmp_path / "lam", {"sweep": "one", "potential": {"family": "yukawa"},
                                   "grid": {"strength": [1.0], "screening_length": {"start": 1, "stop": 100, "num": 6,
                                                                                     "spacing": "log"},
                                            "l": [0], "n_r_max": 2},
                                   "preset": {"kind": "plasma", "temperature_eV": 10.0}})[0]
    fig, data = plots.threshold_map(lam, 0, preset_of(lam)[0])
    assert set(data["lines"]) == {(1.0, "1s"), (1.0, "2s")} and {"1s", "2s"} <= _legend_labels(fig)


def test_line_shifts_relative_and_absolute(cube):
    ds = cube
    preset = preset_of(ds)[0]
    for m in range(ds.sizes["line"]):
        fig, data = line_shift_map(ds, m, preset)
        shift = ds["line_shift"].isel(line=m).values
        energy = ds["line_energy"].isel(line=m).values
        np.testing.assert_array_equal(data["relative_shift"], shift / (energy - shift))
        # in eV with the cube's own factor (CODATA's hartree in eV, scipy.constants)
        np.testing.assert_allclose(data["shift"], shift * HARTREE_EV, rtol=1e-14)
        assert float(ds["line_shift"].attrs["energy_unit_in_eV"]) == HARTREE_EV
        assert data["shift_unit"] == "eV"
        titles = [ax.get_title() for ax in fig.axes]
        assert any("relative shift" in t for t in titles) and any("(eV)" in t for t in titles)
        loss = line_loss_density(ds, m)
        for z, (xs, ys) in data["loss"].items():
            i = list(ds["strength"].values).index(z)
            np.testing.assert_array_equal(xs, loss[i][np.isfinite(loss[i])])
        assert "red-shifted" in fig.get_suptitle()


def test_line_survival_over_temperatures(cube):
    ds = cube
    preset = preset_of(ds)[0]
    fig, data = line_survival_chart(ds, preset)
    series = [line for line in fig.axes[0].get_lines() if (line.get_gid() or "").startswith("line:")]
    assert series and {line.get_label() for line in series} <= _legend_labels(fig)
    # the threshold of a line is the smaller of its levels' stored loss densities
    upper = ds["loss_electron_density"].sel(l=1, n_r=0).values  # 2p, (strength, T)
    lower = ds["loss_electron_density"].sel(l=0, n_r=0).values  # 1s
    np.testing.assert_array_equal(data["threshold"][:, 0, 0], np.fmin(upper, lower)[:, 0])
    assert _tick_label_overlaps(fig) == []


def test_render_all_of_a_condition_cube(cube, tmp_path):
    first = [p.name for p in plots.render_all(cube, tmp_path / "a")]
    assert "condition_map.png" not in first  # the threshold maps are over the conditions
    for stem in ("threshold_map_l0", "level_fan", "resonance_fan", "line_shift_1s-2p", "line_survival"):
        assert f"{stem}.png" in first and f"{stem}.pdf" in first
    second = plots.render_all(cube, tmp_path / "b")
    for a, b in zip(sorted((tmp_path / "a").iterdir()), sorted(p for p in second)):
        assert a.read_bytes() == b.read_bytes(), a.name
