"""Bound states: the mapped grid, compiled Numerov kernels, whole cells, levels, zero-energy
counts, complete level sets and critical parameters."""

from .critical import critical_screening_length, critical_strength
from .level_set import LEVEL_SET_STATUS, LevelSet, level_set
from .levels import BoundLevels, LevelSolution, Resolution, bound_levels, level_on_grid, level_solutions, solve_level
from .zero_energy import count_bound, zero_energy_solution

__all__ = ["BoundLevels", "LevelSolution", "Resolution", "bound_levels", "solve_level", "level_solutions",
           "level_on_grid", "count_bound", "zero_energy_solution", "critical_screening_length", "critical_strength",
           "LevelSet", "level_set", "LEVEL_SET_STATUS"]
