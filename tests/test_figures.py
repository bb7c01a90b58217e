"""Figures and tables drawn from real cubes: the plotted data must be the cube's data.

The cubes are built through the workflow's own steps (plan -> tiles -> criticals -> collect), in
process; one test runs Snakemake end to end on a tiny sweep and builds the HTML report.
"""

import csv
import math
import json
import shutil
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import yaml
from scipy.constants import physical_constants as pc

from boundscape import labels, plots
from boundscape.cube import open_cube
from boundscape.physics.presets import NO_PRESET, Nuclear, Plasma, Semiconductor
from workflow_steps import build_cube

pytestmark = pytest.mark.filterwarnings("error")
BOHR = pc["Bohr radius"][0]
ROOT = Path(__file__).resolve().parents[1]


def _build_cube(directory: Path, config: dict):
    """The cube of ``config``, computed with the workflow's steps in this process."""
    return build_cube(directory, config)[0]
@pytest.fixture(scope="module")
def yukawa_cube(tmp_path_factory):
    config = {"sweep": "figtest", "potential": {"family": "yukawa", "mass": 1.0},
              "grid": {"strength": [1.0, 2.0, 4.0], "screening_length": {"start": 0.5, "stop": 200, "num": 9,
                                                                          "spacing": "log"},
                       "l": [0, 1], "n_r_max": 3},
              "preset": {"kind": "plasma", "temperature_eV": 10.0}}
    return _build_cube(tmp_path_factory.mktemp("yukawa"), config)


@pytest.fixture(scope="module")
def never_binding_cube(tmp_path_factory):
    # A screened Gaussian well -3 exp(-r²) hartree: 2μV₀a² = 6 at most, enough for one s state
    # (the first needs 2.68, the second 17.7; value from memory) and no p state, whatever λ:
    # 2s and every p state are never bound.
    directory = tmp_path_factory.mktemp("gauss")
    r = np.linspace(0.01, 8.0, 400)
    np.savetxt(directory / "well.csv", np.column_stack([r, -3.0 * np.exp(-r ** 2)]), delimiter=",")
    config = {"sweep": "never", "potential": {"family": "tabulated", "table": str(directory / "well.csv"),
                                              "screened": True},
              "grid": {"strength": [0.5, 1.0, 2.0], "screening_length": {"start": 0.3, "stop": 30, "num": 7,
                                                                           "spacing": "log"},
                       "l": [0, 1], "n_r_max": 2}}
    return _build_cube(directory, config)


def test_state_names():
    # Spectroscopic notation, j skipped (common practice, no source).
    assert [labels.state_label(n, l) for n, l in [(1, 0), (2, 1), (3, 2), (4, 3), (8, 7)]] == \
        ["1s", "2p", "3d", "4f", "8k"]


def test_threshold_map_plots_the_stored_critical_lengths(yukawa_cube):
    ds = yukawa_cube
    for l in ds["l"].values:
        fig, data = plots.threshold_map(ds, int(l))
        np.testing.assert_array_equal(data["count"], ds["num_bound"].sel(l=l).values)
        drawn = {line.get_gid()[5:]: line.get_xydata() for line in fig.axes[0].get_lines()
                 if (line.get_gid() or "").startswith("loss:")}
        assert len(drawn) == ds.sizes["n_r"]
        for n_r in ds["n_r"].values:
            name = labels.state_label(int(ds["n"].sel(l=l, n_r=n_r)), int(l))
            stored = ds["critical_screening_length"].sel(l=l, n_r=n_r).values
            np.testing.assert_array_equal(drawn[name][:, 0], ds["strength"].values)
            np.testing.assert_array_equal(drawn[name][:, 1], stored)


def test_loss_curves_of_a_one_scale_family_have_slope_minus_one(yukawa_cube):
    # One-scale law E(Z, λ, μ) = Z²μ E(1, Zμλ, 1) => λ_c ∝ 1/Z: slope −1 on log–log axes.
    fig, _ = plots.threshold_map(yukawa_cube, 1)
    lines = [line for line in fig.axes[0].get_lines() if (line.get_gid() or "").startswith("loss:")]
    assert lines
    for line in lines:
        x, y = line.get_xydata().T
        slopes = np.diff(np.log(y)) / np.diff(np.log(x))
        np.testing.assert_allclose(slopes, -1.0, atol=1e-7)


