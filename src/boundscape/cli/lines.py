"""``boundscape lines``: the E1 lines between the bound levels of one potential.

    boundscape lines --family yukawa --strength 1 --screening-length 10 --n-max 3 [--l-max L]

Wired into the main command by ``lines.register(subparsers)``; the options and the potential's
description are the ones ``levels`` uses (:mod:`.options`).  The handler is stored as ``func``
and returns the exit status.
"""

from __future__ import annotations

import json

from ..engine import lines
from ..errors import InputError
from ..physics.units import HARTREE_EV
from .options import atomic_potential, describe, potential_args, title

__all__ = ["register", "run"]

COLUMNS = [("ΔE (hartree)", "energy_hartree", 20, ".13g"), ("ΔE (eV)", "_energy_eV", 16, ".10g"),
           ("λ (nm)", "wavelength_nm", 16, ".10g"), ("|<r>| (bohr)", "radial_integral_bohr", 16, ".10g"),
           ("f", "oscillator_strength", 14, ".8g"), ("A (1/s)", "einstein_A_per_s", 14, ".8g")]


def register(subparsers):
    """Add the ``lines`` subcommand to what ``ArgumentParser.add_subparsers()`` returned."""
    parser = subparsers.add_parser(
        "lines", help="the electric-dipole lines between bound levels",
        description="Every electric-dipole (E1, Δl = ±1) line between bound levels with n ≤ --n-max: ΔE, the "
                    "vacuum wavelength, the radial integral |<n'l'|r|nl>|, the absorption oscillator strength f "
                    "and the Einstein A of the upper → lower decay, with a status.  A line whose upper or lower "
                    "level is not bound is absent.  Atomic units (hartree, bohr, electron masses).")
    potential_args(parser, levels=True, l_values=False)
    parser.add_argument("--n-max", type=int, required=True,
                        help="required: levels with principal quantum number n ≤ N (n = n_r + l + 1), N ≥ 2")
    parser.add_argument("--l-max", type=int, default=None, help="levels with l ≤ L only (default N − 1)")
    parser.set_defaults(func=run, parser=parser)
    return parser


def run(args) -> int:
    """Print the lines asked for in ``args``; raises :class:`InputError` on bad input."""
    if args.n_max < 2:
        raise InputError(f"--n-max must be at least 2 (a line joins two levels), got {args.n_max}")
    if args.l_max is not None and args.l_max < 1:
        raise InputError(f"--l-max must be at least 1 (a line joins l and l + 1), got {args.l_max}")
    pot, reading, strength_text = atomic_potential(args, "lines")
    found = lines(pot, args.n_max, l_max=args.l_max)
    rows = found.rows()
    if args.format == "json":
        print(json.dumps({"potential": describe(pot, reading, strength_text), "lines": rows}, indent=2))
        return 0
    print(f"# {title(pot, reading, strength_text)}")
    print(f"{'lower':>6} {'upper':>6} " + " ".join(f"{name:>{width}}" for name, _, width, _ in COLUMNS) + "  status")
    for i, row in enumerate(rows):
        row["_energy_eV"] = row["energy_hartree"] * HARTREE_EV
        values = " ".join(f"{row[key]:>{width}{fmt}}" for _, key, width, fmt in COLUMNS)
        reason = found.reason[i]
        print(f"{row['lower']:>6} {row['upper']:>6} {values}  {row['status']}{' (' + reason + ')' if reason else ''}")
    if not rows:
        print(f"# no lines: fewer than two bound levels with n ≤ {args.n_max} differ by one in l")
    else:
        print(f"# {len(rows)} lines between bound levels with n ≤ {args.n_max}; f is the absorption oscillator "
              "strength of lower → upper, A the decay rate of upper → lower")
    return 0
