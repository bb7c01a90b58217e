"""What the loss table says about itself: its commented header (the sweep, the engine version, the
model and preset with their conditions, every column with its unit) and the digits each value
carries (as many as its error estimate allows).  Everything is read from the cube's attributes."""

from __future__ import annotations

import math

from ..cube.model import family_title
from ..physics.presets import NO_PRESET

__all__ = ["table_header", "matched_digits", "mass_text", "DERIVED_PREFIXES", "SCOPE"]

# Columns computed from λ_c (a unit conversion or the screening model at it): their digits follow λ_c's error.
DERIVED_PREFIXES = ("critical_screening_length_", "loss_", "mott_parameter", "two_mu_g2")
SCOPE = ("non-relativistic Schroedinger equation with a static screened potential; the screening models are "
         "linear (mean-field): Debye-Hueckel holds at weak coupling only (see screening_validity); not a "
         "substitute for a licensed or site-specific safety assessment")


def mass_text(attrs) -> str:
    """The cube's reduced mass as read aloud: "1 electron mass", "0.5 electron masses"."""
    mass, units = float(attrs.get("mass", 1.0)), attrs.get("mass_units", "electron masses")
    if mass == 1.0 and units.endswith("masses"):
        units = units.removesuffix("es")
    return f"{mass:g} {units}"


def matched_digits(value: float, error: float) -> int | None:
    """Significant digits of ``value`` down to the digit its ``error`` reaches, plus one guard digit
    (3 to 17); ``None`` where the error says nothing (NaN, inf or zero)."""
    if not (math.isfinite(value) and math.isfinite(error)) or value == 0 or error <= 0:
        return None
    return int(min(17, max(3, math.ceil(math.log10(abs(value) / error)) + 1)))


def _flag_text(ds, name):
    """Every meaning of a flag variable, then its comment on them."""
    attrs = ds[name].attrs
    meanings = ", ".join(attrs.get("flag_meanings", "").split())
    comment = attrs.get("comment", "")
    return f"one of {meanings}" + (f" ({comment})" if comment else "")


def _columns(ds, columns, preset, loss):
    """One ``name: meaning [unit]`` line per column."""
    strength_dim = ds["critical_screening_length"].dims[0]
    known = {"n": "principal quantum number n = n_r + l + 1", "l": "angular momentum l",
             "n_r": "radial quantum number (nodes of u(r))", "state": "spectroscopic name of the state"}
    text = []
    for column in columns:
        if column == columns[0]:
            meaning = ds[strength_dim].attrs.get("long_name", strength_dim)
            if preset.strength_long_name and strength_dim == "strength":
                meaning = preset.strength_long_name
        elif column in known:
            meaning = known[column]
        elif column.startswith("critical_screening_length_error_"):
            meaning = (f"error estimate of the critical screening length [{column.rsplit('_', 1)[1]}]: Richardson's "
                       "change of the zero-energy eigenvalue at the root over its slope (cube variable "
                       "critical_screening_length_error)")
        elif column.startswith("critical_screening_length_"):
            meaning = (f"critical screening length lambda_c [{column.rsplit('_', 1)[1]}]: below it the state is not "
                       "bound; inf: never bound")
        elif loss is not None and column == f"{loss}_cm-3":
            attrs = ds[loss].attrs
            meaning = f"{attrs.get('long_name', loss)} [cm-3]: {attrs.get('comment', '')}"
        elif column == "screening_validity":
            meaning = f"whether the screening model holds at the loss density: {_flag_text(ds, f'{loss}_validity')}"
        elif column == "flag":
            meaning = f"critical length against the sweep's grid: {_flag_text(ds, 'critical_screening_length_flag')}"
        elif column in ds.variables or column.rsplit("_", 1)[0] in ds.variables:
            name = column if column in ds.variables else column.rsplit("_", 1)[0]
            attrs = ds[name].attrs
            meaning = f"{attrs.get('long_name', name)} [{attrs.get('units', '1')}]"
        else:
            meaning = column.replace("_", " ")
        text.append(f"  {column}: {meaning}")
    return text


def table_header(ds, columns, preset=NO_PRESET, loss=None) -> list[str]:
    """The comment lines (without ``#``) that open ``critical_screening_lengths.csv``."""
    attrs = ds.attrs
    family = attrs.get("family", "")
    lines = [f"critical screening lengths of sweep {attrs.get('sweep', '?')}: where each bound state of the "
             f"{family_title(family)} potential is lost",
             f"computed by boundscape {attrs.get('boundscape_version', '?')} (git {attrs.get('git_commit', 'unknown')}), "
             f"config sha256 {attrs.get('config_sha256', 'unknown')}, from the cube levels.nc",
             f"model: {family} potential, reduced mass {mass_text(attrs)} (engine units)"]
    if "preset" in attrs:
        model = f"preset: {attrs['preset']}"
        if "screening_model" in attrs:
            model += (f"; screening model {attrs['screening_model']} ({attrs.get('screening_model_description', '')}); "
                      f"screening species {attrs.get('screening_species', '?')}")
        lines.append(model)
    if loss is not None:
        t_columns = [c for c in columns if c.endswith(("_eV", "_K")) and "temperature" in c]
        if t_columns:
            lines.append(f"conditions: each loss density holds at the temperature in the row's {t_columns[0]} column")
        else:
            lines.append(f"conditions: {ds[loss].attrs.get('comment', '')}")
    lines.append(f"scope: {SCOPE}")
    lines.append("digits: lambda_c and the values computed from it carry the digits its error estimate reaches, "
                 "plus one; stored inputs carry every digit")
    lines.append("columns:")
    return lines + _columns(ds, columns, preset, loss)
