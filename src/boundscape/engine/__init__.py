"""The radial problem and nothing else: families, the mapped grid and operator, the exterior
solution, zero-energy counts and critical parameters, bound levels, what each lost state
becomes past its threshold (resonances, virtual states), and the E1 lines between levels.

Imports numpy, scipy and numba only (xarray just to read a NetCDF potential table, when
asked): no workflow, no plotting, no output files.  The compiled kernels are cached on disk
(see :mod:`.jitcache`); the solvers are imported on first use.
"""

import importlib

from .families import FAMILIES, Family, family_info
from .potential import Potential, potential, potential_from_spec
from .lines import Lines, lines  # the function shadows its module's name: import it, not lazily
from .resonances import (Resonances, dissolution_screening_length, load_trajectory_records, resonances,
                         shares_trajectories, trajectory_records)
from .status import DISSOLVED, INPUT_REJECTED, LEVEL_STATUS, NOT_CONVERGED, OK, RESONANCE_STATUS
from .tables import Table, load_table

# The solvers load numba and the compiled kernels (some 100 MB): only when first used, so that a
# step that only reads cubes (collect, figures) stays light.
_SOLVERS = {"BoundLevels": "levels", "bound_levels": "levels", "count_bound": "zero_energy",
            "zero_energy_solution": "zero_energy", "critical_screening_length": "critical",
            "critical_strength": "critical"}


def __getattr__(name):
    if name in _SOLVERS:
        value = getattr(importlib.import_module(f".{_SOLVERS[name]}", __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


__all__ = [
    "FAMILIES", "Family", "family_info", "Potential", "potential", "potential_from_spec", "Table", "load_table",
    "BoundLevels", "bound_levels", "count_bound", "zero_energy_solution",
    "critical_screening_length", "critical_strength",
    "Resonances", "resonances", "dissolution_screening_length", "Lines", "lines",
    "shares_trajectories", "trajectory_records", "load_trajectory_records",
    "LEVEL_STATUS", "OK", "NOT_CONVERGED", "INPUT_REJECTED", "RESONANCE_STATUS", "DISSOLVED",
]
