"""What the commands share: the potential's options, building it from them, and how a
potential is described in the JSON and the table title."""

from __future__ import annotations

import argparse

from ..engine import FAMILIES, ParameterError, family_info, potential_from_spec
from ..engine.limits import check_l
from ..errors import InputError
from ..physics.presets.strengths import PARAMETER_DIMENSIONS
from .readings import add_preset_arguments, engine_strength, reading_of

__all__ = ["parse_l_values", "parse_params", "potential_args", "make_potential"]


def parse_l_values(text: str) -> list[int]:
    """'0-3' → [0, 1, 2, 3]; '0,2,5' → [0, 2, 5]; '4' → [4]."""
    spans: list[tuple[int, int]] = []
    try:
        for part in text.split(","):
            part = part.strip()
            if "-" in part[1:]:
                a, b = part.split("-", 1)
                spans.append((int(a), int(b)))
                if spans[-1][1] < spans[-1][0]:
                    raise InputError(f"--l range {part!r} runs backwards")
            else:
                spans.append((int(part), int(part)))
    except ValueError as exc:
        if isinstance(exc, InputError):
            raise
        raise InputError(f"--l must be integers like 0-3 or 0,2,5, got {text!r}") from None
    if any(lo < 0 for lo, _ in spans):
        raise InputError(f"--l values must be non-negative, got {text!r}")
    check_l(max(hi for _, hi in spans))  # before any range is expanded: '0-10**12' must not fill memory
    return sorted({l for lo, hi in spans for l in range(lo, hi + 1)})


def potential_args(p: argparse.ArgumentParser, *, levels: bool, l_values: bool = True):
    p.add_argument("--family", required=True, help=f"potential family: {', '.join(sorted(FAMILIES))}")
    p.add_argument("--strength", type=float, default=None,
                   help="required: Z (charge number; for an ion, its nuclear charge); a depth V0 (square_well, "
                        "woods_saxon) in hartree, or in the preset's energy unit (eV, meV, MeV); ω in hartree/ħ "
                        "(harmonic); scale factor (tabulated, default 1)")
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
    p.add_argument("--param", action="append", default=[], metavar="NAME=VALUE",
                   help="a family's own parameter, repeatable, e.g. --param diffuseness=0.5 (woods_saxon, a length "
                        "in --length-unit); "
                        "--param core_strength=2 --param core_range=0.5 (two_yukawa)")
    p.add_argument("--format", choices=("table", "json"), default="table", help="output format (default table)")
    add_preset_arguments(p)


def parse_params(family: str, given: list[str], flagged: dict) -> dict:
    """``--param NAME=VALUE`` options as {name: number}, checked against ``family``'s own
    parameters (``flagged``: the parameters other flags set, which --param must not repeat)."""
    info = family_info(family)
    out: dict = {}
    for text in given:
        name, sep, value = text.partition("=")
        name = name.strip()
        if not sep or not name:
            raise InputError(f"--param must be NAME=VALUE, got {text!r}")
        if name in out:
            raise InputError(f"--param {name} given twice; keep one")
        if name in flagged:
            raise InputError(f"--param {name}: give it with --{name.replace('_', '-')}, its own flag")
        if name not in {q.name for q in info.parameters}:
            raise info.unknown(name, " (--param)")
        try:
            out[name] = float(value)
        except ValueError:
            raise InputError(f"--param {name}={value}: the value must be a number") from None
    return out


def engine_parameters(args, reading, given: dict) -> dict:
    """The family's own parameters given with ``--param`` in the engine's units: lengths read in
    ``--length-unit`` (fm under the nuclear preset), dimensionless ones as given."""
    units = {q.name: q.unit for q in family_info(args.family).parameters}
    out = {}
    for name, value in given.items():
        dimension = PARAMETER_DIMENSIONS.get(units[name])
        if dimension == "length":
            out[name] = reading.engine_length(value, args.length_unit)
        elif dimension == "1":
            out[name] = value
        else:  # no family declares one yet: say so rather than guess a unit
            raise InputError(f"--param {name} is in {units[name]}, which the command line cannot read yet")
    return out


def make_potential(args, strength, screening_length):
    flagged = {"table": args.table, "screened": getattr(args, "screened", False), "coulomb_tail": args.coulomb_tail}
    own = parse_params(args.family, getattr(args, "param", []), {"family", "mass", *flagged})
    own = engine_parameters(args, reading_of(args), own)
    spec = {"family": args.family, "mass": 1.0 if args.mass is None else args.mass, **flagged, **own}
    try:
        return potential_from_spec(spec, strength, screening_length)
    except ParameterError as exc:
        if exc.parameter in flagged or exc.parameter in own:
            raise
        raise InputError(f"{exc}: give --param {exc.parameter}=VALUE") from None
