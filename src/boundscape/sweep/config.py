"""A sweep's configuration: read, checked against the schema and the physics-level rules.

The schema is package data (``boundscape/sweep/schema.yaml``), the one file that both the
Snakefile and this module validate against.
"""

from __future__ import annotations

import hashlib
import json
import math
import re
from collections.abc import Mapping
from importlib import resources
from pathlib import Path

import numpy as np
import yaml

from ..engine import FAMILIES, ParameterError, potential
from ..errors import InputError
from ..physics.presets import PRESETS, from_config, is_condition_sweep
from .limits import check_limits
from . import population_tiles
from .lines import check_lines
from .scattering_config import check_scattering

__all__ = ["SCHEMA_PATH", "load_config", "load_yaml", "read_config_files", "config_file_error", "schema_error", "validate_config",
           "config_text", "axis_values", "DEFAULT_CELLS_PER_TILE", "GRID_AXES"]

SCHEMA_PATH = Path(str(resources.files(__package__).joinpath("schema.yaml")))

DEFAULT_CELLS_PER_TILE = 2048

# Every numeric grid axis but l: the engine's (strength, screening length), the nuclear coupling
# in MeV fm, and the trades' conditions (physics.presets: condition_keys).
# The grid's strength axes: the engine's own, or a preset's reading of it (physics.presets: grid_axes).
STRENGTH_KEYS = ("strength", "coupling_MeV_fm", "depth_MeV")
GRID_AXES = ("strength", "coupling_MeV_fm", "depth_MeV", "screening_length", "electron_density", "electron_temperature",
             "carrier_density", "temperature", "coupling", "range")


_TYPE_WORDS = {"object": "a mapping of keys", "array": "a list", "number": "a number", "integer": "an integer",
               "string": "a string", "boolean": "true or false"}


def _where(error) -> str:
    path = ".".join(str(p) for p in error.absolute_path)
    return f"config key {path}" if path else "config"


def _shown(value) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def schema_error(config) -> str | None:
    """The first schema violation of ``config`` as one line naming the key and the bad value, or None."""
    import jsonschema

    schema = yaml.safe_load(SCHEMA_PATH.read_text())
    validator = jsonschema.Draft202012Validator(schema)
    error = jsonschema.exceptions.best_match(validator.iter_errors(config))
    if error is None:
        return None
    if error.validator in ("oneOf", "anyOf") and error.schema.get("description"):
        text = f"got {_shown(error.instance)}; expected {error.schema['description']}"
    elif error.validator == "type" and isinstance(error.validator_value, str):
        text = f"got {_shown(error.instance)}; expected {_TYPE_WORDS.get(error.validator_value, error.validator_value)}"
    else:
        text = error.message if len(error.message) <= 200 else error.message[:197] + "..."
    return f"{_where(error)}: {text}"


def validate_config(config: dict) -> dict:
    """Check a configuration against the schema, then the physics-level rules.

    Returns a copy with defaults filled in. Raises :class:`InputError` with one line naming the key.
    """
    message = schema_error(config)
    if message is not None:
        raise InputError(message)
    config = json.loads(json.dumps(config))
    pot = config["potential"]
    config.setdefault("tiles", {}).setdefault("cells", DEFAULT_CELLS_PER_TILE)
    config.setdefault("resonances", False)

    family = pot["family"]
    if family not in FAMILIES:
        known = ", ".join(sorted(FAMILIES))
        raise InputError(f"config key potential.family: unknown family {family!r}; known families: {known}")
    own = _family_parameters(pot)
    grid = config["grid"]
    uses_length = FAMILIES[family].uses_screening_length(own)
    try:
        preset = from_config(config.get("preset"), grid, family)
    except InputError as exc:
        raise InputError(f"config key preset: {exc}") from None
    if is_condition_sweep(grid):
        _check_conditions(grid, config.get("preset") or {}, preset, family, uses_length)
    else:
        if uses_length and "screening_length" not in grid:
            raise InputError(f"config key grid.screening_length: family {family} needs a screening length axis")
        if not uses_length and "screening_length" in grid:
            raise InputError(f"config key grid.screening_length: family {family} has no screening length here, so "
                             "every value would give the same cells; remove the key")
        _check_strength_axis(grid, preset)
    if config["resonances"]:
        _check_resonances(family, own)
    if config.get("scattering", False) is not False:
        check_scattering(config["scattering"], family, own, int(axis_values(grid["l"], "l").max()))
    pot["mass"] = _sweep_mass(pot.get("mass"), config.get("preset") or {}, preset)
    axes = [name for name in GRID_AXES if name in grid]
    for name in axes:
        axis = grid[name]
        if isinstance(axis, dict) and axis.get("num", 1) > 1 and axis["start"] == axis["stop"]:
            raise InputError(f"config key grid.{name}: start equals stop but num is {axis['num']}")
    lgrid = config["grid"]["l"]
    if isinstance(lgrid, dict) and lgrid["stop"] < lgrid["start"]:
        raise InputError("config key grid.l: stop is below start")
    for name in axes + ["l"]:
        if name not in grid:
            continue
        values = axis_values(grid[name], name)
        if not np.all(np.isfinite(values)):
            raise InputError(f"config key grid.{name}: values must be finite")
        if np.unique(values).size != values.size:
            raise InputError(f"config key grid.{name}: repeated values")
    check_lines(config)
    population_tiles.check_config(config, preset)
    return config


