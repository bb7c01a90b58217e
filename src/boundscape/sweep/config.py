"""A sweep's configuration: read, checked against the schema and the physics-level rules.

The schema is package data (``boundscape/sweep/schema.yaml``), the one file that both the
Snakefile and this module validate against.
"""

from __future__ import annotations

import hashlib
import json
from importlib import resources
from pathlib import Path

import numpy as np
import yaml

from ..engine import FAMILIES
from ..errors import InputError

__all__ = ["SCHEMA_PATH", "load_config", "schema_error", "validate_config", "config_text", "axis_values",
           "DEFAULT_CELLS_PER_TILE"]

SCHEMA_PATH = Path(str(resources.files(__package__).joinpath("schema.yaml")))

DEFAULT_CELLS_PER_TILE = 2048


def _where(error) -> str:
    path = ".".join(str(p) for p in error.absolute_path)
    return f"config key {path}" if path else "config"


def schema_error(config) -> str | None:
    """The first schema violation of ``config`` as one line naming the key, or None."""
    import jsonschema

    schema = yaml.safe_load(SCHEMA_PATH.read_text())
    validator = jsonschema.Draft202012Validator(schema)
    error = jsonschema.exceptions.best_match(validator.iter_errors(config))
    return None if error is None else f"{_where(error)}: {error.message}"


def validate_config(config: dict) -> dict:
    """Check a configuration against the schema, then the physics-level rules.

    Returns a copy with defaults filled in. Raises :class:`InputError` with one line naming the key.
    """
    message = schema_error(config)
    if message is not None:
        raise InputError(message)
    config = json.loads(json.dumps(config))
    pot = config["potential"]
    pot.setdefault("mass", 1.0)
    pot.setdefault("screened", False)
    config.setdefault("tiles", {}).setdefault("cells", DEFAULT_CELLS_PER_TILE)

    family = pot["family"]
    if family not in FAMILIES:
        known = ", ".join(sorted(FAMILIES))
        raise InputError(f"config key potential.family: unknown family {family!r}; known families: {known}")
    if family == "tabulated":
        if "table" not in pot:
            raise InputError("config key potential.table: the tabulated family needs a table file")
        if not Path(pot["table"]).is_file():
            raise InputError(f"config key potential.table: file {pot['table']!r} does not exist")
    else:
        for key in ("table", "screened", "coulomb_tail"):
            if key in pot and (key != "screened" or pot[key]):
                raise InputError(f"config key potential.{key}: only the tabulated family takes a table")
    for name in ("strength", "screening_length"):
        axis = config["grid"][name]
        if isinstance(axis, dict) and axis.get("num", 1) > 1 and axis["start"] == axis["stop"]:
            raise InputError(f"config key grid.{name}: start equals stop but num is {axis['num']}")
    lgrid = config["grid"]["l"]
    if isinstance(lgrid, dict) and lgrid["stop"] < lgrid["start"]:
        raise InputError("config key grid.l: stop is below start")
    for name in ("strength", "screening_length", "l"):
        values = axis_values(config["grid"][name], name)
        if not np.all(np.isfinite(values)):
            raise InputError(f"config key grid.{name}: values must be finite")
        if np.unique(values).size != values.size:
            raise InputError(f"config key grid.{name}: repeated values")
    return config


def load_config(path) -> dict:
    """Read and validate a YAML configuration file."""
    path = Path(path)
    if not path.is_file():
        raise InputError(f"configuration file {str(path)!r} does not exist")
    try:
        config = yaml.safe_load(path.read_text())
    except yaml.YAMLError as exc:
        raise InputError(f"configuration file {path}: not valid YAML ({str(exc).splitlines()[0]})") from None
    if not isinstance(config, dict):
        raise InputError(f"configuration file {path}: expected a mapping of keys")
    return validate_config(config)


def config_text(config: dict) -> tuple[str, str]:
    """The configuration as YAML text and its sha256: the provenance stored in the cube."""
    text = yaml.safe_dump(config, sort_keys=False)
    return text, hashlib.sha256(text.encode()).hexdigest()


def axis_values(spec, name) -> np.ndarray:
    """The sorted values of one grid axis (a list, or {start, stop, num, spacing}; l: {start, stop})."""
    if name == "l":
        values = np.arange(spec["start"], spec["stop"] + 1) if isinstance(spec, dict) else np.asarray(spec)
        return np.sort(values.astype(np.int32))
    if isinstance(spec, dict):
        if spec.get("spacing", "linear") == "log":
            values = np.geomspace(spec["start"], spec["stop"], spec["num"])
        else:
            values = np.linspace(spec["start"], spec["stop"], spec["num"])
    else:
        values = np.asarray(spec, dtype=np.float64)
    return np.sort(values.astype(np.float64))
