"""How ``levels``, ``critical``, ``resonances`` and ``lines`` read their inputs and show their
numbers: atomic units, or a preset's (plasma: eV and nm; semiconductor: meV and nm, effective
atomic units inside; nuclear: MeV and fm), with the trade's conditions as inputs.

Each flag keeps one meaning and one unit whatever the preset: ``--strength`` is the engine's
strength (Z, a depth, ω), ``--nuclear-charge`` a plasma ion's Z, ``--coupling`` a nuclear g² in
MeV fm, ``--screening-length`` a length in ``--length-unit`` (bohr unless given), ``--density`` a
plasma's electron density and ``--carrier-density`` a semiconductor's (cm⁻³), ``--temperature``
a plasma's T_e (eV) and ``--temperature-K`` a semiconductor's T (K), ``--range`` a nuclear range
(fm), ``--mass`` the reduced mass in electron masses.  The preset classes declare which flags
they take (``command_line``, ``strength_flag``, ``length_flag``, ``temperature_flag``).
"""

from __future__ import annotations

import argparse
import math
import re
from dataclasses import dataclass

from ..engine import family_info
from ..errors import InputError
from ..checks import positive
from ..physics.presets import NO_PRESET, PRESETS, NoPreset, Nuclear, Plasma, Preset, Semiconductor
from ..physics.presets.strengths import PARAMETER_DIMENSIONS
from ..physics.screening import MODELS
from ..physics.units import ATOMIC, BOHR_M, UnitSystem, convert

__all__ = ["add_preset_arguments", "Reading", "reading_of", "engine_strength", "strength_reading", "engine_length",
           "length_reader", "describe", "title", "flag_value", "own_parameters", "shown_parameters", "significant"]

LENGTH_UNITS = ("bohr", "nm", "fm", "a*")


def significant(value, digits: int = 13):
    """``value`` rounded to ``digits`` significant digits (what a derived number can claim)."""
    if not isinstance(value, float) or not math.isfinite(value) or value == 0:
        return value
    return float(f"{value:.{digits}g}")


def add_preset_arguments(p: argparse.ArgumentParser):
    group = p.add_argument_group("physical units and conditions (a preset)")
    group.add_argument("--preset", choices=tuple(PRESETS), default=None,
                       help="show energies and lengths in a trade's units and take its conditions: plasma eV and nm "
                            "(--nuclear-charge, --density, --temperature); semiconductor meV and nm (needs "
                            "--effective-mass, --permittivity; --carrier-density, --temperature-K); nuclear MeV and fm "
                            "(needs --reduced-mass; --coupling instead of --strength, --range). Default: atomic units")
    group.add_argument("--length-unit", choices=LENGTH_UNITS, default="bohr",
                       help="unit of --screening-length (default bohr; a* needs --preset semiconductor)")
    group.add_argument("--screening", choices=MODELS, default=None,
                       help="plasma and semiconductor: how the carriers screen at --density/--carrier-density: "
                            "finite_temperature (the ideal Fermi gas at T, default), debye (classical limit) or "
                            "thomas_fermi (degenerate limit)")
    plasma = p.add_argument_group("--preset plasma")
    plasma.add_argument("--nuclear-charge", type=float, default=None,
                        help="plasma: nuclear charge Z of the hydrogen-like ion (its charge is Z - 1), instead of "
                             "--strength")
    plasma.add_argument("--density", type=float, default=None, help=Plasma.length_flag[1])
    plasma.add_argument("--temperature", type=float, default=None,
                        help="plasma: electron temperature T_e, eV (with --density; for critical, where the loss "
                             "densities are read)")
    plasma.add_argument("--species", choices=("electrons", "electrons_and_ions", "electrons_and_holes"), default=None,
                        help="who screens: plasma electrons (default) or electrons_and_ions; semiconductor electrons "
                             "(default for a donor) or electrons_and_holes (default for an exciton)")
    plasma.add_argument("--screening-ion-charge", type=float, default=None,
                        help="plasma with --species electrons_and_ions: charge Z_i of the screening ions (default 1)")
    plasma.add_argument("--ion-sphere-charge", type=float, default=None,
                        help="plasma, family ion_sphere with --density: charge Z_i of the ions whose Wigner-Seitz "
                             "radius (3 Z_i/(4 pi n_e))^(1/3) is the ion-sphere radius R (default: --nuclear-charge, "
                             "so that the sphere's cloud of Z electrons has the density n_e)")
    plasma.add_argument("--ion-temperature-ratio", type=float, default=None,
                        help="plasma with --species electrons_and_ions: T_i/T_e (default 1)")
    semi = p.add_argument_group("--preset semiconductor")
    semi.add_argument("--effective-mass", type=float, default=None,
                      help="semiconductor: the electrons' effective mass m_e* (a donor's μ*), electron masses")
    semi.add_argument("--hole-mass", type=float, default=None,
                      help="semiconductor, exciton: hole mass m_h*, electron masses; μ* = m_e* m_h*/(m_e* + m_h*)")
    semi.add_argument("--permittivity", type=float, default=None, help="semiconductor: relative permittivity ε_r")
    semi.add_argument("--carrier-density", type=float, default=None, help=Semiconductor.length_flag[1])
    semi.add_argument("--temperature-K", type=float, default=None,
                      help="semiconductor: carrier temperature, K (with --carrier-density; for critical, where the "
                           "loss densities are read)")
    nuclear = p.add_argument_group("--preset nuclear")
    nuclear.add_argument("--reduced-mass", type=float, default=None, help="nuclear: reduced mass μ, MeV/c²")
    nuclear.add_argument("--coupling", type=float, default=None,
                         help="nuclear: g² of V = -g² exp(-r/λ)/r, MeV fm (instead of --strength)")
    nuclear.add_argument("--range", type=float, default=None, help=Nuclear.length_flag[1])


