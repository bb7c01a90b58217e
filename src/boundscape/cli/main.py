"""The ``boundscape`` command: thin over the engine, the presets and the workflow.

    boundscape levels   --family yukawa --strength 1 --screening-length 10 --l 0-3
    boundscape critical --family yukawa --strength 1 --l 0-2
    boundscape levels   --family yukawa --preset nuclear --reduced-mass 469.459 --coupling 50 \
                        --screening-length 1.4 --length-unit fm
    boundscape convert  ...        (physical conditions <-> engine inputs)
    boundscape lines    --family yukawa --strength 1 --screening-length 10 --n-max 3
"""

from __future__ import annotations

import argparse
import difflib
import json
import math
import os
import sys

from . import convert, fit, lines, populations, resonances, scattering
from .options import make_potential, parse_l_values, potential_args
from .progress import Progress
from .readings import describe, engine_length, engine_strength, reading_of, significant, strength_reading, title
from .trade import print_table, trade_columns, trade_notes
from ..engine import bound_levels, critical_screening_length, critical_strength, family_info
from ..engine.limits import MAX_CRITICAL_STATES, LimitError
from ..errors import ConvergenceError, InputError
from ..labels import orbital_letter, state_label
from ..physics.units import HARTREE_EV
from ..version import VERSION


LEVELS_DESCRIPTION = (
    "Every bound level of one potential for each l, ascending. Where V vanishes far out, the bound "
    "levels are those with E < 0. A Coulomb tail has infinitely many, and a confining family "
    "(harmonic) binds every level, all with E > 0: for those the lowest --n-r-max levels (default 20) "
    "are listed.")


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="boundscape",
        description="Bound states of screened central potentials, in atomic units (hartree, bohr, electron masses) "
                    "or a preset's (plasma, semiconductor, nuclear).")
    parser.add_argument("--version", action="version", version=f"boundscape {VERSION}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", required=True)

    lv = sub.add_parser("levels", help="every bound level of one potential, per l", description=LEVELS_DESCRIPTION)
    potential_args(lv, levels=True)
    lv.add_argument("--n-r-max", type=int, default=None,
                    help="keep levels n_r < N (default: all; 20 for coulomb and harmonic)")
    lv.set_defaults(func=run_levels, parser=lv)

    cr = sub.add_parser("critical", help="critical screening length (or strength) of each state",
                        description="The screening length λ_c below which each state (n, l) is not bound "
                                    "(a table is always screened by exp(-r/λ) here); with --vary strength, the "
                                    "strength below which it is not bound at a fixed --screening-length.")
    potential_args(cr, levels=False)
    cr.add_argument("--n-max", type=int, default=4, help="states with principal quantum number n ≤ N (default 4)")
    cr.add_argument("--vary", choices=("screening_length", "strength"), default="screening_length",
                    help="what is varied until each state is lost: the screening length at fixed --strength "
                         "(default), or the strength at fixed --screening-length")
    cr.add_argument("--screening-length", type=float, default=None,
                    help="with --vary strength: the fixed screening length, in --length-unit (bohr by default)")
    cr.set_defaults(func=run_critical, parser=cr)

    convert.register(sub)
    resonances.register(sub)
    lines.register(sub)
    scattering.register(sub)
    fit.register(sub)
    populations.register(sub)
    return parser


SHELL_LABELS = ("states are labelled n = n_r + l + 1, the atomic convention; the shell model's label is "
                "n_r + 1 (this table's 2p is its 1p, 3d its 1d)")


def _note(pot, n_r_max):
    if pot.tail == "confining":
        return (f"{pot.family} is confining: every level is bound and E > 0; the lowest {n_r_max or 20} per l "
                "are listed (--n-r-max)")
    if pot.tail == "coulomb":
        return f"a Coulomb tail binds infinitely many levels; the lowest {n_r_max or 20} per l are listed (--n-r-max)"
    return None


