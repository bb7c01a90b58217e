"""The sweep cube's data model: an xarray Dataset with CF-1.10 metadata and provenance.

Energies stay in hartree and lengths in bohr; the units say so as UDUNITS-2 scaled units
built from :mod:`scipy.constants` (e.g. ``"5.29177210544e-11 m"``), so no number is converted.
A preset that reads the cube in other units rewrites every unit attribute (:mod:`.physical`).
"""

from __future__ import annotations

import math
from datetime import datetime, timezone

import numpy as np
import yaml

from ..engine import LEVEL_STATUS, family_info
from ..errors import InputError
from ..physics.units import BOHR_M, BOHR_UDUNITS, HARTREE_EV, HARTREE_J, HARTREE_UDUNITS, udunits_scaled
from ..sweep.tiles import CRITICAL_FLAGS

__all__ = ["build_cube", "strength_attributes", "chunk_shape", "listing", "flag_attrs", "CELL_DIMS", "LEVEL_DIMS", "CRITICAL_DIMS",
           "LEVEL_VARS", "MAX_LISTED", "NUM_BOUND_UNKNOWN", "FILL_VALUES"]

CELL_DIMS = ("strength", "screening_length", "l")
LEVEL_DIMS = CELL_DIMS + ("n_r",)
CRITICAL_DIMS = ("strength", "l", "n_r")
LEVEL_VARS = ("energy", "energy_error", "mean_radius")  # per level, along LEVEL_DIMS
# Chunks of about 1 MiB: small enough to read one slice lazily, big enough for zlib to pay
# (common practice, no source).
CHUNK_BYTES = 1 << 20
MAX_LISTED = 2000  # flagged cells or states listed in an attribute; the job logs hold the rest
# num_bound where the count is unknown (the cell's input rejected, or its solve failed): NetCDF's
# default int fill value, so that -1 keeps the engine's meaning "infinitely many". Readers that
# apply CF masking (xarray.open_dataset) see NaN there.
NUM_BOUND_UNKNOWN = np.int32(-2147483647)
FILL_VALUES = {"num_bound": NUM_BOUND_UNKNOWN}  # _FillValue of the integer variables that have one


def family_title(family: str) -> str:
    """The family's own display name (a family unknown to this version keeps its key)."""
    try:
        return family_info(family).display_name
    except InputError:  # a cube from another version may name a family this one lacks
        return family


def _strength_units(family: str) -> tuple[str, str]:
    from scipy.constants import hbar

    info = family_info(family)
    units = {"1": "1", "energy": HARTREE_UDUNITS,
             "angular_frequency": udunits_scaled(HARTREE_J / hbar, "s-1")}[info.strength_dimension]
    return units, info.strength_long_name


