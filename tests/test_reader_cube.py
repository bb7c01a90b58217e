"""What a reader opens in the cube: the run summary counts every flag of every
variable, and the header gives each unit value under one name, from one constant."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.constants import physical_constants as pc

from boundscape.cube import add_physical_coordinates, build_cube, write_cube
from boundscape.cube.model import flag_attrs
from boundscape.cube.resonances import add_resonances
from boundscape.cube.summary import flag_counts, run_summary
from boundscape.engine import LEVEL_STATUS
from boundscape.physics.presets import NO_PRESET, Plasma, Semiconductor
from boundscape.sweep.line_tiles import LINE_FLAGS
from boundscape.sweep.resonance_tiles import DISSOLUTION_FLAGS, RESONANCE_FLAGS
from boundscape.sweep.tiles import CRITICAL_FLAGS

PROVENANCE = {"sweep": "flags", "family": "yukawa", "mass": 1.0, "config_yaml": "sweep: flags\n",
              "config_sha256": "0" * 64, "version": "0", "git_commit": None, "history": "test"}


def _each(flags, shape):
    """An int8 array of ``shape`` holding every code of ``flags`` once, the rest code 0: so each
    meaning but the first is counted once, and the first ``size - len(flags) + 1`` times."""
    values = np.zeros(int(np.prod(shape)), np.int8)
    values[:len(flags)] = np.arange(len(flags))
    return values.reshape(shape)


def _cube_with_every_flag():
    # 2 strengths x 4 lengths x 1 l x 6 n_r: every flag tuple fits in its variable's shape.
    cells, levels, states = (2, 4, 1), (2, 4, 1, 6), (2, 1, 6)
    nan = np.full(levels, np.nan)
    ds = build_cube({"strength": [1.0, 2.0], "screening_length": [1.0, 2.0, 3.0, 4.0], "l": [0], "n_r_max": 6},
                    {"energy": nan, "energy_error": nan, "mean_radius": nan, "num_bound": np.ones(cells, np.int32),
                     "status": _each(LEVEL_STATUS, cells), "reasons": []},
                    {"critical_screening_length": np.full(states, 3.0), "critical_flag": _each(CRITICAL_FLAGS, states),
                     "reasons": []}, provenance=PROVENANCE)
    ds = add_resonances(ds, {"resonance_energy": nan, "resonance_width": nan, "virtual_state_kappa": nan,
                             "resonance_status": _each(RESONANCE_FLAGS, levels), "reasons": []},
                        {"dissolution_screening_length": np.full(states, np.nan),
                         "dissolution_flag": _each(DISSOLUTION_FLAGS, states), "reasons": []})
    validity, _ = Plasma().validity_flags
    ds["line_status"] = (("strength", "screening_length"), _each(LINE_FLAGS, (2, 4)), flag_attrs(LINE_FLAGS))
    ds["screening_validity"] = (("strength", "screening_length"), _each(validity, (2, 4)), flag_attrs(validity))
    return ds


def test_summary_counts_one_of_each_flag_of_every_variable(tmp_path):
    ds = _cube_with_every_flag()
    path = tmp_path / "flags.nc"
    write_cube(ds, path)
    counts = flag_counts(path)
    flagged = {"status": LEVEL_STATUS, "critical_screening_length_flag": CRITICAL_FLAGS,
               "resonance_status": RESONANCE_FLAGS, "dissolution_screening_length_flag": DISSOLUTION_FLAGS,
               "line_status": LINE_FLAGS, "screening_validity": Plasma().validity_flags[0]}
    assert set(counts) == set(flagged)  # every flag variable, and nothing else
    for name, flags in flagged.items():
        dims, tally = counts[name]
        size = ds[name].size
        # the first code fills the rest of the array; every other code is there once
        assert tally == {flags[0]: size - len(flags) + 1, **{meaning: 1 for meaning in flags[1:]}}, name
        assert dims == ds[name].dims
    text = run_summary(path, "sweep flags: 8 cells")
    # not_converged in five variables, input_rejected in two, not_solved in one: 8 in all
    attention = sum(meaning in ("not_converged", "input_rejected", "not_solved")
                    for flags in flagged.values() for meaning in flags)
    assert attention == 8
    assert f"not converged, rejected or not solved: {attention} (" in text
    for name, flags in flagged.items():
        line = next(row for row in text.splitlines() if row.startswith(f"  {name} ["))
        for meaning in flags[1:]:
            assert f"{meaning} 1" in line, (name, meaning)


def test_a_cube_without_flags_says_none(tmp_path):
    ds = _cube_with_every_flag()
    ds["status"][:] = 0
    ds = ds.drop_vars(["resonance_status", "dissolution_screening_length_flag", "line_status",
                       "critical_screening_length_flag", "screening_validity"])
    write_cube(ds, tmp_path / "clean.nc")
    text = run_summary(tmp_path / "clean.nc", "head")
    assert "not converged, rejected or not solved: 0 (none)" in text
    assert "  status [strength x screening_length x l]: ok 8" in text


# --- the header: one name per unit value ------------------------------------------------------

UNIT_NAMES = {"energy_unit_in_J", "energy_unit_in_eV", "length_unit_in_m", "wavenumber_unit_in_per_m"}


def _unit_like(key):
    return key.endswith(("_in_J", "_in_eV", "_in_m", "_unit_J", "_unit_m", "_in_per_m"))


@pytest.mark.parametrize("preset", [NO_PRESET, Plasma(), Semiconductor(effective_mass=0.067, permittivity=12.9)],
                         ids=["atomic", "plasma", "semiconductor"])
def test_each_unit_value_has_one_attribute_name(preset):
    ds = add_physical_coordinates(_cube_with_every_flag(), preset)
    for owner in [ds, *ds.variables.values()]:
        names = {key for key in owner.attrs if _unit_like(key)}
        assert names <= UNIT_NAMES, names
    if preset is not NO_PRESET and preset.unit_system(1.0).name != "atomic":
        return
    # CODATA via scipy.constants: in atomic units the energy unit is the hartree itself, to every digit
    assert ds.attrs["energy_unit_in_J"] == pc["Hartree energy"][0]
    assert ds.attrs["energy_unit_in_eV"] == pc["Hartree energy in eV"][0]
    assert ds.attrs["length_unit_in_m"] == pc["Bohr radius"][0]
    for name in ("energy", "resonance_energy"):
        assert ds[name].attrs["energy_unit_in_J"] == ds.attrs["energy_unit_in_J"]


def test_resonance_energy_says_l0_values_are_virtual_states():
    attrs = _cube_with_every_flag()["resonance_energy"].attrs
    assert "virtual state on the unphysical sheet, negative, l = 0" in attrs["long_name"]
