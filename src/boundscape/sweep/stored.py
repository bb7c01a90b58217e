"""The configuration a cube stores (``config_yaml``): what the user wrote, plus the defaults that
decide its numbers, under the names the schema documents — and nothing that does not apply.

A default "matters" when another value would change the cube: the engine's reduced mass
(``potential.mass``, given once), the preset's screening model, species, degeneracies, units and
(for a sweep over screening lengths) the reference temperature of its density coordinate.  Keys the schema documents for one family or one species
only are left out where they do not apply (``potential.screened`` is for tables; the ions'
charge and temperature ratio for a plasma whose ions screen).  The stored text configures the
same sweep when run again.
"""

from __future__ import annotations

import copy
import dataclasses

import yaml

from ..physics.presets import NO_PRESET, from_config, is_condition_sweep
from .config import SCHEMA_PATH

__all__ = ["stored_config", "TABLE_ONLY", "APPLIES_WITH"]

TABLE_ONLY = ("table", "screened", "coulomb_tail")  # potential keys of the tabulated family alone
# preset keys that matter only with a given species (the schema's descriptions say so)
APPLIES_WITH = {"screening_ion_charge": "electrons_and_ions", "ion_temperature_ratio": "electrons_and_ions",
                "hole_degeneracy": "electrons_and_holes"}


def _preset_keys() -> set:
    schema = yaml.safe_load(SCHEMA_PATH.read_text(encoding="utf-8"))
    return set(schema["properties"]["preset"]["properties"])


def _preset_defaults(section: dict, grid: dict) -> dict:
    """The preset's settled values the user did not write, under their schema names."""
    preset = from_config(section, grid)
    if preset is NO_PRESET or not dataclasses.is_dataclass(preset):
        return {}
    schema_name = {field: key for key, field in preset.config_names.items()}
    documented = _preset_keys()
    species = getattr(preset, "species", None)
    out = {}
    for field in dataclasses.fields(preset):
        key = schema_name.get(field.name, field.name)
        value = getattr(preset, field.name)
        if key in section or key not in documented or value is None or "mass" in key:
            continue  # (the mass is given once: potential.mass holds the engine's)
        if key in APPLIES_WITH and species != APPLIES_WITH[key]:
            continue
        if key == getattr(preset, "reference_key", None) and is_condition_sweep(grid):
            continue  # a sweep over the conditions has its temperatures on an axis
        out[key] = value.item() if hasattr(value, "item") else value
    return out


def stored_config(config: dict, engine_mass: float | None = None) -> dict:
    """A copy of the validated ``config`` as the cube stores it.

    Parameters
    ----------
    config : dict
        The configuration after :func:`~boundscape.sweep.validate_config` (schema defaults filled).
    engine_mass : float, optional
        The reduced mass the plan settled on (the user's, the preset's or 1); written as
        ``potential.mass`` where the user wrote none.
    """
    out = copy.deepcopy(config)
    potential = out.get("potential") or {}
    if potential.get("family") != "tabulated":
        for key in TABLE_ONLY:
            potential.pop(key, None)
    if engine_mass is not None and "mass" not in potential:
        potential["mass"] = float(engine_mass)  # the engine's reduced mass, whoever gave it
    section = out.get("preset")
    if section:
        section.update(_preset_defaults(section, out.get("grid") or {}))
    return out
