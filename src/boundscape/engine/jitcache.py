"""Where the compiled kernels are cached, and their compilation ahead of a sweep.

numba's on-disk cache (``cache=True``) checks only the source file of each function, not the
files of the functions it calls, so a kernel edited in one module could be served stale from
another.  The kernels are therefore cached in a directory named by a hash of all their sources
and of the numba version: any change gives a fresh directory.  It lies under
``$NUMBA_CACHE_DIR`` if set, else the user's cache directory (``$XDG_CACHE_HOME`` or
``~/.cache``), so that it is writable for a non-editable install and shared by the parallel
jobs of a sweep on one machine or one shared home.

``python -m boundscape.engine.warmup`` compiles (or loads) every kernel once: a sweep runs it
before its parallel jobs, which then all load from the cache instead of each compiling.
"""

from __future__ import annotations

import hashlib
import os
import sys
import time
from contextlib import contextmanager
from pathlib import Path

__all__ = ["KERNEL_MODULES", "kernel_cache_dir", "load_kernels", "warm_up"]

KERNEL_MODULES = ("numerov", "compiled_potentials", "cell")


def kernel_cache_dir() -> Path:
    """The cache directory of this version of the kernels."""
    import numba

    here = Path(__file__).parent
    digest = hashlib.sha256(numba.__version__.encode())
    for name in KERNEL_MODULES:
        digest.update((here / f"{name}.py").read_bytes())
    base = os.environ.get("NUMBA_CACHE_DIR") or os.path.join(
        os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache"), "boundscape")
    return Path(base) / f"kernels-{digest.hexdigest()[:16]}"


@contextmanager
def _cache_dir(path: Path):
    # numba fixes a function's cache location when it is decorated: set it for the kernel
    # modules' import only, leaving any other numba code of the process as it was
    from numba.core import config

    saved = config.CACHE_DIR
    config.CACHE_DIR = str(path)
    try:
        yield
    finally:
        config.CACHE_DIR = saved


def load_kernels():
    """Import the kernel modules with their cache in :func:`kernel_cache_dir` (once per process)."""
    package = __name__.rpartition(".")[0]
    if all(f"{package}.{name}" in sys.modules for name in KERNEL_MODULES):
        return
    with _cache_dir(kernel_cache_dir()):
        import importlib

        for name in KERNEL_MODULES:
            importlib.import_module(f"{package}.{name}")


def warm_up() -> float:
    """Compile (or load from the cache) every kernel by solving a few small cells; seconds taken."""
    from .levels import bound_levels
    from .potential import potential

    from .critical import critical_screening_length
    from .zero_energy import zero_energy_solution

    start = time.perf_counter()
    for family, strength, length in (("yukawa", 1.0, 10.0), ("coulomb", 1.0, None), ("harmonic", 1.0, None)):
        for l in (0, 1):
            bound_levels(potential(family, strength, length), l, n_r_max=2)
    critical_screening_length("hulthen", 1.0, 0, 0)  # the Python path of the zero-energy problem
    zero_energy_solution(potential("yukawa", 1.0, 10.0), 0)
    return time.perf_counter() - start

