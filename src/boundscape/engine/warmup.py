"""``python -m boundscape.engine.warmup``: compile (or load from the cache) every engine kernel
once, before a sweep's parallel jobs start, so that they all load it instead of each compiling
(see :mod:`.jitcache` for where the cache lives)."""

from __future__ import annotations

import time

from .jitcache import kernel_cache_dir

__all__ = ["warm_up"]


def warm_up() -> float:
    """Compile (or load from the cache) every kernel, then solve a few small cells; seconds taken.

    Each kernel has one explicit signature and is compiled when its module is imported, and the
    families share one set of kernels (V is chosen by a code at run time), so importing the
    kernel modules compiles all a sweep of any family needs; the cells check that they run."""
    from .jitcache import load_kernels
    from .critical import critical_screening_length
    from .levels import bound_levels
    from .potential import potential
    from .zero_energy import zero_energy_solution

    start = time.perf_counter()
    load_kernels()
    for family, strength, length in (("yukawa", 1.0, 10.0), ("coulomb", 1.0, None), ("harmonic", 1.0, None)):
        for l in (0, 1):
            bound_levels(potential(family, strength, length), l, n_r_max=2)
    critical_screening_length("hulthen", 1.0, 0, 0)  # the Python path of the zero-energy problem
    zero_energy_solution(potential("yukawa", 1.0, 10.0), 0)
    return time.perf_counter() - start


if __name__ == "__main__":
    print(f"engine kernels ready in {kernel_cache_dir()} ({warm_up():.1f} s)")
