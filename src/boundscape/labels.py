"""Spectroscopic labels of states (``state_label(2, 1) == "2p"``)."""

from __future__ import annotations

import re

__all__ = ["LETTERS", "orbital_letter", "state_label", "parse_state", "line_label"]

# j is skipped by convention (common practice, no source).
LETTERS = "spdfghiklmnoqrtuvwxyz"


def orbital_letter(l: int) -> str:
    """The letter of angular momentum ``l`` (``"[l=23]"`` past the alphabet)."""
    return LETTERS[l] if l < len(LETTERS) else f"[l={l}]"


def state_label(n: int, l: int) -> str:
    """The name of state (n, l), e.g. ``"3d"``."""
    return f"{n}{orbital_letter(l)}"


_STATE = re.compile(r"^([1-9][0-9]*)([a-z])$")


def parse_state(label: str) -> tuple[int, int]:
    """``"3d"`` → (3, 2); ValueError if it is no state label (or l ≥ n)."""
    match = _STATE.match(str(label).strip())
    if not match or match.group(2) not in LETTERS:
        raise ValueError(f"{label!r} is not a state label like 2p")
    n, l = int(match.group(1)), LETTERS.index(match.group(2))
    if l >= n:
        raise ValueError(f"{label!r} has l = {l} ≥ n = {n}")
    return n, l


def line_label(lower: str, upper: str) -> str:
    """The name of a line, e.g. ``"1s-2p"``."""
    return f"{lower}-{upper}"
