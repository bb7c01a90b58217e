"""``boundscape lines``: the E1 lines between the bound levels of one potential.

    boundscape lines --family yukawa --strength 1 --screening-length 10 --n-max 3 [--l-max L]
    boundscape lines --family yukawa --preset plasma --nuclear-charge 2 --density 1e22 --temperature 20 --n-max 3

Wired into the main command by ``lines.register(subparsers)``; the options and the potential's
description are the ones ``levels`` uses (:mod:`.options`).  The handler is stored as ``func``
and returns the exit status.
"""

from __future__ import annotations

import json

from scipy import constants

from ..engine import lines
from ..errors import InputError
from ..physics.units import HARTREE_EV
from .options import make_potential, potential_args
from .readings import describe, engine_length, engine_strength, reading_of, significant, title

__all__ = ["register", "run"]

ATOMIC_COLUMNS = [("ΔE (hartree)", "energy_hartree", 20, ".13g"), ("ΔE (eV)", "_energy_eV", 16, ".10g"),
                  ("λ (nm)", "wavelength_nm", 16, ".10g"), ("|<r>| (bohr)", "radial_integral_bohr", 16, ".10g"),
                  ("f", "oscillator_strength", 14, ".8g"), ("A (1/s)", "einstein_A_per_s", 14, ".8g")]
# How a preset's line units read out of ΔE in joules: (column title, JSON key, value).
SHOWN = {"nm": ("λ (nm)", "wavelength_nm", lambda joules: constants.h * constants.c / joules / constants.nano),
         "cm-1": ("ν̃ (1/cm)", "wavenumber_per_cm", lambda joules: joules / (constants.h * constants.c) / 100.0),
         "THz": ("ν (THz)", "frequency_THz", lambda joules: joules / constants.h / 1e12)}


def register(subparsers):
    """Add the ``lines`` subcommand to what ``ArgumentParser.add_subparsers()`` returned."""
    parser = subparsers.add_parser(
        "lines", help="the electric-dipole lines between bound levels",
        description="Every electric-dipole (E1, Δl = ±1) line between bound levels with n ≤ --n-max: ΔE, the "
                    "vacuum wavelength, the radial integral |<n'l'|r|nl>|, the absorption oscillator strength f "
                    "and the Einstein A of the upper → lower decay, with a status.  A line whose upper or lower "
                    "level is not bound is absent.  Atomic units (hartree, bohr, electron masses), or a preset's: "
                    "plasma eV and nm; semiconductor meV, 1/cm and THz; nuclear MeV and fm.")
    potential_args(parser, levels=True, l_values=False)
    parser.add_argument("--n-max", type=int, required=True,
                        help="required: levels with principal quantum number n ≤ N (n = n_r + l + 1), N ≥ 2")
    parser.add_argument("--l-max", type=int, default=None, help="levels with l ≤ L only (default N − 1)")
    parser.set_defaults(func=run, parser=parser)
    return parser


def _in_trade_units(found, reading):
    """The lines as the preset reads them: ΔE in its energy unit and the line units it declares,
    the radial integral in its length unit, f; A only where the engine ran in atomic units (it is
    a vacuum rate with ΔE in hartree; in a crystal it needs the refractive index as well)."""
    units = reading.units
    atomic = units.name == "atomic"
    rows, columns = [], [(f"ΔE ({reading.energy_unit})", f"energy_{reading.energy_unit}", 18, ".12g")]
    for unit in reading.trade.line_units[1:]:
        name, key, _ = SHOWN[unit]
        columns.append((name, key, 16, ".10g"))
    columns += [(f"|<r>| ({reading.length_unit})", f"radial_integral_{reading.length_unit}", 16, ".10g"),
                ("f", "oscillator_strength", 14, ".8g")]
    if atomic:
        columns.append(("A (1/s)", "einstein_A_per_s", 14, ".8g"))
    for i in range(len(found)):
        joules = float(found.energy[i]) * units.energy_J
        row = {"lower": found.lower[i], "upper": found.upper[i],
               f"energy_{reading.energy_unit}": significant(float(found.energy[i]) * reading.energy_factor)}
        for unit in reading.trade.line_units[1:]:
            _, key, value = SHOWN[unit]
            row[key] = significant(float(value(joules)))
        row[f"radial_integral_{reading.length_unit}"] = significant(float(found.radial_integral[i]) * reading.length_factor)
        row["oscillator_strength"] = float(found.oscillator_strength[i])
        if atomic:
            row["einstein_A_per_s"] = float(found.einstein_A[i])
        row["status"] = "ok" if found.status[i] == 0 else "not_converged"
        rows.append(row)
    return rows, columns


def run(args) -> int:
    """Print the lines asked for in ``args``; raises :class:`InputError` on bad input."""
    if args.n_max < 2:
        raise InputError(f"--n-max must be at least 2 (a line joins two levels), got {args.n_max}")
    if args.l_max is not None and args.l_max < 1:
        raise InputError(f"--l-max must be at least 1 (a line joins l and l + 1), got {args.l_max}")
    reading = reading_of(args)
    strength, strength_text = engine_strength(args, reading)
    lam, conditions = engine_length(args, reading)
    pot = make_potential(args, strength, lam)
    found = lines(pot, args.n_max, l_max=args.l_max)
    if reading.trade.kind is None:
        rows, columns = found.rows(), ATOMIC_COLUMNS
        for row in rows:
            row["_energy_eV"] = row["energy_hartree"] * HARTREE_EV
    else:
        rows, columns = _in_trade_units(found, reading)
    if args.format == "json":
        shown = [{k: v for k, v in row.items() if not k.startswith("_")} for row in rows]
        out = {"potential": describe(pot, reading, strength_text, conditions), "lines": shown}
        if reading.trade.kind is not None and "einstein_A_per_s" not in columns[-1]:
            out["note"] = ("no Einstein A: the engine's rate is a vacuum rate with energies in hartree; in these units "
                           "it would need the medium's refractive index and the carriers' effective charge")
        print(json.dumps(out, indent=2))
        return 0
    print(f"# {title(pot, reading, strength_text, conditions)}")
    print(f"{'lower':>6} {'upper':>6} " + " ".join(f"{name:>{width}}" for name, _, width, _ in columns) + "  status")
    for i, row in enumerate(rows):
        values = " ".join(f"{row[key]:>{width}{fmt}}" for _, key, width, fmt in columns)
        reason = reading.shown(found.reason[i])
        print(f"{row['lower']:>6} {row['upper']:>6} {values}  {row['status']}{' (' + reason + ')' if reason else ''}")
    if not rows:
        print(f"# no lines: fewer than two bound levels with n ≤ {args.n_max} differ by one in l")
    else:
        print(f"# {len(rows)} lines between bound levels with n ≤ {args.n_max}; f is the absorption oscillator "
              "strength of lower → upper" + (", A the decay rate of upper → lower" if columns[-1][1] ==
                                            "einstein_A_per_s" else "; no A outside atomic units (a vacuum rate)"))
    return 0
