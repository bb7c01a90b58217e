"""A tabulated V(r): read, checked and interpolated.

The table is the engine's own input, so it is read here (CSV through numpy; NetCDF through
xarray, imported only when a NetCDF table is read); the engine writes no files.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ..errors import InputError

__all__ = ["Table", "load_table", "validate_table"]


@dataclass(frozen=True, eq=False)  # hashed by identity: the critical-length cache keys on it
class Table:
    """A tabulated V(r), interpolated by a cubic spline in r·V(r) (smooth where V ~ 1/r)."""

    r: np.ndarray
    v: np.ndarray
    coulomb_charge: float  # Z of a declared -Z/r tail, 0 for a short-range table
    source: str

    def __post_init__(self):
        from scipy.interpolate import CubicSpline

        object.__setattr__(self, "_spline", CubicSpline(self.r, self.r * self.v))

    def __call__(self, r):
        r = np.asarray(r, dtype=float)
        inside = r <= self.r[-1]
        out = np.empty_like(r)
        ri = np.maximum(r[inside], self.r[0])
        # Below the first point r·V is held at its first value: V ~ c/r at the origin.
        out[inside] = self._spline(ri) / r[inside]
        out[~inside] = -self.coulomb_charge / r[~inside]
        return out


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
    else:
        try:
            data = np.loadtxt(path, delimiter=",", comments="#", ndmin=2)
        except ValueError:
            try:
                data = np.loadtxt(path, delimiter=",", comments="#", skiprows=1, ndmin=2)
            except ValueError as exc:
                raise InputError(f"potential table {path}: cannot read two numeric columns r,V ({exc})") from None
        if data.shape[1] != 2:
            raise InputError(f"potential table {path}: expected two columns r,V, found {data.shape[1]}")
        r, v = data[:, 0], data[:, 1]
    return validate_table(r, v, coulomb_tail=coulomb_tail, source=str(path))


def validate_table(r, v, *, coulomb_tail=None, source="<array>") -> Table:
    """Check a table (r ascending, finite, a tail that is negligible or declared Coulomb)."""
    r = np.asarray(r, dtype=float)
    v = np.asarray(v, dtype=float)
    where = f"potential table {source}"
    if r.ndim != 1 or r.shape != v.shape:
        raise InputError(f"{where}: r and V must be 1-d arrays of equal length")
    if r.size < 8:
        raise InputError(f"{where}: too few points ({r.size}); at least 8 are needed")
    if not (np.all(np.isfinite(r)) and np.all(np.isfinite(v))):
        raise InputError(f"{where}: contains NaN or infinite values")
    if np.any(r <= 0):
        raise InputError(f"{where}: radii must be positive")
    dr = np.diff(r)
    if np.any(dr == 0):
        raise InputError(f"{where}: repeated radius r = {r[1:][dr == 0][0]:g}")
    if np.any(dr < 0):
        raise InputError(f"{where}: radii are not sorted ascending")
    if coulomb_tail is not None:
        if not coulomb_tail > 0:
            raise InputError(f"{where}: a declared Coulomb tail needs a positive charge")
        # The table must join the declared tail: r·V -> -Z at the last point, to 1e-3.
        end = r[-1] * v[-1]
        if abs(end + coulomb_tail) > 1e-3 * coulomb_tail:
            raise InputError(
                f"{where}: r·V at the last point is {end:g}, not the declared Coulomb tail -{coulomb_tail:g}"
            )
        charge = float(coulomb_tail)
    else:
        # A short-range table must be negligible at its end: |V| r² small against l(l+1) ~ 1.
        tail = np.abs(v[-max(3, r.size // 10):] * r[-max(3, r.size // 10):] ** 2)
        if tail[-1] > 1e-6 or not np.all(np.diff(tail) <= 1e-12 + 1e-9 * tail[:-1]) and tail[-1] > 1e-8:
            raise InputError(
                f"{where}: the tail does not fall off faster than 1/r² (|V|·r² = {tail[-1]:.3g} at the last point); "
                "extend the table or declare a Coulomb tail"
            )
        charge = 0.0
    return Table(r=r, v=v, coulomb_charge=charge, source=source)
