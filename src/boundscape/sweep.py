"""A sweep configuration turned into a plan: the grid axes and the tiles of cells, one job each.

No physics here: this module only checks the configuration and cuts the grid
strength × screening_length × l into tiles (blocks of strengths × a share of the λ row × every
l) and the strengths into blocks for the critical lengths. A tile is described by the
values it covers (not by indices), so a tile's description changes exactly when the
cells it computes change; the workflow passes it as the job's params.
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import yaml

from .errors import InputError

__all__ = ["Plan", "Tile", "SCHEMA_PATH", "load_config", "schema_error", "validate_config", "plan", "config_text"]

# The schema lives with the workflow (config/schema.yaml) so that Snakemake validates the
# same file; found relative to the source tree, which is where an editable install points.
SCHEMA_PATH = Path(__file__).resolve().parents[2] / "config" / "schema.yaml"

DEFAULT_CELLS_PER_TILE = 2048
# A critical length costs a root search over zero-energy solutions, taken here as about one
# cell's levels (a planning weight for non-one-scale families, not a measured figure).
CRITICAL_COST_IN_CELLS = 1


@dataclass(frozen=True)
class Tile:
    """A block of cells: consecutive strengths × every k-th screening length × every l."""

    index: int
    strength: tuple[float, ...]
    screening_length: tuple[float, ...]
    strength_slice: tuple[int, int]
    screening_length_index: tuple[int, ...]

    @property
    def name(self) -> str:
        return f"{self.index:04d}"


@dataclass(frozen=True)
class Plan:
    """The axes of a sweep, its engine settings, and its tiles."""

    sweep: str
    engine: dict
    strength: np.ndarray
    screening_length: np.ndarray
    l: np.ndarray
    n_r_max: int
    tiles: tuple[Tile, ...]
    critical_blocks: tuple[Tile, ...]

    @property
    def num_cells(self) -> int:
        return self.strength.size * self.screening_length.size * self.l.size

    def tile_spec(self, tile: Tile) -> dict:
        """Everything a tile job needs, and nothing else: its params."""
        return {**self.engine, "n_r_max": self.n_r_max, "strength": list(tile.strength),
                "screening_length": list(tile.screening_length), "l": [int(v) for v in self.l],
                "strength_slice": list(tile.strength_slice),
                "screening_length_index": list(tile.screening_length_index)}

    def critical_spec(self, block: Tile) -> dict:
        spec = self.tile_spec(block)
        # Critical lengths do not depend on the λ grid; only its ends decide the flags in collect.
        spec.pop("screening_length"), spec.pop("screening_length_index")
        return spec


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
    """Check a configuration against config/schema.yaml, then the physics-level rules.

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

    from .potentials import FAMILIES

    family = pot["family"]
    if family != "tabulated" and family not in FAMILIES:
        known = ", ".join(sorted([*FAMILIES, "tabulated"]))
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
        values = _axis(config["grid"][name], name)
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


def _axis(spec, name) -> np.ndarray:
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


def _blocks(size: int, block: int) -> list[tuple[int, int]]:
    return [(start, min(start + block, size)) for start in range(0, size, block)]


def plan(config: dict) -> Plan:
    """Cut a validated configuration into tiles of about ``tiles.cells`` cells.

    Tiles keep every l (a potential is built once per strength and λ) and take whole λ rows
    when they fit, so that adding strengths adds tiles without touching the existing ones.
    A row too long for one tile is dealt out: tile r of R takes λ indices r, r+R, r+2R, ...,
    because the cost of a cell grows with λ (more levels) and tiles should cost alike.
    """
    config = validate_config(config)
    grid = config["grid"]
    strength = _axis(grid["strength"], "strength")
    screening_length = _axis(grid["screening_length"], "screening_length")
    l_values = _axis(grid["l"], "l")
    n_r_max = int(grid["n_r_max"])
    cells = int(config["tiles"]["cells"])

    per_strength = screening_length.size * l_values.size
    strength_block = max(1, cells // per_strength)
    deal = -(-screening_length.size // max(1, cells // l_values.size)) if cells < per_strength else 1
    tiles = []
    for s0, s1 in _blocks(strength.size, strength_block):
        for r in range(deal):
            index = tuple(range(r, screening_length.size, deal))
            tiles.append(Tile(len(tiles), tuple(strength[s0:s1].tolist()),
                              tuple(screening_length[list(index)].tolist()), (s0, s1), index))

    from .potentials import FAMILIES

    pot = config["potential"]
    if pot["family"] in FAMILIES and FAMILIES[pot["family"]].one_scale:
        # λ_c(Z, μ) = λ_c(1, 1)/(Zμ): the engine solves each (l, n_r) once per process and caches
        # it, so one block is cheapest and more blocks would only repeat the same root searches.
        critical_block = strength.size
    else:
        critical_block = max(1, cells // (CRITICAL_COST_IN_CELLS * l_values.size * n_r_max))
    critical_blocks = tuple(
        Tile(i, tuple(strength[s0:s1].tolist()), (), (s0, s1), ())
        for i, (s0, s1) in enumerate(_blocks(strength.size, critical_block)))

    engine = {"family": pot["family"], "mass": float(pot["mass"])}
    if pot["family"] == "tabulated":
        engine.update(table=pot["table"], screened=bool(pot["screened"]),
                      coulomb_tail=pot.get("coulomb_tail"))
    from . import __version__

    engine["engine"] = f"boundscape {__version__}"
    return Plan(config["sweep"], engine, strength, screening_length, l_values, n_r_max,
                tuple(tiles), critical_blocks)
