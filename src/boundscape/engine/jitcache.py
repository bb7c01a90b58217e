"""Where the compiled kernels are cached.

numba's on-disk cache (``cache=True``) checks only the source file of each function, not the
files of the functions it calls, so a kernel edited in one module could be served stale from
another.  The kernels are therefore cached in a directory named by a hash of every source file
of the engine and of the numba version: any change gives a fresh directory.  It lies under
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

__all__ = ["kernel_cache_dir", "enter", "leave"]

@lru_cache(maxsize=1)
def kernel_cache_dir() -> Path:
    """The cache directory of this version of the kernels."""
    import numba

    here = Path(__file__).parent
    digest = hashlib.sha256(numba.__version__.encode())
    for path in sorted(here.rglob("*.py")):
        digest.update(str(path.relative_to(here)).encode())
        digest.update(path.read_bytes())
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
