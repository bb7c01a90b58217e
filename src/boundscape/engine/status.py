"""Status codes of a solved level or cell, one home for the engine, the sweep and the cube.

The code is the position in :data:`LEVEL_STATUS` (CF ``flag_values``); the names are the
CF ``flag_meanings``.
"""

__all__ = ["LEVEL_STATUS", "OK", "NOT_CONVERGED", "INPUT_REJECTED", "RESONANCE_STATUS", "DISSOLVED", "LEVEL_SET_STATUS"]

LEVEL_STATUS = ("ok", "not_converged", "input_rejected")
OK, NOT_CONVERGED, INPUT_REJECTED = range(len(LEVEL_STATUS))

# A state past its threshold (:mod:`.continuum.lost_states`): ok and not_converged keep their codes;
# dissolved means Γ > E_r or the pole is out of reach (the reason says which).
RESONANCE_STATUS = ("ok", "not_converged", "dissolved")
DISSOLVED = RESONANCE_STATUS.index("dissolved")

# A potential's complete level set (:mod:`.bound.level_set`): complete; a level short of its
# tolerance; the levels above a principal-number cut left out (their counts exact); a Coulomb
# tail or confining potential (infinitely many); a count beyond the engine's limits.
LEVEL_SET_STATUS = ("complete", "level_not_converged", "truncated", "infinitely_many", "beyond_engine_limits")
