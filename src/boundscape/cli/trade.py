"""Critical values in a trade's terms on the command line: where a state is lost as a density
(plasma, at ``--temperature``; semiconductor, at ``--temperature-K``, with n_c^{1/3} a* beside
Mott's criterion).  (The critical coupling at a range, ``critical --range``, is ``critical --vary
strength`` in :mod:`.main`.)"""

from __future__ import annotations

import math

from .readings import flag_value, length_reader, significant

__all__ = ["trade_columns", "trade_notes", "print_table", "MOTT_CRITERION"]

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
    reader = length_reader(args, reading)  # the screening length's model, or a plasma's ion sphere
    if reader is None:  # a well's radius: no density sets it
        return {}
    columns = reader.critical_columns(critical_length * reading.units.length_m)
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
