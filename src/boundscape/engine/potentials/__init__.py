"""Potentials: the families (each one class, :mod:`.family`), tables, the :class:`Potential` of one
cell and its builders.  Imports no compiler: the compiled formulas (:mod:`.kernels`) and the
exterior kernels (:mod:`.exterior`) load numba when a solver first asks for them."""

from . import builtin, nuclear_wells, tabulated  # noqa: F401  (registers the families)
from .family import FAMILIES, Family, Parameter, ParameterError, family_info, register
from .cell_potential import Potential, potential, potential_from_spec
from .tables import Table, load_table, validate_table

__all__ = ["FAMILIES", "Family", "Parameter", "ParameterError", "family_info", "register", "family_parameters", "Potential",
           "potential", "potential_from_spec", "Table", "load_table", "validate_table"]


def family_parameters(name: str) -> tuple[Parameter, ...]:
    """The own parameters of family ``name`` (name, unit, long name, default), beyond strength,
    screening length and mass."""
    return family_info(name).parameters
