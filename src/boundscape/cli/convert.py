"""``boundscape convert``: one-off conversions between physical conditions and engine inputs.

Wired into the main command by ``convert.register(subparsers)``; the handler is stored as
``func`` in the parsed namespace and returns the exit status.
"""

from __future__ import annotations

import argparse
import json
import sys

from ..checks import positive
from ..physics.presets import Nuclear, Plasma, Semiconductor
from ..physics.screening import MODELS, VALIDITY_FLAGS, VALIDITY_REASONS
from ..physics.units import UNITS, convert
from .readings import significant

__all__ = ["register", "run"]


def register(subparsers) -> argparse.ArgumentParser:
    """Add the ``convert`` subcommand (with its own sub-subcommands) to an argparse subparsers object.

    Parameters
    ----------
    subparsers : argparse._SubParsersAction
        What ``ArgumentParser.add_subparsers()`` returned.

    Returns
    -------
    argparse.ArgumentParser
        The ``convert`` parser.
    """
    parser = subparsers.add_parser(
        "convert", help="convert units, or physical conditions (plasma, semiconductor, nuclear) to engine inputs",
        description="Convert a value between units, or physical conditions to the engine's "
                    "(strength, screening length, mass) in atomic or preset units.")
    kinds = parser.add_subparsers(dest="convert_kind", metavar="KIND", required=True)

    def add(name, help_text):
        p = kinds.add_parser(name, help=help_text, description=help_text)
        p.add_argument("--format", choices=("table", "json"), default="table", help="output format (default table)")
        p.set_defaults(func=run, parser=p)
        return p

    p = add("unit", "convert VALUE from one unit to another of the same quantity")
    p.add_argument("value", type=float, help="the number to convert")
    p.add_argument("from_unit", metavar="FROM", help=f"its unit, one of: {', '.join(UNITS)}")
    p.add_argument("to_unit", metavar="TO", help="the unit wanted, of the same quantity")

    p = add("plasma", "Debye length of a plasma, or the electron density giving a screening length")
    which = p.add_mutually_exclusive_group(required=True)
    which.add_argument("--density", type=float, help="electron density n_e, in --density-unit")
    which.add_argument("--screening-length", type=float, help="Debye length, in --length-unit (default bohr)")
    p.add_argument("--density-unit", default="cm-3", choices=("cm-3", "m-3"), help="unit of --density (default cm-3)")
    p.add_argument("--length-unit", default="bohr", choices=("bohr", "nm"),
                   help="unit of --screening-length (default bohr)")
    p.add_argument("--temperature", type=float, required=True, help="electron temperature T_e, in --temperature-unit")
    p.add_argument("--temperature-unit", default="eV", choices=("eV", "K"), help="unit of --temperature (default eV)")
    p.add_argument("--species", default="electrons", choices=("electrons", "electrons_and_ions"),
                   help="who screens: the free electrons only (default), or electrons and the plasma's own ions")
    p.add_argument("--nuclear-charge", type=float, default=1.0,
                   help="nuclear charge Z of the hydrogen-like ion that is screened (its charge is Z - 1); "
                        "the engine strength (default 1)")
    p.add_argument("--screening-ion-charge", type=float, default=1.0,
                   help="with --species electrons_and_ions: charge Z_i of the plasma's screening ions (default 1)")
    p.add_argument("--ion-temperature-ratio", type=float, default=1.0, help="T_i/T_e when ions screen (default 1)")
    p.add_argument("--screening", default="finite_temperature", choices=MODELS,
                   help="the electrons' screening: finite_temperature (ideal Fermi gas at T_e, default), debye "
                        "(classical) or thomas_fermi (degenerate); the engine's screening length is the model's")

    p = add("semiconductor", "effective Bohr radius and Rydberg, and the screening length of a carrier density")
    p.add_argument("--effective-mass", type=float, required=True,
                   help="the electrons' effective mass m_e* (a donor's μ*), electron masses")
    p.add_argument("--hole-mass", type=float, default=None,
                   help="exciton: hole mass m_h*, electron masses; then μ* = m_e* m_h*/(m_e* + m_h*)")
    p.add_argument("--permittivity", type=float, required=True, help="relative permittivity ε_r")
    which = p.add_mutually_exclusive_group()
    which.add_argument("--density", type=float, help="carrier density, cm-3")
    which.add_argument("--screening-length", type=float, help="screening length, in --length-unit (default bohr)")
    p.add_argument("--length-unit", default="bohr", choices=("bohr", "nm", "a*"),
                   help="unit of --screening-length (default bohr; a* = ε_r/μ* bohr)")
    p.add_argument("--screening", default="finite_temperature", choices=MODELS,
                   help="finite_temperature: the ideal Fermi gas at --temperature (default); debye: its classical "
                        "limit; thomas_fermi: its degenerate limit")
    p.add_argument("--temperature", type=float, default=300.0,
                   help="carrier temperature, K (default 300)")
    p.add_argument("--species", default=None, choices=("electrons", "electrons_and_holes"),
                   help="who screens: electrons (default for a donor) or electrons_and_holes (default with "
                        "--hole-mass: an exciton in an electron-hole plasma)")
    p.add_argument("--donor-charge", type=float, default=1.0,
                   help="charge number of the donor (1 for a hydrogenic donor or an exciton); the engine strength "
                        "in effective units")

    p = add("nuclear", "a Yukawa well -g² exp(-r/λ)/r in MeV and fm as engine inputs")
    p.add_argument("--reduced-mass", type=float, required=True, help="μ, MeV/c²")
    p.add_argument("--coupling", type=float, required=True, help="g², MeV fm")
    p.add_argument("--range", type=float, required=True, help="λ, fm")
    return parser


