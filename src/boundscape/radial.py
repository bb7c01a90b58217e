"""Interim placeholder: the radial engine is being written (lands within the hour)."""
from dataclasses import dataclass
import numpy as np


@dataclass
class BoundLevels:
    l: int
    energy: np.ndarray
    n_r: np.ndarray
    energy_error: np.ndarray
    mean_radius: np.ndarray
    num_bound: int


def bound_levels(potential, l, n_r_max=None, wavefunctions=False):
    raise NotImplementedError("engine not yet landed")