def test_level_fan_plots_the_stored_energies(yukawa_cube):
    ds = yukawa_cube
    fig, data = plots.level_fan(ds)
    assert len(data["lines"]) > 0
    lam = ds["screening_length"].values
    for (z, name), (x, y) in data["lines"].items():
        l = labels.LETTERS.index(name[-1])
        n_r = int(name[:-1]) - l - 1
        energy = ds["energy"].sel(strength=z, l=l, n_r=n_r).values
        keep = np.isfinite(energy)
        np.testing.assert_array_equal(x, lam[keep])
        np.testing.assert_array_equal(y, -energy[keep])
    for (z, name), lc in data["critical"].items():
        l = labels.LETTERS.index(name[-1])
        assert lc == float(ds["critical_screening_length"].sel(strength=z, l=l, n_r=int(name[:-1]) - l - 1))
    markers = [line for ax in fig.axes for line in ax.get_lines() if (line.get_gid() or "").startswith("critical:")]
    assert len(markers) == len(data["critical"])


def test_condition_map_counts_match_the_cells(yukawa_cube):
    # At densities whose Debye length is a grid λ, the surviving stored states must equal the cube's
    # own cell counts, Σ_l min(num_bound, n_r_max): critical lengths and cells agree.
    ds = yukawa_cube
    plasma = Plasma(temperature_eV=10.0)
    lam = ds["screening_length"].values[1:-1]
    density = np.sort(plasma.density_for(lam * BOHR, 10.0) / 1e6)  # cm-3, ascending: λ descending
    fig, data = plots.condition_map(ds, plasma, {"density_cm3": list(density), "temperature_eV": [10.0, 20.0],
                                                   "strengths": [1.0, 4.0]})
    assert fig is not None
    for z in (1.0, 4.0):
        expected = np.minimum(ds["num_bound"].sel(strength=z).values, ds.sizes["n_r"]).sum(axis=-1)[1:-1][::-1]
        np.testing.assert_array_equal(data["count"][z][0], expected)
        np.testing.assert_allclose(data["screening_length"][0], lam[::-1], rtol=1e-12)


def test_semiconductor_condition_map_is_one_dimensional(yukawa_cube):
    semi = Semiconductor(effective_mass=0.067, permittivity=12.9, screening="thomas_fermi")
    fig, data = plots.condition_map(yukawa_cube, semi, {"strengths": [1.0]})
    assert data["count"][1.0].shape == (1, data["density_cm3"].size)
    counts = data["count"][1.0][0]
    assert counts[0] > counts[-1] and np.all(np.diff(counts) <= 0)  # denser carriers, fewer states
    # Debye screening adds a temperature axis; hotter carriers screen less, so no state is lost by heating.
    debye = Semiconductor(effective_mass=0.067, permittivity=12.9, screening="debye")
    fig, data = plots.condition_map(yukawa_cube, debye, {"strengths": [1.0], "temperature_K": [10.0, 100.0]})
    hot_minus_cold = data["count"][1.0][1] - data["count"][1.0][0]
    assert data["count"][1.0].shape == (2, data["density_cm3"].size) and np.all(hot_minus_cold >= 0)
    assert hot_minus_cold.any()


