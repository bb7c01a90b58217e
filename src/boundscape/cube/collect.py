"""Collect: merge a sweep's tiles and critical blocks into one cube, checked against the plan.

Streaming: the per-cell arrays (counts, status, reasons) are small and are gathered first; the
per-level variables, the bulk of a cube, are written as NaN placeholders (a zero-stride view, no
memory) and then filled tile by tile in the written file, so collect holds one tile's levels at
a time whatever the sweep's size.
"""

from __future__ import annotations

import json
import subprocess
from pathlib import Path

import numpy as np

from ..errors import InputError
from ..physics.presets import from_config
from ..sweep.config import config_text
from ..sweep.plan import plan as make_plan
from ..sweep.stored import stored_config
from ..sweep.tiles import CRITICAL_FLAGS, UNKNOWN_COUNT
from ..version import VERSION
from .lines import add_lines, fill_lines
from ..sweep.line_tiles import LINE_VARS
from .conditions import layout_of, write_mapped
from .model import LEVEL_VARS, NUM_BOUND_UNKNOWN, build_cube, strength_attributes
from .netcdf import open_for_filling, read_part, read_part_variables, write_cube
from .parameters import add_family_parameters
from .physical import add_physical_coordinates, add_trade_variables
from .populations import add_populations
from .resonances import RESONANCE_VARS, add_resonances
from .resonances import placeholders as resonance_placeholders
from .scattering import add_scattering
from .scattering import fill_names as scattering_names
from .summary import run_summary

__all__ = ["collect"]


def _git_commit() -> str | None:
    try:
        out = subprocess.run(["git", "-C", str(Path(__file__).parent), "describe", "--always",
                              "--dirty", "--abbrev=40"], capture_output=True, text=True, timeout=10)
    except (OSError, subprocess.SubprocessError):
        return None
    return out.stdout.strip() or None


def _read_checked(path, expected_spec, names=None):
    """A part's attributes and its variables ``names`` (all if None), checked against the plan."""
    if names is None:
        arrays, attrs = read_part(path)
    else:
        import netCDF4

        with netCDF4.Dataset(path) as nc:
            attrs = {name: nc.getncattr(name) for name in nc.ncattrs()}
        arrays = read_part_variables(path, names)
    if json.loads(attrs["spec_json"]) != expected_spec:
        raise InputError(f"{path} was computed for other cells or settings than the plan's (a copy of another "
                         "part?); delete it and rerun the workflow, which solves it again")
    return arrays, attrs


def _fill_levels(plan, tile_paths, names=LEVEL_VARS, layout=None):
    """Write each tile's levels into the cube file, one tile in memory at a time (a sweep over
    conditions: one block of strengths, whose engine cells fill all its conditions)."""
    def fill(cube_path):
        nc = open_for_filling(cube_path)
        try:
            if layout is not None and layout.mapped:
                _fill_mapped(nc, plan, tile_paths, names + (LINE_VARS if plan.lines else ()), layout)
                return
            for tile, path in zip(plan.tiles, tile_paths):
                arrays = read_part_variables(path, names)
                s0, s1 = tile.strength_slice
                index = list(tile.screening_length_index)
                for name in names:  # (strength, λ, l) and (strength, λ, l, n_r or energy)
                    nc.variables[name][s0:s1, index] = arrays[name]
                if plan.lines:
                    fill_lines(nc, plan, tile, path)
        finally:
            nc.close()

    return fill


def _fill_mapped(nc, plan, tile_paths, names, layout):
    """The tiles of each block of strengths gathered over every engine screening length, then
    written onto every condition that has one of them."""
    blocks: dict = {}
    for tile, path in zip(plan.tiles, tile_paths):
        blocks.setdefault(tuple(tile.strength_slice), []).append((tile, path))
    for (s0, s1), members in blocks.items():
        slabs = {}
        for tile, path in members:
            arrays = read_part_variables(path, names)
            index = list(tile.screening_length_index)
            for name in names:
                if name not in slabs:
                    shape = (s1 - s0, plan.screening_length.size) + arrays[name].shape[2:]
                    slabs[name] = np.zeros(shape, arrays[name].dtype)
                slabs[name][:, index] = arrays[name]
        for name in names:
            write_mapped(nc, name, (s0, s1), slabs.pop(name), layout.length_index)


