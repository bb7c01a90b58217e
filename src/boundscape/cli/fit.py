"""``boundscape fit``: the value of one parameter at which a state's energy, the scattering length
or the effective range takes a target, the others fixed.

    boundscape fit --family yukawa --preset nuclear --reduced-mass 469.459 --screening-length 1.4 \\
                   --length-unit fm --vary coupling --state 1s --energy -2.2246
    boundscape fit --family yukawa --strength 1 --vary screening-length --state 2p --energy -0.05

Targets are read in the shown units (``--energy`` in hartree, or the preset's eV, meV or MeV;
``--scattering-length`` and ``--effective-range`` in ``--length-unit``, like
``--screening-length``), and the result is printed in them: the parameter, its error estimate,
and the observables recomputed at it.  Wired into the main command by ``fit.register(subparsers)``.
"""

from __future__ import annotations

import json
import math

from ..engine import OutOfReach, solve_for
from ..errors import InputError
from ..labels import orbital_letter
from .options import make_potential, potential_args
from .readings import describe, engine_length, engine_strength, reading_of, significant, strength_reading, title

__all__ = ["register", "run"]

VARY = ("strength", "coupling", "nuclear-charge", "screening-length")


def register(subparsers):
    """Add the ``fit`` subcommand to what ``ArgumentParser.add_subparsers()`` returned."""
    parser = subparsers.add_parser(
        "fit", help="the parameter value at which a state's energy, a or r_e takes a target",
        description="Solve for one parameter (--vary) at which an observable takes a target, the others fixed: the "
                    "energy of a named state (--state 1s --energy E), the scattering length (--scattering-length; "
                    "--state names the branch on which that state is the shallowest bound one) or the effective "
                    "range (--effective-range, l = 0). The root is bracketed by the exact critical values, so it "
                    "is the named state's, never a neighbour's. Short-range potentials only.")
    potential_args(parser, levels=True, l_values=False)
    parser.add_argument("--vary", required=True, choices=VARY,
                        help="the parameter solved for: strength (--strength's Z, depth or ω), coupling (--preset "
                             "nuclear's g²), nuclear-charge (--preset plasma's Z) or screening-length (λ, or a well's "
                             "radius); leave its own flag out")
    parser.add_argument("--state", default=None, help="the state, e.g. 1s or 2p (required with --energy)")
    parser.add_argument("--l", type=int, default=None,
                        help="angular momentum of a scattering-length target without --state (default 0)")
    target = parser.add_mutually_exclusive_group(required=True)
    target.add_argument("--energy", type=float, default=None,
                        help="target energy of --state, < 0, in the shown energy unit (hartree; eV, meV, MeV)")
    target.add_argument("--scattering-length", type=float, default=None,
                        help="target scattering length a (l = 0) or a_l, in --length-unit (bohr by default)")
    target.add_argument("--effective-range", type=float, default=None,
                        help="target effective range r_e (l = 0), in --length-unit (bohr by default)")
    parser.set_defaults(func=run, parser=parser)
    return parser


def _strength_key(reading, name):
    # "coupling" reads as the preset's grid axis of that name ("coupling_MeV_fm"), else as given
    return next((axis for axis in reading.trade.grid_axes if axis.startswith(name)), name)


def _with_error(key):
    # "coupling_MeV_fm" → "coupling_error_MeV_fm", "screening_length_fm" → "screening_length_error_fm"
    for unit_tail in ("_MeV_fm", "_bohr", "_fm", "_nm", "_a*", "_MeV", "_meV", "_eV"):
        if key.endswith(unit_tail):
            return key[: -len(unit_tail)] + "_error" + unit_tail
    return key + "_error"


def _label(key):
    # "coupling_MeV_fm" → "coupling (MeV fm)", "screening_length_fm" → "screening length (fm)"
    for unit_tail in ("_MeV_fm", "_bohr", "_fm", "_nm", "_a*", "_MeV", "_meV", "_eV"):
        if key.endswith(unit_tail):
            return f"{key[: -len(unit_tail)].replace('_', ' ')} ({unit_tail[1:].replace('_', ' ')})"
    return key.replace("_", " ")


def _start(args, reading):
    """(potential to start from, engine name of the parameter, how to show a value of it: key,
    factor from engine units, text for a header)."""
    trade = reading.trade
    taken = strength_reading(args, reading) if args.vary != "screening-length" else None
    flag = taken.flag if taken else trade.strength_flag
    lam, _ = engine_length(args, reading)  # --screening-length, or the preset's --range, --density
    if args.vary in ("strength", "coupling", "nuclear-charge"):
        if f"--{args.vary}" != flag:
            where = (f"with --preset {trade.kind}" if trade.kind else "without a preset") + \
                (f" for family {args.family}" if flag != trade.strength_flag else "")
            raise InputError(f"--vary {args.vary} does not apply {where}: the strength there is {flag} "
                             f"({taken.meaning}); use --vary {flag[2:]}")
        if getattr(args, flag[2:].replace("-", "_")) is not None:
            raise InputError(f"{flag} is what --vary {args.vary} solves for: leave it out")
        per_shown = taken.per_shown  # engine strength per shown unit (a linear reading)
        pot = make_potential(args, per_shown, lam)
        # a depth or ħω in the trade's energy unit (depth_MeV), else the preset's own key (coupling_MeV_fm)
        own_key = taken.unit is not None and taken.quantity != "coupling"
        key = f"{taken.quantity}_{taken.unit.replace(' ', '_')}" if own_key else _strength_key(reading, args.vary)

        def text(engine):
            return taken.text(engine / per_shown) if taken.header else trade.strength_input(engine / per_shown)[1]

        return pot, "strength", key, 1.0 / per_shown, text
    if lam is not None:
        raise InputError("--screening-length is what --vary screening-length solves for: leave it out (and the "
                         "preset's conditions that set it)")
    strength, strength_text = engine_strength(args, reading)
    pot = make_potential(args, strength, 1.0)

    def same(_engine):
        return strength_text

    return pot, "screening_length", f"screening_length_{reading.length_unit}", reading.length_factor, same


