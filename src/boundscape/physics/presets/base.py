"""What every preset answers, and the answers of the engine's own reading (atomic units).

A preset is one class.  The cube, the figures, the command line and the workflow ask it their
questions (which unit system a cube is read in, which coordinates it gains, how its strength axis
is named, which columns the loss table carries, whether a condition map exists and how it reads)
and never test its type.  :class:`Preset` holds the answers of a named preset read in atomic
units; a trade overrides what differs; :class:`NoPreset` answers for a cube or command that names
no preset, so that callers need not test for ``None`` either.

Adding a preset: one module with one subclass (a frozen dataclass of its conditions), overriding
what its trade reads differently, and one entry in ``PRESETS`` (``physics/presets/__init__.py``).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar, NamedTuple

import numpy as np

from ..units import ATOMIC, UnitSystem
from .strengths import StrengthReading, read_strength

__all__ = ["EngineParameters", "Unit", "ConditionAxes", "ConditionGrid", "Preset", "NoPreset", "NO_PRESET"]


@dataclass(frozen=True)
class EngineParameters:
    """Engine inputs (strength, screening length, mass) in the units of ``units``."""

    strength: float
    screening_length: float
    mass: float
    units: UnitSystem


class Unit(NamedTuple):
    """A unit people read: its name and its size in SI units (J for an energy, m for a length)."""

    name: str
    size: float


@dataclass(frozen=True)
class ConditionAxes:
    """How a condition map reads a preset: surviving states over a density (× a temperature).

    Attributes
    ----------
    density_label : str
        The density axis' label, in cm⁻³.
    charge_name : str
        What a panel's strength is ("nuclear charge Z").
    temperature_label : str
        The temperature axis' label, in the preset's temperature unit.
    temperature_key : str
        The ``preset.map`` key that sets the temperature axis.
    temperature_default : dict
        That axis when the key is absent: ``{start, stop, num}``, log-spaced.
    temperature_fixed : float or None
        Where the screening length does not depend on temperature, the one temperature drawn
        (the map is a single density axis); ``None`` draws a temperature axis.
    over : str
        What the title says the map runs over.
    validity_label : str
        The legend entry of the line (or shaded range) where the screening model fails.
    validity_gid : str or None
        The matplotlib ``gid`` of that line, for tests and readers of the SVG/PDF.
    """

    density_label: str
    charge_name: str
    temperature_label: str
    temperature_key: str
    temperature_default: dict
    temperature_fixed: float | None
    over: str
    validity_label: str
    validity_gid: str | None = None


@dataclass(frozen=True)
class ConditionGrid:
    """A sweep over a trade's conditions, and the engine cell of each condition.

    Attributes
    ----------
    strength_dim : str
        The cube's first dimension: ``"strength"`` (Z) or ``"coupling"`` (g², MeV fm).
    strength_values, engine_strength : ndarray
        Its values as the config gives them, and as engine strengths (one each).
    length_dims : tuple of str
        The condition dimensions that set the screening length (``electron_density``,
        ``electron_temperature``; ``range``).
    length_values : tuple of ndarray
        Their values, as the config gives them (cm⁻³, eV, K, fm).
    engine_length : ndarray
        The engine's screening length at every condition, over ``length_dims`` (outer product),
        in the cube's length unit.
    attributes : dict
        ``{dimension: {"long_name", "units"}}`` of the strength and condition dimensions.
    """

    strength_dim: str
    strength_values: np.ndarray
    engine_strength: np.ndarray
    length_dims: tuple[str, ...]
    length_values: tuple[np.ndarray, ...]
    engine_length: np.ndarray
    attributes: dict


class Preset:
    """A named preset read in atomic units: the defaults each trade's preset overrides.

    Class attributes
    ----------------
    kind : str or None
        The config's ``preset.kind`` (``None``: no preset).
    energy_unit, length_unit : Unit or None
        The units the trade reads energies and lengths in (figures' second axes, ``readable``,
        the loss table's length column); ``None``: the cube's own units are the trade's.
    grid_axes : tuple of str
        Grid keys, besides the engine's own, that the preset reads (``coupling_MeV_fm``).
    config_names : dict
        Config keys spelled differently from the class's fields (``units`` → ``units_choice``).
    command_line : tuple of (flag, field, required)
        The command-line flags that build the preset, in the order they are checked.
    strength_flag, strength_meaning : str
        The flag that gives the strength under this preset, and what it holds.
    mass_given_by : str or None
        Why ``--mass`` does not apply (the preset gives the mass), or ``None`` if it does.
    named_length_units : dict
        Length units only this preset can read (``{"a*": "ε_r/μ* bohr"}``), with their meaning.
    density_name : str or None
        The density a screening length stands for (``electron_density``); ``None`` if none.
    length_flag : tuple of (flag, help) or None
        The command-line flag of the condition that sets the screening length (``--density``,
        ``--carrier-density``, ``--range``), instead of ``--screening-length``.
    temperature_flag : str or None
        The command-line flag of the temperature that flag needs (``--temperature``).
    line_units : tuple of str
        How ``boundscape lines`` shows a line's energy: the energy unit, then any of ``nm``
        (vacuum wavelength), ``cm-1`` (wavenumber), ``THz`` (frequency).
    condition_keys : tuple of str
        Grid keys that name the trade's conditions (``electron_density``, ``electron_temperature``),
        in the cube's order: a sweep over them instead of ``screening_length``.
    condition_labels : dict
        Figure labels (matplotlib mathtext, with units) of the condition dimensions.
    condition_strength_key : str
        The grid key of a condition sweep's strength axis (``strength``; ``coupling`` for nuclear).
    reference_key : str or None
        The config key of the reference temperature a sweep over screening lengths reads its
        lengths at (refused in a sweep over temperatures).
    legacy_defaults : dict
        Field values a sweep over ``screening_length`` that does not name them keeps (the
        screening model it was computed with before condition sweeps existed).
    """

    kind: ClassVar[str | None] = None
    energy_unit: ClassVar[Unit | None] = None
    length_unit: ClassVar[Unit | None] = None
    grid_axes: ClassVar[tuple[str, ...]] = ()
    config_names: ClassVar[dict[str, str]] = {}
    command_line: ClassVar[tuple[tuple[str, str, bool], ...]] = ()
    strength_flag: ClassVar[str] = "--strength"
    strength_meaning: ClassVar[str] = "the engine's strength"
    mass_given_by: ClassVar[str | None] = None
    named_length_units: ClassVar[dict[str, str]] = {}
    density_name: ClassVar[str | None] = None
    length_flag: ClassVar[tuple[str, str] | None] = None
    temperature_flag: ClassVar[str | None] = None
    line_units: ClassVar[tuple[str, ...]] = ("eV", "nm")
    condition_keys: ClassVar[tuple[str, ...]] = ()
    condition_labels: ClassVar[dict[str, str]] = {}
    condition_strength_key: ClassVar[str] = "strength"
    reference_key: ClassVar[str | None] = None
    legacy_defaults: ClassVar[dict] = {}

    # -- units ------------------------------------------------------------------------------
    def unit_system(self, cube_mass: float = 1.0) -> UnitSystem:
        """The unit system a cube of engine mass ``cube_mass`` is read in (raises
        :class:`~boundscape.errors.InputError` if that mass does not fit the preset)."""
        return ATOMIC

    def unit_names(self) -> tuple[str, str]:
        """Names of the cube's (length, energy) units, as axis labels say them."""
        return "bohr", "hartree"

    def shown_energy_unit(self, cube_mass: float = 1.0):
        """(name, factor from the cube's energy unit) of the trade's energy unit."""
        return self.energy_unit.name, self.unit_system(cube_mass).energy_J / self.energy_unit.size

    def shown_length_unit(self, cube_mass: float = 1.0):
        """(name, factor from the cube's length unit) of the trade's length unit."""
        return self.length_unit.name, self.unit_system(cube_mass).length_m / self.length_unit.size

    def sweep_mass(self, mass: float | None, section: dict) -> float:
        """The engine's reduced mass for a sweep: ``potential.mass`` (``None`` if absent) under
        this preset, whose config mapping is ``section``; given once, never applied twice."""
        return 1.0 if mass is None else float(mass)

    # -- the strength axis ------------------------------------------------------------------
    def strength_values(self, strength, cube_mass: float = 1.0):
        """The strengths as the trade reads them (a charge number, a coupling g²)."""
        return np.asarray(strength)

    def strength_label(self, attrs: dict) -> str:
        """The strength axis' label; ``attrs`` are the cube's strength attributes."""
        units = attrs.get("units", "1")
        name = attrs.get("long_name", "strength")
        if units == "1":
            return "strength Z" if name.startswith("charge number") else f"strength ({name})"
        return f"{name} (hartree)" if units.endswith(" J") else f"{name} ({units})"

    def strength_text(self, value: float, attrs: dict) -> str:
        """One strength, as a panel title names it (``value`` as :meth:`strength_values` gives it)."""
        return f"Z = {value:g}" if self.strength_label(attrs) == "strength Z" else f"strength {value:g}"

    @property
    def strength_long_name(self) -> str | None:
        """The cube's ``long_name`` of the strength axis (``None``: the family's own stands)."""
        return None

    # -- the cube ---------------------------------------------------------------------------
    def physical_coordinates(self, strength, screening_length_m, cube_mass: float = 1.0,
                             dims=("screening_length",)) -> dict:
        """The coordinates the preset adds to a cube: ``{name: (dimensions, values, attributes)}``.

        ``strength`` is the cube's strength values, ``screening_length_m`` its screening lengths
        in metres, over ``dims`` (the screening-length axis, or the condition axes of a sweep over
        the trade's conditions)."""
        unit = self.length_unit
        return {f"screening_length_{unit.name}": (tuple(dims), screening_length_m / unit.size, {
            "long_name": f"screening length in {unit.name} ({self.kind} preset)", "units": unit.name})}

    def cube_attributes(self, cube_mass: float = 1.0) -> dict:
        """Global attributes naming the preset; the units it reads the cube in are the cube's one
        ``energy_unit_in_J``/``energy_unit_in_eV``/``length_unit_in_m`` (one name per value)."""
        return {"preset": self.kind}

    def unit_notes(self, units: UnitSystem, cube_mass: float = 1.0) -> dict:
        """Global ``comment`` and ``mass_units`` of a cube read in ``units`` (not atomic units)."""
        return {}

    def table_strength(self, strength, cube_mass: float = 1.0) -> tuple[str, float]:
        """(column name, value) of an engine strength in the loss table, as the trade reads it."""
        return "strength", float(strength)

    def critical_length_columns(self, strength, critical_length: float, cube_mass: float = 1.0) -> dict:
        """The loss table's columns of one stored critical length (cube units), beyond the bohr one."""
        name, factor = self.shown_length_unit(cube_mass)
        return {f"critical_screening_length_{name}": critical_length * factor}

    # -- the condition map ------------------------------------------------------------------
    @property
    def condition_axes(self) -> ConditionAxes | None:
        """How the condition map reads this preset (``None``: it has none)."""
        return None

    @property
    def has_condition_map(self) -> bool:
        return self.condition_axes is not None

    # -- the screening model and sweeps over conditions -------------------------------------
    @property
    def screening_model(self) -> str | None:
        """The screening model (``finite_temperature``, ``debye``, ``thomas_fermi``), or ``None``
        where the screening length is not read from a medium."""
        return None

    def condition_attributes(self) -> dict:
        """``{grid key: {"long_name", "units"}}`` of :attr:`condition_keys`."""
        return {}

    def condition_grid(self, strength, axes: dict, cube_mass: float = 1.0) -> ConditionGrid:
        """The engine cells of a sweep over :attr:`condition_keys` (``axes``: their values as the
        config gives them; ``strength``: the grid's strengths, if the preset reads them)."""
        raise NotImplementedError(f"preset {self.kind} has no condition axes")

    def validity(self, density_m3, temperature):
        """Γ, N_D, k_B T/E_F and the validity flag of the screening model at each condition
        (:class:`~boundscape.physics.screening.Validity`), or ``None`` where nothing screens."""
        return None

    @property
    def validity_flags(self):
        """(flag names, {name: reason}) of :meth:`validity`, or ``None``."""
        return None

    def length_conditions(self, screening_length_m):
        """(density m⁻³, temperature) a sweep over screening lengths reads each length as, or
        ``None``."""
        return None

    def trade_criticals(self, critical_length_m, grid: ConditionGrid | None, strength_dim: str = "strength") -> dict:
        """Critical values in the trade's terms that the preset derives from the stored critical
        lengths (m, over (strength, l, n_r)): ``{name: (dims, values, attributes)}``."""
        return {}

    def critical_strength_variable(self) -> tuple[str, dict]:
        """(cube variable name, CF attributes) of the critical strength at each screening length,
        in the units of :meth:`strength_values`."""
        return "critical_strength", {"long_name": "critical strength at this screening length", "units": "1"}

    @property
    def critical_strengths_wanted(self) -> bool:
        """Whether a sweep also stores the critical strength at each screening length (the
        nuclear critical coupling at each range)."""
        return False

    # -- the command line -------------------------------------------------------------------
    def command_line_reading(self) -> dict:
        """The unit system the command line runs the engine in and the units it prints:
        ``units``, ``energy_unit``, ``energy_factor`` (engine → shown), ``length_unit``,
        ``length_factor`` and a ``description``."""
        raise NotImplementedError

    def command_line_length(self, value: float, units: UnitSystem) -> float:
        """The engine's screening length (in ``units``) of the value given with :attr:`length_flag`."""
        raise NotImplementedError(f"preset {self.kind} takes no {self.length_flag}")

    def command_line_conditions(self, value: float) -> dict:
        """The conditions of the value given with :attr:`length_flag`, and the screening model's
        validity there, as the command line prints them (keys carry their unit)."""
        return {}

    def critical_columns(self, critical_length_m: float) -> dict:
        """The command line's columns of one critical screening length (m) in the trade's terms
        (the density at which the state is lost, ...); ``{}`` if none."""
        return {}

    def strength_input(self, value: float) -> tuple[float, str]:
        """(engine strength, how a header names it) of the value given with :attr:`strength_flag`."""
        return float(value), f"strength {value:g}"

    def named_length_m(self, unit: str) -> float:
        """The size in metres of a length unit in :attr:`named_length_units`."""
        raise KeyError(unit)

    def strength_reading(self, info) -> StrengthReading:
        """How the command line takes family ``info``'s strength under this preset: by the
        strength's dimension (:func:`~.strengths.read_strength`)."""
        return read_strength(self, info, self.command_line_reading()["units"].energy_J)

    def length_reading(self, info, charge: float | None = None):
        """What reads the value of :attr:`length_flag` as family ``info``'s length: the preset
        itself (:meth:`command_line_length`, :meth:`command_line_conditions`,
        :meth:`critical_columns`) where that length is a screening length; ``None`` where the
        condition cannot set it (a well's radius).  ``charge`` is the strength given, if any."""
        return self if info.length_kind == "screening_length" else None

    def for_family(self, info) -> "Preset":
        """This preset as it reads family ``info``'s sweeps (a plasma reads an ion sphere's radius
        from the density); raises :class:`~boundscape.errors.InputError` for a setting the family
        cannot use."""
        return self

    def condition_sets_length(self, info) -> bool:
        """Whether a sweep over :attr:`condition_keys` can set family ``info``'s length."""
        return info.length_kind == "screening_length"

    def coupling_reading(self, info) -> StrengthReading:
        """How the command line takes a charge-like strength (dimension ``"1"``): with
        :attr:`strength_flag`, as :meth:`strength_input` reads it (and names it)."""
        own = self.strength_flag == "--strength"
        return StrengthReading(self.strength_flag, info.strength_meaning if own else self.strength_meaning,
                               "strength", None, self.strength_input(1.0)[0], None)


class NoPreset(Preset):
    """No preset: the engine's own reading, atomic units (hartree, bohr, electron masses)."""

    def __eq__(self, other):
        return type(other) is NoPreset

    def __hash__(self):
        return hash(NoPreset)

    def __repr__(self):
        return "NoPreset()"

    def shown_energy_unit(self, cube_mass: float = 1.0):
        return None, None

    def shown_length_unit(self, cube_mass: float = 1.0):
        return None, None

    def physical_coordinates(self, strength, screening_length_m, cube_mass: float = 1.0,
                             dims=("screening_length",)) -> dict:
        return {}

    def cube_attributes(self, cube_mass: float = 1.0) -> dict:
        return {}

    def critical_length_columns(self, strength, critical_length: float, cube_mass: float = 1.0) -> dict:
        return {}

    def command_line_reading(self) -> dict:
        return {"units": ATOMIC, "energy_unit": "hartree", "energy_factor": 1.0, "length_unit": "bohr",
                "length_factor": 1.0, "description": "atomic units"}


NO_PRESET = NoPreset()
