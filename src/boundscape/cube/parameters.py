"""A family's own parameters in the cube: each one a scalar coordinate with its units and long name.

A sweep fixes them under ``potential:`` (``diffuseness`` of a Woods–Saxon well, ``core_strength``
and ``core_range`` of two Yukawas); the cube carries them beside its axes, so that a cube says
which potential it holds without its config.  Numbers are stored as the engine used them, in the
unit system the cube is read in (atomic units, or the preset's: :mod:`.physical`), and their
``units`` say which.
"""

from __future__ import annotations

import numpy as np
from scipy import constants as sc

from ..engine import FAMILIES
from .physical import preset_of

__all__ = ["add_family_parameters"]


def _attributes(unit: str, units) -> dict:
    """CF attributes of a parameter declared in ``unit`` (a family's atomic-unit name), stored in
    the unit system ``units``."""
    if unit == "bohr":
        return {"units": units.length_udunits(), "length_unit_in_m": units.length_m}
    if unit == "hartree":
        return {"units": units.energy_udunits(), "energy_unit_in_J": units.energy_J,
                "energy_unit_in_eV": units.energy_J / sc.electron_volt}
    return {"units": unit or "1"}


def add_family_parameters(ds, engine: dict):
    """``ds`` with each numeric own parameter of ``engine["family"]`` (values in ``engine``, the
    plan's engine settings) as a scalar coordinate; flags and tables (a tabulated potential's
    ``screened``, ``table``) stay in the stored config."""
    info = FAMILIES[engine["family"]]
    preset, _ = preset_of(ds)
    units = preset.unit_system(float(ds.attrs.get("mass", engine.get("mass", 1.0))))
    coords = {}
    for q in info.parameters:
        value = engine.get(q.name, q.default)
        if not q.numeric or isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, float)):
            continue
        coords[q.name] = ((), np.float64(value), {"long_name": q.long_name, **_attributes(q.unit, units),
                                                   "comment": f"own parameter of the {info.name} family, fixed "
                                                              "for this sweep (potential: in the config)"})
    return ds.assign_coords(coords) if coords else ds
