"""The radial equation of one potential and l: its effective potential and where the grid starts."""

from __future__ import annotations

from .potential import Potential

__all__ = ["effective_potential", "origin_radius", "ORIGIN_TOLERANCE"]

# Dirichlet at r_min perturbs a level by ~ (r_min/a)^{2l+1}; keep that below 1e-14 (common practice, no source).
ORIGIN_TOLERANCE = 1e-14


def effective_potential(pot: Potential, l: int):
    """V(r) + l(l+1)/(2μr²) as a function of r (hartree)."""
    c = l * (l + 1) / (2.0 * pot.mass)
    return lambda r: pot(r) + c / (r * r)


def origin_radius(pot: Potential, l: int) -> float:
    """Where the grid starts: a Dirichlet end there moves no level by more than ORIGIN_TOLERANCE."""
    return pot.length_scale * ORIGIN_TOLERANCE ** (1.0 / (2 * l + 1))
