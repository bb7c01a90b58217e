"""The radial problem and nothing else, in subpackages by idea:

* :mod:`.potentials` — the families (each one class), tables, the :class:`Potential` of a cell,
  the closed-form exterior solutions;
* :mod:`.bound` — the mapped grid, compiled Numerov kernels, whole cells, levels, zero-energy
  counts, complete level sets (every bound (n_r, l)) and critical parameters;
* :mod:`.continuum` — propagation along complex paths, the outgoing-wave exterior, the Siegert
  condition, poles followed from their thresholds: resonances and virtual states;
* :mod:`.transitions` — the E1 lines between bound levels;
* :mod:`.inverse` — the parameter at which an observable takes a target (:mod:`.control_parameters`:
  what may be varied);
* :mod:`.richardson` (extrapolation), :mod:`.status` (status codes), :mod:`.jitcache` and
  :mod:`.warmup` (where the compiled kernels live).

Imports numpy, scipy and numba only (xarray just to read a NetCDF potential table, when asked):
no workflow, no plotting, no output files.  The solvers are imported on first use
(:mod:`boundscape.lazy`), so that reading families and status codes loads no compiler.
"""

from ..lazy import lazy_exports
from .potentials import (FAMILIES, Family, Parameter, ParameterError, Potential, Table, family_info, family_parameters,
                         load_table, potential, potential_from_spec)
from .status import DISSOLVED, INPUT_REJECTED, LEVEL_SET_STATUS, LEVEL_STATUS, NOT_CONVERGED, OK, RESONANCE_STATUS

__getattr__, __dir__ = lazy_exports(__name__, {
    "BoundLevels": ".bound", "Resolution": ".bound", "bound_levels": ".bound", "count_bound": ".bound",
    "zero_energy_solution": ".bound", "critical_screening_length": ".bound", "critical_strength": ".bound",
    "LevelSet": ".bound", "level_set": ".bound",
    "Resonances": ".continuum", "resonances": ".continuum", "dissolution_screening_length": ".continuum",
    "shares_trajectories": ".continuum", "trajectory_records": ".continuum", "load_trajectory_records": ".continuum",
    "Lines": ".transitions", "lines": ".transitions",
    "Scattering": ".continuum", "scattering": ".continuum", "PhaseShifts": ".continuum", "phase_shifts": ".continuum",
    "Fit": ".inverse", "solve_for": ".inverse", "ControlParameter": ".control_parameters",
    "OutOfReach": ".control_parameters",
})

__all__ = [
    "FAMILIES", "Family", "Parameter", "ParameterError", "family_info", "family_parameters", "Potential", "potential",
    "potential_from_spec", "Table", "load_table", "BoundLevels", "Resolution", "bound_levels", "count_bound",
    "LevelSet", "level_set", "LEVEL_SET_STATUS",
    "zero_energy_solution", "critical_screening_length", "critical_strength", "Resonances", "resonances",
    "dissolution_screening_length", "Lines", "lines", "shares_trajectories", "trajectory_records",
    "load_trajectory_records", "LEVEL_STATUS", "OK", "NOT_CONVERGED", "INPUT_REJECTED", "RESONANCE_STATUS",
    "DISSOLVED", "Scattering", "scattering", "PhaseShifts", "phase_shifts", "Fit", "solve_for", "ControlParameter",
    "OutOfReach",
]
