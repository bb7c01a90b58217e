"""Critical values in a trade's terms on the command line: where a state is lost as a density
(plasma, at ``--temperature``; semiconductor, at ``--temperature-K``, with n_c^{1/3} a* beside
Mott's criterion), and the critical coupling at a range (nuclear, ``critical --range``)."""

from __future__ import annotations

import json
import math

from ..engine import critical_strength
from ..errors import InputError
from ..labels import state_label
from .options import make_potential
from .readings import flag_value, describe, engine_length, significant, title

__all__ = ["trade_columns", "trade_notes", "print_table", "critical_strengths", "MOTT_CRITERION"]

# Mott's criterion of the metal–insulator transition of a doped crystal, n_c^{1/3} a* ≈ 0.25
# (Mott, Metal–Insulator Transitions, 1974; Edwards & Sienko, Phys. Rev. B 17, 2575 (1978) fit
# 0.26 ± 0.05 over many materials; values from memory).
MOTT_CRITERION = 0.25


def trade_columns(args, reading, critical_length) -> dict:
    """The density at which a state of critical length ``critical_length`` (engine units) is lost,
    and the screening model's validity there; ``{}`` unless the preset's temperature was given
    (the loss density depends on it, and no temperature is assumed)."""
    preset = reading.trade
    if preset.temperature_flag is None or flag_value(args, preset.temperature_flag) is None:
        return {}
    columns = preset.critical_columns(critical_length * reading.units.length_m)
    return {key: significant(value) if isinstance(value, float) else value for key, value in columns.items()}


def trade_notes(args, reading, rows) -> dict:
    """What the table needs said beside it: n_c^{1/3} a* against Mott's criterion, and why they differ."""
    ground = next((row for row in rows if "mott_parameter" in row and math.isfinite(row["mott_parameter"])), None)
    if ground is None:
        return {}
    preset = reading.trade
    return {"mott_criterion": MOTT_CRITERION,
            "note": (f"n_c^(1/3) a* of {ground['state']}: {ground['mott_parameter']:.3g} in this model "
                     f"({preset.screening} screening at T = {preset.reference_temperature:g} K), against Mott's "
                     f"{MOTT_CRITERION}: Mott's criterion sets the Thomas-Fermi length equal to a*, while a Yukawa "
                     "potential keeps its 1s bound down to 0.84 a* (so the same reasoning gives 0.36 at T = 0), and "
                     "finite temperature screens less; the measured metal-insulator transition is a property of the "
                     "donor band (overlap, disorder, correlation), not of one screened donor")}


def print_table(rows, first=("n", "l", "state")):
    """Rows of dicts as an aligned table: ``first`` columns, then the rest in order."""
    if not rows:
        return
    keys = list(first) + [key for key in rows[0] if key not in first]
    width = {key: max(len(key), 6) + 2 for key in keys}
    print(" ".join(f"{key:>{width[key]}}" for key in keys))
    for row in rows:
        cells = []
        for key in keys:
            value = row.get(key, "")
            shown = f"{value:.10g}" if isinstance(value, float) else str(value)
            cells.append(f"{shown:>{width[key]}}")
        print(" ".join(cells))


def critical_strengths(args, reading, ls) -> int:
    """``critical`` given the preset's screening condition (``--range``): each state's critical
    strength there, in the trade's units (the nuclear g²_c in MeV fm)."""
    preset = reading.trade
    lam, conditions = engine_length(args, reading)
    if flag_value(args, preset.strength_flag) is not None:
        raise InputError(f"{preset.strength_flag} does not apply with {preset.length_flag[0]}: critical gives the "
                         f"critical {preset.strength_meaning} at that {preset.length_flag[0].lstrip('-')}")
    probe = make_potential(args, 1.0, lam)
    name, attrs = preset.critical_strength_variable()
    key = f"{name}_{attrs['units'].replace(' ', '_')}" if attrs.get("units", "1") != "1" else name
    rows = []
    for l in ls:
        for n in range(l + 1, args.n_max + 1):
            value = critical_strength(args.family, lam, l, n - l - 1, probe.mass, **dict(probe.own))
            shown = float(preset.strength_values(value)) if math.isfinite(value) else math.inf
            rows.append({"n": n, "l": l, "state": state_label(n, l), "n_r": n - l - 1, key: significant(shown)})
    what = attrs["long_name"].split(" below")[0]
    if args.format == "json":
        print(json.dumps({"potential": describe(probe, reading, f"{what} of each state", conditions), "states": rows},
                         indent=2))
        return 0
    print(f"# {what} of each state, {title(probe, reading, probe.info.display_name, conditions)}")
    print_table(rows, ("n", "l", "state"))
    return 0