def test_critical_table_equals_the_cube(yukawa_cube, tmp_path):
    # The cube's config names a plasma preset at 10 eV and no model: a sweep over screening lengths
    # keeps Debye screening.  Columns in the preset's units only (nm, cm-3): no bohr column.
    ds = yukawa_cube
    plasma = Plasma(temperature_eV=10.0, screening="debye")
    plots.write_critical_csv(ds, tmp_path / "critical.csv", plasma)
    with open(tmp_path / "critical.csv") as f:
        rows = list(csv.DictReader(line for line in f if not line.startswith("#")))
    assert len(rows) == ds["critical_screening_length"].size
    assert "critical_screening_length_bohr" not in rows[0] and "screening_validity" in rows[0]
    meanings = ds["loss_electron_density_validity"].attrs["flag_meanings"].split()
    for row in rows:
        where = {"strength": float(row["nuclear_charge"]), "l": int(row["l"]), "n_r": int(row["n_r"])}
        stored = float(ds["critical_screening_length"].sel(where))
        # λ_c carries the digits its error estimate reaches (plus one): rounding moves it by less
        # than the error, and one digit fewer would move it by more than a tenth of it.
        error_nm = float(ds["critical_screening_length_error"].sel(where)) * BOHR * 1e9
        assert float(row["critical_screening_length_error_nm"]) == pytest.approx(error_nm, rel=0.06)
        shown = float(row["critical_screening_length_nm"])
        assert abs(shown - stored * BOHR * 1e9) <= error_nm
        digits = len(row["critical_screening_length_nm"].replace("-", "").replace(".", "").split("e")[0].lstrip("0"))
        assert 3 <= digits <= 17 and 10 ** -(digits - 1) * shown <= 10 * error_nm + 1e-300
        assert int(row["n"]) == int(row["n_r"]) + int(row["l"]) + 1
        # The loss density gives back λ_c through the NRL-checked Debye length, and carries its flag.
        lam = plasma.debye_length(float(row["loss_electron_density_cm-3"]) * 1e6, 10.0)
        assert abs(lam - stored * BOHR) <= 3 * error_nm * 1e-9
        assert row["screening_validity"] == meanings[int(ds["loss_electron_density_validity"].sel(where))]


def test_never_bound_states_are_kept_out_of_the_curves(never_binding_cube, tmp_path):
    ds = never_binding_cube
    critical = ds["critical_screening_length"]
    assert np.isinf(critical.sel(l=1)).all() and np.isinf(critical.sel(l=0, n_r=1)).all()
    assert np.isfinite(critical.sel(l=0, n_r=0)).all()
    _, data = plots.threshold_map(ds, 0)
    assert list(data["curves"]) == ["1s"]
    _, data = plots.threshold_map(ds, 1)
    assert data["curves"] == {}
    written = plots.render_all(ds, tmp_path / "figures")
    with open(tmp_path / "figures" / "critical_screening_lengths.csv") as f:
        rows = list(csv.DictReader(line for line in f if not line.startswith("#")))
    assert {row["flag"] for row in rows if row["l"] == "1"} == {"never_bound"}
    assert all(row["critical_screening_length_bohr"] == "inf" for row in rows if row["l"] == "1")
    assert all(path.stat().st_size > 0 for path in written)


def test_reruns_are_byte_identical(yukawa_cube, tmp_path):
    first = plots.render_all(yukawa_cube, tmp_path / "a")
    second = plots.render_all(yukawa_cube, tmp_path / "b")
    assert {p.suffix for p in first} == {".png", ".pdf", ".csv", ".yaml"}
    for a, b in zip(first, second):
        assert a.read_bytes() == b.read_bytes(), a.name


def _workflow_copy(directory: Path, config: dict):
    shutil.copytree(ROOT / "workflow", directory / "workflow")
    (directory / "config").mkdir()
    (directory / "config" / "config.yaml").write_text(yaml.safe_dump(config))


TINY = {"sweep": "tiny", "potential": {"family": "yukawa", "mass": 1.0},
        "grid": {"strength": [1.0, 2.0], "screening_length": {"start": 0.5, "stop": 50, "num": 5, "spacing": "log"},
                 "l": [0], "n_r_max": 2},
        "tiles": {"cells": 5}, "preset": {"kind": "plasma", "temperature_eV": 5.0}}


@pytest.mark.parametrize("preset, words", [
    ({"kind": "semiconductor", "units": "atomic", "effective_mass": 0.067}, "needs potential.mass"),
    ({"kind": "plasma", "permittivity": 12.0}, "config key preset"),
])
def test_a_preset_that_does_not_fit_fails_before_any_job(tmp_path, preset, words):
    _workflow_copy(tmp_path, {**TINY, "preset": preset})
    run = subprocess.run([sys.executable, "-m", "snakemake", "-n"], cwd=tmp_path, capture_output=True, text=True,
                         timeout=120)
    assert run.returncode != 0
    message = [line for line in run.stderr.splitlines() if line.startswith("boundscape:")]
    assert len(message) == 1 and words in message[0], run.stderr[-1000:]
    assert "Traceback" not in run.stderr


