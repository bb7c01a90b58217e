"""Where the compiled kernels are cached, and their compilation ahead of a sweep.

numba's on-disk cache (``cache=True``) checks only the source file of each function, not the
files of the functions it calls, so a kernel edited in one module could be served stale from
another.  The kernels are therefore cached in a directory named by a hash of all their sources
and of the numba version: any change gives a fresh directory.  It lies under
``$NUMBA_CACHE_DIR`` if set, else the user's cache directory (``$XDG_CACHE_HOME`` or
``~/.cache``), so that it is writable for a non-editable install and shared by the parallel
jobs of a sweep on one machine or one shared home.

``python -m boundscape.engine.warmup`` compiles (or loads) every kernel once (see there).
"""

from __future__ import annotations

import hashlib
import os
from functools import lru_cache
from pathlib import Path

__all__ = ["KERNEL_MODULES", "kernel_cache_dir", "enter", "leave", "load_kernels", "lazy_module"]

KERNEL_MODULES = ("numerov", "compiled_potentials", "cell")


@lru_cache(maxsize=1)
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


def enter():
    """Point numba's cache at :func:`kernel_cache_dir` (a kernel module calls this first, and
    :func:`leave` last: numba fixes a function's cache location when it is decorated, and other
    numba code in the process keeps its own)."""
    from numba.core import config

    saved = config.CACHE_DIR
    config.CACHE_DIR = str(kernel_cache_dir())
    return saved


def leave(saved):
    from numba.core import config

    config.CACHE_DIR = saved


def load_kernels():
    """Import the kernel modules (compiled lazily on first use, or loaded from the cache)."""
    import importlib

    package = __name__.rpartition(".")[0]
    for name in KERNEL_MODULES:
        importlib.import_module(f"{package}.{name}")


class _LazyModule:
    """A kernel module imported on its first attribute access."""

    def __init__(self, name: str):
        self._name = name
        self._module = None

    def __getattr__(self, attr):
        if self._module is None:
            import importlib

            self._module = importlib.import_module(f"{__name__.rpartition('.')[0]}.{self._name}")
        return getattr(self._module, attr)


def lazy_module(name: str):
    """The kernel module ``name`` (one of KERNEL_MODULES), imported when first used: importing
    the engine's Python modules then loads neither numba nor the kernels (~90 MB), which a step
    that only reads cubes (collect, figures) does not need."""
    if name not in KERNEL_MODULES:
        raise ValueError(f"{name!r} is not a kernel module")
    return _LazyModule(name)
