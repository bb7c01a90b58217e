"""The cube file (boundscape.cube): CF-1.10 metadata, units from scipy.constants, provenance,
compression and lazy opening, atomic writes. Built here from exact hydrogen-like numbers
(E = -Z²/(2n²), any QM textbook) so that no engine is needed."""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest
from scipy.constants import physical_constants

from boundscape import cube
from boundscape.cube import model, netcdf

HARTREE = physical_constants["Hartree energy"][0]
BOHR = physical_constants["Bohr radius"][0]


def hydrogen_like_cube(strength, lam, l, n_r_max, reasons=()):
    n = l[None, None, :, None] + np.arange(n_r_max) + 1
    shape = (strength.size, lam.size, l.size, n_r_max)
    energy = np.broadcast_to(-(strength[:, None, None, None] ** 2) / (2.0 * n**2), shape).copy()
    # Stand-in for screening: the state is bound where λ exceeds n² / Z (any monotone rule will do).
    lam_c = n[0, 0][None] ** 2 / strength[:, None, None] * np.ones((strength.size, l.size, n_r_max))
    energy[~(lam[None, :, None, None] > lam_c[:, None, :, :])] = np.nan
    status = np.zeros(shape[:3], np.int8)
    for i, j, k, _ in reasons:
        status[i, j, k] = 1
        energy[i, j, k] = np.nan
    levels = {"energy": energy, "energy_error": np.abs(energy) * 1e-12,
              "mean_radius": np.where(np.isfinite(energy), 1.5 * n**2 / strength[:, None, None, None], np.nan),
              "num_bound": np.isfinite(energy).sum(axis=-1).astype(np.int32), "status": status,
              "reasons": [f"cell {i},{j},{k}: {text}" for i, j, k, text in reasons]}
    flag = np.zeros(lam_c.shape, np.int8)
    lam_c[0, 0, 0] = np.inf
    flag[0, 0, 0] = 3
    criticals = {"critical_screening_length": lam_c, "critical_flag": flag, "reasons": []}
    provenance = {"sweep": "unit", "family": "yukawa", "mass": 1.0, "config_yaml": "sweep: unit\n",
                  "config_sha256": "0" * 64, "version": "0.1.0", "git_commit": None, "history": "test"}
    return cube.build_cube({"strength": strength, "screening_length": lam, "l": l, "n_r_max": n_r_max},
                           levels, criticals, provenance=provenance)


@pytest.fixture(scope="module")
def small_cube(tmp_path_factory):
    path = tmp_path_factory.mktemp("cube") / "levels.nc"
    ds = hydrogen_like_cube(np.array([1.0, 2.0]), np.geomspace(0.5, 50, 5), np.array([0, 1], np.int32), 3,
                            reasons=[(1, 2, 0, "ConvergenceError: tolerance not met")])
    cube.write_cube(ds, path)
    return ds, path


def test_units_are_scaled_udunits_from_scipy_constants(small_cube):
    _, path = small_cube
    with cube.open_cube(path) as ds:
        # CODATA via scipy.constants, formatted with repr as the cube contract says.
        assert ds.energy.attrs["units"] == f"{HARTREE!r} J"
        assert ds.energy_error.attrs["units"] == f"{HARTREE!r} J"
        assert ds.mean_radius.attrs["units"] == f"{BOHR!r} m"
        assert ds.screening_length.attrs["units"] == f"{BOHR!r} m"
        assert ds.critical_screening_length.attrs["units"] == f"{BOHR!r} m"
        assert ds.energy.attrs["energy_unit_in_eV"] == physical_constants["Hartree energy in eV"][0]


def test_round_trip_keeps_values_dims_and_dtypes(small_cube):
    built, path = small_cube
    with cube.open_cube(path) as ds:
        assert dict(ds.sizes) == {"strength": 2, "screening_length": 5, "l": 2, "n_r": 3}
        assert ds.energy.dims == ("strength", "screening_length", "l", "n_r")
        assert ds.critical_screening_length.dims == ("strength", "l", "n_r")
        assert ds.num_bound.dims == ("strength", "screening_length", "l")
        assert ds.energy.dtype == np.float64 and ds.l.dtype == np.int32 and ds.n_r.dtype == np.int32
        # num_bound is int32 on disk; its _FillValue (unknown counts) makes xarray decode it to float64.
        assert ds.num_bound.encoding["dtype"] == np.int32 and ds.status.dtype == np.int8
        np.testing.assert_array_equal(ds.num_bound.values, built.num_bound.values)
        np.testing.assert_array_equal(ds.energy.values, built.energy.values)
        np.testing.assert_array_equal(ds.n.values, ds.l.values[:, None] + ds.n_r.values[None, :] + 1)
        assert np.isinf(ds.critical_screening_length.values[0, 0, 0])
        # -Z²/(2n²) for Z = 2, n = 1 (1s): exactly -2 hartree.
        assert ds.energy.sel(strength=2.0, l=0, n_r=0).values[-1] == -2.0


def test_status_flags_and_reasons(small_cube):
    _, path = small_cube
    with cube.open_cube(path) as ds:
        meanings = ds.status.attrs["flag_meanings"].split()
        assert meanings[:2] == ["ok", "not_converged"]
        assert list(ds.status.attrs["flag_values"]) == list(range(len(meanings)))
        assert int(ds.status.attrs["flagged_cell_count"]) == 1
        assert "ConvergenceError" in ds.status.attrs["flagged_cells"]
        assert np.isnan(ds.energy.values[1, 2, 0]).all()


