"""Scattering in a sweep (``scattering: true`` or ``{energies: [...]}``): each engine cell's
scattering length a (l = 0) or generalised length a_l (l ≥ 1), its inverse and the effective
range, and at the configured energies the phase shifts δ_l and partial cross sections σ_l, with
the engine's ``scattering`` and ``phase_shifts`` given the count the bound solve has just found
(not recounted).

A value short of the engine's tolerance is NaN with its flag ``not_converged`` and a reason, as
a level is; an energy too high for the engine's grid limit is flagged ``energy_too_high`` and the
cell's other energies are still solved.  A cell's values depend on nothing but the cell: the
bits do not depend on the tiling.
"""

from __future__ import annotations

import time

import numpy as np

from .. import engine
from ..engine import INPUT_REJECTED, NOT_CONVERGED, OK
from ..errors import ConvergenceError, InputError
from .config import axis_values

__all__ = ["SCATTERING_VARS", "SCATTERING_FLAGS", "PHASE_VARS", "PHASE_FLAGS", "NOT_SOLVED", "ENERGY_DIM",
           "PART_CELL_DIMS", "scattering_spec", "wanted", "energies", "variable_names", "empty_arrays", "solve_cell", "part_dims",
           "part_attrs"]

SCATTERING_VARS = ("scattering_length", "scattering_length_error", "inverse_scattering_length",
                   "inverse_scattering_length_error", "effective_range", "effective_range_error")
PHASE_VARS = ("phase_shift", "phase_shift_error", "cross_section", "cross_section_error")
# The engine's codes first (ok, not_converged, input_rejected), then what the sweep adds: the
# cell's bound solve failed, so it was not asked; an energy beyond the engine's grid limit.
SCATTERING_FLAGS = ("ok", "not_converged", "input_rejected", "not_solved")
PHASE_FLAGS = SCATTERING_FLAGS + ("energy_too_high",)
NOT_SOLVED = SCATTERING_FLAGS.index("not_solved")
ENERGY_TOO_HIGH = PHASE_FLAGS.index("energy_too_high")
ENERGY_DIM = "scattering_energy"
PART_CELL_DIMS = ("strength", "screening_length", "l")  # a tile's engine cells


def scattering_spec(section, preset, mass: float) -> dict | None:
    """What the plan and each tile spec carry of the config's ``scattering``: None (off), or
    ``{"energies": [...]}``, the configured energies (the preset's energy unit, hartree without a
    preset) in the engine's unit, ascending; empty for ``true``."""
    if section is False:
        return None
    if section is True:
        return {"energies": []}
    energies = axis_values(section["energies"], "scattering.energies")
    _, factor = preset.shown_energy_unit(mass)  # engine unit -> the preset's; (None, None) without one
    return {"energies": (energies / factor if factor else energies).tolist()}


def wanted(spec: dict) -> bool:
    """Whether a tile spec asks for scattering."""
    return spec.get("scattering") is not None


def energies(spec: dict) -> list:
    """The configured energies in the engine's (and the cube's) energy unit; empty for ``true``."""
    return list(spec["scattering"]["energies"])


def variable_names(spec: dict) -> tuple[str, ...]:
    """The variables a tile stores (and collect streams into the cube)."""
    names = SCATTERING_VARS + ("scattering_status",)
    return names + (PHASE_VARS + ("phase_shift_status",) if energies(spec) else ())


def _one_line(exc) -> str:
    text = str(exc).strip().splitlines()
    return f"{type(exc).__name__}: {text[0] if text else 'no message'}"


def empty_arrays(cell_shape, spec: dict) -> dict:
    """The tile's arrays: NaN values, every flag ``not_solved`` until a cell's bound solve succeeds."""
    cell_shape = tuple(cell_shape)
    out = {name: np.full(cell_shape, np.nan) for name in SCATTERING_VARS}
    out["scattering_status"] = np.full(cell_shape, NOT_SOLVED, np.int8)
    num = len(energies(spec))
    if num:
        out.update({name: np.full(cell_shape + (num,), np.nan) for name in PHASE_VARS})
        out["phase_shift_status"] = np.full(cell_shape + (num,), NOT_SOLVED, np.int8)
    out["scattering_reasons"], out["phase_shift_reasons"] = [], []
    out["scattering_seconds"] = 0.0
    return out


