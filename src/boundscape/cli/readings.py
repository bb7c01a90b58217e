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

from ..errors import InputError
from ..physics.presets import Nuclear, Semiconductor
from ..physics.units import ATOMIC, BOHR_M, MEV_J, UnitSystem, convert

__all__ = ["add_preset_arguments", "Reading", "reading_of", "significant"]

LENGTH_UNITS = ("bohr", "nm", "fm", "a*")


def significant(value, digits: int = 13):
    """``value`` rounded to ``digits`` significant digits (what a derived number can claim)."""
    if not isinstance(value, float) or not math.isfinite(value) or value == 0:
        return value
    return float(f"{value:.{digits}g}")


def add_preset_arguments(p: argparse.ArgumentParser):
    group = p.add_argument_group("physical units (a preset)")
    group.add_argument("--preset", choices=("plasma", "semiconductor", "nuclear"), default=None,
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
    """The unit system the engine is run in, and the units the numbers are shown in."""

    preset: object
    units: UnitSystem
    energy_unit: str      # shown unit of energies
    energy_factor: float  # engine energy unit -> shown unit
    length_unit: str
    length_factor: float  # engine length unit -> shown unit
    description: str

    def engine_length(self, value, unit) -> float:
        """A length given in ``unit`` as the engine's length unit."""
        if unit == "a*":
            if not isinstance(self.preset, Semiconductor):
                raise InputError("--length-unit a* needs --preset semiconductor (a* = ε_r/μ* bohr)")
            metres = value * self.preset.effective.length_m
        else:
            metres = convert(value, unit, "m")
        return metres / self.units.length_m


def _needs(args, flag, why):
    value = getattr(args, flag.lstrip("-").replace("-", "_"))
    if value is None:
        raise InputError(f"{flag} is required with {why}")
    return value


def _refuse(args, flags, why):
    for flag in flags:
        if getattr(args, flag.lstrip("-").replace("-", "_")) is not None:
            raise InputError(f"{flag} does not apply {why}")


def reading_of(args) -> Reading:
    """The reading the command line asks for; checks that every preset flag fits the preset."""
    if args.preset != "semiconductor":
        _refuse(args, ("--effective-mass", "--hole-mass", "--permittivity"), "without --preset semiconductor")
    if args.preset != "nuclear":
        _refuse(args, ("--reduced-mass", "--coupling"), "without --preset nuclear")
    if args.preset is None or args.preset == "plasma":
        shown = ("eV", convert(1.0, "hartree", "eV"), "nm", BOHR_M / 1e-9) if args.preset else \
            ("hartree", 1.0, "bohr", 1.0)
        return Reading(None, ATOMIC, *shown, "atomic units" + (", plasma preset" if args.preset else ""))
    if args.preset == "semiconductor":
        if args.mass is not None:
            raise InputError("--mass does not apply with --preset semiconductor: μ* comes from --effective-mass "
                             "(and --hole-mass for an exciton)")
        semi = Semiconductor(effective_mass=_needs(args, "--effective-mass", "--preset semiconductor"),
                             permittivity=_needs(args, "--permittivity", "--preset semiconductor"),
                             hole_mass=args.hole_mass)
        units = semi.effective
        what = "exciton" if semi.is_exciton else "donor"
        return Reading(semi, units, "meV", units.energy_eV * 1e3, "nm", units.length_m / 1e-9,
                       f"{what}, μ* = {semi.reduced_mass:.6g}, ε_r = {semi.permittivity:g}: effective atomic units "
                       f"a* = {units.length_m / 1e-9:.6g} nm, 2Ry* = {units.energy_eV * 1e3:.6g} meV")
    if args.mass is not None:
        raise InputError("--mass does not apply with --preset nuclear: the reduced mass is --reduced-mass (MeV/c²)")
    nuc = Nuclear(reduced_mass_MeV=_needs(args, "--reduced-mass", "--preset nuclear"))
    units = nuc.units
    return Reading(nuc, units, "MeV", units.energy_J / MEV_J, "fm", units.length_m / 1e-15,
                   f"nuclear, μ = {nuc.reduced_mass_MeV:g} MeV/c²")


def engine_strength(args, reading: Reading) -> tuple[float, str]:
    """The engine strength and how the header names it."""
    if isinstance(reading.preset, Nuclear):
        if args.strength is not None:
            raise InputError("--strength does not apply with --preset nuclear: give --coupling (g², MeV fm)")
        g2 = _needs(args, "--coupling", "--preset nuclear")
        return float(reading.preset.strength_for(g2)), f"g² = {g2:g} MeV fm"
    if args.strength is None:
        if args.family == "tabulated":
            return 1.0, "strength 1 (scale factor on the table, the default)"
        raise InputError(f"--strength is required for family {args.family}")
    what = "donor charge" if isinstance(reading.preset, Semiconductor) and not reading.preset.is_exciton else "strength"
    return float(args.strength), f"{what} {args.strength:g}"
