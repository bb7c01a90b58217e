"""``boundscape scattering``: scattering lengths, effective ranges and phase shifts of one potential.

    boundscape scattering --family yukawa --strength 1 --screening-length 2 --l 0-2 --energies 0.01,0.1,1
    boundscape scattering --family yukawa --preset nuclear --reduced-mass 469.459 --coupling 70.9 \\
                          --screening-length 1.4 --length-unit fm --energies 1,10

Numbers are in atomic units (hartree, bohr), or under ``--preset`` in the trade's units as
``levels`` prints them (plasma eV and nm; semiconductor meV and nm; nuclear MeV and fm), and the
JSON keys carry them.  ``--energies`` are in that energy unit.  Wired into the main command by
``scattering.register(subparsers)``.
"""

from __future__ import annotations

import json
import math

from ..engine import phase_shifts, scattering
from ..engine.continuum.phase_shifts import MAX_ENERGIES, EnergyTooHigh
from ..errors import InputError
from ..labels import orbital_letter
from .options import make_potential, parse_l_values, potential_args
from .readings import describe, engine_length, engine_strength, reading_of, significant, title

__all__ = ["register", "run", "parse_energies", "shown"]

DESCRIPTION = (
    "Zero-energy scattering of each l: the scattering length a (l = 0) or the generalised length a_l of "
    "tan δ_l ≈ −(k a_l)^(2l+1) (l ≥ 1), its inverse (zero where a state is at threshold), the effective range "
    "r_e (l = 0) and the number of bound states; with --energies, the phase shift δ_l (rad, on the branch with "
    "δ_l(∞) = 0, so δ_l(0⁺) = N_b π: Levinson) and the partial cross section σ_l = 4π(2l+1) sin²δ_l/k². "
    "Short-range potentials only.")


def register(subparsers):
    """Add the ``scattering`` subcommand to what ``ArgumentParser.add_subparsers()`` returned."""
    parser = subparsers.add_parser("scattering", help="scattering lengths, effective ranges and phase shifts, per l",
                                   description=DESCRIPTION)
    potential_args(parser, levels=True)
    parser.add_argument("--energies", default=None,
                        help="phase shifts at these energies E > 0, comma-separated, in the shown energy unit "
                             f"(hartree; eV, meV or MeV with a preset); at most {MAX_ENERGIES}")
    parser.set_defaults(func=run, parser=parser)
    return parser


def parse_energies(text: str | None, unit: str) -> list[tuple[str, float]]:
    """'0.1, 1,2e1' → [("0.1", 0.1), ...]: each energy as given and as a number (> 0)."""
    if text is None:
        return []
    out = []
    for part in text.split(","):
        part = part.strip()
        try:
            value = float(part)
        except ValueError:
            raise InputError(f"--energies must be numbers like 0.1,0.5,2 (in {unit}), got {part!r}") from None
        if not (math.isfinite(value) and value > 0):
            raise InputError(f"--energies must be positive (E > 0 is the continuum), got {part} {unit}")
        out.append((part, value))
    if len(out) > MAX_ENERGIES:
        raise InputError(f"--energies: {len(out)} given, at most {MAX_ENERGIES}")
    return out


def shown(value: float, factor: float, atomic: bool, digits: int = 13):
    """A number in the shown unit (JSON null where not finite): exact in atomic units, else to
    ``digits`` significant digits, as ``levels`` prints a preset's numbers."""
    if value is None or not math.isfinite(value):
        return None
    return float(value) if atomic else significant(float(value) * factor, digits)


