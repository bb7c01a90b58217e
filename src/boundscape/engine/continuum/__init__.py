"""Past the threshold: the radial equation carried along (complex) paths, the outgoing-wave
exterior, the Siegert condition, poles followed from their thresholds, and what each lost state
becomes (a shape resonance or a virtual state); and scattering below and above threshold
(scattering lengths, effective ranges, phase shifts)."""

from .lost_states import Resonances, resonances
from .phase_shifts import PhaseShifts, phase_shifts
from .scattering import Scattering, scattering
from .universal import dissolution_screening_length, load_trajectory_records, shares_trajectories, trajectory_records

__all__ = ["Resonances", "resonances", "dissolution_screening_length", "shares_trajectories", "trajectory_records",
           "load_trajectory_records", "Scattering", "scattering", "PhaseShifts", "phase_shifts"]