def _rows(args) -> list[tuple[str, float, str]]:
    if args.convert_kind == "unit":
        return [(f"{args.value:g} {args.from_unit}", convert(args.value, args.from_unit, args.to_unit), args.to_unit)]
    if args.convert_kind == "plasma":
        temperature_eV = args.temperature if args.temperature_unit == "eV" else convert(
            args.temperature, "K", "eV_temperature")
        plasma = Plasma(species=args.species, screening_ion_charge=args.screening_ion_charge,
                        ion_temperature_ratio=args.ion_temperature_ratio, screening=args.screening)
        if args.density is not None:
            density = convert(args.density, args.density_unit, "m-3")
        else:
            density = float(plasma.density_for(float(convert(args.screening_length, args.length_unit, "m")),
                                               temperature_eV))
        lam_m = float(plasma.screening_length_at(density, temperature_eV))
        debye = float(plasma.debye_length(density, temperature_eV))
        engine = plasma.to_engine(args.nuclear_charge, density, temperature_eV)
        return [("electron density", convert(density, "m-3", "cm-3"), "cm-3"),
                ("electron temperature", temperature_eV, "eV"),
                ("Debye length", debye, "m"), ("Debye length", debye / 1e-9, "nm"),
                (f"screening length ({args.screening})", lam_m / 1e-9, "nm"),
                *_validity_rows(plasma.validity(density, temperature_eV)),
                ("engine strength Z (nuclear charge)", engine.strength, "1"), ("engine screening_length", engine.screening_length, "bohr"),
                ("engine mass", engine.mass, "electron masses")]
    if args.convert_kind == "semiconductor":
        semi = Semiconductor(effective_mass=args.effective_mass, permittivity=args.permittivity,
                             screening=args.screening, temperature_K=args.temperature, hole_mass=args.hole_mass,
                             species=args.species)
        eff = semi.effective
        rows = [("reduced mass μ*", semi.reduced_mass, "electron masses"),
                ("effective Bohr radius a*", eff.length_m / 1e-9, "nm"),
                ("effective Rydberg Ry*", eff.energy_eV / 2 * 1e3, "meV"),
                ("effective hartree 2Ry*", eff.energy_eV * 1e3, "meV")]
        if args.density is None and args.screening_length is None:
            return rows
        if args.density is not None:
            density = convert(args.density, "cm-3", "m-3")
            lam_m = float(semi.screening_length(density))
        else:
            lam_m = float(args.screening_length) * (eff.length_m if args.length_unit == "a*" else
                                                    convert(1.0, args.length_unit, "m"))
            density = float(semi.density_for(lam_m))
        as_effective = semi.to_engine(density, args.donor_charge, units="effective")
        as_atomic = semi.to_engine(density, args.donor_charge, units="atomic")
        # Below this density the electrons are classical (k_B T > E_F), above it degenerate.
        degenerate = [(f"E_F = k_B T at {args.temperature:g} K (degenerate above)",
                       convert(semi.degenerate_density(), "m-3", "cm-3"), "cm-3")]
        return rows + [
            ("carrier density", convert(density, "m-3", "cm-3"), "cm-3"), *degenerate,
            (f"screening length ({args.screening})", lam_m / 1e-9, "nm"),
            *_validity_rows(semi.validity(density, args.temperature)),
            ("effective units: strength", as_effective.strength, "1"),
            ("effective units: screening_length", as_effective.screening_length, "a*"),
            ("effective units: mass", as_effective.mass, "μ*"),
            ("atomic units: strength", as_atomic.strength, "1"),
            ("atomic units: screening_length", as_atomic.screening_length, "bohr"),
            ("atomic units: mass", as_atomic.mass, "electron masses")]
    nuclear = Nuclear(reduced_mass_MeV=args.reduced_mass)
    engine = nuclear.to_engine(args.coupling, args.range)
    x = float(nuclear.dimensionless(args.coupling, args.range))
    return [("μ g² λ/(ħc)² (one-scale variable Z·μ·λ)", x, "1"), ("2μ g² λ/ħ²", 2 * x, "1"),
            ("engine strength", engine.strength, "1"), ("engine screening_length", engine.screening_length, "fm"),
            ("engine mass", engine.mass, "μ"),
            ("energy unit (ħc)²/(μc² fm²)", engine.units.energy_J / convert(1.0, "MeV", "J"), "MeV")]


