"""Physical presets: plasma, semiconductor and nuclear conditions as engine parameters, and back.

Each preset is one class (:class:`Preset`) that answers every question the cube, the figures,
the command line and the workflow ask of it: in which :class:`~boundscape.physics.units.UnitSystem`
a cube's numbers are read, which physical coordinates it gains, how its axes are labelled, which
columns the loss table carries, how a condition map reads it, how the command line builds it and
prints in its units.  :data:`NO_PRESET` answers the same questions for atomic units.  The engine
itself only ever sees (strength, screening length, mass) in the preset's units.

* plasma -- atomic units; the strength is the ion charge Z; λ is the Debye length.
* semiconductor -- effective atomic units (strength = donor charge, mass 1, lengths in a*,
  energies in 2Ry*) or true atomic units (strength = donor charge/ε_r, mass = μ*).
* nuclear -- lengths in b fm, the engine's mass in multiples of μ/m, so that Z·m·λ = μ g² λ/(ħc)².
"""

from __future__ import annotations

from ...engine import FAMILIES
from ...errors import InputError
from .base import NO_PRESET, ConditionAxes, ConditionGrid, EngineParameters, NoPreset, Preset, Unit
from .carriers import CarrierScreening
from .ion_sphere import IonSpherePlasma  # registers itself as the plasma's reading of an ion sphere
from .nuclear import Nuclear
from .nuclear_depth import NuclearDepth  # registers itself as the nuclear reading of a depth
from .plasma import Plasma
from .donors import DonorSemiconductor
from .semiconductor import Semiconductor

__all__ = ["Preset", "NoPreset", "NO_PRESET", "CarrierScreening", "Plasma", "IonSpherePlasma", "Semiconductor",
           "DonorSemiconductor", "Nuclear", "NuclearDepth", "PRESETS", "VARIANTS", "from_config", "EngineParameters",
           "Unit", "ConditionAxes", "ConditionGrid", "is_condition_sweep"]

# The config's preset.kind (and the command line's --preset) -> its class.
PRESETS: dict[str, type[Preset]] = {cls.kind: cls for cls in (Plasma, Semiconductor, Nuclear)}
# A kind swept over other conditions: the class whose first condition key is in the grid.
VARIANTS: dict[str, tuple[type[Preset], ...]] = {"semiconductor": (DonorSemiconductor,)}


def is_condition_sweep(grid: dict | None) -> bool:
    """Whether a config's ``grid`` runs over a trade's conditions rather than ``screening_length``."""
    classes = [*PRESETS.values(), *(cls for variants in VARIANTS.values() for cls in variants)]
    keys = {key for cls in classes for key in cls.condition_keys}
    return bool(grid) and any(key in keys for key in grid)


def from_config(section: dict | None, grid: dict | None = None, family: str | None = None) -> Preset:
    """The preset of the config's ``preset`` mapping (:data:`NO_PRESET` if absent).

    ``grid`` is the config's grid: a sweep over ``screening_length`` (not over the trade's
    conditions) keeps the preset's :attr:`~Preset.legacy_defaults` for the keys it does not give,
    so that a configuration written before condition sweeps reads its cube as it did.  ``family``
    (``potential.family``) gives the preset as it reads that family (:meth:`Preset.for_family`)."""
    if not section:
        return NO_PRESET
    section = dict(section)
    kind = section.pop("kind", None)
    if kind not in PRESETS:
        raise InputError(f"preset.kind must be one of {', '.join(PRESETS)}, got {kind!r}")
    section.pop("map", None)  # plotting ranges, read by the figures
    cls = next((v for v in VARIANTS.get(kind, ()) if grid and v.condition_keys[0] in grid), PRESETS[kind])
    section = {cls.config_names.get(key, key): value for key, value in section.items()}
    if grid is not None and not is_condition_sweep(grid):
        section = {**cls.legacy_defaults, **section}
    try:
        preset = cls(**section)
    except TypeError as exc:
        raise InputError(f"preset {kind}: {exc}") from None
    return preset if family is None or family not in FAMILIES else preset.for_family(FAMILIES[family])
