"""The cube's dimensions, and a sweep over a trade's conditions in it.

A sweep over screening lengths has the dimensions (strength, screening_length, l, n_r).  A sweep
over a preset's conditions has (strength, electron_density, electron_temperature, l, n_r) — or
(strength, carrier_density, temperature, …), (coupling, range, …) — with the engine's
``screening_length`` (and, for the coupling, ``strength``) as coordinates over them.  The tiles
solve each distinct engine cell once; :class:`Layout` maps those onto the conditions.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..engine import family_info
from ..physics.units import BOHR_M, BOHR_UDUNITS

__all__ = ["Layout", "layout_of", "layout_of_cube", "write_mapped"]

# A mapped variable is written in slabs of about this many bytes (common practice, no source).
SLAB_BYTES = 64 << 20


@dataclass(frozen=True)
class Layout:
    """Where the engine grid (strength × distinct screening length) sits in the cube.

    ``length_index`` has the shape of the condition dimensions and holds, for each, the index of
    its screening length in the engine grid; ``None`` where the dimension is the screening length
    itself."""

    strength_dim: str
    length_dims: tuple[str, ...]
    coords: dict
    length_index: np.ndarray | None = None

    @property
    def cell_dims(self) -> tuple[str, ...]:
        return (self.strength_dim, *self.length_dims, "l")

    @property
    def level_dims(self) -> tuple[str, ...]:
        return self.cell_dims + ("n_r",)

    @property
    def critical_dims(self) -> tuple[str, ...]:
        return (self.strength_dim, "l", "n_r")

    @property
    def line_dims(self) -> tuple[str, ...]:
        return (self.strength_dim, *self.length_dims, "line")

    @property
    def mapped(self) -> bool:
        """Whether cells share engine cells (a sweep over conditions)."""
        return self.length_index is not None

    def cells(self, engine_array):
        """An array over (strength, engine screening length, ...) as one over the cube's
        (strength, *conditions, ...)."""
        array = np.asarray(engine_array)
        return array if self.length_index is None else array[:, self.length_index]

    def shape(self, plan) -> tuple[int, ...]:
        """(strength, *conditions) sizes."""
        lengths = (plan.screening_length.size,) if self.length_index is None else self.length_index.shape
        return (plan.strength.size, *lengths)


def _length_attrs(family: str) -> dict:
    return {"long_name": family_info(family).length_long_name, "units": BOHR_UDUNITS, "length_unit_in_m": BOHR_M}


def layout_of(plan, family: str, strength_attrs: dict) -> Layout:
    """The cube layout of a plan; ``strength_attrs`` are the engine strength's attributes."""
    grid = plan.conditions
    if grid is None:
        return Layout("strength", ("screening_length",), {
            "strength": ("strength", np.asarray(plan.strength, np.float64), strength_attrs),
            "screening_length": ("screening_length", np.asarray(plan.screening_length, np.float64),
                                 _length_attrs(family))})
    coords = {}
    for name, values in zip((grid.strength_dim, *grid.length_dims), (grid.strength_values, *grid.length_values)):
        coords[name] = (name, np.asarray(values, np.float64), dict(grid.attributes[name]))
    if grid.strength_dim != "strength":  # the engine's strength as a coordinate over the coupling
        coords["strength"] = (grid.strength_dim, np.asarray(plan.strength, np.float64),
                              {**strength_attrs, "comment": "the engine's strength of each coupling"})
    else:
        coords["strength"][2].update({key: value for key, value in strength_attrs.items() if key != "long_name"})
    lengths = np.asarray(plan.screening_length, np.float64)[plan.length_index]
    coords["screening_length"] = (grid.length_dims, lengths, {
        **_length_attrs(family),
        "comment": "the engine's screening length at these conditions, in the engine's units: the value each cell "
                   f"was solved at (lengths within {_same_length():g} of each other are one engine cell)"})
    return Layout(grid.strength_dim, tuple(grid.length_dims), coords, plan.length_index)


def _same_length():
    from ..sweep.plan import SAME_LENGTH

    return SAME_LENGTH


def layout_of_cube(ds) -> Layout:
    """The layout of an opened cube, read from its ``energy`` variable's dimensions."""
    dims = ds["energy"].dims
    return Layout(dims[0], tuple(dims[1:-2]), {})


def write_mapped(nc, name, strength_slice, engine_slab, length_index):
    """Write an engine slab (strengths of ``strength_slice`` × every engine screening length × …)
    into the cube variable ``name`` over (strength, *conditions, …), in slabs of the first
    condition dimension small enough to hold."""
    s0, s1 = strength_slice
    rows = length_index.shape[0]
    per_row = max(1, engine_slab[:, length_index[:1]].nbytes)
    step = max(1, SLAB_BYTES // per_row)
    for a in range(0, rows, step):
        b = min(rows, a + step)
        nc.variables[name][s0:s1, a:b] = engine_slab[:, length_index[a:b]]
