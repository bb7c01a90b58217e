"""A tabulated V(r): read and checked.

The table is the engine's own input, so it is read here (CSV through the csv module; NetCDF through
xarray, imported only when a NetCDF table is read); the engine writes no files.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ...errors import InputError

__all__ = ["Table", "load_table", "validate_table"]


@dataclass(frozen=True, eq=False)  # hashed by identity: the critical-length cache keys on it
class Table:
    """A tabulated V(r) (bohr, hartree), read and checked; the engine interpolates it by a cubic
    spline in r·V(r) (smooth where V ~ 1/r), whose breakpoints and coefficients are ``spline``
    (scipy's CubicSpline, evaluated by the family's formula, :mod:`.tabulated`)."""

    r: np.ndarray
    v: np.ndarray
    coulomb_charge: float  # Z of a declared -Z/r tail, 0 for a short-range table
    source: str

    def __post_init__(self):
        from scipy.interpolate import CubicSpline

        spline = CubicSpline(self.r, self.r * self.v)
        object.__setattr__(self, "spline", (np.ascontiguousarray(spline.x, dtype=float),
                                            np.ascontiguousarray(spline.c, dtype=float)))


def load_table(path, *, coulomb_tail: float | None = None) -> Table:
    """Read r, V(r) (bohr, hartree) from a two-column CSV or a NetCDF file with variables r and V.

    ``coulomb_tail`` declares a −Z/r tail beyond the last point (Z > 0); otherwise the table
    must fall off faster than 1/r² and is taken as zero beyond its last point.
    """
    path = Path(path)
    if not path.exists():
        raise InputError(f"potential table {str(path)!r} does not exist")
    if path.suffix in (".nc", ".nc4", ".cdf"):
        import xarray as xr

        with xr.open_dataset(path) as ds:
            if "r" not in ds or "V" not in ds:
                raise InputError(f"potential table {path}: NetCDF file needs variables 'r' and 'V'")
            r = np.asarray(ds["r"].values, dtype=float)
            v = np.asarray(ds["V"].values, dtype=float)
        rows = None
    else:
        r, v, rows = _read_csv(path)
    return validate_table(r, v, coulomb_tail=coulomb_tail, source=str(path), rows=rows)


def _read_csv(path: Path):
    """r, V and the file line of each point of a two-column CSV ('#' comments, one header line).

    The csv module rather than numpy.loadtxt: it keeps each point's line number for the
    messages, and an empty file is an error here rather than a numpy warning."""
    import csv

    where = f"potential table {path}"
    try:
        text = path.read_text()
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(f"{where}: cannot be read ({exc})") from None
    # Comments become empty lines, so the reader's line numbers stay the file's.
    reader = csv.reader(line.split("#", 1)[0] for line in text.splitlines())
    r, v, rows = [], [], []
    first = True
    for fields in reader:
        fields = [f.strip() for f in fields]
        if not any(fields):
            continue
        line = reader.line_num
        try:
            values = [float(f) for f in fields]
        except ValueError:
            if first:  # one header line before the first point
                first = False
                continue
            raise InputError(f"{where}, line {line}: not two numbers r,V: {','.join(fields)!r}") from None
        if len(values) != 2:
            raise InputError(f"{where}, line {line}: expected two columns r,V, found {len(values)}")
        first = False
        r.append(values[0])
        v.append(values[1])
        rows.append(line)
    if not rows:
        raise InputError(f"{where}: no data (expected two numeric columns r,V)")
    return np.array(r), np.array(v), np.array(rows)


def validate_table(r, v, *, coulomb_tail=None, source="<array>", rows=None) -> Table:
    """Check a table (r ascending, finite, a tail that is negligible or declared Coulomb).

    ``rows`` gives each point's line in the file it was read from; messages name that line
    (or the point's index when there is no file)."""
    r = np.asarray(r, dtype=float)
    v = np.asarray(v, dtype=float)
    where = f"potential table {source}"

    def at(i):
        i = int(i)
        return f"{where}, line {int(rows[i])}" if rows is not None else f"{where}, point {i}"

    if r.ndim != 1 or r.shape != v.shape:
        raise InputError(f"{where}: r and V must be 1-d arrays of equal length")
    if r.size < 8:
        raise InputError(f"{where}: too few points ({r.size}); at least 8 are needed")
    bad = np.flatnonzero(~(np.isfinite(r) & np.isfinite(v)))
    if bad.size:
        i = bad[0]
        raise InputError(f"{at(i)}: NaN or infinite value (r = {r[i]:g}, V = {v[i]:g})")
    bad = np.flatnonzero(r <= 0)
    if bad.size:
        raise InputError(f"{at(bad[0])}: radius r = {r[bad[0]]:g} is not positive")
    dr = np.diff(r)
    bad = np.flatnonzero(dr <= 0)
    if bad.size:
        i = bad[0] + 1
        if dr[bad[0]] == 0:
            raise InputError(f"{at(i)}: repeated radius r = {r[i]:g}")
        raise InputError(f"{at(i)}: radius r = {r[i]:g} is below the previous point's {r[i - 1]:g}; "
                         "radii must be sorted ascending")
    last = at(r.size - 1)
    if coulomb_tail is not None:
        if not coulomb_tail > 0:
            raise InputError(f"{where}: a declared Coulomb tail needs a positive charge")
        # The table must join the declared tail: r·V -> -Z at the last point, to 1e-3.
        end = r[-1] * v[-1]
        if abs(end + coulomb_tail) > 1e-3 * coulomb_tail:
            raise InputError(
                f"{last} (the last point): r·V is {end:g}, not the declared Coulomb tail -{coulomb_tail:g}"
            )
        charge = float(coulomb_tail)
    else:
        # A short-range table must be negligible at its end: |V| r² small against l(l+1) ~ 1.
        tail = np.abs(v[-max(3, r.size // 10):] * r[-max(3, r.size // 10):] ** 2)
        if tail[-1] > 1e-6 or not np.all(np.diff(tail) <= 1e-12 + 1e-9 * tail[:-1]) and tail[-1] > 1e-8:
            raise InputError(
                f"{last} (the last point): the tail does not fall off faster than 1/r² "
                f"(|V|·r² = {tail[-1]:.3g}); extend the table or declare a Coulomb tail"
            )
        charge = 0.0
    return Table(r=r, v=v, coulomb_charge=charge, source=source)
