"""The ``boundscape`` command: thin over the engine, the presets and the workflow.

    boundscape levels   --family yukawa --strength 1 --screening-length 10 --l 0-3
    boundscape critical --family yukawa --strength 1 --l 0-2
    boundscape convert  ...        (physical conditions <-> engine inputs)
"""

from __future__ import annotations

import argparse
import json
import math
import sys

from . import convert, resonances
from ..engine import FAMILIES, bound_levels, critical_screening_length, potential_from_spec
from ..errors import ConvergenceError, InputError
from ..labels import orbital_letter, state_label
from ..physics.units import HARTREE_EV
from ..version import VERSION


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


def _potential_args(p: argparse.ArgumentParser, needs_length: bool = True):
    p.add_argument("--family", required=True, help=f"potential family: {', '.join(sorted(FAMILIES))}")
    p.add_argument("--strength", type=float, default=1.0,
                   help="Z (charge number); depth in hartree (square_well); ω (harmonic); scale factor (tabulated)")
    if needs_length:
        p.add_argument("--screening-length", type=float, default=None,
                       help="λ in bohr (radius for square_well); not used by coulomb and harmonic")
    p.add_argument("--mass", type=float, default=1.0, help="reduced mass μ in electron masses (default 1)")
    p.add_argument("--l", default="0", help="angular momenta: 0-3, 0,2,5 or 1 (default 0)")
    p.add_argument("--table", default=None, help="tabulated family: CSV (r,V in bohr,hartree) or NetCDF with r, V")
    p.add_argument("--screened", action="store_true", help="tabulated family: multiply the table by exp(-r/λ)")
    p.add_argument("--coulomb-tail", type=float, default=None,
                   help="tabulated family: declare a -Z/r tail beyond the table with this Z")
    p.add_argument("--format", choices=("table", "json"), default="table", help="output format (default table)")


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="boundscape",
        description="Bound states of screened central potentials, in atomic units (hartree, bohr, electron masses).")
    parser.add_argument("--version", action="version", version=f"boundscape {VERSION}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", required=True)

    lv = sub.add_parser("levels", help="every bound level of one potential, per l",
                        description="Every bound level (E < 0) of one potential for each l, ascending.")
    _potential_args(lv)
    lv.add_argument("--n-r-max", type=int, default=None,
                    help="keep levels n_r < N (default: all; 20 for coulomb and harmonic)")
    lv.set_defaults(func=run_levels)

    cr = sub.add_parser("critical", help="critical screening length of each state",
                        description="The screening length λ_c (bohr) below which each state (n, l) is not bound.")
    _potential_args(cr, needs_length=False)
    cr.add_argument("--n-max", type=int, default=4, help="states with principal quantum number n ≤ N (default 4)")
    cr.set_defaults(func=run_critical)

    convert.register(sub)
    resonances.register(sub, potential_args=_potential_args, make_potential=_make_potential, describe=_describe, title=_title, parse_l=parse_l_values)
    return parser


def _make_potential(args, screening_length):
    spec = {"family": args.family, "mass": args.mass, "table": args.table, "screened": args.screened,
            "coulomb_tail": args.coulomb_tail}
    return potential_from_spec(spec, args.strength, screening_length)


def run_levels(args) -> int:
    ls = parse_l_values(args.l)
    pot = _make_potential(args, args.screening_length)
    rows, counts = [], {}
    for l in ls:
        res = bound_levels(pot, l, n_r_max=args.n_r_max)
        counts[l] = res.num_bound
        for i in range(len(res.energy)):
            rows.append({
                "n": int(res.n[i]), "l": l, "state": res.labels[i], "n_r": int(res.n_r[i]),
                "energy_hartree": float(res.energy[i]), "energy_eV": float(res.energy[i] * HARTREE_EV),
                "mean_radius_bohr": float(res.mean_radius[i]), "energy_error_hartree": float(res.energy_error[i]),
                "status": "ok" if res.status[i] == 0 else "not_converged", "reason": res.reason[i],
            })
    if args.format == "json":
        print(json.dumps({"potential": _describe(pot), "num_bound": {str(k): v for k, v in counts.items()},
                          "levels": rows}, indent=2, allow_nan=True))
        return 0
    print(f"# {_title(pot)}")
    print(f"{'n':>3} {'l':>4} {'state':>6} {'E (hartree)':>22} {'E (eV)':>18} {'<r> (bohr)':>16} {'error (hartree)':>16}  status")
    for row in rows:
        print(f"{row['n']:>3} {row['l']:>2} {orbital_letter(row['l']):>1} {row['state']:>6} {row['energy_hartree']:>22.15g} "
              f"{row['energy_eV']:>18.11g} {row['mean_radius_bohr']:>16.10g} {row['energy_error_hartree']:>16.3g}  "
              f"{row['status']}{' (' + row['reason'] + ')' if row['reason'] else ''}")
    for l, c in counts.items():
        text = "infinitely many" if c < 0 else str(c)
        print(f"# l={l} ({orbital_letter(l)}): {text} bound states")
    return 0


def run_critical(args) -> int:
    ls = parse_l_values(args.l)
    if args.n_max < 1:
        raise InputError(f"--n-max must be at least 1, got {args.n_max}")
    pot = _make_potential(args, 1.0)  # validates family and parameters
    rows = []
    for l in ls:
        for n in range(l + 1, args.n_max + 1):
            lam = critical_screening_length(args.family, args.strength, l, n - l - 1, args.mass,
                                            table=args.table, coulomb_tail=args.coulomb_tail)
            rows.append({"n": n, "l": l, "state": state_label(n, l), "n_r": n - l - 1,
                         "critical_screening_length_bohr": lam,
                         "critical_inverse_length_per_bohr": 0.0 if math.isinf(lam) else 1.0 / lam})
    if args.format == "json":
        print(json.dumps({"potential": _describe(pot, with_length=False), "states": rows}, indent=2))
        return 0
    print(f"# critical screening lengths, {args.family}, strength {args.strength:g}, mass {args.mass:g}")
    print(f"{'n':>3} {'l':>2} {'state':>6} {'lambda_c (bohr)':>22} {'1/lambda_c (1/bohr)':>22}")
    for row in rows:
        print(f"{row['n']:>3} {row['l']:>2} {row['state']:>6} {row['critical_screening_length_bohr']:>22.13g} "
              f"{row['critical_inverse_length_per_bohr']:>22.13g}")
    if not rows:
        print("# no states with n ≤ --n-max for these l")
    return 0


def _describe(pot, with_length=True):
    d = {"family": pot.family, "strength": pot.strength, "mass": pot.mass}
    if with_length and math.isfinite(pot.screening_length):
        d["screening_length_bohr"] = pot.screening_length
    return d


def _title(pot):
    lam = f", λ = {pot.screening_length:g} bohr" if math.isfinite(pot.screening_length) else ""
    return f"{pot.family}, strength {pot.strength:g}{lam}, mass {pot.mass:g} m_e (atomic units)"


def main(argv=None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        return int(args.func(args) or 0)
    except (InputError, ConvergenceError) as exc:
        print(f"boundscape: error: {exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("boundscape: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":
    sys.exit(main())