def chunk_shape(shape, itemsize, target=CHUNK_BYTES):
    """Whole trailing axes, halving the leading ones until a chunk holds about ``target`` bytes."""
    chunks = list(shape)
    for axis in range(len(chunks)):
        while math.prod(chunks) * itemsize > target and chunks[axis] > 1:
            chunks[axis] = -(-chunks[axis] // 2)
    return tuple(max(1, c) for c in chunks)


def listing(lines) -> str:
    """One attribute's text listing flagged cells or states, one per line: at most
    :data:`MAX_LISTED` of them (the job logs hold the rest), ``"none"`` if there are none."""
    lines = list(lines)
    if len(lines) > MAX_LISTED:
        lines = lines[:MAX_LISTED] + [f"... and {len(lines) - MAX_LISTED} more (see the tile logs)"]
    return "\n".join(lines) or "none"


def flag_attrs(flags) -> dict:
    """CF ``flag_values`` and ``flag_meanings`` of a flag variable whose codes are the positions
    in ``flags`` (a tuple of names), stored as int8."""
    return {"flag_values": np.arange(len(flags), dtype=np.int8), "flag_meanings": " ".join(flags)}


def strength_attributes(family: str) -> dict:
    """CF attributes of the engine's strength of a family."""
    units, name = _strength_units(family)
    return {"long_name": name, "units": units}


def build_cube(axes, levels, criticals, *, provenance, layout=None):
    """Assemble the cube Dataset.

    Parameters
    ----------
    axes : dict
        ``strength``, ``screening_length`` (bohr), ``l`` and ``n_r_max``.
    levels : dict
        ``energy``, ``energy_error``, ``mean_radius`` (strength, screening_length, l, n_r);
        ``num_bound`` (:data:`NUM_BOUND_UNKNOWN` where the count is unknown), ``status``
        (strength, screening_length, l); ``reasons``, a list of one-line texts naming each
        flagged cell.  With a ``layout`` the arrays run over its dimensions instead.
    criticals : dict
        ``critical_screening_length`` and ``critical_flag`` (strength, l, n_r), ``reasons``;
        ``critical_screening_length_error`` (its error estimate; NaN if absent).
    provenance : dict
        ``sweep``, ``family``, ``mass``, ``config_yaml``, ``config_sha256``, ``version``,
        ``git_commit`` (or None), ``history`` (one line).

    Returns
    -------
    xarray.Dataset
    """
    import xarray as xr

    family = provenance["family"]
    n_r = np.arange(axes["n_r_max"], dtype=np.int32)
    l_values = np.asarray(axes["l"], dtype=np.int32)
    if layout is None:
        from .conditions import Layout

        layout = Layout("strength", ("screening_length",), {
            "strength": ("strength", np.asarray(axes["strength"], np.float64), strength_attributes(family)),
            "screening_length": ("screening_length", np.asarray(axes["screening_length"], np.float64),
                                 {"long_name": family_info(family).length_long_name, "units": BOHR_UDUNITS})})
    cell_dims, level_dims, critical_dims = layout.cell_dims, layout.level_dims, layout.critical_dims
    coords = {
        **{name: (dims, values, dict(attrs)) for name, (dims, values, attrs) in layout.coords.items()},
        "l": ("l", l_values, {"long_name": "angular momentum l", "units": "1"}),
        "n_r": ("n_r", n_r, {"long_name": "radial quantum number n_r", "units": "1",
                             "comment": "nodes of u(r) in 0 < r < inf"}),
        "n": (("l", "n_r"), (l_values[:, None] + n_r[None, :] + 1).astype(np.int32),
              {"long_name": "principal quantum number n", "units": "1", "comment": "n = n_r + l + 1"}),
    }
    # The unit each number is in, as plain factors: a script converts with these, whatever the
    # preset (a preset that reads the cube in other units rewrites them, see physical.py).
    # One name per unit value: energy_unit_in_J/eV and length_unit_in_m, nothing else.
    energy_attrs = {"units": HARTREE_UDUNITS, "energy_unit_in_J": HARTREE_J, "energy_unit_in_eV": HARTREE_EV}
    length_attrs = {"units": BOHR_UDUNITS, "length_unit_in_m": BOHR_M}
    coords["screening_length"][2].update(length_attrs)
    status = levels["status"].astype(np.int8)
    flagged = int(np.count_nonzero(status))
    data_vars = {
        "energy": (level_dims, levels["energy"], {
            "long_name": "energy", **energy_attrs,
            "comment": "energy of the bound state (n_r, l); NaN where it is not bound, or where status is not ok"}),
        "energy_error": (level_dims, levels["energy_error"], {
            "long_name": "energy error estimate", **energy_attrs,
            "comment": "absolute error estimate of the energy"}),
        "mean_radius": (level_dims, levels["mean_radius"], {
            "long_name": "mean radius <r>", **length_attrs}),
        "num_bound": (cell_dims, levels["num_bound"].astype(np.int32), {
            "long_name": "number of bound states of this l", "units": "1", "ancillary_variables": "status",
            "comment": "exact count from the nodes of the zero-energy solution, also where some level of the "
                       f"cell did not converge; levels with n_r >= {axes['n_r_max']} are counted but not "
                       "stored; -1 means infinitely many (a Coulomb tail or a confining potential); "
                       f"_FillValue ({int(NUM_BOUND_UNKNOWN)}) where the count is unknown: the cell's input "
                       "was rejected or its solve failed (see status)"}),
        "status": (cell_dims, status, {
            "long_name": "solver status of the cell",
            **flag_attrs(LEVEL_STATUS),
            "flagged_cell_count": np.int32(flagged),
            "flagged_cells": listing(levels["reasons"])}),
        "critical_screening_length": (critical_dims, criticals["critical_screening_length"], {
            "long_name": "critical screening length",
            **length_attrs, "ancillary_variables": "critical_screening_length_flag critical_screening_length_error",
            "comment": "the screening length below which the state (n_r, l) is not bound; from the zero-energy "
                       "solution by root finding; +inf where never bound; stored for every state, also outside "
                       "the grid's screening_length range"}),
        "critical_screening_length_error": (critical_dims, criticals.get(
            "critical_screening_length_error", np.full(np.shape(criticals["critical_screening_length"]), np.nan)), {
            "long_name": "critical screening length error estimate", **length_attrs,
            "comment": "absolute error estimate of critical_screening_length: the Richardson change of the "
                       "zero-energy eigenvalue at the root over its slope in the screening length; NaN where "
                       "the state is never bound or not converged"}),
        "critical_screening_length_flag": (critical_dims, criticals["critical_flag"].astype(np.int8), {
            "long_name": "position of the critical screening length against the grid",
            **flag_attrs(CRITICAL_FLAGS),
            "comment": "below_grid: bound over the whole grid; above_grid: not bound anywhere on it",
            "flagged_states": listing(criticals["reasons"])}),
    }
    now = datetime.now(timezone.utc).replace(microsecond=0).isoformat()
    config = yaml.safe_load(provenance.get("config_yaml") or "") or {}
    attrs = {
        "Conventions": "CF-1.10",
        "title": f"Bound states of the {family_title(family)} potential over "
                 f"{' x '.join(d.replace('_', ' ') for d in cell_dims)} (sweep {provenance['sweep']})",
        # CF: who produced the data. Only the config can say; absent otherwise.
        **({"institution": config["institution"]} if isinstance(config, dict) and config.get("institution") else {}),
        "source": f"boundscape {provenance['version']} radial engine (bound_levels, "
                  "critical_screening_length)",
        "history": f"{now} {provenance['history']}",
        "references": "units: CODATA values from scipy.constants",
        "comment": "atomic units: energies in hartree, lengths in bohr, mass in electron masses; each variable's "
                   "energy_unit_in_J, energy_unit_in_eV or length_unit_in_m gives its unit",
        "boundscape_version": provenance["version"],
        "sweep": provenance["sweep"],
        "family": family,
        "mass": float(provenance["mass"]),
        "mass_units": "electron masses",
        "n_r_max": np.int32(axes["n_r_max"]),
        "energy_unit_in_J": HARTREE_J,
        "energy_unit_in_eV": HARTREE_EV,
        "length_unit_in_m": BOHR_M,
        "config_yaml": provenance["config_yaml"],
        "config_sha256": provenance["config_sha256"],
        "git_commit": provenance.get("git_commit") or "unknown",
        "date_created": now,
    }
    return xr.Dataset(data_vars, coords, attrs)