@dataclass(frozen=True)
class Reading:
    """The unit system the engine is run in, and the units the numbers are shown in.

    ``preset`` is the preset whose units the engine runs in (``None`` in atomic units: no preset,
    or the plasma preset); ``trade`` is the preset asked for (:data:`NO_PRESET` for none)."""

    preset: Preset | None
    units: UnitSystem
    energy_unit: str      # shown unit of energies
    energy_factor: float  # engine energy unit -> shown unit
    length_unit: str
    length_factor: float  # engine length unit -> shown unit
    description: str
    trade: Preset = NO_PRESET

    def engine_length(self, value, unit) -> float:
        """A length given in ``unit`` as the engine's length unit."""
        if unit in self.trade.named_length_units:
            metres = value * self.trade.named_length_m(unit)
        elif (owner := _naming(unit)) is not None:
            raise InputError(f"--length-unit {unit} needs --preset {owner.kind} "
                             f"({unit} = {owner.named_length_units[unit]})")
        else:
            metres = convert(value, unit, "m")
        return metres / self.units.length_m

    def shown(self, text: str) -> str:
        """An engine message (a status reason) with its lengths and energies in the shown units.

        The engine writes its own units as "bohr" and "hartree"; under a preset that runs the
        engine in other units (nuclear, semiconductor) those words would be wrong, so each
        "<number> bohr|hartree" is converted to the unit the table shows."""
        if not text:
            return text

        def convert_one(match):
            value, unit = float(match.group(1)), match.group(2)
            if unit == "bohr":
                return f"{value * self.length_factor:.5g} {self.length_unit}"
            return f"{value * self.energy_factor:.5g} {self.energy_unit}"

        if self.length_unit == "bohr" and self.energy_unit == "hartree":
            return text
        return _ENGINE_QUANTITY.sub(convert_one, text)


# a number followed by the engine's unit words, as engine messages write them ("λ ≈ 23.517 bohr")
_ENGINE_QUANTITY = re.compile(r"(?<![\w.])([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?) (bohr|hartree)\b")


def _naming(unit):
    # The preset that alone names a length unit (a* = ε_r/μ* bohr), or None.
    return next((cls for cls in PRESETS.values() if unit in cls.named_length_units), None)


def flag_value(args, flag):
    """The value given with ``flag`` (``None`` if not given)."""
    return getattr(args, flag.lstrip("-").replace("-", "_"))


def _needs(args, flag, why):
    value = flag_value(args, flag)
    if value is None:
        raise InputError(f"{flag} is required with {why}")
    return value


