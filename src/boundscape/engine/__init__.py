"""The radial problem and nothing else: families, the mapped grid and operator, the exterior
solution, zero-energy counts and critical parameters, bound levels.

Imports numpy, scipy and numba only (xarray just to read a NetCDF potential table, when
asked): no workflow, no plotting, no output files.  The compiled kernels are cached on disk
(see :mod:`.jitcache`).
"""

from . import jitcache

jitcache.load_kernels()  # before any module that uses the kernels: it sets where they are cached


from .critical import critical_screening_length, critical_strength
from .families import FAMILIES, Family, family_info
from .levels import BoundLevels, bound_levels
from .potential import Potential, potential, potential_from_spec
from .status import INPUT_REJECTED, LEVEL_STATUS, NOT_CONVERGED, OK
from .tables import Table, load_table
from .zero_energy import count_bound, zero_energy_solution

__all__ = [
    "FAMILIES", "Family", "family_info", "Potential", "potential", "potential_from_spec", "Table", "load_table",
    "BoundLevels", "bound_levels", "count_bound", "zero_energy_solution",
    "critical_screening_length", "critical_strength",
    "LEVEL_STATUS", "OK", "NOT_CONVERGED", "INPUT_REJECTED",
]