@pytest.mark.parametrize("preset", [
    {"kind": "semiconductor", "units": "atomic", "effective_mass": 0.067, "permittivity": 12.9},
    {"kind": "plasma", "reduced_mass": 0.9994557},
])
def test_a_preset_that_gives_the_mass_passes_the_dry_run(tmp_path, preset):
    # The mass comes from the preset alone (no potential.mass): planned, not refused.
    config = json.loads(json.dumps({**TINY, "preset": preset}))
    config["potential"].pop("mass")
    _workflow_copy(tmp_path, config)
    run = subprocess.run([sys.executable, "-m", "snakemake", "-n"], cwd=tmp_path, capture_output=True, text=True,
                         timeout=120)
    assert run.returncode == 0, run.stderr[-1000:]


@pytest.mark.workflow
def test_workflow_renders_figures_and_builds_the_report(tmp_path):
    _workflow_copy(tmp_path, TINY)
    snakemake = [sys.executable, "-m", "snakemake", "--cores", "2"]
    run = subprocess.run(snakemake, cwd=tmp_path, capture_output=True, text=True, timeout=300)
    assert run.returncode == 0, run.stderr[-2000:]
    out = tmp_path / "results" / "tiny"
    for stem in ("threshold_map_l0", "level_fan", "condition_map"):  # a sweep over λ keeps its condition map
        assert (out / "figures" / f"{stem}.png").stat().st_size > 0
        assert (out / "figures" / f"{stem}.pdf").stat().st_size > 0
    run = subprocess.run(snakemake + ["--report", str(out / "report.html")], cwd=tmp_path, capture_output=True,
                         text=True, timeout=300)
    assert run.returncode == 0, run.stderr[-2000:]
    assert "Could not detect mimetype" not in run.stdout + run.stderr
    html = (out / "report.html").read_text()
    # categories in a reader's order, readable labels, the run's pages inline (HTML), the first
    # page composed from the cube
    for text in ("1. Maps", "2. Fans", "3. Conditions", "4. Tables", "5. Run", "Threshold map, l = 0",
                 "threshold_map_l0.png", "run_summary.html", "configuration.html", "critical_screening_lengths.html",
                 "sweep_config.yaml", "the exact number of bound states of this l", "Reduced mass", "Scope",
                 "Accuracy"):
        assert text in html, text
    assert "Thomas–Fermi on a non-degenerate gas" not in html  # no semiconductor paragraph in a plasma run


@pytest.mark.parametrize("preset", [Plasma(temperature_eV=10.0),
                                    Semiconductor(effective_mass=0.26, permittivity=11.7),
                                    Nuclear(reduced_mass_MeV=469.4591)], ids=["plasma", "semiconductor", "nuclear"])
def test_physical_coordinates_keep_the_cube_cf_conformant(yukawa_cube, preset, tmp_path, cf_findings):
    # An independent checker (IOOS compliance-checker, CF-1.10 suite, strict) must find nothing.
    from boundscape.cube import add_physical_coordinates, write_cube

    path = tmp_path / "physical.nc"
    write_cube(add_physical_coordinates(yukawa_cube, preset), path)
    assert cf_findings(path) == []
    with open_cube(path) as ds:
        assert ds[f"screening_length_{preset.length_unit.name}"].attrs["units"] == preset.length_unit.name


def test_nuclear_table_shows_the_one_scale_threshold(yukawa_cube):
    # 2μg²λ_c/ħ² = 2/1.19061 ≈ 1.6798 for the Yukawa ground state at every coupling
    # (Rogers, Graboske & Harwood, Phys. Rev. A 1, 1577 (1970); value from memory).
    rows = plots.critical_rows(yukawa_cube, Nuclear(reduced_mass_MeV=469.4591))
    ground = [row for row in rows if row["state"] == "1s"]
    assert len(ground) == yukawa_cube.sizes["strength"]
    for row in ground:
        assert row["two_mu_g2_lambda_over_hbar2"] == pytest.approx(2 / 1.19061, rel=5e-6)
        assert f"{row['two_mu_g2_lambda_over_hbar2']:.5g}" == "1.6798"


# ---------------------------------------------------------------------------------------------
# Legibility: nothing dropped, nothing overlapping, the trade's units on the axes.

