"""The loss table: every stored state's critical screening length, in bohr, in the preset's
unit, and as the density at which it is lost (``critical_screening_lengths.csv``)."""

from __future__ import annotations

import csv
import math

from ..labels import state_label
from ..physics.presets import NO_PRESET
from ..physics.units import BOHR_M
from .style import cube_unit_system

__all__ = ["critical_rows", "write_critical_csv"]


def critical_rows(ds, preset=NO_PRESET):
    """One row per stored (strength, l, n_r): λ_c in bohr, then the preset's columns (in its unit,
    its loss density or coupling: :meth:`~boundscape.physics.presets.Preset.critical_length_columns`)."""
    units_m = cube_unit_system(ds, preset).length_m
    mass = float(ds.attrs.get("mass", 1.0))
    flags = ds["critical_screening_length_flag"] if "critical_screening_length_flag" in ds else None
    meanings = flags.attrs["flag_meanings"].split() if flags is not None else []
    rows = []
    for z in ds["strength"].values:
        for l in ds["l"].values:
            for n_r in ds["n_r"].values:
                lc = float(ds["critical_screening_length"].sel(strength=z, l=l, n_r=n_r))
                n = int(ds["n"].sel(l=l, n_r=n_r))
                row = {"strength": float(z), "n": n, "l": int(l), "n_r": int(n_r), "state": state_label(n, int(l)),
                       # Atomic-unit cubes keep every stored digit; others convert to bohr.
                       "critical_screening_length_bohr": lc if units_m == BOHR_M else lc * units_m / BOHR_M}
                row.update(preset.critical_length_columns(z, lc, mass))
                if flags is not None:
                    row["flag"] = meanings[int(flags.sel(strength=z, l=l, n_r=n_r))]
                rows.append(row)
    return rows


# Columns the cube stores, printed with every digit; the others are derived through physical
# constants and a unit conversion, and carry 13 significant digits (not round-trip noise).
STORED = ("strength", "critical_screening_length_bohr")


def _shown(key, value):
    if not isinstance(value, float):
        return value
    if key in STORED or not math.isfinite(value) or value == 0:
        return repr(value)
    return f"{value:.13g}"


def write_critical_csv(ds, path, preset=NO_PRESET):
    """Write ``critical_screening_lengths.csv`` (inf where never bound): stored values with every
    digit, derived ones (other units, loss densities, g²) with 13 significant digits."""
    rows = critical_rows(ds, preset)
    with open(path, "w", newline="") as out:
        writer = csv.DictWriter(out, fieldnames=list(rows[0]), lineterminator="\n")
        writer.writeheader()
        writer.writerows({k: _shown(k, v) for k, v in row.items()} for row in rows)
    return rows
