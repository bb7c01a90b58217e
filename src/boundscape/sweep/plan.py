"""A validated sweep configuration turned into a plan: the grid axes and the tiles of cells, one job each.

No physics here: this module only cuts the grid strength × screening_length × l into tiles
(blocks of strengths × a share of the λ row × every l) and the strengths into blocks for the
critical lengths.  A sweep over a trade's conditions (density × temperature, coupling × range)
is mapped to engine cells by its preset; the plan keeps each distinct screening length once
(:func:`distinct_lengths`) and tiles those. A tile is described by the values it covers (not by indices), so a tile's
description changes exactly when the cells it computes change; the workflow passes it as the
job's params.

Tiles are named by their index, zero-padded to four digits (``0042``; ``12345`` past 9999), and
their files by :data:`TILE_FILE` and :data:`CRITICAL_FILE` under the sweep's results folder:
one home for the names the workflow's rules and the collect step both use.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..engine import FAMILIES
from ..errors import InputError
from ..physics.presets import ConditionGrid, from_config, is_condition_sweep
from ..version import VERSION
from .config import axis_values, validate_config
from .limits import check_limits, max_tiles
from . import population_tiles
from .lines import label_of, line_pairs
from .scattering_tiles import scattering_spec

__all__ = ["Plan", "Tile", "plan", "tile_layout", "distinct_lengths", "TILE_FILE", "CRITICAL_FILE", "SAME_LENGTH"]

# The parts' files under results/<sweep>/ ({tile}, {block}: a tile's or block's name).
TILE_FILE = "tiles/tile_{tile}.nc"
CRITICAL_FILE = "criticals/criticals_{block}.nc"

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
        """The index, at least four digits: ``0042``, ``12345``."""
        return f"{self.index:04d}"


@dataclass(frozen=True)
class Plan:
    """The axes of a sweep, its engine settings, and its tiles.

    ``strength`` × ``screening_length`` is the grid of engine cells the tiles solve.  A sweep over
    a trade's conditions has ``conditions`` (the preset's
    :class:`~boundscape.physics.presets.ConditionGrid`) and ``length_index``, which gives each
    condition the index of its screening length in ``screening_length``: the distinct lengths,
    each solved once."""

    sweep: str
    engine: dict
    strength: np.ndarray
    screening_length: np.ndarray
    l: np.ndarray
    n_r_max: int
    tiles: tuple[Tile, ...]
    critical_blocks: tuple[Tile, ...]
    lines: tuple[str, ...] = ()  # the configured E1 lines, e.g. "1s-2p" (lower n first)
    conditions: ConditionGrid | None = None
    length_index: np.ndarray | None = None
    critical_strengths: bool = False  # also the critical strength at each screening length (block 0)
    scattering: dict | None = None  # {"energies": [...]} (engine units; [] for true), or None: off

    @property
    def num_cells(self) -> int:
        """Cells of the sweep: conditions (or strength × screening length) × l."""
        if self.conditions is None:
            return self.num_engine_cells
        return self.strength.size * self.length_index.size * self.l.size

    @property
    def num_engine_cells(self) -> int:
        """Distinct engine cells (strength, screening length, l) the tiles solve."""
        return self.strength.size * self.screening_length.size * self.l.size

    def describe(self) -> str:
        """One line: the cells, the distinct engine cells, the tiles."""
        if self.conditions is None:
            cells = (f"{self.num_cells} cells = {self.strength.size} strengths x {self.screening_length.size} "
                     f"screening lengths x {self.l.size} l")
        else:
            grid = self.conditions
            sizes = " x ".join(f"{values.size} {name}" for name, values in
                               zip((grid.strength_dim, *grid.length_dims), (self.strength, *grid.length_values)))
            cells = (f"{self.num_cells} cells = {sizes} x {self.l.size} l; {self.num_engine_cells} distinct engine "
                     f"cells ({self.screening_length.size} distinct screening lengths)")
        return (f"sweep {self.sweep}: {cells}; {len(self.tiles)} tiles, {len(self.critical_blocks)} critical "
                f"block{'s' * (len(self.critical_blocks) != 1)}")

    def tile_spec(self, tile: Tile) -> dict:
        """Everything a tile job needs, and nothing else: its params."""
        spec = {**self.engine, "n_r_max": self.n_r_max, "strength": list(tile.strength),
                "screening_length": list(tile.screening_length), "l": [int(v) for v in self.l],
                "strength_slice": list(tile.strength_slice),
                "screening_length_index": list(tile.screening_length_index)}
        if self.lines:
            spec["lines"] = list(self.lines)
        if self.scattering is not None:
            spec["scattering"] = self.scattering
        return spec

    def tile_paths(self, results) -> list[str]:
        """The tiles' files under the results folder ``results``, in the plan's order."""
        return [f"{results}/{TILE_FILE.format(tile=tile.name)}" for tile in self.tiles]

    def critical_paths(self, results) -> list[str]:
        """The critical blocks' files under ``results``, in the plan's order."""
        return [f"{results}/{CRITICAL_FILE.format(block=block.name)}" for block in self.critical_blocks]

    def critical_spec(self, block: Tile) -> dict:
        spec = self.tile_spec(block)
        # Critical lengths do not depend on the λ grid; only its ends decide the flags in collect.
        spec.pop("screening_length"), spec.pop("screening_length_index")
        spec.pop("lines", None)
        spec.pop("scattering", None)
        spec.pop("populations", None)  # critical lengths do not depend on them: toggling reruns no block
        if self.critical_strengths and block.index == 0:  # the critical strength at every length, once
            spec["critical_strength_at"] = self.screening_length.tolist()
        return spec


def _blocks(size: int, block: int) -> list[tuple[int, int]]:
    return [(start, min(start + block, size)) for start in range(0, size, block)]


def tile_layout(num_strength: int, num_length: int, num_l: int, cells: int) -> tuple[int, int]:
    """``(strength_block, deal)``: consecutive strengths per tile, and how many tiles a λ row is
    dealt out over when it does not fit in one."""
    per_strength = num_length * num_l
    strength_block = max(1, cells // per_strength)
    deal = -(-num_length // max(1, cells // num_l)) if cells < per_strength else 1
    return strength_block, deal


def _cells_for(max_tiles: int, *sizes) -> int:
    """A tile size whose plan has at most ``max_tiles`` tiles (for the advice in an error)."""
    cells = -(-sizes[0] * sizes[1] * sizes[2] // max_tiles)
    while True:
        strength_block, deal = tile_layout(*sizes, cells)
        if -(-sizes[0] // strength_block) * deal <= max_tiles:
            return cells
        cells += -(-cells // 8)


def plan(config: dict) -> Plan:
    """Cut a validated configuration into tiles of about ``tiles.cells`` cells.

    Tiles keep every l (a potential is built once per strength and λ) and take whole λ rows
    when they fit, so that adding strengths adds tiles without touching the existing ones.
    A row too long for one tile is dealt out: tile r of R takes λ indices r, r+R, r+2R, ...,
    because the cost of a cell grows with λ (more levels) and tiles should cost alike.

    A sweep over a limit (:mod:`.limits`: cells, tiles, levels per l, l) is refused before any
    axis or tile is built.
    """
    check_limits(config)
    config = validate_config(config)
    grid = config["grid"]
    preset = from_config(config.get("preset"), grid, config["potential"]["family"])
    conditions = length_index = None
    if is_condition_sweep(grid):
        axes = {key: axis_values(grid[key], key) for key in preset.condition_keys}
        given = axis_values(grid["strength"], "strength") if "strength" in grid else None
        conditions = preset.condition_grid(given, axes, float(config["potential"]["mass"]))
        strength = np.asarray(conditions.engine_strength, dtype=np.float64)
        screening_length, length_index = distinct_lengths(conditions.engine_length)
    elif "strength" in grid:
        strength = axis_values(grid["strength"], "strength")
        screening_length = axis_values(grid.get("screening_length"), "screening_length")
    else:  # a preset's own strength axis (nuclear g² in MeV fm, a depth in MeV), as engine strengths
        axis = next(key for key in preset.grid_axes if key in grid)
        strength = np.asarray(preset.grid_strength(axis_values(grid[axis], axis)), dtype=np.float64)
        screening_length = axis_values(grid.get("screening_length"), "screening_length")
    l_values = axis_values(grid["l"], "l")
    n_r_max = int(grid["n_r_max"])
    cells = int(config["tiles"]["cells"])

    strength_block, deal = tile_layout(strength.size, screening_length.size, l_values.size, cells)
    num_tiles = -(-strength.size // strength_block) * deal
    if num_tiles > max_tiles(config):
        raise InputError(f"config key tiles.cells: {cells:,} cell{'s' * (cells != 1)} per tile make {num_tiles:,} "
                         f"tiles (jobs), over the limit of {max_tiles(config):,} (limits.max_tiles); give tiles.cells "
                         "at least "
                         f"{_cells_for(max_tiles(config), strength.size, screening_length.size, l_values.size):,}")
    tiles = []
    for s0, s1 in _blocks(strength.size, strength_block):
        for r in range(deal):
            index = tuple(range(r, screening_length.size, deal))
            tiles.append(Tile(len(tiles), tuple(strength[s0:s1].tolist()),
                              tuple(screening_length[list(index)].tolist()), (s0, s1), index))

    pot = config["potential"]
    if FAMILIES[pot["family"]].one_scale:
        # λ_c(Z, μ) = λ_c(1, 1)/(Zμ): the engine solves each (l, n_r) once per process and caches
        # it, so one block is cheapest and more blocks would only repeat the same root searches.
        critical_block = strength.size
    else:
        critical_block = max(1, cells // (CRITICAL_COST_IN_CELLS * l_values.size * n_r_max))
    critical_blocks = tuple(
        Tile(i, tuple(strength[s0:s1].tolist()), (), (s0, s1), ())
        for i, (s0, s1) in enumerate(_blocks(strength.size, critical_block)))

    engine = {"family": pot["family"], "mass": float(pot["mass"])}
    # the family's own parameters as the config gives them (a table by its path), defaults filled in
    for q in FAMILIES[pot["family"]].parameters:
        engine[q.name] = pot.get(q.name, q.default)
    engine["engine"] = f"boundscape {VERSION}"
    if config["resonances"]:  # only when on, so that a sweep without them keeps its tiles' params
        engine["resonances"] = True
    if config.get("populations"):  # the temperatures each complete level set is summed at
        engine["populations"] = population_tiles.settings(config, conditions, length_index)
    return Plan(config["sweep"], engine, strength, screening_length, l_values, n_r_max,
                tuple(tiles), critical_blocks, tuple(label_of(p) for p in line_pairs(config.get("lines"))),
                conditions, length_index,
                preset.critical_strengths_wanted and bool(np.isfinite(screening_length).all()),
                scattering_spec(config.get("scattering", False), preset, float(pot["mass"])))


# Screening lengths closer than this (relative) are one engine cell: on log grids λ ∝ √(T/n)
# repeats along diagonals, but each repeat is computed from different rounded n and T and
# differs in its last bits.  The cell is solved at the group's smallest value, which is the
# coordinate the cube stores for all of them.
SAME_LENGTH = 1e-12


def distinct_lengths(lengths):
    """(distinct lengths ascending, index of each input's length among them).

    Lengths within :data:`SAME_LENGTH` of their sorted neighbour form one group, represented by
    its smallest member; the result does not depend on any tiling."""
    lengths = np.asarray(lengths, dtype=np.float64)
    flat = lengths.ravel()
    order = np.argsort(flat, kind="stable")
    ordered = flat[order]
    starts = np.ones(flat.size, bool)
    starts[1:] = np.diff(ordered) > SAME_LENGTH * ordered[1:]
    index = np.empty(flat.size, np.int64)
    index[order] = np.cumsum(starts) - 1
    return ordered[starts], index.reshape(lengths.shape)
