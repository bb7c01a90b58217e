"""``boundscape populations``: partition function, ionization balance and continuum lowering of
one condition, from the complete level set.

    boundscape populations --preset plasma --nuclear-charge 1 --density 1e22 --temperature 20
    boundscape populations --preset semiconductor --effective-mass 0.067 --permittivity 12.9 \\
                           --donor-concentration 1e16 --temperature-K 10 --format json

Plasma: the hydrogen-like ion of nuclear charge Z screened at (n_e, T_e) by the preset's model
(``--screening``), its every bound level counted and solved; U, the bound-state count, I, ΔI
(this model, Stewart–Pyatt, Ecker–Kröll) and the Saha ionized fraction, in eV.  Semiconductor:
the self-consistent donor freeze-out at N_D and T (or, with ``--hole-mass`` and
``--pair-density``, the exciton ⇄ electron–hole plasma balance), in cm⁻³ and meV.  Wired into
the main command by ``populations.register(subparsers)``.
"""

from __future__ import annotations

import json
import math

from scipy import constants as sc

from ..errors import InputError
from ..physics.populations import LevelSets, donor_freeze_out, exciton_ionization, plasma_cell
from ..physics.populations import unscreened_ionization_energy
from ..physics.units import convert, effective_atomic_units
from .options import make_potential
from .readings import add_preset_arguments, describe, engine_length, engine_strength, own_parameters, reading_of, \
    significant, title

__all__ = ["register", "run", "SAHA_CONVENTION"]

SAHA_CONVENTION = ("n_Z/n_{Z-1} = 2 (2 pi m_e k T/h^2)^{3/2} / (n_e U): the bare nucleus's partition function "
                   "is taken as 1 and the free electron's spin weight is 2; U sums 2(2l+1) exp(-E_nl/kT) over "
                   "every bound level of the screened ion, energies from the screened continuum")

DESCRIPTION = (
    "Populations of one condition from the complete bound level set (every l that binds, every bound n_r, from "
    "the exact zero-energy counts). Plasma (--nuclear-charge, --density, --temperature): the partition function "
    "U, the bound-state count, the ionization energy I = -E_1s, the continuum lowering ΔI = I0 - I beside "
    "Stewart–Pyatt and Ecker–Kröll, and the Saha ionized fraction of the hydrogen-like ion. Semiconductor "
    "(--effective-mass, --permittivity, --donor-concentration, --temperature-K): the self-consistent donor "
    "freeze-out; with --hole-mass and --pair-density, the exciton ⇄ electron–hole plasma balance.")


def register(subparsers):
    """Add the ``populations`` subcommand to what ``ArgumentParser.add_subparsers()`` returned."""
    parser = subparsers.add_parser("populations", help="partition function, Saha balance, continuum lowering",
                                   description=DESCRIPTION)
    parser.add_argument("--family", default="yukawa", help="the screened potential family (default yukawa)")
    parser.add_argument("--mass", type=float, default=None,
                        help="plasma: the bound electron's reduced mass μ, electron masses (default 1)")
    parser.add_argument("--donor-concentration", type=float, default=None,
                        help="semiconductor: donor concentration N_D, cm-3 (with --temperature-K)")
    parser.add_argument("--pair-density", type=float, default=None,
                        help="semiconductor with --hole-mass: electron–hole pair density, cm-3 (with --temperature-K)")
    parser.add_argument("--format", choices=("table", "json"), default="table", help="output format (default table)")
    add_preset_arguments(parser)
    parser.set_defaults(func=run, parser=parser, strength=None, screening_length=None, table=None, coulomb_tail=None,
                        param=[], screened=False)
    return parser


def _number(value, digits=13):
    """A JSON number in the shown unit (null where not finite)."""
    if value is None or not math.isfinite(float(value)):
        return None
    return significant(float(value), digits)


def run(args) -> int:
    """Print the populations asked for in ``args``; raises :class:`InputError` on bad input."""
    if args.preset not in ("plasma", "semiconductor"):
        raise InputError(f"populations needs --preset plasma or --preset semiconductor, got "
                         f"{'no --preset' if args.preset is None else '--preset ' + args.preset}")
    if args.preset == "plasma":
        for flag in ("donor_concentration", "pair_density"):
            if getattr(args, flag) is not None:
                raise InputError(f"--{flag.replace('_', '-')} applies with --preset semiconductor, not plasma")
        result, header = _plasma(args)
    else:
        result, header = _semiconductor(args)
    if args.format == "json":
        print(json.dumps(result, indent=2))
    else:
        _table(result, header)
    return 0