def test_provenance_attributes(small_cube):
    _, path = small_cube
    with cube.open_cube(path) as ds:
        for key in ("Conventions", "title", "history", "source", "boundscape_version", "config_yaml",
                    "config_sha256", "git_commit", "date_created", "family", "mass"):
            assert key in ds.attrs, key
        assert ds.attrs["Conventions"] == "CF-1.10"
        assert ds.attrs["config_yaml"] == "sweep: unit\n"


def test_cf_checker_finds_nothing(small_cube, cf_findings):
    _, path = small_cube
    assert cf_findings(path) == []


def test_cf_checker_catches_a_broken_file(tmp_path, cf_findings):
    # Negative control: the same checker must object to a bad unit and an unknown standard_name.
    import netCDF4

    path = tmp_path / "broken.nc"
    with netCDF4.Dataset(path, "w") as nc:
        nc.Conventions = "CF-1.10"
        nc.createDimension("x", 2)
        var = nc.createVariable("energy", "f8", ("x",))
        var.units, var.standard_name = "hartrees", "bound_state_energy"
        var[:] = [-0.5, -0.125]
    findings = " ".join(msg for _, msg in cf_findings(path))
    assert "hartrees" in findings and "bound_state_energy" in findings


@pytest.mark.skipif(shutil.which("ncdump") is None, reason="ncdump not found (Debian package netcdf-bin)")
def test_ncdump_reads_the_header(small_cube):
    _, path = small_cube
    header = subprocess.run(["ncdump", "-h", str(path)], capture_output=True, text=True, check=True).stdout
    for text in ("strength = 2 ;", "screening_length = 5 ;", "l = 2 ;", "n_r = 3 ;",
                 "double energy(strength, screening_length, l, n_r) ;",
                 f'energy:units = "{HARTREE!r} J" ;', ':Conventions = "CF-1.10" ;',
                 "int num_bound(strength, screening_length, l) ;", "byte status(strength, screening_length, l) ;"):
        assert text in header, text


def test_million_cell_cube_is_small_and_opens_lazily(tmp_path):
    strength = np.linspace(1, 10, 100)
    lam = np.geomspace(0.1, 1000, 1250)
    l = np.arange(8, dtype=np.int32)
    ds = hydrogen_like_cube(strength, lam, l, 4)
    assert ds.strength.size * ds.screening_length.size * ds.l.size == 1_000_000
    path = tmp_path / "big.nc"
    cube.write_cube(ds, path)
    raw = sum(v.nbytes for v in ds.data_vars.values())
    # Smooth energies with NaN where unbound compress well; a fifth of the raw size is plenty.
    assert path.stat().st_size < raw / 5
    with cube.open_cube(path) as lazy:
        assert not lazy.energy.variable._in_memory
        one = lazy.energy.isel(strength=3, l=1).values
        assert one.shape == (1250, 4)
        np.testing.assert_array_equal(one, ds.energy.isel(strength=3, l=1).values)
        assert lazy.energy.encoding["zlib"] and lazy.energy.encoding["chunksizes"][0] < 100


def test_chunks_hold_about_a_mebibyte():
    chunks = model.chunk_shape((100, 1250, 8, 4), 8)
    assert np.prod(chunks) * 8 <= model.CHUNK_BYTES
    assert chunks[1:] == (1250, 8, 4)


def test_write_is_atomic(tmp_path):
    final = tmp_path / "levels.nc"

    def dies_half_way(temp):
        Path(temp).write_bytes(b"half a file")
        raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        netcdf.replace_atomically(dies_half_way, final)
    assert list(tmp_path.iterdir()) == []


def test_part_files_round_trip(tmp_path):
    arrays = {"energy": np.array([[-0.5, np.nan]]), "status": np.array([1], np.int8)}
    cube.write_part(tmp_path / "t.nc", arrays, {"energy": ("a", "b"), "status": ("a",)},
                    {"spec_json": "{}", "engine_seconds": 1.5})
    back, attrs = cube.read_part(tmp_path / "t.nc")
    np.testing.assert_array_equal(back["energy"], arrays["energy"])
    assert back["status"].dtype == np.int8 and attrs["engine_seconds"] == 1.5


def test_open_missing_cube_is_one_line(tmp_path):
    from boundscape.errors import InputError

    with pytest.raises(InputError, match="does not exist"):
        cube.open_cube(tmp_path / "none.nc")


def test_one_listing_and_one_flag_attrs_serve_every_flag_variable():
    # CF-1.10 section 3.5: flag_values and flag_meanings, one meaning per value, in order.
    assert model.listing([]) == "none"
    assert model.listing(["a", "b"]) == "a\nb"
    long = model.listing([f"cell {i}" for i in range(model.MAX_LISTED + 5)]).splitlines()
    assert len(long) == model.MAX_LISTED + 1 and long[-1].startswith("... and 5 more")
    attrs = model.flag_attrs(("ok", "bad", "worse"))
    assert attrs["flag_meanings"] == "ok bad worse"
    assert attrs["flag_values"].dtype == np.int8 and list(attrs["flag_values"]) == [0, 1, 2]
    # No module of the cube writes flag attributes or listings by hand any more.
    for path in Path(model.__file__).parent.glob("*.py"):
        text = path.read_text()
        if path.name != "model.py":
            assert '"flag_values":' not in text and "MAX_LISTED" not in text, path.name