def _family_parameters(pot) -> dict:
    """The family's own parameters (every key of ``potential`` but family and mass), checked by
    the family; a table is read and checked here, before any job, so that a bad file stops the
    sweep with its file and line named rather than flagging every cell."""
    given = {key: value for key, value in pot.items() if key not in ("family", "mass")}
    try:
        return FAMILIES[pot["family"]].prepare(given)
    except ParameterError as exc:
        raise InputError(f"config key potential.{exc.parameter}: {exc}") from None


def _check_resonances(family, own):
    probe = potential(family, 1.0, 1.0, **own)
    if probe.tail != "short":
        raise InputError(f"config key resonances: family {family} has a {probe.tail} tail, so every state stays "
                         "bound and none turns into a resonance; set resonances: false")


def _check_conditions(grid, section, preset, family, uses_length):
    """A sweep over a trade's conditions: the preset's axes, all of them, and nothing that would
    set the screening length a second way."""
    given = [key for key in grid if any(key in cls.condition_keys for cls in PRESETS.values())]
    for key in given:
        if key not in preset.condition_keys:
            kinds = " or ".join(kind for kind, cls in PRESETS.items() if key in cls.condition_keys)
            raise InputError(f"config key grid.{key}: a sweep over {key} needs preset kind {kinds}")
    for key in preset.condition_keys:
        if key not in grid:
            raise InputError(f"config key grid.{key}: a sweep over {', '.join(given)} needs {key} as well (a list "
                             "of one value for a single one)")
    if "screening_length" in grid:
        raise InputError(f"config key grid.screening_length: the conditions ({', '.join(preset.condition_keys)}) set "
                         "the screening length; remove it")
    if not uses_length:
        raise InputError(f"config key potential.family: family {family} has no screening length, so the conditions "
                         f"({', '.join(preset.condition_keys)}) change nothing; use yukawa, ecsc, hulthen or a "
                         "screened table")
    length = FAMILIES[family].length_long_name
    if not preset.condition_sets_length(FAMILIES[family]):  # a well's radius is not what a density sets
        raise InputError(f"config key potential.family: family {family}'s length is its {length}, not a screening "
                         f"length, so the conditions ({', '.join(preset.condition_keys)}) cannot set it; sweep "
                         "grid.screening_length instead")
    strength_axis = preset.condition_strength_key
    for key in STRENGTH_KEYS:
        if key != strength_axis and key in grid:
            raise InputError(f"config key grid.{key}: the strength of this sweep is grid.{strength_axis}; remove it")
    if strength_axis not in grid:
        raise InputError(f"config key grid.{strength_axis}: a sweep over {', '.join(given)} needs it")
    reference = preset.reference_key
    if reference is not None and reference in section:
        raise InputError(f"config key preset.{reference}: the temperatures of this sweep are grid."
                         f"{preset.condition_keys[1]}; remove it")


def _check_strength_axis(grid, preset):
    given = [key for key in STRENGTH_KEYS if key in grid]
    if len(given) != 1:
        names = ("strength", *(preset.grid_axes or ("coupling_MeV_fm",)))
        raise InputError(f"config key grid: give exactly one of {' and '.join(names)}"
                         + (f" (got {', '.join(given)})" if given else ""))
    axis = given[0]
    if axis != "strength" and axis not in preset.grid_axes:
        what = {"coupling_MeV_fm": "a coupling g² in MeV fm", "depth_MeV": "a well depth in MeV"}[axis]
        own = f"; this family's is grid.{preset.grid_axes[0]}" if preset.grid_axes else ""
        raise InputError(f"config key grid.{axis}: {what} needs preset kind nuclear and a family whose strength it "
                         f"is{own}; use grid.strength otherwise")


def _sweep_mass(mass, section: dict, preset) -> float:
    """The engine's reduced mass under the preset: given once, never applied twice."""
    return preset.sweep_mass(mass, section)


class _DuplicateKey(yaml.YAMLError):
    def __init__(self, key, first, line):
        super().__init__(f"line {line}: key {key!r} given twice (first on line {first}); keep one")


class _SweepLoader(yaml.SafeLoader):
    """YAML as a sweep is read: a key given twice in one mapping is an error (PyYAML keeps the
    last silently), and ``1e308`` is a number (YAML 1.1 wants a dot and a signed exponent,
    ``1.0e+308``, and reads the rest as strings; YAML 1.2 reads both as numbers)."""

    def construct_mapping(self, node, deep=False):
        if isinstance(node, yaml.MappingNode):
            seen = {}
            for key_node, _ in node.value:
                if key_node.tag == "tag:yaml.org,2002:merge":  # "<<: *base": overriding merged keys is the point
                    continue
                key = self.construct_object(key_node, deep=True)
                try:
                    first = seen.setdefault(key, key_node.start_mark.line)
                except TypeError:  # an unhashable key: the base class reports it
                    continue
                if first != key_node.start_mark.line:
                    raise _DuplicateKey(key, first + 1, key_node.start_mark.line + 1)
        return super().construct_mapping(node, deep=deep)


