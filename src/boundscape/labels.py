"""Spectroscopic labels of states: ``state_label(2, 1) == "2p"``."""

from __future__ import annotations

__all__ = ["LETTERS", "orbital_letter", "state_label"]

# j is skipped by convention (common practice, no source).
LETTERS = "spdfghiklmnoqrtuvwxyz"


def orbital_letter(l: int) -> str:
    """The letter of angular momentum ``l`` (``"[l=23]"`` past the alphabet)."""
    return LETTERS[l] if l < len(LETTERS) else f"[l={l}]"


def state_label(n: int, l: int) -> str:
    """The name of state (n, l), e.g. ``"3d"``."""
    return f"{n}{orbital_letter(l)}"