def collect(config: dict, tile_paths, critical_paths, output, summary=None) -> str:
    """Merge tile files and critical blocks into the cube.

    Parameters
    ----------
    config : dict
        The sweep configuration the tiles were planned from.
    tile_paths, critical_paths : list of path
        The files of every tile and every critical block, in the plan's order; each is checked
        against the plan, so a stale file is an error rather than silently merged.
    output : path
        Where the cube is written (atomically).
    summary : path, optional
        Where the summary text is written as well.

    Returns
    -------
    str
        The summary: cells, flagged cells and where to look, where the cube is.
    """
    plan = make_plan(config)
    if len(tile_paths) != len(plan.tiles) or len(critical_paths) != len(plan.critical_blocks):
        raise InputError(f"collect needs {len(plan.tiles)} tiles and {len(plan.critical_blocks)} "
                         f"critical blocks, got {len(tile_paths)} and {len(critical_paths)}")
    family = plan.engine["family"]
    layout = layout_of(plan, family, strength_attributes(family))
    engine_shape = (plan.strength.size, plan.screening_length.size, plan.l.size)
    shape = layout.shape(plan) + (plan.l.size,)  # the cube's cells (the engine's, or the conditions')
    placeholder = np.broadcast_to(np.float64(np.nan), shape + (plan.n_r_max,))
    levels = {name: placeholder for name in LEVEL_VARS}
    levels["num_bound"] = np.full(engine_shape, UNKNOWN_COUNT, np.int32)
    levels["status"] = np.zeros(engine_shape, np.int8)
    levels["reasons"] = []
    past = bool(plan.engine.get("resonances"))  # the states past threshold (cube/resonances.py)
    if past:
        past_levels = {**resonance_placeholders(shape + (plan.n_r_max,)), "reasons": []}
        past_dissolution = {"dissolution_screening_length": np.full((plan.strength.size, plan.l.size, plan.n_r_max),
                                                                    np.nan),
                            "dissolution_flag": np.zeros((plan.strength.size, plan.l.size, plan.n_r_max), np.int8),
                            "reasons": []}
    engine_seconds = 0.0
    for tile, path in zip(plan.tiles, tile_paths):
        arrays, attrs = _read_checked(path, plan.tile_spec(tile), ("num_bound", "status"))
        where = (slice(*tile.strength_slice), list(tile.screening_length_index))
        for name in ("num_bound", "status"):
            levels[name][where] = arrays[name]
        engine_seconds += float(attrs["engine_seconds"])
        levels["reasons"] += [f"strength={tile.strength[i]!r} screening_length={tile.screening_length[j]!r} "
                              f"l={int(plan.l[k])}: {text}" for i, j, k, text in json.loads(attrs["reasons_json"])]
        if past:
            past_levels["reasons"] += [
                f"strength={tile.strength[i]!r} screening_length={tile.screening_length[j]!r} l={int(plan.l[k])} "
                f"n_r={n_r}: {text}" for i, j, k, n_r, text in json.loads(attrs["resonance_reasons_json"])]

    # A flagged cell keeps its count when the count was found (some level short of tolerance);
    # where the solve failed or the input was rejected the tile says the count is unknown.
    levels["num_bound"][levels["num_bound"] == UNKNOWN_COUNT] = NUM_BOUND_UNKNOWN
    levels["num_bound"], levels["status"] = layout.cells(levels["num_bound"]), layout.cells(levels["status"])

    crit_shape = (plan.strength.size, plan.l.size, plan.n_r_max)
    criticals = {"critical_screening_length": np.full(crit_shape, np.nan),
                 "critical_screening_length_error": np.full(crit_shape, np.nan),
                 "critical_flag": np.zeros(crit_shape, np.int8), "reasons": []}
    for block, path in zip(plan.critical_blocks, critical_paths):
        arrays, attrs = _read_checked(path, plan.critical_spec(block))
        for name in ("critical_screening_length", "critical_screening_length_error", "critical_flag"):
            if name in arrays:  # (a part written before the error estimate keeps NaN there)
                criticals[name][slice(*block.strength_slice)] = arrays[name]
        if past:
            for name in ("dissolution_screening_length", "dissolution_flag"):
                past_dissolution[name][slice(*block.strength_slice)] = arrays[name]
            past_dissolution["reasons"] += [f"strength={block.strength[i]!r} l={int(plan.l[k])} n_r={n_r}: {text}"
                                            for i, k, n_r, text in json.loads(attrs["dissolution_reasons_json"])]
        engine_seconds += float(attrs["engine_seconds"])
        criticals["reasons"] += [f"strength={block.strength[i]!r} l={int(plan.l[k])} n_r={n_r}: {text}"
                                 for i, k, n_r, text in json.loads(attrs["reasons_json"])]
        if "critical_strength" in arrays:  # block 0 of a sweep that asks for them
            criticals["critical_strength"] = arrays["critical_strength"]
            criticals["critical_strength_flag"] = arrays["critical_strength_flag"]
            criticals["critical_strength_reasons"] = [
                f"screening_length={plan.screening_length[j]!r} l={int(plan.l[k])} n_r={n_r}: {text}"
                for j, k, n_r, text in json.loads(attrs["critical_strength_reasons_json"])]
    # The grid flags need the grid's λ range, which only the whole plan knows.
    lam_c, flag = criticals["critical_screening_length"], criticals["critical_flag"]
    finite = np.isfinite(lam_c) & (flag == 0)
    flag[finite & (lam_c < plan.screening_length[0])] = CRITICAL_FLAGS.index("below_grid")
    flag[finite & (lam_c > plan.screening_length[-1])] = CRITICAL_FLAGS.index("above_grid")

    text, sha = config_text(stored_config(config, plan.engine["mass"]))  # what was written + defaults that matter
    provenance = {"sweep": plan.sweep, "family": plan.engine["family"], "mass": plan.engine["mass"],
                  "config_yaml": text, "config_sha256": sha, "version": VERSION,
                  "git_commit": _git_commit(),
                  "history": f"boundscape collect: {len(tile_paths)} tiles and "
                             f"{len(critical_paths)} critical blocks merged"}
    ds = build_cube({"strength": plan.strength, "screening_length": plan.screening_length,
                     "l": plan.l, "n_r_max": plan.n_r_max}, levels, criticals, provenance=provenance, layout=layout)
    ds.attrs["engine_seconds"] = engine_seconds
    if past:
        ds = add_resonances(ds, past_levels, past_dissolution)
    if plan.lines:
        ds = add_lines(ds, plan, tile_paths, layout)
    # The physical reading of the axes travels with the cube as extra coordinates, with the
    # screening model's validity and the critical values in the trade's terms.
    preset = from_config(config.get("preset"), config["grid"], config["potential"]["family"])
    ds = add_physical_coordinates(ds, preset)
    ds = add_trade_variables(ds, preset, plan, criticals)
    ds = add_family_parameters(ds, plan.engine)  # potential: diffuseness, core_strength, ... as scalar coordinates
    if plan.scattering is not None:  # in the units the preset left the cube in (cube/scattering.py)
        ds = add_scattering(ds, plan, tile_paths, layout)
    if plan.engine.get("populations"):  # partition functions, lowering, Saha (cube/populations.py)
        ds = add_populations(ds, plan, tile_paths, layout, preset)
    write_cube(ds, output, fill=_fill_levels(plan, tile_paths, LEVEL_VARS + (RESONANCE_VARS if past else ())
                                             + scattering_names(plan), layout))
    cells = f"{plan.num_cells} cells ({' x '.join(map(str, shape))})"
    if layout.mapped:
        cells += f" from {plan.num_engine_cells} distinct engine cells"
    # every flag of every variable, counted from the written cube (cube/summary.py)
    report = run_summary(output, f"sweep {plan.sweep}: {cells}; engine time {engine_seconds:.2f} s")
    if summary:
        Path(summary).write_text(report + "\n")
    return report