# The YAML 1.2 core schema's floats (https://yaml.org/spec/1.2.2/#1022-tag-resolution), which
# include 1e308 and 1E-5 that YAML 1.1's pattern misses; added after the 1.1 resolvers, so it
# only decides what they leave a string.
_SweepLoader.add_implicit_resolver(
    "tag:yaml.org,2002:float",
    re.compile(r"^[-+]?(?:\.[0-9]+|[0-9]+(?:\.[0-9]*)?)(?:[eE][-+]?[0-9]+)?$"),
    list("-+0123456789."))


def _text_of(path: Path, what: str) -> str:
    """The file's text, which must be UTF-8 (as Snakemake reads configs): else one line saying so."""
    data = path.read_bytes()
    if data.startswith((b"\xff\xfe", b"\xfe\xff")) or b"\x00" in data:
        raise InputError(f"{what} {path}: UTF-16 or UTF-32 text; save it as UTF-8")
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[:exc.start].count(b"\n") + 1
        raise InputError(f"{what} {path}, line {line}: not UTF-8 text (byte 0x{data[exc.start]:02x}, perhaps "
                         "Latin-1); save it as UTF-8") from None


def load_yaml(path, what: str = "configuration file"):
    """Read a YAML (or JSON) file as a sweep's configuration is read.

    Duplicate keys are refused, numbers such as ``1e308`` are numbers, and a file that is not
    UTF-8 (Latin-1, UTF-16) is one line naming it; every error is an :class:`InputError` that
    names ``what`` and the file.
    """
    path = Path(path)
    if not path.is_file():
        raise InputError(f"{what} {str(path)!r} does not exist")
    text = _text_of(path, what)
    try:
        return yaml.load(text, Loader=_SweepLoader)  # noqa: S506 (a SafeLoader subclass)
    except _DuplicateKey as exc:
        raise InputError(f"{what} {path}, {exc}") from None
    except yaml.YAMLError as exc:
        raise InputError(f"{what} {path}: not valid YAML ({str(exc).splitlines()[0]})") from None


def config_file_error(path) -> str | None:
    """Why the configuration file ``path`` cannot be read (:func:`load_yaml`), or None."""
    try:
        load_yaml(path)
    except InputError as exc:
        return str(exc)
    return None


def read_config_files(workflow_files, command_line_files=(), overrides=None) -> dict:
    """The configuration Snakemake assembles, read again through :func:`load_yaml`.

    Snakemake loads the config itself, keeping the last of a duplicated key and reading
    ``1e308`` as a string; the workflow reads the same files again with this. The order is
    Snakemake's: the Snakefile's ``configfile:`` files, then each ``--configfile`` (each
    updating the former recursively), then the ``--config`` key=value ``overrides``.
    """
    command_line = [Path(f).resolve() for f in command_line_files]
    files = [f for f in workflow_files if Path(f).resolve() not in command_line] + list(command_line_files)
    config: dict = {}
    for path in files:
        loaded = load_yaml(path)
        if not isinstance(loaded, dict):
            raise InputError(f"configuration file {path}: expected a mapping of keys")
        _update(config, loaded)
    _update(config, dict(overrides or {}))
    return config


def _update(config: dict, other) -> None:
    # Snakemake's update_config: mappings merge key by key, anything else replaces.
    for key, value in other.items():
        if isinstance(value, Mapping) and isinstance(config.get(key), dict):
            _update(config[key], value)
        else:
            config[key] = _plain(value)


def _plain(value):
    if isinstance(value, Mapping):
        return {key: _plain(item) for key, item in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(item) for item in value]
    return value


def load_config(path) -> dict:
    """Read and validate a YAML configuration file (see :func:`load_yaml`); a sweep over a
    limit (:mod:`.limits`) is refused before any axis is built."""
    config = load_yaml(path)
    if not isinstance(config, dict):
        raise InputError(f"configuration file {path}: expected a mapping of keys")
    check_limits(config)
    return validate_config(config)


def config_text(config: dict) -> tuple[str, str]:
    """The configuration as YAML text and its sha256: the provenance stored in the cube."""
    text = yaml.safe_dump(config, sort_keys=False)
    return text, hashlib.sha256(text.encode()).hexdigest()


def axis_values(spec, name) -> np.ndarray:
    """The sorted values of one grid axis (a list, or {start, stop, num, spacing}; l: {start, stop}).

    A missing screening-length axis (families without one) is the single value +inf: unscreened."""
    if spec is None and name == "screening_length":
        return np.array([math.inf])
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
