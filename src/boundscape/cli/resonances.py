"""``boundscape resonances``: what each state a potential no longer binds has become.

    boundscape resonances --family yukawa --strength 1 --screening-length 4.3 --l 0-3 [--n-max N]
    boundscape resonances --family yukawa --preset nuclear --reduced-mass 469.459 --coupling 30 --range 2 --l 0-1

Wired into the main command by ``resonances.register(subparsers)``; the options and the
potential's description are the ones ``levels`` uses (:mod:`.options`).  The handler is stored
as ``func`` and returns the exit status.
"""

from __future__ import annotations

import json
import math

from ..engine import RESONANCE_STATUS, resonances
from ..errors import InputError
from ..labels import orbital_letter
from ..physics.units import HARTREE_EV
from .options import make_potential, parse_l_values, potential_args
from .readings import describe, engine_length, engine_strength, reading_of, significant, title

__all__ = ["register", "run"]


def register(subparsers):
    """Add the ``resonances`` subcommand to what ``ArgumentParser.add_subparsers()`` returned."""
    parser = subparsers.add_parser(
        "resonances", help="what each lost state becomes: shape resonance (l ≥ 1) or virtual state (l = 0)",
        description="Every state the potential no longer binds, continued past its threshold: the shape "
                    "resonance E_r − iΓ/2 (l ≥ 1) or the virtual state k = −iκ_v (l = 0), with a status "
                    "(ok; dissolved when Γ > E_r or the pole is out of reach; not_converged).  Short-range "
                    "potentials only.  Atomic units (hartree, bohr, electron masses), or a preset's: plasma eV and "
                    "nm, semiconductor meV and nm, nuclear MeV and fm.")
    potential_args(parser, levels=True)
    parser.add_argument("--n-max", type=int, default=None,
                        help="states with principal quantum number n ≤ N (default: the 4 states after the bound ones)")
    parser.set_defaults(func=run, parser=parser)
    return parser


def _number(x):
    return None if x is None or not math.isfinite(x) else float(x)


def run(args) -> int:
    """Print the lost states asked for in ``args``; raises :class:`InputError` on bad input."""
    ls = parse_l_values(args.l)
    if args.n_max is not None and args.n_max < 1:
        raise InputError(f"--n-max must be at least 1, got {args.n_max}")
    reading = reading_of(args)
    strength, strength_text = engine_strength(args, reading)
    lam, conditions = engine_length(args, reading)
    pot = make_potential(args, strength, lam)
    atomic = reading.trade.kind is None and reading.energy_unit == "hartree"
    e_unit, e_factor = ("hartree", 1.0) if atomic else (reading.energy_unit, reading.energy_factor)
    r_unit, r_factor = ("bohr", 1.0) if atomic else (reading.length_unit, reading.length_factor)
    rows, counts = [], {}
    for l in ls:
        n_r_max = None if args.n_max is None else max(args.n_max - l, 0)
        res = resonances(pot, l, n_r_max=n_r_max)
        counts[l] = res.num_bound
        virtual = res.kind == "virtual"
        for i in range(len(res.n_r)):
            energy, width, kappa = _number(res.energy[i]), _number(res.width[i]), _number(res.kappa[i])
            rows.append({
                "n": int(res.n[i]), "l": l, "n_r": int(res.n_r[i]), "state": res.labels[i], "kind": res.kind,
                f"energy_{e_unit}": _scaled(energy, e_factor, atomic),
                f"width_{e_unit}": None if virtual else _scaled(width, e_factor, atomic),
                f"kappa_per_{r_unit}": _scaled(kappa, 1.0 / r_factor, atomic) if virtual else None,
                "status": RESONANCE_STATUS[int(res.status[i])], "reason": reading.shown(res.reason[i]),
                "_error": _scaled(_number(res.energy_error[i]), e_factor, atomic),
            })
    if args.format == "json":
        shown = [{k: v for k, v in row.items() if not k.startswith("_")} for row in rows]
        print(json.dumps({"potential": describe(pot, reading, strength_text, conditions), "resonances": shown},
                         indent=2))
        return 0
    print(f"# {title(pot, reading, strength_text, conditions)}")
    second = ("E (eV)", 18) if atomic else None
    print(f"{'n':>3} {'l':>4} {'state':>6} {'kind':>10} {f'E ({e_unit})':>22} "
          + (f"{second[0]:>{second[1]}} " if second else "")
          + f"{f'Γ ({e_unit})':>16} {f'κ_v (1/{r_unit})':>16} {f'error ({e_unit})':>16}  status")
    for row in rows:
        energy = row[f"energy_{e_unit}"]
        extra = f"{_cell(None if energy is None else energy * HARTREE_EV, 18, '.11g')} " if second else ""
        print(f"{row['n']:>3} {row['l']:>2} {orbital_letter(row['l']):>1} {row['state']:>6} {row['kind']:>10} "
              f"{_cell(energy, 22, '.15g' if atomic else '.12g')} {extra}"
              f"{_cell(row[f'width_{e_unit}'], 16, '.10g')} {_cell(row[f'kappa_per_{r_unit}'], 16, '.10g')} "
              f"{_cell(row['_error'], 16, '.3g')}  {row['status']}{' (' + row['reason'] + ')' if row['reason'] else ''}")
    for l, c in counts.items():
        print(f"# l={l} ({orbital_letter(l)}): {c} bound states; the states listed are past their thresholds")
    if any(row["kind"] == "virtual" for row in rows):
        print("# a virtual state's E is −κ_v²/2μ on the unphysical sheet (k = −iκ_v): not a bound level")
    if not rows:
        print("# no lost states with n ≤ --n-max for these l")
    return 0


def _scaled(value, factor, atomic):
    # Atomic units keep every digit the engine gives; a trade's unit is a derived number (13 digits).
    if value is None:
        return None
    return value if atomic else significant(value * factor)


def _cell(value, width, spec):
    return f"{'—':>{width}}" if value is None else f"{value:>{width}{spec}}"
