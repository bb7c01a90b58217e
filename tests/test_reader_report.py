"""What a reader opens: the loss table's header, error column and digits; the stored
configuration; the report's captions composed for the sweep's preset and l; its categories, labels,
landing text and the pages it shows inline."""

from __future__ import annotations

import csv
import json
import math
from pathlib import Path
from types import SimpleNamespace

import jinja2
import pytest
import yaml
from docutils.core import publish_parts

from boundscape import sweep
from boundscape.cli.report_pages import landing_text, table_page, write_report_pages
from boundscape.cube.physical import preset_of
from boundscape.plots import write_critical_csv
from boundscape.report_layout import arrange, figure_label
from boundscape.sweep.stored import stored_config
from workflow_steps import build_cube

REPO = Path(__file__).resolve().parents[1]
CAPTIONS = REPO / "workflow" / "report"
# A plasma sweep over screening lengths at T_e = 20 eV (its reference temperature), Z = 1 and 2.
PLASMA = {"sweep": "reader", "potential": {"family": "yukawa"},
          "grid": {"strength": [1.0, 2.0], "screening_length": [1.0, 3.0, 10.0], "l": [0, 1], "n_r_max": 2},
          "tiles": {"cells": 6}, "preset": {"kind": "plasma", "temperature_eV": 20.0}}


@pytest.fixture(scope="module")
def plasma_cube(tmp_path_factory):
    """The cube of :data:`PLASMA` through the workflow's own steps, in this process."""
    directory = tmp_path_factory.mktemp("reader")
    cube, _ = build_cube(directory, PLASMA, summary=directory / "summary.txt")
    return cube, directory
def _table(path):
    lines = Path(path).read_text().splitlines()
    header = [line for line in lines if line.startswith("#")]
    rows = list(csv.DictReader(line for line in lines if not line.startswith("#")))
    return header, rows


# --- the loss table ---------------------------------------------------------------------------

def test_loss_table_header_says_units_conditions_model_and_version(plasma_cube, tmp_path):
    ds, _ = plasma_cube
    preset, _ = preset_of(ds)
    write_critical_csv(ds, tmp_path / "t.csv", preset)
    header, rows = _table(tmp_path / "t.csv")
    text = "\n".join(header)
    assert Path(tmp_path / "t.csv").read_text().startswith("# ")  # the header comes first
    assert f"boundscape {ds.attrs['boundscape_version']}" in text and ds.attrs["config_sha256"] in text
    assert "preset: plasma" in text and "screening model debye" in text  # a sweep over λ keeps Debye
    assert "at the reference temperature 20 eV" in text  # where the loss density holds
    assert "reduced mass 1 electron mass (engine units)" in text and "non-relativistic" in text
    for column in rows[0]:  # every column explained, with its unit where it has one
        assert f"#   {column}: " in text, column
    assert "nuclear_charge" in rows[0] and "strength" not in rows[0]  # Z under the plasma preset
    assert "critical_screening_length_nm [nm]" not in text and "[nm]" in text


def test_loss_table_error_column_and_digits_follow_the_cube(plasma_cube, tmp_path):
    ds, _ = plasma_cube
    preset, _ = preset_of(ds)
    write_critical_csv(ds, tmp_path / "t.csv", preset)
    _, rows = _table(tmp_path / "t.csv")
    nm = 0.529177210544e-1  # bohr in nm, CODATA 2022 (scipy.constants)
    assert len(rows) == ds["critical_screening_length"].size
    for row in rows:
        where = {"strength": float(row["nuclear_charge"]), "l": int(row["l"]), "n_r": int(row["n_r"])}
        lam = float(ds["critical_screening_length"].sel(where)) * nm
        err = float(ds["critical_screening_length_error"].sel(where)) * nm
        assert 0 < err < 1e-8 * lam  # the engine's estimate, stored in the cube
        assert float(row["critical_screening_length_error_nm"]) == pytest.approx(err, rel=0.06)
        shown = row["critical_screening_length_nm"]
        assert abs(float(shown) - lam) <= err  # rounding stays within the error
        digits = len(shown.split("e")[0].replace(".", "").lstrip("0"))
        assert digits <= math.ceil(math.log10(lam / err)) + 1  # and no more digits than it reaches
        assert row["screening_validity"] in ds["loss_electron_density_validity"].attrs["flag_meanings"].split()


