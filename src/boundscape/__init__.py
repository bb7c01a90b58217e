"""boundscape: bound states of screened central potentials, their energies, exact counts and
critical screening lengths, in atomic units (hartree, bohr, electron masses).

The package is layered (see DEVELOPERS.md): ``engine`` (the radial problem), ``physics``
(units and presets), ``sweep`` (config → plan → tiles), ``cube`` (the NetCDF data model),
``plots`` and ``cli``.  The names below are the engine's.
"""

from . import engine
from .engine import FAMILIES, Lines, Potential, Resonances, dissolution_screening_length, lines, potential, resonances
from .errors import ConvergenceError, InputError
from .version import VERSION as __version__


def __getattr__(name):
    # the solvers on first use (see boundscape.engine): importing the package stays light
    if name in ("BoundLevels", "bound_levels", "count_bound", "critical_screening_length", "critical_strength",
                "zero_energy_solution"):
        return getattr(engine, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")

__all__ = [
    "FAMILIES", "Potential", "potential", "BoundLevels", "bound_levels", "count_bound",
    "critical_screening_length", "critical_strength", "zero_energy_solution", "Resonances", "resonances", "dissolution_screening_length",
    "Lines", "lines", "InputError", "ConvergenceError", "__version__",
]
