"""A cube made for reading on screen: units people read ("hartree", "meV", "nm") instead of the
file's UDUNITS-2 scaled units, so that xarray's own plots and prints label themselves legibly.

The file keeps UDUNITS-valid units (``"4.3597447222060e-18 J"``); those are exact but not meant
to be read.  :func:`readable` returns a copy for display only: its ``units`` strings such as
``"hartree"`` are names, not UDUNITS, so it is not meant to be written back to NetCDF.
"""

from __future__ import annotations

from ..errors import InputError
from ..physics.units import BOHR_M, HARTREE_J
from .physical import preset_of

__all__ = ["readable"]

# (energy unit, its size in J, length unit, its size in m) of the atomic reading; a preset's are
# its energy_unit and length_unit.
ATOMIC_DISPLAY = ("hartree", HARTREE_J, "bohr", BOHR_M)


def readable(ds, units: str = "atomic"):
    """A copy of a cube with readable units and long names, for plots and prints.

    Parameters
    ----------
    ds : xarray.Dataset
        A cube (:func:`boundscape.cube.open_cube`).
    units : {"atomic", "preset"}
        ``"atomic"``: energies in hartree, lengths in bohr.  ``"preset"``: the units of the
        cube's preset (plasma: eV and nm; semiconductor: meV and nm; nuclear: MeV and fm).

    Returns
    -------
    xarray.Dataset
        Numbers converted to those units with the cube's own ``energy_unit_in_J``,
        ``length_unit_in_m`` and ``wavenumber_unit_in_per_m`` — every energy, length and inverse
        length it holds (levels, resonances, lines, critical and dissolution lengths, the
        screening-length coordinate, κ_v); ``units`` set to the unit's name (``1/nm`` for κ_v);
        a ``binding_energy`` (−E) added;
        dimensionless quantities lose their ``units = "1"`` so labels carry no "[1]".
    """
    if units == "atomic":
        e_name, e_J, l_name, l_m = ATOMIC_DISPLAY
    elif units == "preset":
        preset, _ = preset_of(ds)
        if preset.kind is None:
            raise InputError("this cube names no preset; use units='atomic'")
        (e_name, e_J), (l_name, l_m) = preset.energy_unit, preset.length_unit
    else:
        raise InputError(f"units must be 'atomic' or 'preset', got {units!r}")
    out = ds.copy()
    if "energy" in out:
        out["binding_energy"] = -out["energy"]
        out["binding_energy"].attrs = {**ds["energy"].attrs, "long_name": "binding energy −E"}
    for name in list(out.variables):
        attrs = dict(out[name].attrs)
        # Every energy, length and wavenumber of the cube says its unit's size; nothing is listed.
        if "energy_unit_in_J" in attrs:
            factor, shown = attrs["energy_unit_in_J"] / e_J, e_name
        elif "length_unit_in_m" in attrs:
            factor, shown = attrs["length_unit_in_m"] / l_m, l_name
        elif "wavenumber_unit_in_per_m" in attrs:
            factor, shown = attrs["wavenumber_unit_in_per_m"] * l_m, f"1/{l_name}"
        elif "area_unit_in_m2" in attrs:  # cross sections (cube/scattering.py)
            factor, shown = attrs["area_unit_in_m2"] / l_m**2, f"{l_name}^2"
        else:
            if attrs.get("units") == "1":
                attrs.pop("units")
                out[name].attrs = attrs
            continue
        keep = {k: v for k, v in attrs.items() if k in ("long_name", "comment")}
        converted = out[name] * factor if factor != 1.0 else out[name]
        if name in out.coords:
            out = out.assign_coords({name: (out[name].dims, converted.values, {**keep, "units": shown})})
        else:
            out[name] = converted
            out[name].attrs = {**keep, "units": shown}
    return out