def test_cube_error_variable_has_cf_attributes(plasma_cube):
    ds, _ = plasma_cube
    attrs = ds["critical_screening_length_error"].attrs
    assert attrs["units"] == ds["critical_screening_length"].attrs["units"]
    assert "critical_screening_length_error" in ds["critical_screening_length"].attrs["ancillary_variables"]
    assert attrs["long_name"] == "critical screening length error estimate"


# --- the stored configuration -----------------------------------------------------------------

def test_stored_config_is_what_was_written_plus_the_defaults_that_matter(plasma_cube):
    ds, _ = plasma_cube
    stored = yaml.safe_load(ds.attrs["config_yaml"])
    assert stored["preset"] == {"kind": "plasma", "temperature_eV": 20.0, "species": "electrons",
                                "screening": "debye"}  # the model a sweep over λ keeps, named
    assert stored["potential"] == {"family": "yukawa", "mass": 1.0}
    again = sweep.validate_config(json.loads(json.dumps(stored)))  # it runs the same sweep again
    assert sweep.plan(again).num_cells == sweep.plan(sweep.validate_config(PLASMA)).num_cells


def test_stored_config_drops_table_keys_and_ion_settings_that_do_not_apply():
    config = {"sweep": "s", "potential": {"family": "yukawa", "screened": False},
              "grid": {"strength": [1.0], "electron_density": [1e20], "electron_temperature": [10.0], "l": [0],
                       "n_r_max": 1},
              "preset": {"kind": "plasma"}}
    stored = stored_config(config, 1.0)
    assert "screened" not in stored["potential"] and stored["potential"]["mass"] == 1.0
    assert stored["preset"]["screening"] == "finite_temperature"  # the default of a sweep over conditions
    assert "temperature_eV" not in stored["preset"]  # temperatures are on an axis
    assert "screening_ion_charge" not in stored["preset"] and "reduced_mass" not in stored["preset"]
    ions = stored_config({**config, "preset": {"kind": "plasma", "species": "electrons_and_ions"}}, 1.0)
    assert ions["preset"]["screening_ion_charge"] == 1.0 and ions["preset"]["ion_temperature_ratio"] == 1.0
    table = {**config, "potential": {"family": "tabulated", "table": "t.csv", "screened": True}}
    assert stored_config(table, 1.0)["potential"]["screened"] is True


# --- captions composed for the preset and l -----------------------------------------------------

CONFIGS = {
    "plasma_conditions": {"sweep": "c", "potential": {"family": "yukawa"}, "resonances": True,
                          "grid": {"strength": [1], "electron_density": [1e20], "electron_temperature": [1], "l": [0],
                                   "n_r_max": 1}, "preset": {"kind": "plasma"}},
    "plasma_lengths": {**PLASMA, "resonances": True},
    "semiconductor_lengths": {**PLASMA, "preset": {"kind": "semiconductor", "effective_mass": 0.067,
                                                   "permittivity": 12.9}},
    "no_preset": {k: v for k, v in PLASMA.items() if k != "preset"},
}


def _caption(name, config):
    text = (CAPTIONS / name).read_text()
    rst = jinja2.Environment().from_string(text).render(snakemake=SimpleNamespace(config=config))
    parts = publish_parts(rst, writer="html", settings_overrides={"report_level": 2, "halt_level": 2})
    return rst, parts["body"]


@pytest.mark.parametrize("name", sorted(p.name for p in CAPTIONS.glob("*.rst")))
@pytest.mark.parametrize("which", sorted(CONFIGS))
def test_every_caption_renders_cleanly_for_every_kind_of_sweep(name, which):
    rst, body = _caption(name, CONFIGS[which])  # docutils halts on any warning (halt_level 2)
    assert "{{" not in body and "{%" not in body and body.strip()


def test_a_plasma_run_reads_no_other_trade():
    for name in ("threshold_map.rst", "threshold_map_l0.rst", "condition_map.rst", "level_fan.rst",
                 "critical_table.rst", "line_survival.rst"):
        for which in ("plasma_conditions", "plasma_lengths"):
            rst, _ = _caption(name, CONFIGS[which])
            for other in ("semiconductor", "donor", "carrier", "nuclear preset", "g²", "MeV", "square well", "a*"):
                assert other not in rst, (name, which, other)


