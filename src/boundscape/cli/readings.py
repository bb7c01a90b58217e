"""How ``levels`` and ``critical`` read their inputs and show their numbers: atomic units, or a
preset's (plasma: eV and nm; semiconductor: meV and nm, effective atomic units inside; nuclear:
MeV and fm).

Each flag keeps one meaning and one unit whatever the preset: ``--strength`` is the engine's
strength (Z, a depth, ω), ``--coupling`` a nuclear g² in MeV fm, ``--screening-length`` a length
in ``--length-unit`` (bohr unless given), ``--mass`` the reduced mass in electron masses.
"""

from __future__ import annotations

import argparse
import math
from dataclasses import dataclass

from ..engine import family_info
from ..errors import InputError
from ..physics.presets import NO_PRESET, PRESETS, NoPreset, Preset
from ..physics.units import ATOMIC, UnitSystem, convert

__all__ = ["add_preset_arguments", "Reading", "reading_of", "significant"]

LENGTH_UNITS = ("bohr", "nm", "fm", "a*")


def significant(value, digits: int = 13):
    """``value`` rounded to ``digits`` significant digits (what a derived number can claim)."""
    if not isinstance(value, float) or not math.isfinite(value) or value == 0:
        return value
    return float(f"{value:.{digits}g}")


def add_preset_arguments(p: argparse.ArgumentParser):
    group = p.add_argument_group("physical units (a preset)")
    group.add_argument("--preset", choices=tuple(PRESETS), default=None,
                       help="show energies and lengths in a trade's units: plasma eV and nm; semiconductor meV "
                            "and nm (needs --effective-mass, --permittivity); nuclear MeV and fm (needs "
                            "--reduced-mass, takes --coupling instead of --strength). Default: atomic units")
    group.add_argument("--length-unit", choices=LENGTH_UNITS, default="bohr",
                       help="unit of --screening-length (default bohr; a* needs --preset semiconductor)")
    group.add_argument("--effective-mass", type=float, default=None,
                       help="semiconductor: the electrons' effective mass m_e* (a donor's μ*), electron masses")
    group.add_argument("--hole-mass", type=float, default=None,
                       help="semiconductor, exciton: hole mass m_h*, electron masses; μ* = m_e* m_h*/(m_e* + m_h*)")
    group.add_argument("--permittivity", type=float, default=None, help="semiconductor: relative permittivity ε_r")
    group.add_argument("--reduced-mass", type=float, default=None, help="nuclear: reduced mass μ, MeV/c²")
    group.add_argument("--coupling", type=float, default=None,
                       help="nuclear: g² of V = -g² exp(-r/λ)/r, MeV fm (instead of --strength)")


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


def _naming(unit):
    # The preset that alone names a length unit (a* = ε_r/μ* bohr), or None.
    return next((cls for cls in PRESETS.values() if unit in cls.named_length_units), None)


def _flag_value(args, flag):
    return getattr(args, flag.lstrip("-").replace("-", "_"))


def _needs(args, flag, why):
    value = _flag_value(args, flag)
    if value is None:
        raise InputError(f"{flag} is required with {why}")
    return value


def _refuse(args, flags, why):
    for flag in flags:
        if _flag_value(args, flag) is not None:
            raise InputError(f"{flag} does not apply {why}")


def _own_flags(cls):
    # The flags only this preset takes: those that build it, and its own strength flag.
    strength = () if cls.strength_flag == "--strength" else (cls.strength_flag,)
    return tuple(flag for flag, _, _ in cls.command_line) + strength


def reading_of(args) -> Reading:
    """The reading the command line asks for; checks that every preset flag fits the preset."""
    for kind, cls in PRESETS.items():
        if args.preset != kind:
            _refuse(args, _own_flags(cls), f"without --preset {kind}")
    cls = PRESETS[args.preset] if args.preset else NoPreset
    if args.mass is not None and cls.mass_given_by:
        raise InputError(f"--mass does not apply with --preset {args.preset}: {cls.mass_given_by}")
    why = f"--preset {args.preset}"
    preset = cls(**{field: _needs(args, flag, why) if required else _flag_value(args, flag)
                    for flag, field, required in cls.command_line})
    shown = preset.command_line_reading()
    return Reading(None if shown["units"] is ATOMIC else preset, trade=preset, **shown)


def engine_strength(args, reading: Reading) -> tuple[float, str]:
    """The engine strength and how the header names it."""
    preset = reading.trade
    if preset.strength_flag != "--strength":
        if args.strength is not None:
            raise InputError(f"--strength does not apply with --preset {preset.kind}: give {preset.strength_flag} "
                             f"({preset.strength_meaning})")
        return preset.strength_input(_needs(args, preset.strength_flag, f"--preset {preset.kind}"))
    if args.strength is None:
        info = family_info(args.family)
        if info.default_strength is not None:
            return info.default_strength, (f"strength {info.default_strength:g} ({info.strength_meaning}, "
                                           "the default)")
        raise InputError(f"--strength is required for family {args.family}")
    return preset.strength_input(args.strength)