def _own_flags(cls):
    # The flags this preset takes: those that build it, its strength flag, its condition flags.
    flags = [flag for flag, _, _ in cls.command_line]
    flags += [flag for flag in (cls.strength_flag, cls.length_flag and cls.length_flag[0], cls.temperature_flag)
              if flag and flag != "--strength"]
    return tuple(flags)


def reading_of(args) -> Reading:
    """The reading the command line asks for; checks that every preset flag fits the preset."""
    cls = PRESETS[args.preset] if args.preset else NoPreset
    mine = set(_own_flags(cls))
    for kind, other in PRESETS.items():
        for flag in _own_flags(other):
            if flag not in mine and flag_value(args, flag) is not None:
                takers = " or ".join(k for k, c in PRESETS.items() if flag in _own_flags(c))
                raise InputError(f"{flag} does not apply {'without' if args.preset is None else 'with'} --preset "
                                 f"{args.preset or takers}" + (f" (it belongs to --preset {takers})" if args.preset else ""))
    if args.mass is not None and cls.mass_given_by:
        raise InputError(f"--mass does not apply with --preset {args.preset}: {cls.mass_given_by}")
    why = f"--preset {args.preset}"
    fields = {}
    for flag, field, required in cls.command_line:
        value = _needs(args, flag, why) if required else flag_value(args, flag)
        if value is not None:
            fields[field] = value
    preset = cls(**fields)
    shown = preset.command_line_reading()
    return Reading(None if shown["units"] is ATOMIC else preset, trade=preset, **shown)


def engine_length(args, reading: Reading) -> tuple[float | None, dict]:
    """The engine's screening length the command line gives — ``--screening-length`` (in
    ``--length-unit``) or the preset's condition (``--density`` with ``--temperature``, ...) —
    and the conditions to print (``{}`` for a length given directly)."""
    preset = reading.trade
    length = getattr(args, "screening_length", None)
    flag = preset.length_flag[0] if preset.length_flag else None
    value = flag_value(args, flag) if flag else None
    reader = length_reader(args, reading) if flag else None
    if value is None:
        return (None if length is None else reading.engine_length(length, args.length_unit)), {}
    if length is not None:
        raise InputError(f"give {flag} or --screening-length, not both: each sets the screening length")
    if reader is None:
        info = family_info(args.family)
        raise InputError(f"{flag} sets a screening length, but family {args.family}'s length is its "
                         f"{info.length_long_name}: give --screening-length (in --length-unit)")
    positive(flag, value)
    if preset.temperature_flag and flag_value(args, preset.temperature_flag) is None:
        raise InputError(f"{flag} needs {preset.temperature_flag} (the screening and its validity depend on the "
                         "temperature)")
    return reader.command_line_length(value, reading.units), reader.command_line_conditions(value)


def length_reader(args, reading: Reading):
    """What reads the preset's condition flag (``--density``) as ``--family``'s length
    (``Preset.length_reading``): the screening length, or a plasma's ion-sphere radius."""
    preset = reading.trade
    taken = preset.strength_reading(family_info(args.family))
    return preset.length_reading(family_info(args.family), flag_value(args, taken.flag))


def own_parameters(pot) -> dict:
    """The potential's own numeric parameters by name (what ``--param`` sets)."""
    return {q.name: pot.params[q.name] for q in pot.info.parameters
            if q.numeric and isinstance(pot.params.get(q.name), float)}


def shown_parameters(pot, reading: Reading) -> list[tuple[str, float, str]]:
    """(name, value, unit) of the potential's own numeric parameters as the reading shows them:
    lengths in its length unit, dimensionless ones as they are."""
    units = {q.name: q.unit for q in pot.info.parameters}
    out = []
    for name, value in own_parameters(pot).items():
        if PARAMETER_DIMENSIONS.get(units[name]) == "length":
            out.append((name, significant(value * reading.length_factor), reading.length_unit))
        else:
            out.append((name, value, "" if units[name] == "1" else units[name]))
    return out


