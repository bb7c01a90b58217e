"""Status codes of a solved level or cell, one home for the engine, the sweep and the cube.

The code is the position in :data:`LEVEL_STATUS` (CF ``flag_values``); the names are the
CF ``flag_meanings``.
"""

__all__ = ["LEVEL_STATUS", "OK", "NOT_CONVERGED", "INPUT_REJECTED", "RESONANCE_STATUS", "DISSOLVED"]

LEVEL_STATUS = ("ok", "not_converged", "input_rejected")
OK, NOT_CONVERGED, INPUT_REJECTED = range(len(LEVEL_STATUS))

# A state past its threshold (:mod:`.continuum.lost_states`): ok and not_converged keep their codes;
# dissolved means Γ > E_r or the pole is out of reach (the reason says which).
RESONANCE_STATUS = ("ok", "not_converged", "dissolved")
DISSOLVED = RESONANCE_STATUS.index("dissolved")
