"""Spectroscopic labels of states (``state_label(2, 1) == "2p"``) and the names of the families."""

from __future__ import annotations

__all__ = ["LETTERS", "FAMILY_NAMES", "orbital_letter", "state_label"]

# How titles and the cube name each engine family (the config keys are identifiers, not names).
FAMILY_NAMES = {"coulomb": "Coulomb", "yukawa": "Yukawa", "ecsc": "exponential-cosine-screened Coulomb",
                "hulthen": "Hulthén", "square_well": "square well", "harmonic": "harmonic oscillator",
                "tabulated": "tabulated"}

# j is skipped by convention (common practice, no source).
LETTERS = "spdfghiklmnoqrtuvwxyz"


def orbital_letter(l: int) -> str:
    """The letter of angular momentum ``l`` (``"[l=23]"`` past the alphabet)."""
    return LETTERS[l] if l < len(LETTERS) else f"[l={l}]"


def state_label(n: int, l: int) -> str:
    """The name of state (n, l), e.g. ``"3d"``."""
    return f"{n}{orbital_letter(l)}"