def run_levels(args) -> int:
    ls = parse_l_values(args.l)
    reading = reading_of(args)
    strength, strength_text = engine_strength(args, reading)
    lam, conditions = engine_length(args, reading)
    pot = make_potential(args, strength, lam)
    e_unit, r_unit = reading.energy_unit, reading.length_unit
    rows, counts = [], {}
    progress = Progress(len(ls), "levels, one l at a time")
    for l in ls:
        res = bound_levels(pot, l, n_r_max=args.n_r_max)
        progress.step(f"l = {l}")
        counts[l] = res.num_bound
        for i in range(len(res.energy)):
            row = {"n": int(res.n[i]), "l": l, "state": res.labels[i], "n_r": int(res.n_r[i])}
            if reading.preset is None and e_unit == "hartree":  # the atomic shape scripts rely on
                row.update(energy_hartree=float(res.energy[i]), energy_eV=float(res.energy[i] * HARTREE_EV),
                           mean_radius_bohr=float(res.mean_radius[i]),
                           energy_error_hartree=float(res.energy_error[i]))
            else:
                row.update({f"energy_{e_unit}": significant(float(res.energy[i] * reading.energy_factor), 15),
                            f"mean_radius_{r_unit}": significant(float(res.mean_radius[i] * reading.length_factor), 12),
                            f"energy_error_{e_unit}": significant(float(res.energy_error[i] * reading.energy_factor), 3)})
            row.update(status="ok" if res.status[i] == 0 else "not_converged", reason=reading.shown(res.reason[i]))
            rows.append(row)
    note = _note(pot, args.n_r_max)
    # Nuclear physicists number a shell by its radial nodes (1s, 1p, 1d): say which convention this is.
    labels = (SHELL_LABELS if reading.trade.kind == "nuclear" else None)
    if args.format == "json":
        out = {"potential": describe(pot, reading, strength_text, conditions),
               "num_bound": {str(k): v for k, v in counts.items()}, "levels": rows}
        if note:
            out["note"] = note
        if labels:
            out["state_labels"] = labels
        print(json.dumps(out, indent=2, allow_nan=True))
        return 0
    print(f"# {title(pot, reading, strength_text, conditions)}")
    for line in (note, labels):
        if line:
            print(f"# {line}")
    if reading.preset is None and e_unit == "hartree":
        columns = [("E (hartree)", "energy_hartree", 22, ".15g"), ("E (eV)", "energy_eV", 18, ".11g"),
                   ("<r> (bohr)", "mean_radius_bohr", 16, ".10g"), ("error (hartree)", "energy_error_hartree", 16, ".3g")]
    else:
        columns = [(f"E ({e_unit})", f"energy_{e_unit}", 22, ".13g"), (f"<r> ({r_unit})", f"mean_radius_{r_unit}", 16, ".10g"),
                   (f"error ({e_unit})", f"energy_error_{e_unit}", 16, ".3g")]
    print(f"{'n':>3} {'l':>4} {'state':>6} " + " ".join(f"{name:>{width}}" for name, _, width, _ in columns) + "  status")
    for row in rows:
        values = " ".join(f"{row[key]:>{width}{fmt}}" for _, key, width, fmt in columns)
        print(f"{row['n']:>3} {row['l']:>2} {orbital_letter(row['l']):>1} {row['state']:>6} {values}  "
              f"{row['status']}{' (' + row['reason'] + ')' if row['reason'] else ''}")
    for l, c in counts.items():
        text = "infinitely many" if c < 0 else str(c)
        print(f"# l={l} ({orbital_letter(l)}): {text} bound states")
    return 0


def _critical_states(args, ls) -> Progress:
    """Refuse, before any search, an --n-max beyond the engine's states per l; else the run's progress."""
    if args.n_max < 1:
        raise InputError(f"--n-max must be at least 1, got {args.n_max}")
    top = args.n_max - min(ls) - 1
    if top >= MAX_CRITICAL_STATES:
        raise LimitError(f"--n-max {args.n_max} asks for states up to n_r = {top} at l = {min(ls)}, beyond the "
                         f"engine's limit n_r ≤ {MAX_CRITICAL_STATES - 1} per l (a root search per state, "
                         "costing ~n_r² per l)")
    return Progress(sum(max(0, args.n_max - l) for l in ls), "critical states")


def run_critical(args) -> int:
    ls = parse_l_values(args.l)
    progress = _critical_states(args, ls)
    if args.vary == "strength":
        return _critical_strengths(args, ls, progress)
    if args.screening_length is not None:
        raise InputError("--screening-length applies to critical only with --vary strength (the screening length "
                         "is what critical finds otherwise)")
    reading = reading_of(args)
    info = family_info(args.family)
    if not info.uses_screening_length(info.screened_parameters({})):
        raise InputError(f"family {args.family!r} has no screening length, so no state is ever lost; "
                         "critical lengths need a screened family")
    if engine_length(args, reading)[0] is not None:  # a range (or density) fixes the length: vary the strength
        return _critical_strengths(args, ls, progress)
    strength, strength_text = engine_strength(args, reading)
    pot = make_potential(args, strength, 1.0)  # validates family and parameters
    unit, factor = reading.length_unit, reading.length_factor
    rows = []
    for l in ls:
        for n in range(l + 1, args.n_max + 1):
            lam = critical_screening_length(args.family, strength, l, n - l - 1, pot.mass, **dict(pot.own))
            row = {"n": n, "l": l, "state": state_label(n, l), "n_r": n - l - 1}
            if unit == "bohr":
                row.update(critical_screening_length_bohr=lam,
                           critical_inverse_length_per_bohr=0.0 if math.isinf(lam) else 1.0 / lam)
            else:
                shown = significant(lam * factor, 13)
                row.update({f"critical_screening_length_{unit}": shown,
                            f"critical_inverse_length_per_{unit}": 0.0 if math.isinf(lam) else significant(1.0 / shown, 13)})
            row.update(trade_columns(args, reading, lam))  # where the state is lost, in the trade's terms
            rows.append(row)
            progress.step(row["state"])
    notes = trade_notes(args, reading, rows)
    if args.format == "json":
        print(json.dumps({"potential": describe(pot, reading, strength_text, with_length=False), "states": rows,
                          **notes}, indent=2))
        return 0
    print(f"# critical screening lengths, {title(pot, reading, strength_text, with_length=False)}")
    print_table(rows, ("n", "l", "state"))
    if not rows:
        print("# no states with n ≤ --n-max for these l")
    for key, text in notes.items():
        print(f"# {key}: {text}")
    return 0