def run(args) -> int:
    """Print the scattering asked for in ``args``; raises :class:`InputError` on bad input."""
    ls = parse_l_values(args.l)
    reading = reading_of(args)
    strength, strength_text = engine_strength(args, reading)
    lam, _ = engine_length(args, reading)  # --screening-length, or the preset's --range, --density
    pot = make_potential(args, strength, lam)
    e_unit, r_unit = reading.energy_unit, reading.length_unit
    ef, rf = reading.energy_factor, reading.length_factor
    atomic = reading.preset is None and e_unit == "hartree"
    given = parse_energies(args.energies, e_unit)
    energies = [value / ef for _, value in given]
    rows = []
    for l in ls:
        sc = scattering(pot, l)
        row = {"l": l,
               f"scattering_length_{r_unit}": shown(sc.length, rf, atomic),
               f"inverse_scattering_length_per_{r_unit}": shown(sc.inverse_length, 1.0 / rf, atomic),
               f"effective_range_{r_unit}": shown(sc.effective_range, rf, atomic),
               "num_bound": sc.num_bound, "phase_shifts": [], "status": "ok" if sc.status == 0 else "not_converged",
               "reason": reading.shown(sc.reason),
               f"scattering_length_error_{r_unit}": shown(sc.length_error, rf, atomic, 3),
               f"effective_range_error_{r_unit}": shown(sc.effective_range_error, rf, atomic, 3)}
        if energies:
            try:
                ps = phase_shifts(pot, l, energies, num_bound=sc.num_bound)
            except EnergyTooHigh as exc:
                raise InputError(f"--energies: {exc.energy * ef:g} {e_unit} needs too fine a grid for this potential: "
                                 f"{exc.why}") from None
            for i, (text, _) in enumerate(given):
                row["phase_shifts"].append({
                    f"energy_{e_unit}": float(text), "phase_shift_rad": float(ps.phase_shift[i]),
                    f"cross_section_{r_unit}2": shown(ps.cross_section[i], rf * rf, atomic),
                    "phase_shift_error_rad": shown(ps.phase_shift_error[i], 1.0, atomic, 3),
                    "status": "ok" if ps.status[i] == 0 else "not_converged", "reason": reading.shown(ps.reason[i])})
        rows.append(row)
    if args.format == "json":
        print(json.dumps({"potential": describe(pot, reading, strength_text), "scattering": rows}, indent=2))
        return 0
    _table(pot, reading, strength_text, rows, r_unit, e_unit)
    return 0


def _cell(value, width, spec):
    return f"{'—':>{width}}" if value is None else f"{value:>{width}{spec}}"


def _table(pot, reading, strength_text, rows, r_unit, e_unit):
    print(f"# {title(pot, reading, strength_text)}")
    print(f"{'l':>3} {f'a_l ({r_unit})':>22} {f'1/a_l (1/{r_unit})':>22} {f'r_e ({r_unit})':>22} "
          f"{f'error a_l ({r_unit})':>18} {'bound':>6}  status")
    for row in rows:
        print(f"{row['l']:>3} {_cell(row[f'scattering_length_{r_unit}'], 22, '.13g')} "
              f"{_cell(row[f'inverse_scattering_length_per_{r_unit}'], 22, '.13g')} "
              f"{_cell(row[f'effective_range_{r_unit}'], 22, '.13g')} "
              f"{_cell(row[f'scattering_length_error_{r_unit}'], 18, '.3g')} {row['num_bound']:>6}  "
              f"{row['status']}{' (' + row['reason'] + ')' if row['reason'] else ''}")
    print("# a_0 is the scattering length a; a_l (l ≥ 1) is defined by tan δ_l ≈ −(k a_l)^(2l+1) as k → 0; "
          "r_e for l = 0 only")
    for row in rows:
        if not row["phase_shifts"]:
            continue
        print(f"# phase shifts, l = {row['l']} ({orbital_letter(row['l'])}): δ_l(0⁺) = {row['num_bound']}π (Levinson)")
        print(f"{f'E ({e_unit})':>22} {'delta (rad)':>22} {'delta/pi':>12} {f'sigma_l ({r_unit}^2)':>22} "
              f"{'error (rad)':>12}  status")
        for p in row["phase_shifts"]:
            delta = p["phase_shift_rad"]
            print(f"{p[f'energy_{e_unit}']:>22.13g} {delta:>22.15g} {delta / math.pi:>12.6f} "
                  f"{_cell(p[f'cross_section_{r_unit}2'], 22, '.13g')} {p['phase_shift_error_rad']:>12.3g}  "
                  f"{p['status']}{' (' + p['reason'] + ')' if p['reason'] else ''}")
