"""Level fans: −E_nl against λ, one row per chosen strength and one panel per l, each state's
critical length marked.  Drawn from a cube alone."""

from __future__ import annotations

import math

import matplotlib
import matplotlib.lines
import numpy as np
from matplotlib.figure import Figure

from ..labels import state_label
from .style import unit_names

__all__ = ["level_fan", "fan_strengths"]


def fan_strengths(strength, most=3):
    """Up to ``most`` strengths spread over the axis (first, middle, last) for the level fans."""
    strength = np.asarray(strength)
    picks = np.unique(np.round(np.linspace(0, strength.size - 1, min(most, strength.size))).astype(int))
    return strength[picks]


def level_fan(ds, strengths=None, preset=None):
    """−E_nl against λ, one row per chosen strength and one panel per l; each state's critical length marked.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``lines`` maps (strength, state name) to the (λ, −E) arrays drawn (finite stored energies)
        and ``critical`` maps them to the stored λ_c marked on the axis.
    """
    strengths = fan_strengths(ds["strength"].values) if strengths is None else np.atleast_1d(strengths)
    ls = ds["l"].values
    lam = ds["screening_length"].values
    fig = Figure(figsize=(max(2.6 * len(ls) + 2.0, 5.6), 2.5 * len(strengths) + 0.6), layout="constrained")
    axes = fig.subplots(len(strengths), len(ls), sharex=True, sharey="row", squeeze=False)
    colors = matplotlib.colormaps["viridis"](np.linspace(0, 0.85, ds.sizes["n_r"]))
    lines, critical = {}, {}
    for row, z in enumerate(strengths):
        depth = -ds["energy"].sel(strength=z).values  # (λ, l, n_r)
        positive = depth[np.isfinite(depth) & (depth > 0)]
        top = positive.max() * 2 if positive.size else 1.0
        bottom = max(positive.min() if positive.size else top * 1e-6, top * 1e-7) / 2
        for col, l in enumerate(ls):
            ax = axes[row, col]
            ax.set(xscale="log", yscale="log", ylim=(bottom, top), xlim=(lam.min(), lam.max()))
            drawn = False
            labelled = []  # log10 positions of labels already placed in this panel
            span = math.log10(lam.max() / lam.min()) or 1.0
            for k, n_r in enumerate(ds["n_r"].values):
                name = state_label(int(ds["n"].sel(l=l, n_r=n_r)), int(l))
                y = depth[:, col, k]
                keep = np.isfinite(y) & (y > 0)
                if keep.any():
                    drawn = True
                    lines[(float(z), name)] = (lam[keep], y[keep])
                    ax.plot(lam[keep], y[keep], "-", color=colors[k], lw=1.3, gid=f"level:{name}")
                if "critical_screening_length" in ds:
                    lc = float(ds["critical_screening_length"].sel(strength=z, l=l, n_r=n_r))
                    if math.isfinite(lc) and lam.min() <= lc <= lam.max():
                        critical[(float(z), name)] = lc
                        ax.plot([lc], [bottom], "^", color=colors[k], ms=6, clip_on=False, gid=f"critical:{name}")
                        if all(abs(math.log10(lc) - x) > 0.045 * span for x in labelled):
                            labelled.append(math.log10(lc))
                            ax.annotate(name, (lc, bottom), xytext=(0, 7), textcoords="offset points", rotation=90,
                                        ha="center", va="bottom", fontsize=7, color=colors[k])
            if not drawn:
                ax.text(0.5, 0.5, "no bound level stored", transform=ax.transAxes, ha="center", va="center",
                        color="0.4")
            ax.set_title(f"strength {z:g}, l = {l}")
    handles = [matplotlib.lines.Line2D([], [], color=c, lw=1.3, label=f"n_r = {k}") for k, c in enumerate(colors)]
    handles.append(matplotlib.lines.Line2D([], [], color="0.3", marker="^", ls="", label="λ_c (state lost)"))
    fig.legend(handles=handles, loc="outside right center", fontsize=7, title="n = n_r + l + 1", title_fontsize=7)
    fig.supxlabel(f"screening length λ ({unit_names(preset)[0]})", fontsize="medium")
    fig.supylabel(f"binding energy −E ({unit_names(preset)[1]})", fontsize="medium")
    fig.suptitle("Level fan: binding energy against screening length")
    return fig, {"lines": lines, "critical": critical}
