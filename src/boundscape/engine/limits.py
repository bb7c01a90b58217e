"""How much one engine call may be asked for: every call is bounded in memory and in time
proportional to what was asked, and a request beyond a limit is a one-line :class:`LimitError`
naming the limit, never a hang or an out-of-memory kill.

The sweep's own limits (``boundscape.sweep.limits``) repeat the first two.
"""

from __future__ import annotations

from ..errors import InputError

__all__ = ["LimitError", "MAX_L", "MAX_CRITICAL_STATES", "MAX_LEVELS", "MAX_LOST", "MAX_NODES", "check_l",
           "check_count"]

# A level of angular momentum l has n > l; a hydrogen-like one has <r> = (3n² − l(l+1))/(2Z)
# bohr (any QM textbook), about 10^6/Z bohr at n = l + 1 = 1001: beyond any screened ion,
# donor or nucleus this models.
MAX_L = 1000
# States per l whose critical parameter is searched: the root searches cost about n_r² per l
# (yukawa, l = 0: 1.2 s for 20 states, 5.6 s for 100, measured on the development machine).
MAX_CRITICAL_STATES = 200
# Levels of one l asked of a potential that binds infinitely many (a Coulomb tail, an oscillator):
# the n = 1000 hydrogen level lies 5e-7 hartree below threshold, 2e6 bohr out (~0.2 ms each).
MAX_LEVELS = 1000
# States past the bound ones followed to a resonance or virtual state in one call (~0.2-0.5 s
# each; far above threshold they have long dissolved).
MAX_LOST = 50
# Nodes of one grid (refinements included): its arrays hold five float64 rows, 160 MB at the
# limit.  Past it, a potential binds so many states that counting them exactly is beyond the
# machine (a screening length of 10^12 bohr binds about 10^6 s states).
MAX_NODES = 4_000_000


class LimitError(InputError):
    """A request beyond one of the engine's limits; the message names the limit."""


def check_l(l: int) -> int:
    if l > MAX_L:
        raise LimitError(f"l = {l} is beyond the engine's limit l ≤ {MAX_L} (such a level lies ~10^6 bohr out)")
    return l


def check_count(value: int, what: str, limit: int, why: str) -> int:
    if value > limit:
        raise LimitError(f"{what} = {value} is beyond the engine's limit of {limit} ({why})")
    return value
