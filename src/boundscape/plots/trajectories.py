"""Each lost state's whole trajectory past its threshold, as a resonance fan draws it.

A sweep with ``resonances: true`` traces every pole once, from its threshold, for the family at
Z = λ = μ = 1 (the workflow's ``resonance_trajectories.json``, written by the ``trajectories``
step).  For a one-scale family V = Z f(r/λ)/r the poles of a cell (Z, λ, μ) lie on that one
trajectory in the coupling g = Zμλ, with E = E₁(g)/(μλ²) (:mod:`boundscape.engine.continuum.universal`):
at a fixed strength the trajectory is a continuous curve E_r(λ), Γ(λ) between the grid points, so
a resonance whose window λ_d < λ < λ_c holds no grid point is still drawn.  Nothing is solved
here: the traced points are rescaled and interpolated (PCHIP in ln s, s = g_c − g, along which
the threshold laws E_r ∝ s, Γ ∝ s^{l+½} are straight lines).
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path

import numpy as np
from scipy.interpolate import PchipInterpolator

__all__ = ["StatePath", "read_trajectories", "state_path", "AGREEMENT"]

# The traced points are the coarse grid's poles; a cell's stored value is refined and
# extrapolated.  A drawn curve that misses the cube's own points by more than this is not the
# cube's trajectory (another family, or mismatched units) and is not drawn.
AGREEMENT = 0.05
POINTS = 160  # samples of one drawn trajectory


@dataclass
class StatePath:
    """One state's trajectory at one strength, on the fan's x axis: x (λ or the condition),
    the resonance energy E_r and width Γ in the cube's energy unit, ordered from the threshold
    outwards; ``threshold`` is x at E = 0."""

    x: np.ndarray
    e_r: np.ndarray
    width: np.ndarray
    threshold: float


def read_trajectories(source, family: str) -> dict:
    """The traced trajectories of ``source`` (a path, or the JSON text) by (l, n_r), for l ≥ 1.

    Raises ValueError if they do not read as trajectories or are of another family than the
    cube's, OSError if the file does not read."""
    text = source if isinstance(source, str) and source.lstrip().startswith("{") else Path(source).read_text()
    try:
        data = json.loads(text)
        records = data["records"]
    except (ValueError, KeyError, TypeError) as exc:
        raise ValueError(f"not a trajectories file ({type(exc).__name__}: {exc})") from None
    if data.get("family") != family:
        raise ValueError(f"the trajectories are of family {data.get('family')!r}, the cube's is {family!r}")
    out = {}
    for rec in records:
        item = rec.get("trajectory")
        if item is None or int(rec["l"]) == 0 or len(item.get("s", ())) < 2:
            continue
        pole = np.array(item["pole"], float)
        out[(int(rec["l"]), int(rec["n_r"]))] = (float(item["g_c"]), np.array(item["s"], float), pole[:, 0],
                                                 -2.0 * pole[:, 1])
    return out


def state_path(trajectory, strength: float, mass: float, to_x=None) -> StatePath | None:
    """The trajectory ``(g_c, s, E_r, Γ)`` of :func:`read_trajectories` at engine strength Z and
    mass μ: λ = g/(Zμ), E = E₁(g)/(μλ²) (the one-scale scaling; lengths and energies in the
    cube's engine units).  ``to_x`` maps λ onto the fan's x axis (NaN where the axis does not
    reach); None if nothing of it falls on the axis."""
    g_c, s, e_r, width = trajectory
    keep = (s > 0) & (e_r > 0) & (width > 0)
    s, e_r, width = s[keep], e_r[keep], width[keep]
    if s.size < 2:
        return None
    ln_s = np.log(s)
    fine = np.exp(np.linspace(ln_s[0], ln_s[-1], POINTS))
    e1 = np.exp(PchipInterpolator(ln_s, np.log(e_r))(np.log(fine)))
    w1 = np.exp(PchipInterpolator(ln_s, np.log(width))(np.log(fine)))
    zm = strength * mass
    lam = (g_c - fine) / zm
    scale = 1.0 / (mass * lam ** 2)
    x = lam if to_x is None else to_x(lam)
    threshold = g_c / zm if to_x is None else float(to_x(np.array([g_c / zm]))[0])
    on = np.isfinite(x)
    if not on.any():
        return None
    return StatePath(x[on], (e1 * scale)[on], (w1 * scale)[on], threshold)


def length_to_condition(lengths, x):
    """λ → the condition axis ``x`` of one fan row (the row's stored λ at each x), interpolated in
    log–log; NaN outside the stored λ."""
    lengths, x = np.asarray(lengths, float), np.asarray(x, float)
    order = np.argsort(lengths)
    ln_l, ln_x = np.log(lengths[order]), np.log(x[order])

    def to_x(lam):
        lam = np.asarray(lam, float)
        out = np.exp(np.interp(np.log(lam), ln_l, ln_x))
        return np.where((lam >= lengths.min()) & (lam <= lengths.max()), out, np.nan)

    return to_x


def agrees(path: StatePath, x, e_r) -> bool:
    """Whether the drawn curve passes through the cube's own resonance points (x, E_r) that lie
    on it, within :data:`AGREEMENT`."""
    x, e_r = np.asarray(x, float), np.asarray(e_r, float)
    order = np.argsort(path.x)
    lo, hi = path.x.min(), path.x.max()
    inside = np.isfinite(e_r) & (e_r > 0) & (x >= lo) & (x <= hi)
    if not inside.any():
        return True
    drawn = np.exp(np.interp(np.log(x[inside]), np.log(path.x[order]), np.log(path.e_r[order])))
    return bool(np.all(np.abs(drawn / e_r[inside] - 1.0) <= AGREEMENT))