def _validity_rows(validity) -> list:
    """Γ, N_D, k_B T/E_F and the screening model's validity flag (as a row with its reason)."""
    flag = VALIDITY_FLAGS[int(validity.flag)]
    return [("coupling parameter Γ", float(validity.coupling_parameter), "1"),
            ("Debye number N_D", float(validity.debye_number), "1"),
            ("degeneracy k_B T/E_F", float(validity.degeneracy), "1"),
            (f"screening model validity: {flag}", int(validity.flag), "flag")]


def run(args) -> int:
    """Print the conversion asked for in ``args``; raises :class:`InputError` on bad input."""
    for name in ("density", "screening_length", "temperature", "effective_mass", "permittivity",
                 "reduced_mass", "coupling", "range", "hole_mass", "nuclear_charge", "screening_ion_charge"):
        value = getattr(args, name, None)
        if value is not None:
            positive(f"--{name.replace('_', '-')}", value)
    rows = _rows(args)
    if args.format == "json":
        # Derived numbers carry 13 significant digits, not the last bits of a unit round trip.
        json.dump([{"quantity": q, "value": significant(float(v)), "unit": u} for q, v, u in rows], sys.stdout, indent=1)
        sys.stdout.write("\n")
    else:
        width = max(len(q) for q, _, _ in rows)
        for q, v, u in rows:
            print(f"{q:<{width}}  {v:<.10g}  {u}")
        for q, _, u in rows:
            if u == "flag":  # why the screening model does (not) hold here
                flag = q.rsplit(": ", 1)[-1]
                print(f"# {flag}: {VALIDITY_REASONS[flag]}")
    return 0