def _critical_strengths(args, ls, progress) -> int:
    """``critical --vary strength``: the strength below which each state is lost, at a fixed length."""
    reading = reading_of(args)
    preset = reading.trade
    for flag in dict.fromkeys(("--strength", preset.strength_flag)):
        if getattr(args, flag.lstrip("-").replace("-", "_")) is not None:
            raise InputError(f"{flag} does not apply with --vary strength: the strength is what critical finds")
    lam, conditions = engine_length(args, reading)  # --screening-length, or the preset's --range, --density
    if lam is None:
        other = f" or {preset.length_flag[0]}" if preset.length_flag else ""
        raise InputError(f"--vary strength needs --screening-length{other} (the fixed screening length)")
    pot = make_potential(args, 1.0, lam)  # validates family and parameters (at strength 1)
    if not pot.uses_screening_length:
        raise InputError(f"family {args.family!r} has no screening length, so no state is ever lost; "
                         "critical strengths need a screened family")
    # the strength as the trade reads this family's (a nuclear g² in MeV fm, a depth V0 in MeV), and,
    # where it has a unit, also under a key that carries it (critical_coupling_MeV_fm, critical_depth_MeV)
    taken = strength_reading(args, reading)
    meaning = taken.meaning
    rows = []
    for l in ls:
        for n in range(l + 1, args.n_max + 1):
            z = critical_strength(args.family, lam, l, n - l - 1, pot.mass, **dict(pot.own))
            shown = z if (math.isinf(z) or taken.per_shown == 1.0) else taken.shown(z)
            rows.append({"n": n, "l": l, "state": state_label(n, l), "n_r": n - l - 1,
                         "critical_strength": shown if shown is z and reading.preset is None else significant(shown, 13)})
            if taken.unit_key:
                rows[-1][taken.unit_key] = rows[-1]["critical_strength"]
            progress.step(rows[-1]["state"])
    length = f"{lam * reading.length_factor:.10g} {reading.length_unit}"
    if args.format == "json":
        description = describe(pot, reading, f"critical strength: {meaning}", conditions)
        description.pop("strength")
        print(json.dumps({"potential": description, "critical_strength_meaning": meaning, "states": rows}, indent=2))
        return 0
    print(f"# critical strengths ({meaning}) at λ = {length}, "
          f"{title(pot, reading, 'strength varied', with_length=False)}")
    heading = f"critical {taken.quantity} ({taken.unit})" if taken.unit else "critical strength"
    print(f"{'n':>3} {'l':>2} {'state':>6} {heading:>22}")
    for row in rows:
        print(f"{row['n']:>3} {row['l']:>2} {row['state']:>6} {row['critical_strength']:>22.13g}")
    if not rows:
        print("# no states with n ≤ --n-max for these l")
    return 0


# Flags that were split because they had two meanings: say what replaced them.
RETIRED = {"--ion-charge": "--nuclear-charge (the screened ion's nucleus) or --screening-ion-charge "
                           "(the plasma's screening ions)"}


def _parse(parser, argv):
    args, extra = parser.parse_known_args(argv)
    if extra:
        # The subcommand's own usage, and the nearest flag it knows, rather than the top level's.
        sub = getattr(args, "parser", parser)
        known = [flag for action in sub._actions for flag in action.option_strings]
        flags = [word.split("=")[0] for word in extra if word.startswith("-")]
        hint = RETIRED.get(flags[0]) if flags else None
        if hint is None and flags:
            hint = next(iter(difflib.get_close_matches(flags[0], known, n=1)), None)
        sub.error(f"unrecognized arguments: {' '.join(extra)}" + (f" (did you mean {hint}?)" if hint else ""))
    return args


def main(argv=None) -> int:
    parser = build_parser()
    args = _parse(parser, argv)
    try:
        status = int(args.func(args) or 0)
        sys.stdout.flush()
        return status
    except (InputError, ConvergenceError) as exc:
        print(f"boundscape: error: {exc}", file=sys.stderr)
        return 2
    except BrokenPipeError:
        # The reader (head, less) stopped reading: no traceback; further writes go nowhere.
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return 141
    except KeyboardInterrupt:
        print("boundscape: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":
    sys.exit(main())
