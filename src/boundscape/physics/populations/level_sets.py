"""Level sets by screening length, each solved once: within one call of the populations
functions (a self-consistent search visits a screening length again and again), or across the
cells of a sweep that share an engine cell (pass one :class:`LevelSets` to every call)."""

from __future__ import annotations

from collections import OrderedDict

from ... import engine
from ...checks import positive

__all__ = ["LevelSets", "DEFAULT_MAX_LEVELS", "SEARCH_REACH"]

# Levels solved per set here: enough for a Yukawa Z = 1 at λ ≈ 2000 in full; beyond it a set is
# truncated at n ≤ n_cut with a bound on what it leaves out, which at kT ≪ Z²μ/(2 n_cut²) is
# negligible (see partition.omitted_partition_bound).
DEFAULT_MAX_LEVELS = 2000
# Sets kept (least recently used dropped): a set of 2000 levels holds ~100 kB.
DEFAULT_CAPACITY = 512
# Beyond this Zμλ a set costs ~1000 exact counts (~30 s at Zμλ = 10^6, ~2 s at 10^5, measured),
# and its lowest levels lie within Z/λ of the unscreened ones: the self-consistent searches stop
# there (see balance.solve_balance) rather than spend minutes on a set that cannot change them.
SEARCH_REACH = 1e5


class LevelSets:
    """``sets(λ)``: the :class:`boundscape.LevelSet` of the potential at screening length λ.

    Parameters
    ----------
    family : str
        The screened family (default ``yukawa``, Debye–Hückel screening).
    strength, mass : float
        Z and μ in the engine's units (a donor in effective atomic units: 1 and 1).
    max_levels, principal_cut :
        Passed to :func:`boundscape.level_set`.
    capacity : int
        How many sets are kept.
    max_screening_length : float, optional
        Beyond it (a screening length λ with Zμλ above it) a call returns None instead of a set.
    **params
        The family's own parameters.
    """

    def __init__(self, family: str = "yukawa", strength: float = 1.0, mass: float = 1.0, *,
                 max_levels: int = DEFAULT_MAX_LEVELS, principal_cut: int | None = None,
                 capacity: int = DEFAULT_CAPACITY, max_screening_length: float | None = None, **params):
        self.family, self.strength, self.mass, self.params = family, float(strength), float(mass), params
        self.max_levels, self.principal_cut, self.capacity = max_levels, principal_cut, int(capacity)
        self.max_screening_length = max_screening_length
        self._sets: OrderedDict = OrderedDict()
        self.solved = 0  # sets solved (not taken from the cache), for benchmarks

    def potential(self, screening_length):
        return engine.potential(self.family, self.strength, float(positive("screening_length", screening_length)),
                                self.mass, **self.params)

    def __call__(self, screening_length):
        """The level set at λ = ``screening_length``, or None beyond ``max_screening_length``."""
        if self.max_screening_length is not None and screening_length > self.max_screening_length:
            return None
        pot = self.potential(screening_length)
        found = self._sets.get(pot)
        if found is not None:
            self._sets.move_to_end(pot)
            return found
        found = engine.level_set(pot, max_levels=self.max_levels, principal_cut=self.principal_cut)
        self.solved += 1
        self._sets[pot] = found
        if len(self._sets) > self.capacity:
            self._sets.popitem(last=False)
        return found
