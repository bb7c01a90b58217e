"""``python -m boundscape.engine.warmup``: compile (or load from the cache) every engine kernel
once, before a sweep's parallel jobs start, so that they all load it instead of each compiling
(see :mod:`.jitcache` for where the cache lives)."""

from __future__ import annotations

import time

from .jitcache import kernel_cache_dir
from .potentials import FAMILIES, family_info, potential

__all__ = ["warm_up"]


def warm_up(families=None) -> float:
    """Compile (or load from the cache) every kernel and the formulas of ``families`` (default:
    every registered family), then solve a few small cells; seconds taken.

    Each kernel has one explicit signature and is compiled when its module is imported; the
    solver's kernels take a family's compiled formula as a first-class function, so they are
    compiled once for all families, and each family adds only its own formula (~0.05 s)."""
    start = time.perf_counter()
    # every module that holds kernels (each compiled, or loaded from the cache, on import)
    from . import richardson  # noqa: F401
    from .bound import bound_levels, cell, critical_screening_length, design, mapping, numerov, search  # noqa: F401
    from .bound import zero_energy_solution
    from .continuum import regular  # noqa: F401  (the zero-energy and scattering solutions)
    from .potentials import exterior, kernels  # noqa: F401

    for name in FAMILIES if families is None else families:
        family_info(name).kernel  # noqa: B018  (compiled, or loaded from the cache, on first access)
    for family, strength, length in (("yukawa", 1.0, 10.0), ("coulomb", 1.0, None), ("harmonic", 1.0, None)):
        for l in (0, 1):
            bound_levels(potential(family, strength, length), l, n_r_max=2)
    critical_screening_length("hulthen", 1.0, 0, 0)
    zero_energy_solution(potential("yukawa", 1.0, 10.0), 0)
    return time.perf_counter() - start


def main(argv=None) -> int:
    """``python -m boundscape.engine.warmup [FAMILY ...]``: the kernels and those families' formulas."""
    import sys

    names = list(sys.argv[1:] if argv is None else argv) or None
    print(f"engine kernels ready in {kernel_cache_dir()} ({warm_up(names):.1f} s)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
