"""boundscape: bound states of screened central potentials, their energies, exact counts and
critical screening lengths, in atomic units (hartree, bohr, electron masses).

The package is layered (see DEVELOPERS.md): ``engine`` (the radial problem), ``physics``
(units and presets), ``sweep`` (config → plan → tiles), ``cube`` (the NetCDF data model),
``plots`` and ``cli``.  The names below are the engine's; its solvers load on first use.
"""

from .engine import FAMILIES, Potential, family_parameters, potential
from .errors import ConvergenceError, InputError
from .lazy import lazy_exports
from .version import VERSION as __version__

__getattr__, __dir__ = lazy_exports(__name__, {
    name: ".engine" for name in ("BoundLevels", "Resolution", "bound_levels", "count_bound", "LevelSet", "level_set",
                                 "critical_screening_length",
                                 "critical_strength", "zero_energy_solution", "Resonances", "resonances",
                                 "dissolution_screening_length", "Lines", "lines", "Scattering", "scattering",
                                 "PhaseShifts", "phase_shifts", "Fit", "solve_for", "ControlParameter", "OutOfReach")})

__all__ = [
    "FAMILIES", "Potential", "potential", "family_parameters", "BoundLevels", "Resolution", "bound_levels",
    "LevelSet", "level_set",
    "count_bound", "critical_screening_length", "critical_strength", "zero_energy_solution", "Resonances",
    "resonances", "dissolution_screening_length", "Lines", "lines", "Scattering", "scattering", "PhaseShifts",
    "phase_shifts", "Fit", "solve_for", "ControlParameter", "OutOfReach", "InputError", "ConvergenceError", "__version__",
]
