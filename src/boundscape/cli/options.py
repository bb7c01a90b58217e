"""What the commands share: the potential's options, building it from them, and how a
potential is described in the JSON and the table title."""

from __future__ import annotations

import argparse
import math

from ..engine import FAMILIES, potential_from_spec
from ..errors import InputError
from .readings import add_preset_arguments, engine_strength, reading_of, significant

__all__ = ["parse_l_values", "potential_args", "make_potential", "describe", "title"]


def parse_l_values(text: str) -> list[int]:
    """'0-3' → [0, 1, 2, 3]; '0,2,5' → [0, 2, 5]; '4' → [4]."""
    out: list[int] = []
    try:
        for part in text.split(","):
            part = part.strip()
            if "-" in part[1:]:
                a, b = part.split("-", 1)
                lo, hi = int(a), int(b)
                if hi < lo:
                    raise InputError(f"--l range {part!r} runs backwards")
                out.extend(range(lo, hi + 1))
            else:
                out.append(int(part))
    except ValueError:
        raise InputError(f"--l must be integers like 0-3 or 0,2,5, got {text!r}") from None
    if any(l < 0 for l in out):
        raise InputError(f"--l values must be non-negative, got {text!r}")
    return sorted(set(out))


def potential_args(p: argparse.ArgumentParser, *, levels: bool, l_values: bool = True):
    p.add_argument("--family", required=True, help=f"potential family: {', '.join(sorted(FAMILIES))}")
    p.add_argument("--strength", type=float, default=None,
                   help="required: Z (charge number; for an ion, its nuclear charge); depth in hartree "
                        "(square_well); ω in hartree/ħ (harmonic); scale factor (tabulated, default 1)")
    if levels:
        p.add_argument("--screening-length", type=float, default=None,
                       help="λ in --length-unit, bohr by default (the radius for square_well); "
                            "not used by coulomb and harmonic")
    p.add_argument("--mass", type=float, default=None, help="reduced mass μ in electron masses (default 1)")
    if l_values:
        p.add_argument("--l", default="0", help="angular momenta: 0-3, 0,2,5 or 1 (default 0)")
    p.add_argument("--table", default=None, help="tabulated family: CSV (r,V in bohr,hartree) or NetCDF with r, V")
    if levels:
        p.add_argument("--screened", action="store_true", help="tabulated family: multiply the table by exp(-r/λ)")
    p.add_argument("--coulomb-tail", type=float, default=None,
                   help="tabulated family: declare a -Z/r tail beyond the table with this Z")
    p.add_argument("--format", choices=("table", "json"), default="table", help="output format (default table)")
    add_preset_arguments(p)


def make_potential(args, strength, screening_length):
    spec = {"family": args.family, "mass": 1.0 if args.mass is None else args.mass, "table": args.table,
            "screened": getattr(args, "screened", False), "coulomb_tail": args.coulomb_tail}
    return potential_from_spec(spec, strength, screening_length)


def describe(pot, reading, strength_text, with_length=True):
    d = {"family": pot.family, "strength": pot.strength, "mass": pot.mass}
    if reading.preset is not None or reading.length_unit != "bohr":
        d.update(units=reading.description, input=strength_text)
    if with_length and math.isfinite(pot.screening_length):
        if reading.length_unit == "bohr":
            d["screening_length_bohr"] = pot.screening_length
        else:
            d[f"screening_length_{reading.length_unit}"] = significant(pot.screening_length * reading.length_factor)
    return d


def title(pot, reading, strength_text, with_length=True):
    lam = ""
    if with_length and math.isfinite(pot.screening_length):
        shown = pot.screening_length * reading.length_factor
        lam = f", λ = {shown:.10g} {reading.length_unit}"
    mass = f", mass {pot.mass:g} m_e" if reading.preset is None else ""
    return f"{pot.info.display_name}, {strength_text}{lam}{mass} ({reading.description})"


def atomic_potential(args, command: str):
    """(potential, reading, strength text) of a command that prints atomic units only (its JSON keys
    say hartree and bohr); a preset, or energies in a trade's unit, is refused in one line."""
    reading = reading_of(args)
    if reading.preset is not None or reading.energy_unit != "hartree":
        raise InputError(f"{command} prints atomic units (hartree, bohr): leave out --preset, and give "
                         "--screening-length in bohr or with --length-unit")
    strength, strength_text = engine_strength(args, reading)
    lam = None if args.screening_length is None else reading.engine_length(args.screening_length, args.length_unit)
    return make_potential(args, strength, lam), reading, strength_text
