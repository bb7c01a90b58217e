"""The loss table: where every stored state is lost (``critical_screening_lengths.csv``), in the
preset's units only — its critical screening length, and under a preset that reads densities the
density above which it is lost (at each temperature of a sweep over them) with the screening
model's validity there — with λ_c's error estimate, under a ``#`` header that says what each
column is (:mod:`.table_notes`); and, under the nuclear preset, the critical coupling at each
range (``critical_couplings.csv``)."""

from __future__ import annotations

import csv
import math

from ..labels import state_label
from ..physics.presets import NO_PRESET
from .style import cube_dims
from .table_notes import DERIVED_PREFIXES, matched_digits, table_header

__all__ = ["critical_rows", "coupling_rows", "write_critical_csv"]


def _meanings(ds, name):
    return ds[name].attrs["flag_meanings"].split() if name in ds else None


def _loss_variable(ds):
    names = [name for name in ds.data_vars if name.startswith("loss_") and not name.endswith("_validity")]
    return names[0] if names else None


def critical_rows(ds, preset=NO_PRESET):
    """One row per stored (strength, l, n_r) — and per temperature of a sweep over them: λ_c in
    the preset's length unit (bohr without a preset), its error estimate in the same unit
    (``critical_screening_length_error_<unit>``, NaN if the cube has none), then the preset's
    columns (the loss density and the model's validity there, the coupling; see
    :meth:`~boundscape.physics.presets.Preset.critical_length_columns`), and the flag."""
    strength_dim, length_dims = cube_dims(ds)
    mass = float(ds.attrs.get("mass", 1.0))
    unit, factor = preset.shown_length_unit(mass)
    flags = _meanings(ds, "critical_screening_length_flag")
    loss = _loss_variable(ds)
    validity = _meanings(ds, f"{loss}_validity") if loss else None
    temperatures = [None]
    if len(length_dims) == 2:
        t_dim = length_dims[1]
        temperatures = [(t_dim, float(t)) for t in ds[t_dim].values]
    rows = []
    for z in ds[strength_dim].values:
        engine_z = float(ds["strength"].sel({strength_dim: z})) if strength_dim != "strength" else float(z)
        for t in temperatures:
            for l in ds["l"].values:
                for n_r in ds["n_r"].values:
                    where = {strength_dim: z, "l": l, "n_r": n_r}
                    lc = float(ds["critical_screening_length"].sel(where))
                    error = (float(ds["critical_screening_length_error"].sel(where))
                             if "critical_screening_length_error" in ds else math.nan)
                    n = int(ds["n"].sel(l=l, n_r=n_r))
                    name, shown = preset.table_strength(engine_z, mass)
                    row = {name: shown}
                    if t is not None:
                        row[f"{t[0]}_{ds[t[0]].attrs.get('units', '')}"] = t[1]
                    row.update({"n": n, "l": int(l), "n_r": int(n_r), "state": state_label(n, int(l))})
                    if unit is None:  # atomic units: the cube's own bohr
                        row["critical_screening_length_bohr"] = lc
                    columns = preset.critical_length_columns(engine_z, lc, mass)
                    # the engine's error estimate of λ_c, in the same unit
                    columns[f"critical_screening_length_error_{unit or 'bohr'}"] = error * (factor or 1.0)
                    at = {**where, **({t[0]: t[1]} if t is not None else {})}
                    if loss is not None:  # the loss density the cube stores
                        columns[f"{loss}_cm-3"] = float(ds[loss].sel(at))
                        if validity is not None:
                            columns["screening_validity"] = validity[int(ds[f"{loss}_validity"].sel(at))]
                    row.update(columns)
                    if "mott_parameter" in ds:
                        row["mott_parameter"] = float(ds["mott_parameter"].sel(at))
                    if flags is not None:
                        row["flag"] = flags[int(ds["critical_screening_length_flag"].sel(where))]
                    rows.append(row)
    return rows


def coupling_rows(ds, preset=NO_PRESET):
    """One row per stored (range, l, n_r) of a cube with ``critical_coupling``: the coupling g²
    below which the state is not bound at that range, in MeV fm."""
    if "critical_coupling" not in ds:
        return []
    along = ds["critical_coupling"].dims[0]
    flags = _meanings(ds, "critical_coupling_flag")
    unit, factor = preset.shown_length_unit(float(ds.attrs.get("mass", 1.0)))
    rows = []
    for j, lam in enumerate(ds[along].values):
        shown = float(lam) if along != "screening_length" else float(lam) * (factor or 1.0)
        for l in ds["l"].values:
            for n_r in ds["n_r"].values:
                n = int(ds["n"].sel(l=l, n_r=n_r))
                where = {along: lam, "l": l, "n_r": n_r}
                row = {f"range_{unit or 'fm'}": shown, "n": n, "l": int(l), "n_r": int(n_r),
                       "state": state_label(n, int(l)),
                       f"critical_coupling_{ds['critical_coupling'].attrs['units'].replace(' ', '_')}":
                           float(ds["critical_coupling"].sel(where))}
                if flags is not None:
                    row["flag"] = flags[int(ds["critical_coupling_flag"].sel(where))]
                rows.append(row)
    return rows


# Inputs the cube stores, printed with every digit; λ_c and what is computed from it carry the
# digits its error estimate reaches (table_notes.matched_digits), the error two; the rest 13.
STORED = ("strength", "nuclear_charge")


def _shown(key, value, digits=None):
    if not isinstance(value, float):
        return value
    if key in STORED or not math.isfinite(value) or value == 0:
        return repr(value)
    if key.startswith("critical_screening_length_error_"):
        return f"{value:.2g}"
    if digits is not None and key.startswith(DERIVED_PREFIXES):
        return f"{value:.{digits}g}"
    return f"{value:.13g}"


def _digits(row):
    """The significant digits λ_c's error estimate allows in ``row`` (None without one)."""
    error = next((k for k in row if k.startswith("critical_screening_length_error_")), None)
    if error is None:
        return None
    value = row.get(error.replace("_error", ""), math.nan)
    return matched_digits(value, row[error])


def _write(rows, path, header=()):
    with open(path, "w", newline="") as out:
        out.writelines(f"# {line}\n" for line in header)
        writer = csv.DictWriter(out, fieldnames=list(rows[0]), lineterminator="\n")
        writer.writeheader()
        writer.writerows({k: _shown(k, v, _digits(row)) for k, v in row.items()} for row in rows)


def write_critical_csv(ds, path, preset=NO_PRESET):
    """Write ``critical_screening_lengths.csv`` (inf where never bound): a ``#``-commented header
    (sweep, engine version, model, preset and conditions, every column and its unit), then the
    rows: stored inputs with every digit, λ_c and the values computed from it (other units, loss
    densities, g²) with the digits its error estimate reaches, the error with two; with a
    ``critical_coupling`` in the cube also ``critical_couplings.csv`` beside it.  Returns the rows."""
    rows = critical_rows(ds, preset)
    _write(rows, path, table_header(ds, list(rows[0]), preset, _loss_variable(ds)))
    couplings = coupling_rows(ds, preset)
    if couplings:
        _write(couplings, path.with_name("critical_couplings.csv") if hasattr(path, "with_name") else
               str(path).rsplit("/", 1)[0] + "/critical_couplings.csv")
    return rows
