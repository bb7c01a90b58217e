"""Rows of curve figures (level and resonance fans, binding energy against density): one row per
chosen strength (and temperature), each a slice of the cube along one condition axis with the
value on that axis where each state is lost.  Read from the cube alone."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..physics.presets import NO_PRESET
from ..physics.units import convert
from .style import axis_label, cube_dims, invalid_mask, length_label, strength_values

__all__ = ["FanRow", "FanView", "fan_view", "fan_strengths", "picks", "MAX_STRENGTH_ROWS", "MAX_TEMPERATURE_ROWS"]

# Rows a fan draws: every stored strength up to this many (a taller figure is still read at the
# report's width); beyond it, and for the temperatures of a condition sweep, the figure says
# which rows it shows and where the others are.
MAX_STRENGTH_ROWS = 8
MAX_TEMPERATURE_ROWS = 3


def fan_strengths(strength, most=3):
    """Up to ``most`` strengths spread over the axis (first, middle, last) for the level fans."""
    strength = np.asarray(strength)
    return strength[picks(strength.size, most)]


def picks(size: int, most: int):
    """Up to ``most`` indices spread over ``range(size)`` (first, middle, last)."""
    return np.unique(np.round(np.linspace(0, size - 1, min(most, size))).astype(int))


@dataclass
class FanRow:
    """One row: ``cube`` is the cube at one strength (and temperature), over (x, l, n_r);
    ``critical`` (l, n_r) the x value where each state is lost (NaN or inf: never, or not
    stored); ``invalid`` where the screening model fails along x (or None)."""

    key: object
    title: str
    cube: object
    critical: object
    invalid: np.ndarray | None


@dataclass
class FanView:
    """The x axis shared by the rows: its dimension, values and label, and which way a state is
    lost along it (``lost_towards_small``: below λ_c, or above a loss density)."""

    x_dim: str
    x: np.ndarray
    x_label: str
    lost_towards_small: bool
    rows: list
    omitted: str = ""  # a note naming the stored rows not drawn ("" if every one is)


def _strength_text(ds, strength_dim, value, preset):
    if strength_dim != "strength":
        return f"{preset.condition_labels.get(strength_dim, strength_dim).split(' (')[0]} = {value:.4g}"
    shown = float(strength_values(ds.sel(strength=[value]), preset)[0])
    return preset.strength_text(shown, ds["strength"].attrs)


def _shown_strengths(ds, strength_dim, chosen, preset) -> str:
    """``""`` if every stored strength is chosen, else a note: which of how many are drawn."""
    stored = ds[strength_dim].values
    if len(chosen) >= len(stored):
        return ""
    listed = ", ".join(_strength_text(ds, strength_dim, float(v), preset) for v in chosen)
    return f"{len(chosen)} of the {len(stored)} stored strengths drawn ({listed}); the threshold maps show every one"


def fan_view(ds, preset=NO_PRESET, strengths=None, most=MAX_STRENGTH_ROWS,
             most_temperatures=MAX_TEMPERATURE_ROWS) -> FanView:
    """The rows of a fan: per stored strength (up to ``most``, spread over the axis) against the
    screening length (a sweep over screening lengths), against the density at a chosen
    temperature (a sweep over density × temperature; up to ``most_temperatures`` temperatures
    when the sweep has one strength), against the range (nuclear coupling × range).  The view's
    ``omitted`` names the stored strengths and temperatures it leaves out."""
    strength_dim, length_dims = cube_dims(ds)
    stored = ds[strength_dim].values
    chosen = fan_strengths(stored, most) if strengths is None else np.atleast_1d(strengths)
    omitted = _shown_strengths(ds, strength_dim, chosen, preset)
    bad = invalid_mask(ds)
    x_dim = length_dims[0]
    rows = []
    if length_dims == ("screening_length",):
        for z in chosen:
            rows.append(FanRow(float(z), _strength_text(ds, strength_dim, float(z), preset), ds.sel(strength=z),
                               ds["critical_screening_length"].sel(strength=z), bad))
        return FanView(x_dim, ds[x_dim].values, length_label(ds, preset), True, rows, omitted)
    if len(length_dims) == 1:  # (coupling, range): λ_c converted to the range's unit
        factor = ds["critical_screening_length"].attrs["length_unit_in_m"] / convert(1.0, ds[x_dim].attrs["units"], "m")
        for g in chosen:
            cell = ds.sel({strength_dim: g})
            rows.append(FanRow(float(g), _strength_text(ds, strength_dim, float(g), preset), cell,
                               cell["critical_screening_length"] * factor, bad))
        return FanView(x_dim, ds[x_dim].values, axis_label(ds, x_dim, preset), True, rows, omitted)
    t_dim = length_dims[1]
    temperatures = ds[t_dim].values
    unit = ds[t_dim].attrs.get("units", "")
    symbol = preset.condition_labels.get(t_dim, t_dim).split("(")[0].split()[-1]
    if stored.size == 1 and strengths is None:
        combos = [(stored[0], temperatures[k]) for k in picks(temperatures.size, most_temperatures)]
    else:
        combos = [(z, temperatures[temperatures.size // 2]) for z in chosen]
    shown_t = sorted({t for _, t in combos})
    if len(shown_t) < temperatures.size:
        at = ", ".join(f"{t:.3g}" for t in shown_t)
        omitted = "; ".join(filter(None, [omitted, (
            f"drawn at {symbol} = {at} {unit} only, of the {temperatures.size} stored temperatures "
            f"({temperatures.min():.4g}–{temperatures.max():.4g} {unit}); the threshold maps show every one")]))
    loss = f"loss_{x_dim}"
    for z, t in combos:
        cell = ds.sel({strength_dim: z, t_dim: t})
        critical = cell[loss] if loss in ds else None
        rows.append(FanRow((float(z), float(t)), f"{_strength_text(ds, strength_dim, float(z), preset)}, "
                                                 f"{symbol} = {t:.3g} {unit}", cell, critical,
                           None if bad is None else bad[:, list(temperatures).index(t)]))
    return FanView(x_dim, ds[x_dim].values, axis_label(ds, x_dim, preset), False, rows, omitted)