def synthetic_cube(family="yukawa", strength=(1.0, 2.0, 3.0), lam=None, l=(0,), n_r_max=3, preset=NO_PRESET,
                   config_yaml="sweep: synthetic\n", status=None):
    """A cube with hydrogen-like levels, bound where λ > λ_c = n²/Z (a stand-in rule: the figures
    are checked against the cube, not against physics), built with the cube's own model."""
    from boundscape.cube import add_physical_coordinates, build_cube

    strength = np.asarray(strength, float)
    lam = np.geomspace(0.5, 100.0, 12) if lam is None else np.asarray(lam, float)
    l = np.asarray(l, np.int32)
    n = l[None, None, :, None] + np.arange(n_r_max) + 1
    shape = (strength.size, lam.size, l.size, n_r_max)
    lam_c = (n[0, 0][None] ** 2 / strength[:, None, None]) * np.ones((strength.size, l.size, n_r_max))
    energy = np.broadcast_to(-(strength[:, None, None, None] ** 2) / (2.0 * n ** 2), shape).copy()
    energy[~(lam[None, :, None, None] > lam_c[:, None, :, :])] = np.nan
    status = np.zeros(shape[:3], np.int8) if status is None else status
    levels = {"energy": energy, "energy_error": np.abs(energy) * 1e-12, "mean_radius": -1.0 / energy,
              "num_bound": np.isfinite(energy).sum(axis=-1).astype(np.int32), "status": status, "reasons": []}
    if not np.isfinite(lam).all():
        lam_c[...] = np.nan
    criticals = {"critical_screening_length": lam_c, "critical_flag": np.zeros(lam_c.shape, np.int8), "reasons": []}
    provenance = {"sweep": "synthetic", "family": family, "mass": 1.0, "config_yaml": config_yaml,
                  "config_sha256": "0" * 64, "version": "0", "git_commit": None, "history": "test"}
    ds = build_cube({"strength": strength, "screening_length": lam, "l": l, "n_r_max": n_r_max}, levels, criticals,
                    provenance=provenance)
    return add_physical_coordinates(ds, preset)


def _boxes(fig, artists):
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    return [a.get_window_extent(renderer) for a in artists if a.get_visible() and a.get_text()]


def _overlaps(boxes):
    return [(a, b) for i, a in enumerate(boxes) for b in boxes[i + 1:] if a.overlaps(b)]


def _tick_label_overlaps(fig):
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    FigureCanvasAgg(fig)
    found = []
    for ax in fig.axes:
        for axis in (ax.xaxis, ax.yaxis):
            labels = [t for t in axis.get_ticklabels(which="both") if t.get_text()]
            found += _overlaps(_boxes(fig, labels))
    return found


def test_level_fan_labels_every_critical_length_without_overlap(yukawa_cube):
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    # Many states close together: 8 levels per l between λ = 1 and 100 (synthetic, λ_c = n²/Z).
    for ds in (yukawa_cube, synthetic_cube(l=(0, 3), n_r_max=8, lam=np.geomspace(1, 100, 30))):
        fig, data = plots.level_fan(ds)
        FigureCanvasAgg(fig)
        for ax in fig.axes:
            labels = [t for t in ax.texts if (t.get_gid() or "").startswith("label:")]
            marks = [line for line in ax.get_lines() if (line.get_gid() or "").startswith("critical:")]
            assert sorted(t.get_gid()[6:] for t in labels) == sorted(m.get_gid()[9:] for m in marks)
            assert _overlaps(_boxes(fig, labels)) == []
            # Labels sit above the curves on an opaque patch: no curve runs over a label.
            top_line = max((line.get_zorder() for line in ax.get_lines()), default=0)
            for t in labels:
                assert t.get_zorder() > top_line and t.get_bbox_patch().get_alpha() >= 0.8
        assert len([t for ax in fig.axes for t in ax.texts if (t.get_gid() or "").startswith("label:")]) == \
            len(data["critical"])


def test_level_fan_curves_reach_their_critical_length(yukawa_cube):
    fig, data = plots.level_fan(yukawa_cube)
    for ax in fig.axes:
        bottom = ax.get_ylim()[0]
        for line in ax.get_lines():
            gid = line.get_gid() or ""
            if not gid.startswith("connector:"):
                continue
            name = gid[10:]
            (x0, x1), (y0, y1) = line.get_data()
            curve = next(c for c in ax.get_lines() if c.get_gid() == f"level:{name}")
            assert (x0, y0) == (curve.get_xdata()[0], curve.get_ydata()[0])  # from the last stored point
            marker = next(c for c in ax.get_lines() if c.get_gid() == f"critical:{name}")
            assert (x1, y1) == (marker.get_xdata()[0], bottom)  # to the λ_c triangle