def _plasma(args):
    reading = reading_of(args)
    Z, strength_text = engine_strength(args, reading)
    if args.density is None:
        raise InputError("--density (n_e, cm-3) is required with --preset plasma")
    lam, conditions = engine_length(args, reading)
    pot = make_potential(args, Z, lam)
    hartree_eV = sc.physical_constants["Hartree energy in eV"][0]
    kT = args.temperature / hartree_eV
    n_e = convert(args.density, "cm-3", "m-3") * sc.physical_constants["Bohr radius"][0] ** 3
    preset = reading.trade
    ions = getattr(preset, "species", "electrons") == "electrons_and_ions"
    z_star = float(preset.screening_ion_charge) if ions else 0.0  # the screening ions' ⟨Z_i²⟩/⟨Z_i⟩
    sets = LevelSets(pot.family, pot.strength, pot.mass, **own_parameters(pot))
    cell = plasma_cell(Z, n_e, kT, screening_length=pot.screening_length, mass=pot.mass, family=pot.family,
                       level_sets=sets, z_star=z_star, ion_density=n_e / z_star if ions else None)
    ev = hartree_eV
    result = {
        "potential": describe(pot, reading, strength_text, conditions),
        "bound_state_count": int(cell.bound_state_count),
        "partition_function": _number(cell.partition_function),
        "log_partition_function": _number(cell.log_partition_function),
        "partition_function_omitted_bound": _number(cell.partition_function_omitted_bound, 3),
        "planck_larkin_partition_function": _number(cell.planck_larkin_partition_function),
        "ionization_energy_eV": _number(cell.ionization_energy * ev),
        "unscreened_ionization_energy_eV": _number(unscreened_ionization_energy(Z, pot.mass) * ev),
        "continuum_lowering_eV": _number(cell.continuum_lowering * ev),
        "continuum_lowering_stewart_pyatt_eV": _number(cell.continuum_lowering_stewart_pyatt * ev),
        "continuum_lowering_ecker_kroll_eV": _number(cell.continuum_lowering_ecker_kroll * ev),
        "ionized_fraction": _number(cell.ionized_fraction),
        "level_set_status": _status_name(cell.level_set_status),
        "level_set_reason": cell.level_set_reason,
        "convention": SAHA_CONVENTION,
    }
    return result, title(pot, reading, strength_text, conditions)


def _status_name(code):
    from ..engine.status import LEVEL_SET_STATUS

    return LEVEL_SET_STATUS[int(code)]


def _semiconductor(args):
    reading = reading_of(args)
    preset = reading.trade
    if args.carrier_density is not None:
        raise InputError("--carrier-density does not apply to populations: the free-carrier density is solved for; "
                         "give --donor-concentration (or --pair-density with --hole-mass)")
    if args.temperature_K is None:
        raise InputError("--temperature-K (K) is required with --preset semiconductor")
    screening = preset.screening_length_at  # λ(n m⁻³, T K) in metres, the preset's model
    if preset.hole_mass is None:
        if args.pair_density is not None:
            raise InputError("--pair-density needs --hole-mass (an exciton); a donor takes --donor-concentration")
        if args.donor_concentration is None:
            raise InputError("--donor-concentration (N_D, cm-3) is required with --preset semiconductor")
        out = donor_freeze_out(args.donor_concentration, args.temperature_K, effective_mass=preset.effective_mass,
                               permittivity=preset.permittivity, screening_length_m=screening)
        total_key, header = "donor_concentration_cm-3", "donor freeze-out"
    else:
        if args.donor_concentration is not None:
            raise InputError("--donor-concentration applies to a donor (no --hole-mass); an exciton takes --pair-density")
        if args.pair_density is None:
            raise InputError("--pair-density (cm-3) is required with --preset semiconductor --hole-mass")
        out = exciton_ionization(args.pair_density, args.temperature_K, electron_mass=preset.effective_mass,
                                 hole_mass=preset.hole_mass, permittivity=preset.permittivity,
                                 screening_length_m=screening)
        total_key, header = "pair_density_cm-3", "exciton ⇄ electron–hole plasma"
    units = effective_atomic_units(preset.reduced_mass, preset.permittivity)
    rydberg_meV = units.energy_eV * 1e3 / 2.0  # I₀ = μ*/(2ε_r²) hartree
    result = {
        "preset": "semiconductor", "effective_mass": preset.effective_mass, "hole_mass": preset.hole_mass,
        "permittivity": preset.permittivity, "screening": preset.screening,
        total_key: _number(out.total_cm3), "temperature_K": out.temperature_K,
        "free_density_cm-3": _number(out.free_density_cm3),
        "ionized_fraction": _number(out.ionized_fraction),
        "ionization_energy_meV": _number(out.binding_energy_meV),
        "unscreened_ionization_energy_meV": _number(rydberg_meV),
        "continuum_lowering_meV": _number(rydberg_meV - out.binding_energy_meV),
        "screening_length_nm": _number(out.screening_length_nm),
        "effective_density_of_states_cm-3": _number(out.effective_density_of_states_cm3),
        "solutions_cm-3": [_number(v) for v in out.solutions_cm3],
        "jumps_cm-3": [_number(v) for v in out.jumps_cm3],
        "status": out.status, "reason": out.reason,
    }
    return result, f"{header}, semiconductor m* = {preset.effective_mass:g}, ε_r = {preset.permittivity:g}"


def _table(result, header):
    print(f"# {header}")
    for key, value in result.items():
        if key in ("potential", "convention"):
            continue
        shown = "—" if value is None else (f"{value:.10g}" if isinstance(value, float) else value)
        print(f"{key:>38}  {shown}")
    if "convention" in result:
        print(f"# Saha: {result['convention']}")
