"""How a preset reads a family's strength and its own parameters: by their dimension, which the
family declares (``Family.strength_dimension``, ``Parameter.unit``), never by the family's name.

A family's strength is a charge-like coupling (dimension ``"1"``: Z in atomic units, where
e²/4πε₀ = 1, so Z·(energy unit)·(length unit) is an energy × length), a depth (``"energy"``) or
an angular frequency (``"angular_frequency"``, read as ħω).  Each trade reads them in its own
units:

=============  ===========================  =================  ==============
preset         coupling (dimension ``1``)   depth              ħω
=============  ===========================  =================  ==============
(none)         ``--strength`` (atomic)      hartree            hartree
plasma         ``--nuclear-charge`` Z       eV                 eV
semiconductor  ``--strength`` (charge)      meV                meV
nuclear        ``--coupling`` g² in MeV fm  MeV                MeV
=============  ===========================  =================  ==============

A depth or ħω is always given with ``--strength``, in the preset's energy unit.  The family's own
parameters with a length unit (a Woods–Saxon diffuseness) are read in the command line's
``--length-unit``; dimensionless ones (the two-Yukawa ratios) as given.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["StrengthReading", "read_strength", "PARAMETER_DIMENSIONS"]

# A family parameter's declared unit (atomic units) -> its dimension.
PARAMETER_DIMENSIONS = {"bohr": "length", "hartree": "energy", "1": "1", "": "1"}

# The JSON key's word for each strength dimension (critical_depth_MeV, critical_coupling_MeV_fm).
_QUANTITY = {"energy": "depth", "angular_frequency": "hbar_omega"}


@dataclass(frozen=True)
class StrengthReading:
    """How the command line takes a family's strength under a preset.

    Attributes
    ----------
    flag : str
        The flag that gives it (``--strength``, ``--nuclear-charge``, ``--coupling``).
    meaning : str
        What that flag holds, with its unit ("well depth V0, MeV").
    quantity : str
        The word of the unit-carrying JSON keys (``coupling``, ``depth``, ``strength``).
    unit : str or None
        The unit the value is given in; ``None`` for a number (Z) or the engine's own units.
    per_shown : float
        The engine strength of one given unit (the reading is linear).
    header : str or None
        How a header names a value, a template of ``value`` ("V0 = {value:g} MeV"); ``None``:
        as the preset's ``strength_input`` names it.
    """

    flag: str
    meaning: str
    quantity: str
    unit: str | None
    per_shown: float
    header: str | None

    def engine(self, value: float) -> float:
        """The engine strength of a value given with :attr:`flag`."""
        return float(value) * self.per_shown

    def shown(self, engine_strength: float) -> float:
        """An engine strength as the flag reads it."""
        return float(engine_strength) / self.per_shown

    def text(self, value: float) -> str:
        """The header's words for a value given with :attr:`flag`."""
        return self.header.format(value=value)

    @property
    def unit_key(self) -> str | None:
        """The JSON key of a critical strength in :attr:`unit` (``None`` without a unit)."""
        return f"critical_{self.quantity}_{self.unit.replace(' ', '_')}" if self.unit else None


def read_strength(preset, info, engine_energy_J: float) -> StrengthReading:
    """How ``preset`` reads the strength of family ``info`` whose engine energy unit is
    ``engine_energy_J`` (J): a coupling as the preset's :meth:`~.base.Preset.coupling_reading`
    says, a depth or ħω with ``--strength`` in the preset's energy unit."""
    dimension = info.strength_dimension
    if dimension == "1" or preset.energy_unit is None:
        return preset.coupling_reading(info)
    unit = preset.energy_unit
    long_name = "ħω" if dimension == "angular_frequency" else info.strength_long_name
    symbol = "ħω" if dimension == "angular_frequency" else info.strength_symbol
    return StrengthReading("--strength", f"{long_name}, {unit.name}", _QUANTITY.get(dimension, "strength"),
                           unit.name, unit.size / engine_energy_J, f"{symbol} = {{value:g}} {unit.name}")
