"""The one way a package here defers importing a module until one of its names is used.

The solvers load numba and the compiled kernels (some 100 MB, about a second): a step that only
reads cubes (collect, figures) or checks a configuration should not pay that.  A package lists
its deferred names in one literal mapping, ``lazy_exports(__name__, {name: ".module"})``, which
``tests/test_layers.py`` reads as imports like any other.
"""

from __future__ import annotations

import importlib

__all__ = ["lazy_exports"]


def lazy_exports(package: str, exports: dict[str, str]):
    """(``__getattr__``, ``__dir__``) for ``package``: each name of ``exports`` is imported from
    its module (a name relative to ``package``, such as ``".bound.levels"``) on first use."""

    def __getattr__(name):
        if name not in exports:
            raise AttributeError(f"module {package!r} has no attribute {name!r}")
        value = getattr(importlib.import_module(exports[name], package), name)
        setattr(importlib.import_module(package), name, value)
        return value

    def __dir__():
        return sorted(set(vars(importlib.import_module(package))) | set(exports))

    return __getattr__, __dir__