def describe(pot, reading: Reading, strength_text: str, conditions: dict | None = None, with_length: bool = True):
    """The potential as the JSON output gives it: the engine's inputs (``strength``, ``mass``, its
    own ``parameters`` and ``screening_length_bohr``, whatever the units), the trade's reading,
    and the conditions."""
    d = {"family": pot.family, "strength": pot.strength, "mass": pot.mass}
    if own_parameters(pot):  # the engine's values, and each length in the shown unit beside it
        d["parameters"] = own_parameters(pot)
        if reading.length_unit != "bohr" or reading.units is not ATOMIC:
            d["parameters"].update({f"{name}_{unit}": value for name, value, unit in shown_parameters(pot, reading)
                                    if unit == reading.length_unit})
    if reading.trade.kind is not None or reading.length_unit != "bohr":
        d.update(units=reading.description, input=strength_text)
    if with_length and math.isfinite(pot.screening_length):
        d["screening_length_bohr"] = significant(pot.screening_length * reading.units.length_m / BOHR_M) \
            if reading.units is not ATOMIC else pot.screening_length
        if reading.units is not ATOMIC:
            d[f"screening_length_{_unit_key(reading)}"] = pot.screening_length
        if reading.length_unit != "bohr":
            d[f"screening_length_{reading.length_unit}"] = significant(pot.screening_length * reading.length_factor)
    if conditions:
        d["conditions"] = {k: significant(v) if isinstance(v, float) else v for k, v in conditions.items()}
    return d


def _unit_key(reading):
    # The engine's own length unit, as a JSON key says it.
    return {"effective atomic": "effective_bohr_radii", "nuclear": "engine_length_unit"}.get(reading.units.name,
                                                                                         reading.units.name)


def title(pot, reading: Reading, strength_text: str, conditions: dict | None = None, with_length: bool = True):
    """The table's header line."""
    lam = ""
    if with_length and math.isfinite(pot.screening_length):
        symbol = "λ" if pot.info.length_kind == "screening_length" else "R"  # a well's or ion sphere's radius
        lam = f", {symbol} = {pot.screening_length * reading.length_factor:.10g} {reading.length_unit}"
    mass = f", mass {pot.mass:g} m_e" if reading.trade.kind is None else ""
    own = "".join(f", {name} {value:.10g}{' ' + unit if unit else ''}" for name, value, unit in
                  shown_parameters(pot, reading))
    text = f"{pot.info.display_name}, {strength_text}{lam}{own}{mass} ({reading.description})"
    if conditions:
        shown = ", ".join(f"{k} = {v:.6g}" if isinstance(v, float) else f"{k} = {v}" for k, v in conditions.items()
                          if k not in ("screening_validity_reason", "screening_species"))
        text += f"\n# conditions: {shown}"
        if conditions.get("screening_validity") not in (None, "ok"):
            text += f"\n# WARNING: {conditions['screening_validity_reason']}"
    return text


def strength_reading(args, reading: Reading):
    """How the command line takes ``--family``'s strength (:class:`~boundscape.physics.presets.
    strengths.StrengthReading`); refuses, in one line, a strength flag that does not give it."""
    preset, info = reading.trade, family_info(args.family)
    taken = preset.strength_reading(info)
    for flag in dict.fromkeys(("--strength", preset.strength_flag)):
        if flag != taken.flag and flag_value(args, flag) is not None:
            whose = "" if preset.strength_flag == taken.flag else \
                f" to family {args.family}, whose strength is its {info.strength_long_name}"
            raise InputError(f"{flag} does not apply with --preset {preset.kind}{whose}: give {taken.flag} "
                             f"({taken.meaning})")
    return taken


def engine_strength(args, reading: Reading) -> tuple[float, str]:
    """The engine strength and how the header names it."""
    preset = reading.trade
    taken = strength_reading(args, reading)
    value = flag_value(args, taken.flag)
    if value is None and taken.flag == "--strength":
        info = family_info(args.family)
        if info.default_strength is not None:
            return info.default_strength, (f"strength {info.default_strength:g} ({info.strength_meaning}, "
                                           "the default)")
        raise InputError(f"--strength is required for family {args.family}"
                         + (f" ({taken.meaning})" if preset.kind else ""))
    if value is None:
        value = _needs(args, taken.flag, f"--preset {preset.kind}")
    if taken.header is None:
        return preset.strength_input(value)
    if taken.flag != "--strength":
        positive(taken.flag, value)
    return taken.engine(value), taken.text(value)