def test_short_log_axes_do_not_collide():
    from matplotlib.figure import Figure

    from boundscape.plots.style import value_ticks

    fig = Figure(figsize=(6.4, 4.6))
    ax = fig.add_subplot(xscale="log")
    values = np.array([74.6, 82.9, 91.2, 99.5])  # close couplings: every one a tick would collide
    ax.set_xlim(70, 105)
    value_ticks(ax.xaxis, values)
    assert _tick_label_overlaps(fig) == []
    assert all("×" not in t.get_text() and "10^" not in t.get_text() for t in ax.xaxis.get_ticklabels(which="both"))


def test_nuclear_figures_are_legible_and_show_MeV(yukawa_cube):
    # Energy unit (ħc)²/(μc² fm²) in MeV (ħc from CODATA via scipy).
    hbar_c = pc["reduced Planck constant times c in MeV fm"][0]
    nuclear = Nuclear(reduced_mass_MeV=469.4591)
    ds = synthetic_cube(strength=np.linspace(1.5, 2.0, 6), lam=np.geomspace(1.0, 5.0, 15), preset=nuclear)
    for fig in (plots.threshold_map(ds, 0, nuclear)[0], plots.level_fan(ds, preset=nuclear)[0]):
        assert _tick_label_overlaps(fig) == []
    fig, _ = plots.threshold_map(ds, 0, nuclear)
    assert fig.axes[0].get_xlabel() == "coupling g² (MeV fm)"
    fig, _ = plots.level_fan(ds, preset=nuclear)
    _tick_label_overlaps(fig)  # draws
    pairs = [(ax, child) for ax in fig.axes for child in ax.child_axes if child.get_ylabel() == "−E (MeV)"]
    assert pairs
    unit_MeV = hbar_c ** 2 / 469.4591
    for ax, right in pairs:
        np.testing.assert_allclose(right.get_ylim(), np.array(ax.get_ylim()) * unit_MeV, rtol=1e-9)


def test_condition_map_shows_every_stored_strength_and_distinct_bands():
    from matplotlib.colors import to_rgb

    from boundscape.plots.style import count_norm

    plasma = Plasma(temperature_eV=10.0)
    ds = synthetic_cube(strength=[1.0, 2.0, 3.0, 4.0, 5.0, 6.0], l=(0, 1, 2, 3), n_r_max=8, preset=plasma)
    fig, data = plots.condition_map(ds, plasma)
    titles = [ax.get_title() for ax in fig.axes if ax.get_visible() and ax.get_title()]
    assert [t for t in titles if t.startswith("nuclear charge Z = ")] == [f"nuclear charge Z = {z}" for z in range(1, 7)]
    # 0, 1, 2 and 3 surviving states: clearly different shades (sRGB distance), even with 32 in the map.
    cmap, norm = count_norm(32)
    shades = [np.array(to_rgb(cmap(norm(k)))) for k in range(4)]
    assert min(np.linalg.norm(a - b) for i, a in enumerate(shades) for b in shades[i + 1:]) > 0.1


def test_thomas_fermi_map_marks_where_the_gas_is_not_degenerate():
    # E_F = ħ²k_F²/(2m*) with k_F = (3π²n)^{1/3} (Ashcroft & Mermin, ch. 2): E_F = k_B T at
    # n = (2m* k_B T)^{3/2}/(3π² ħ³).  Below it Thomas–Fermi screening fails, and every density there
    # is hatched; so is every other density the preset flags (here also the too dilute degenerate
    # gas, whose Thomas–Fermi sphere holds less than one electron), and nothing else.
    from scipy import constants as sc

    semi = Semiconductor(effective_mass=0.067, permittivity=12.9, temperature_K=77.0, screening="thomas_fermi")
    ds = synthetic_cube(preset=semi)
    density = np.geomspace(1e10, 1e20, 51)
    fig, _ = plots.condition_map(ds, semi, {"density_cm3": list(density)})
    k_F = math.sqrt(2 * 0.067 * sc.m_e * sc.k * 77.0) / sc.hbar
    n_cm3 = k_F ** 3 / (3 * math.pi ** 2) / 1e6
    flags = semi.validity(density * 1e6, 77.0).flag
    assert np.all(flags[density < n_cm3] == 3)  # thomas_fermi_model_on_classical_gas
    spans = [p for ax in fig.axes for p in ax.patches if p.get_gid() == "invalid"]
    assert spans
    edges = plots.style.cell_edges(density)
    hatched = np.zeros(density.size, bool)
    for span in spans:
        lo, hi = span.get_x(), span.get_x() + span.get_width()
        hatched |= (density > lo) & (density < hi)
    np.testing.assert_array_equal(hatched, flags != 0)
    assert edges[0] == pytest.approx(1e10 / math.sqrt(density[1] / density[0]))


