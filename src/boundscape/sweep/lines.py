"""The lines a sweep asks for (config key ``lines``): a list such as ``[1s-2p, 2p-3d]`` or
``{n_max: N}``, checked and put in a fixed order.  No physics: which lines exist in a cell is
the engine's business; this module only names the pairs of levels the cube has a line for."""

from __future__ import annotations

from ..errors import InputError
from ..labels import line_label, parse_state, state_label

__all__ = ["line_pairs", "check_lines", "label_of"]


def _pair(text: str):
    parts = str(text).split("-")
    if len(parts) != 2:
        raise ValueError(f"{text!r} is not a line like 1s-2p")
    a, b = parse_state(parts[0]), parse_state(parts[1])
    if abs(a[1] - b[1]) != 1:
        raise ValueError(f"{text!r} is not an electric-dipole line (l must change by one)")
    return tuple(sorted((a, b)))  # lower n first (equal n: lower l first)


def line_pairs(spec) -> list[tuple[tuple[int, int], tuple[int, int]]]:
    """The configured lines as ((n, l), (n′, l′)) pairs, sorted; [] when ``spec`` is None.

    ``{n_max: N}`` gives every pair of distinct n ≤ N with l′ = l ± 1 (the pairs of equal n,
    2s–2p, are only a line where screening splits them: list them to have them)."""
    if spec is None:
        return []
    if isinstance(spec, dict):
        n_max = int(spec["n_max"])
        return sorted(((n, l), (n2, l2)) for n in range(1, n_max + 1) for n2 in range(n + 1, n_max + 1)
                      for l in range(n) for l2 in (l - 1, l + 1) if 0 <= l2 < n2)
    return sorted(_pair(item) for item in spec)


def label_of(pair) -> str:
    (n, l), (n2, l2) = pair
    return line_label(state_label(n, l), state_label(n2, l2))


def check_lines(config: dict) -> list:
    """The pairs of ``config["lines"]``, each naming levels the cube holds; one-line errors
    naming the key and the bad value."""
    spec = config.get("lines")
    if spec is None:
        return []
    items = spec if isinstance(spec, list) else [spec]
    try:
        pairs = line_pairs(spec)
    except ValueError as exc:
        bad = next((item for item in items if not _parses(item)), items[0])
        where = "" if repr(bad) in str(exc) else f" in {bad!r}"
        raise InputError(f"config key lines: {exc}{where}") from None
    if len(set(pairs)) != len(pairs):
        raise InputError(f"config key lines: a line is listed twice in {spec!r}")
    if not pairs:
        raise InputError(f"config key lines: {spec!r} names no line")
    grid = config["grid"]
    ls = set(range(grid["l"]["start"], grid["l"]["stop"] + 1)) if isinstance(grid["l"], dict) else set(grid["l"])
    n_r_max = int(grid["n_r_max"])
    for pair in pairs:
        for n, l in pair:
            if l not in ls or n - l - 1 >= n_r_max:
                raise InputError(f"config key lines: line {label_of(pair)} needs level {state_label(n, l)}, "
                                 f"which the cube does not hold (grid.l, grid.n_r_max)")
    return pairs


def _parses(item) -> bool:
    try:
        _pair(item)
    except ValueError:
        return False
    return True
