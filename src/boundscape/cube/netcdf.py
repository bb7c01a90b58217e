"""NetCDF files of a sweep: the cube and the parts (tiles, critical blocks) it is merged from.

Every file is written to a temporary name in the same directory and renamed into place, so a
killed job never leaves a partial file under a final name. A part that is damaged later (a file
truncated, or copied over another) is found by :func:`part_problem`, and a results folder that
cannot be written by :func:`unwritable`.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import numpy as np

from ..errors import InputError
from .model import FILL_VALUES, chunk_shape

__all__ = ["write_cube", "open_cube", "atomic_path", "replace_atomically", "write_part", "read_part",
           "read_part_variables", "open_for_filling", "part_problem", "unwritable"]


def atomic_path(path) -> Path:
    """The temporary name a file is written under before it is renamed to ``path``."""
    path = Path(path)
    return path.with_name(f".{path.name}.{os.getpid()}.partial")


def replace_atomically(write, path):
    """Call ``write(temp_path)``, then rename the result to ``path`` (same directory, so atomic)."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    for stale in path.parent.glob(f".{path.name}.*.partial"):  # left by a killed job
        stale.unlink(missing_ok=True)
    temp = atomic_path(path)
    try:
        write(temp)
        os.replace(temp, path)
    except PermissionError as exc:  # name the file the user knows, not the temporary one
        raise PermissionError(exc.errno, exc.strerror, str(path)) from None
    finally:
        temp.unlink(missing_ok=True)


def write_cube(ds, path, fill=None):
    """Write the cube compressed and chunked, atomically.

    ``fill(temp_path)``, if given, is called on the written file before it is renamed into
    place: collect uses it to stream the tiles' levels into a cube written with placeholders."""
    encoding = {}
    for name, var in ds.variables.items():
        enc = {"_FillValue": None}
        if name in ds.data_vars:
            enc.update(zlib=True, complevel=4, shuffle=True,
                       chunksizes=chunk_shape(var.shape, var.dtype.itemsize))
            if var.dtype.kind == "f":
                enc["_FillValue"] = np.nan
            elif name in FILL_VALUES:
                enc["_FillValue"] = FILL_VALUES[name]
        encoding[name] = enc
    def write(temp):
        ds.to_netcdf(temp, engine="netcdf4", format="NETCDF4", encoding=encoding)
        if fill is not None:
            fill(temp)

    replace_atomically(write, path)


def open_cube(path):
    """Open a cube lazily: arrays are read from disk only when indexed."""
    import xarray as xr

    path = Path(path)
    if not path.is_file():
        raise InputError(f"cube {str(path)!r} does not exist")
    return xr.open_dataset(path, engine="netcdf4")


def write_part(path, arrays: dict, dims: dict, attrs: dict):
    """Write a tile or a block of critical lengths (internal files, read back by :func:`read_part`).

    Parameters
    ----------
    path : path
        The final name; the file is written beside it and renamed into place.
    arrays : dict of numpy.ndarray
        The variables.
    dims : dict of tuple of str
        The dimension names of each variable.
    attrs : dict
        Global attributes (strings and numbers).

    netCDF4 directly rather than xarray: a tile job then skips importing pandas, which is a
    good part of a short job's start-up time.
    """
    import netCDF4

    def write(temp):
        with netCDF4.Dataset(temp, "w", format="NETCDF4") as nc:
            for name, array in arrays.items():
                for dim, size in zip(dims[name], array.shape):
                    if dim not in nc.dimensions:
                        nc.createDimension(dim, size)
                # Fletcher-32 checksums: a damaged chunk fails to read instead of reading wrong numbers.
                var = nc.createVariable(name, array.dtype, dims[name], zlib=True, complevel=1, fletcher32=True)
                var[...] = array
            nc.setncatts(attrs)

    replace_atomically(write, path)


def read_part(path) -> tuple[dict, dict]:
    """Arrays and attributes of a file written by :func:`write_part`."""
    import netCDF4

    with netCDF4.Dataset(path) as nc:
        nc.set_auto_mask(False)
        arrays = {name: var[...] for name, var in nc.variables.items()}
        attrs = {name: nc.getncattr(name) for name in nc.ncattrs()}
    return arrays, attrs


def read_part_variables(path, names) -> dict:
    """Only the variables ``names`` of a part (the others stay on disk)."""
    import netCDF4

    with netCDF4.Dataset(path) as nc:
        nc.set_auto_mask(False)
        return {name: nc.variables[name][...] for name in names}


def open_for_filling(path):
    """The written cube opened to overwrite variables in place (netCDF4, append mode)."""
    import netCDF4

    nc = netCDF4.Dataset(path, "a")
    nc.set_auto_mask(False)
    return nc


def part_problem(path, expected_spec: dict) -> str | None:
    """Why the part at ``path`` cannot be merged as the plan's part ``expected_spec``, or None.

    Every variable is read in full (its checksums verified), and the spec the part was
    computed for must be the plan's: a truncated or damaged file, and a part copied over
    another, are each named here rather than failing later in collect.
    """
    import netCDF4

    path = Path(path)
    if not path.is_file():
        return "missing"
    try:
        with netCDF4.Dataset(path) as nc:
            nc.set_auto_mask(False)
            stored = json.loads(nc.getncattr("spec_json"))
            for var in nc.variables.values():
                var[...]
    except (OSError, RuntimeError, KeyError, AttributeError, ValueError, IndexError) as exc:
        return f"does not read back ({type(exc).__name__}: {str(exc).splitlines()[0] if str(exc) else 'damaged'})"
    if stored != expected_spec:
        return "was computed for other cells or settings than the plan's (a copy of another part?)"
    return None


def unwritable(directory) -> str | None:
    """One line naming the first folder of ``directory`` (itself, its nearest existing parent,
    or a folder directly inside it) that this process cannot write, or None."""
    path = Path(directory)
    existing = path
    while not existing.exists() and existing != existing.parent:
        existing = existing.parent
    folders = [existing]
    if path.is_dir():
        folders += sorted(p for p in path.iterdir() if p.is_dir())
    for folder in folders:
        if not os.access(folder, os.W_OK | os.X_OK):
            return f"results folder {str(folder)!r} is not writable; make it writable (or run in another directory)"
    return None