def solve_cell(out: dict, cell, pot, l: int, num_bound: int, spec: dict) -> None:
    """a_l, 1/a_l, r_e (and δ_l, σ_l at the spec's energies) of one cell and l, stored at ``cell``;
    ``num_bound`` is the bound solve's exact count."""
    start = time.perf_counter()
    cell = tuple(cell)
    try:
        res = engine.scattering(pot, l, num_bound=num_bound)
    except (ConvergenceError, InputError) as exc:
        out["scattering_status"][cell] = INPUT_REJECTED if isinstance(exc, InputError) else NOT_CONVERGED
        out["scattering_reasons"].append(cell + (_one_line(exc),))
    else:
        out["scattering_status"][cell] = res.status
        if res.status == OK:
            for name, value in zip(SCATTERING_VARS, (res.length, res.length_error, res.inverse_length,
                                                     res.inverse_length_error, res.effective_range,
                                                     res.effective_range_error)):
                out[name][cell] = value
        else:
            out["scattering_reasons"].append(cell + (res.reason or "no reason given",))
    if energies(spec):
        _phase_shifts(out, cell, pot, l, num_bound, np.asarray(energies(spec), dtype=np.float64))
    out["scattering_seconds"] += time.perf_counter() - start


def _phase_shifts(out, cell, pot, l, num_bound, e):
    """δ_l and σ_l at every energy the engine's grid limit allows; those above it are flagged and
    the rest solved again without them (the engine refuses a call with any one too high)."""
    status = out["phase_shift_status"][cell]
    todo = np.arange(e.size)
    while todo.size:
        try:
            res = engine.phase_shifts(pot, l, e[todo], num_bound=num_bound)
        except (ConvergenceError, InputError) as exc:
            if isinstance(exc, _energy_too_high()):
                high = todo[e[todo] >= exc.energy]
                status[high] = ENERGY_TOO_HIGH
                out["phase_shift_reasons"].append(cell + (f"{high.size} energies from {e[high].min():.6g} up: "
                                                          f"{_one_line(exc)}",))
                todo = todo[e[todo] < exc.energy]
                continue
            status[todo] = INPUT_REJECTED if isinstance(exc, InputError) else NOT_CONVERGED
            out["phase_shift_reasons"].append(cell + (_one_line(exc),))
            return
        good = res.status == OK
        status[todo] = res.status
        for name, values in zip(PHASE_VARS, (res.phase_shift, res.phase_shift_error, res.cross_section,
                                             res.cross_section_error)):
            out[name][cell + (todo[good],)] = np.asarray(values)[good]
        if not good.all():
            bad = todo[~good]
            why = next((r for r, g in zip(res.reason, good) if not g and r), "no reason given")
            out["phase_shift_reasons"].append(cell + (f"not converged at {bad.size} energies from "
                                                      f"{e[bad].min():.6g}: {why}",))
        return


def part_dims(spec: dict) -> dict:
    """The dimensions of each variable a tile stores."""
    dims = dict.fromkeys(SCATTERING_VARS + ("scattering_status",), PART_CELL_DIMS)
    if energies(spec):
        dims.update(dict.fromkeys(PHASE_VARS + ("phase_shift_status",), PART_CELL_DIMS + (ENERGY_DIM,)))
    return dims


def part_attrs(result: dict) -> dict:
    """The tile file's attributes: the flagged values' reasons (JSON) and the time spent."""
    import json

    return {"scattering_reasons_json": json.dumps(result["scattering_reasons"]),
            "phase_shift_reasons_json": json.dumps(result["phase_shift_reasons"]),
            "scattering_seconds": result["scattering_seconds"]}


def _energy_too_high():
    # imported when a tile solves (the compiled solver is loaded then anyway), not when the
    # workflow plans
    from ..engine.continuum.phase_shifts import EnergyTooHigh

    return EnergyTooHigh


# The codes this module shares with the engine must be the engine's.
assert (OK, NOT_CONVERGED, INPUT_REJECTED) == tuple(SCATTERING_FLAGS.index(n) for n in
                                                    ("ok", "not_converged", "input_rejected"))
