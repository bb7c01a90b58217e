"""boundscape: bound states of screened central potentials, their energies, exact counts and
critical screening lengths, in atomic units (hartree, bohr, electron masses)."""

from importlib.metadata import PackageNotFoundError, version as _version

from .errors import ConvergenceError, InputError
from .potentials import FAMILIES, Potential, potential
from .radial import BoundLevels, bound_levels
from .threshold import count_bound, critical_screening_length, critical_strength, zero_energy_solution

try:
    __version__ = _version("boundscape")
except PackageNotFoundError:  # running from a source tree that was not installed
    __version__ = "0.0.0+unknown"

__all__ = [
    "FAMILIES", "Potential", "potential", "BoundLevels", "bound_levels", "count_bound",
    "critical_screening_length", "critical_strength", "zero_energy_solution",
    "InputError", "ConvergenceError", "__version__",
]