def test_l0_map_has_no_resonance_talk_and_l1_has_it():
    for which in ("plasma_conditions", "plasma_lengths"):
        l0, _ = _caption("threshold_map_l0.rst", CONFIGS[which])
        l1, _ = _caption("threshold_map.rst", CONFIGS[which])
        assert "resonance narrower" not in l0 and "orange band" not in l0 and "virtual state" in l0
        assert "resonance narrower" in l1 and "orange band" in l1
    l1, _ = _caption("threshold_map.rst", CONFIGS["semiconductor_lengths"])  # resonances off: no bands
    assert "orange band" not in l1 and "donor charge" in l1.lower() and "electron temperature" not in l1


# --- the report's layout and pages ---------------------------------------------------------------

DEMO_FIGURES = [("threshold_map_l0", "threshold_map.rst", "Threshold maps", "l = 0"),
                ("threshold_map_l1", "threshold_map.rst", "Threshold maps", "l = 1"),
                ("level_fan", "level_fan.rst", "Level fans", None),
                ("resonance_fan", "resonance_fan.rst", "Resonance fans", None),
                ("line_shift_1s-2p", "line_shift.rst", "Spectral lines", "1s-2p"),
                ("condition_map", "condition_map.rst", "Physical conditions", None)]


def test_categories_follow_the_readers_order_and_labels_are_names():
    figures, numbered = arrange(DEMO_FIGURES)
    assert list(numbered.values()) == ["1. Maps", "2. Fans", "3. Lines", "4. Conditions", "5. Tables", "6. Run"]
    # Snakemake sorts categories by name: the numbers keep the reader's order
    assert sorted(numbered.values()) == list(numbered.values())
    assert figures[0] == ("threshold_map_l0", "threshold_map_l0.rst", "1. Maps", "l = 0")
    assert figures[1][1] == "threshold_map.rst" and figures[2][2] == figures[3][2] == "2. Fans"
    assert [figure_label(stem) for stem, *_ in DEMO_FIGURES] == [
        "Threshold map, l = 0", "Threshold map, l = 1", "Level fan", "Resonance fan", "Line shift, 1s–2p",
        "Condition map"]
    _, without = arrange(DEMO_FIGURES[:3])  # no lines, no condition map: no gaps in the numbers
    assert list(without.values()) == ["1. Maps", "2. Fans", "3. Tables", "4. Run"]


def test_landing_text_states_preset_mass_tolerance_and_scope(plasma_cube):
    ds, directory = plasma_cube
    config = yaml.safe_load(ds.attrs["config_yaml"])
    text = landing_text(ds, config, (directory / "summary.txt").read_text())
    for words in ("**Preset**: plasma (temperature_eV 20.0, species electrons, screening debye)",
                  "**Reduced mass**: 1 electron mass", "below 1e-9 of its energy", "checked to 1e-9",
                  "The non-relativistic Schrödinger equation", "static screened potential", "weak coupling",
                  "not converged, rejected or not solved: 0"):
        assert words in text, words
    publish_parts(text, writer="html", settings_overrides={"report_level": 2, "halt_level": 2})


def test_report_pages_show_summary_config_and_table_inline(plasma_cube, tmp_path):
    ds, directory = plasma_cube
    preset, _ = preset_of(ds)
    write_critical_csv(ds, tmp_path / "table.csv", preset)
    (tmp_path / "config.yaml").write_text(ds.attrs["config_yaml"])
    written = write_report_pages(directory / "levels.nc", directory / "summary.txt", tmp_path / "table.csv",
                                 tmp_path / "config.yaml", tmp_path / "report")
    assert {p.name for p in written} == {"landing.rst", "run_summary.html", "configuration.html",
                                         "critical_screening_lengths.html"}
    page = (tmp_path / "report" / "critical_screening_lengths.html").read_text()
    _, rows = _table(tmp_path / "table.csv")
    assert page.count("<tr>") == len(rows) + 1 and "<th>critical_screening_length_error_nm</th>" in page
    assert "at the reference temperature 20 eV" in page  # the header's notes, shown above the table
    assert "temperature_eV: 20.0" in (tmp_path / "report" / "configuration.html").read_text()
    assert "every flag of the cube, counted" in (tmp_path / "report" / "run_summary.html").read_text()
    assert table_page("t", tmp_path / "table.csv").startswith("<!DOCTYPE html>")