def run(args) -> int:
    """Solve and print what ``args`` asks for; raises :class:`InputError` on bad input."""
    reading = reading_of(args)
    e_unit, r_unit = reading.energy_unit, reading.length_unit
    ef, rf = reading.energy_factor, reading.length_factor
    atomic = reading.preset is None and e_unit == "hartree"
    pot, name, key, factor, strength_text = _start(args, reading)
    if args.energy is not None:
        if args.state is None:
            raise InputError("--energy needs --state, the state it belongs to (e.g. 1s)")
        if not args.energy < 0:
            raise InputError(f"--energy must be negative (a bound state), got {args.energy:g} {e_unit}")
        target, shown_target = {"energy": args.energy / ef}, {f"energy_{e_unit}": args.energy}
    elif args.scattering_length is not None:
        value = args.scattering_length
        target = {"scattering_length": reading.engine_length(value, args.length_unit)}
        shown_target = {f"scattering_length_{args.length_unit}": value}
    else:
        value = args.effective_range
        target = {"effective_range": reading.engine_length(value, args.length_unit)}
        shown_target = {f"effective_range_{args.length_unit}": value}
    try:
        fit = solve_for(pot, name, state=args.state, l=args.l, **target)
    except OutOfReach as exc:
        unit, scale = (e_unit, ef) if exc.observable == "energy" else (r_unit, rf)
        where = None if exc.parameter_value is None else f"{key} = {exc.parameter_value * factor:.6g}"
        exc.where = exc.where.replace(f"varying {name}", f"varying {args.vary}")  # as the command line names it
        raise InputError(exc.describe(unit, scale, where)) from None

    def number(x, f, digits=13):
        if x is None or not math.isfinite(x):
            return None
        return float(x) if atomic else significant(float(x) * f, digits)

    sc = fit.scattering
    out = {key: number(fit.value, factor), _with_error(key): number(fit.error, factor, 3), "vary": args.vary,
           "potential": describe(fit.potential, reading, strength_text(fit.potential.strength)),
           "state": fit.state, "l": fit.l, "target": shown_target}
    if fit.n_r is not None:
        out.update({f"energy_{e_unit}": number(fit.energy, ef, 15), f"energy_error_{e_unit}": number(fit.energy_error, ef, 3)})
    out.update({f"scattering_length_{r_unit}": number(sc.length, rf),
                f"scattering_length_error_{r_unit}": number(sc.length_error, rf, 3),
                f"effective_range_{r_unit}": number(sc.effective_range, rf),
                f"effective_range_error_{r_unit}": number(sc.effective_range_error, rf, 3),
                "num_bound": fit.num_bound, "status": "ok" if fit.status == 0 else "not_converged",
                "reason": reading.shown(fit.reason)})
    if args.format == "json":
        print(json.dumps(out, indent=2))
        return 0
    _table(fit, out, reading, strength_text, key, e_unit, r_unit)
    return 0


def _table(fit, out, reading, strength_text, key, e_unit, r_unit):
    print(f"# fit: {title(fit.potential, reading, strength_text(fit.potential.strength))}")
    (target_key, target_value), = out["target"].items()
    observable = target_key.rsplit("_", 1)[0].replace("_", " ")
    unit = target_key.rsplit("_", 1)[1]
    whose = f"{fit.state} " if fit.observable == "energy" else ""
    print(f"# vary {out['vary']} so that the {whose}{observable} is {target_value:g} {unit}")
    rows = [(_label(key), out[key], out[_with_error(key)])]
    if fit.n_r is not None:
        rows.append((f"E({fit.state}) ({e_unit})", out[f"energy_{e_unit}"], out[f"energy_error_{e_unit}"]))
    rows.append((f"{'a' if fit.l == 0 else f'a_{fit.l}'} ({r_unit})", out[f"scattering_length_{r_unit}"],
                 out[f"scattering_length_error_{r_unit}"]))
    if fit.l == 0:
        rows.append((f"r_e ({r_unit})", out[f"effective_range_{r_unit}"], out[f"effective_range_error_{r_unit}"]))
    for name, value, error in rows:
        print(f"{name:<28} {value:>22.13g}  ± {error:.3g}")
    print(f"{f'bound {orbital_letter(fit.l)} states':<28} {fit.num_bound:>22}")
    print(f"{'status':<28} {out['status']:>22}{'  (' + out['reason'] + ')' if out['reason'] else ''}")