def test_family_names_and_the_square_well_radius():
    ds = synthetic_cube(family="ecsc")
    assert "exponential-cosine-screened Coulomb" in plots.threshold_map(ds, 0)[0].axes[0].get_title()
    well = synthetic_cube(family="square_well")
    fig, _ = plots.threshold_map(well, 0)
    assert fig.axes[0].get_ylabel() == "radius of the well R (bohr)"
    assert "square well" in fig.axes[0].get_title()
    fig, _ = plots.level_fan(well)
    assert fig.get_supxlabel() == "radius of the well R (bohr)"


def test_rejected_cells_are_not_shaded_as_zero_states():
    from boundscape.engine import INPUT_REJECTED

    status = np.zeros((3, 12, 1), np.int8)
    status[1, 4, 0] = INPUT_REJECTED
    _, data = plots.threshold_map(synthetic_cube(status=status), 0)
    assert np.isnan(data["count"][1, 4]) and np.isfinite(np.delete(data["count"].ravel(), 1 * 12 + 4)).all()


@pytest.mark.parametrize("family", ["coulomb", "harmonic"])
def test_families_without_a_screening_length_render(family, tmp_path):
    ds = synthetic_cube(family=family, lam=[np.inf], l=(0, 1))
    ds["num_bound"][:] = -1
    written = plots.render_all(ds, tmp_path)
    assert all(path.stat().st_size > 0 for path in written)
    assert "no screening length" in plots.threshold_map(ds, 0)[0].axes[0].get_title()


def test_the_readme_xarray_snippet_labels_itself_legibly(tmp_path, monkeypatch):
    # The README's snippet, run on a cube shaped like the demo's (Z × n_e × T_e under the plasma preset).
    import re

    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from test_conditions import PLASMA, build, changed

    build(tmp_path, changed(PLASMA, grid__electron_temperature=[1.0, 10.0, 100.0], resonances=False, lines=None))
    readme = (ROOT / "README.md").read_text()
    code = re.search(r"```python\n(.*?)```", readme, re.S).group(1)
    assert "results/demo/levels.nc" in code
    monkeypatch.chdir(tmp_path)
    code = code.replace("results/demo/levels.nc", str(tmp_path / "levels.nc"))
    exec(compile(code, "README.md", "exec"), {})
    ax = plt.gcf().axes[0]
    assert ax.get_ylabel() == "binding energy −E [eV]"
    assert ax.get_xlabel() == "electron density [cm-3]"
    assert ax.get_legend().get_title().get_text() == "radial quantum number n_r"
    assert (tmp_path / "binding_Z2.png").stat().st_size > 0
    plt.close("all")


def test_readable_units_follow_the_preset(yukawa_cube):
    from boundscape.cube import readable

    # The fixture's cube names a plasma preset: eV and nm (CODATA via scipy).
    shown = readable(yukawa_cube, "preset")
    assert shown["energy"].attrs["units"] == "eV" and shown["screening_length"].attrs["units"] == "nm"
    np.testing.assert_allclose(shown["energy"].values, yukawa_cube["energy"].values * pc["Hartree energy in eV"][0],
                               rtol=1e-14)
    np.testing.assert_allclose(shown["screening_length"].values, yukawa_cube["screening_length"].values * BOHR * 1e9,
                               rtol=1e-14)
    atomic = readable(yukawa_cube)
    np.testing.assert_array_equal(atomic["binding_energy"].values, -yukawa_cube["energy"].values)
    assert "units" not in atomic["n_r"].attrs
