"""Input checks shared by every layer, each raising :class:`~boundscape.errors.InputError` with one
line that names the value."""

from __future__ import annotations

import numpy as np

from .errors import InputError

__all__ = ["positive", "quantum_number"]


def positive(name: str, value, *, where: str = ""):
    """``value`` as a float (or a float array) if every element is positive and finite.

    ``name`` is what the message calls the value (a config key, an option, a parameter);
    ``where`` is appended to it, e.g. ``" for family 'yukawa'"``.
    """
    if value is None or isinstance(value, (bool, np.bool_)):
        raise InputError(f"{name} must be a number{where}, got {value!r}")
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be a number{where}, got {value!r}") from None
    if not np.all(np.isfinite(array)) or np.any(array <= 0):
        shown = f"{float(array):g}" if array.ndim == 0 else repr(value)
        raise InputError(f"{name} must be positive and finite{where}, got {shown}")
    return array if array.ndim else float(array)


def quantum_number(value, name: str = "l") -> int:
    """A non-negative integer quantum number (``name`` says which, for the message)."""
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)):
        if isinstance(value, float) and value.is_integer():
            value = int(value)
        else:
            raise InputError(f"{name} must be a non-negative integer, got {value!r}")
    if value < 0:
        raise InputError(f"{name} must be a non-negative integer, got {value}")
    return int(value)

