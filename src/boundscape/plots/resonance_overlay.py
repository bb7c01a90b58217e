"""What a threshold map shows past each loss curve (l ≥ 1, cubes with ``resonances``): the band
where the lost state lives on as a shape resonance narrower than its energy (between its
dissolution line Γ = E_r and its loss curve), drawn from the stored lengths alone."""

from __future__ import annotations

import matplotlib.lines
import matplotlib.patches
import numpy as np

from ..labels import state_label

__all__ = ["has_resonances", "draw_resonance_bands", "BAND_COLOR", "LINE_COLOR"]

BAND_COLOR = "#ff9f1c"
LINE_COLOR = "#7a2e00"


def has_resonances(ds, l) -> bool:
    """Whether the cube holds a dissolution length of some state of ``l`` (l ≥ 1)."""
    return ("dissolution_screening_length" in ds and int(l) >= 1
            and bool(np.isfinite(ds["dissolution_screening_length"].sel(l=l).values).any()))


def draw_resonance_bands(ax, window_ax, ds, l, z, z_text=lambda v: f"strength {v:.3g}"):
    """Between each state's dissolution length λ_d and its critical length λ_c, a band; λ_d a
    dark line.  The band is thin (λ_c/λ_d is a few per cent for a screened Coulomb state), so
    ``window_ax`` shows each state's window λ_d/λ_c at the lowest strength; ``z_text`` names it.

    Returns the (strength, λ_d) arrays drawn, by state index n_r, and legend handles."""
    lam_d = ds["dissolution_screening_length"].sel(l=l)
    lam_c = ds["critical_screening_length"].sel(l=l)
    drawn = {}
    for n_r in ds["n_r"].values:
        d = lam_d.sel(n_r=n_r).values
        c = lam_c.sel(n_r=n_r).values
        keep = np.isfinite(d) & np.isfinite(c) & (d > 0)
        if not keep.any():
            continue
        drawn[int(n_r)] = (z[keep], d[keep], c[keep])
        _band(ax, z[keep], d[keep], c[keep], int(n_r))
    if not drawn:
        return {}, []
    first = {k: v for k, v in drawn.items() if v[0][0] == min(w[0][0] for w in drawn.values())}
    _window(window_ax, ds, l, first, z_text(float(next(iter(first.values()))[0][0])))
    handles = [matplotlib.patches.Patch(color=BAND_COLOR, label="lives on as a resonance ($\\Gamma < E_r$)"),
               matplotlib.lines.Line2D([], [], color=LINE_COLOR, lw=1.0, label="dissolution line $\\Gamma = E_r$")]
    return {k: v[:2] for k, v in drawn.items()}, handles


def _band(ax, z, d, c, n_r, lw=1.0):
    ax.fill_between(z, d, c, color=BAND_COLOR, alpha=0.9, lw=0, zorder=1.5, gid=f"resonance_band:{n_r}")
    ax.plot(z, d, "-", color=LINE_COLOR, lw=lw, zorder=2.5, gid=f"dissolution:{n_r}")


def _window(inset, ds, l, drawn, z_text):
    """Each state's window λ_d/λ_c … 1 at the first strength that has one, as bars."""
    names, lows = [], []
    for n_r, (z, d, c) in drawn.items():
        names.append(state_label(int(ds["n"].sel(l=l, n_r=n_r)), int(l)))
        lows.append(d[0] / c[0])
    x = np.arange(len(names))
    inset.bar(x, 1.0 - np.array(lows), bottom=lows, color=BAND_COLOR, width=0.7, gid="resonance_window")
    inset.axhline(1.0, color="black", lw=1.0, label="threshold $\\lambda = \\lambda_c$")
    inset.legend(loc="upper left", fontsize=7.5, frameon=False)
    bottom = min(lows) - 0.35 * (1.0 - min(lows))
    inset.set(ylim=(bottom, 1.0 + 0.5 * (1.0 - min(lows))), xlim=(-0.6, len(names) - 0.4))
    inset.set_xticks(x, names)
    inset.tick_params(labelsize=7.5)
    inset.set_ylabel("$\\lambda/\\lambda_c$")
    inset.set_title(f"where each state lives on as a resonance: $\\lambda_d < \\lambda < \\lambda_c$ ({z_text})", fontsize=8.5)
    inset.text(0.99, 0.95, "bound above 1", transform=inset.transAxes, ha="right", va="top", fontsize=7.5)
    inset.text(0.99, 0.05, "below the bars $\\Gamma > E_r$: dissolved", transform=inset.transAxes, ha="right",
               va="bottom", fontsize=7.5)
