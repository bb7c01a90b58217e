"""The donor freeze-out of a semiconductor donor sweep (``populations: true`` over
``donor_concentration`` × ``temperature``), drawn from the stored variables only: the ionized
fraction against N_D at each T, with the concentration where the 1s is lost marked."""

from __future__ import annotations

import matplotlib.pyplot as plt
import numpy as np
from matplotlib.lines import Line2D

from .style import invalid_mask, shade_invalid_x, tidy_log_axis

__all__ = ["donor_figure_list", "donor_freeze_out_figure"]

CONCENTRATION = r"donor concentration $N_D$ (cm$^{-3}$)"


def donor_figure_list() -> list:
    """(stem, caption, report category, subcategory) of the donor sweep's figures."""
    return [("donor_freeze_out", "donor_freeze_out.rst", "Populations", "donor freeze-out")]


def _loss_1s(ds, i):
    """N_D at which the 1s (l = 0, n_r = 0) is lost with every donor ionized, per temperature."""
    if "loss_donor_concentration" not in ds or 0 not in ds["l"].values:
        return None
    return ds["loss_donor_concentration"].sel(l=0).isel(n_r=0).values[i]


def donor_freeze_out_figure(ds):
    """Upper row: the ionized-donor fraction N_D⁺/N_D against N_D, one curve per T, one column per
    donor charge; a triangle in the curve's colour on the top axis marks the N_D at which the 1s is
    lost when every donor is ionized (``loss_donor_concentration``), a circle a cell with several
    self-consistent solutions (the ionized one shown).  Lower row: the free-electron density n."""
    n_d, T = ds["donor_concentration"].values, ds["temperature"].values
    zs = ds["strength"].values
    colours = plt.get_cmap("viridis")(np.linspace(0.0, 0.85, max(T.size, 1)))
    fig, axes = plt.subplots(2, zs.size, figsize=(4.2 * zs.size + 1.8, 6.2), layout="constrained", squeeze=False,
                             sharex=True)
    mask = invalid_mask(ds)
    for i, z in enumerate(zs):
        top, bottom = axes[0, i], axes[1, i]
        fraction = ds["ionized_fraction"].values[i]
        free = ds["free_electron_density"].values[i]
        several = ds["balance_solutions"].values[i] > 1
        loss = _loss_1s(ds, i)
        for j, colour in enumerate(colours):
            top.plot(n_d, fraction[:, j], color=colour, lw=1.4, marker=".", ms=4)
            top.plot(n_d[several[:, j]], fraction[several[:, j], j], ls="none", marker="o", mfc="none", mec=colour,
                     ms=7)
            bottom.plot(n_d, free[:, j], color=colour, lw=1.4, marker=".", ms=4)
            if loss is not None and np.isfinite(loss[j]):
                top.plot([loss[j]], [1.0], marker="v", color=colour, ms=9, clip_on=False, ls="none",
                         transform=top.get_xaxis_transform(), zorder=5)
        bottom.plot(n_d, n_d, color="0.5", lw=0.8, ls="--")  # n = N_D: every donor ionized
        if mask is not None:
            shade_invalid_x(top, n_d, mask.all(axis=1))
        top.set_xscale("log"), top.set_ylim(-0.02, 1.02)
        bottom.set_xscale("log"), bottom.set_yscale("log")
        top.set_title(f"donor charge $Z$ = {float(z):g}", pad=14)
        bottom.set_xlabel(CONCENTRATION)
        tidy_log_axis(bottom.xaxis, n_d.min(), n_d.max())
    axes[0, 0].set_ylabel(r"ionized fraction $N_D^+/N_D$")
    axes[1, 0].set_ylabel(r"free electron density $n$ (cm$^{-3}$)")
    handles = [Line2D([], [], color=c, lw=1.4, label=f"$T$ = {t:.3g} K") for c, t in zip(colours, T)]
    handles += [Line2D([], [], color="0.3", ls="none", marker="v", ms=8, label="1s lost, all donors ionized"),
                Line2D([], [], color="0.3", ls="none", marker="o", mfc="none", ms=7, label="several solutions"),
                Line2D([], [], color="0.5", ls="--", lw=0.8, label="$n = N_D$")]
    fig.legend(handles=handles, loc="outside right upper", fontsize=7)
    fig.suptitle("self-consistent donor freeze-out")
    return fig
