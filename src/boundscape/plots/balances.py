"""The self-consistent balance of a semiconductor sweep (``populations: true``): the donor
freeze-out over ``donor_concentration`` × ``temperature``, or the exciton ⇄ electron–hole plasma
over the pair density × ``temperature``, drawn from the stored variables only: the ionized
fraction against the total density at each T, with the density where the 1s is lost marked."""

from __future__ import annotations

import matplotlib
from matplotlib.figure import Figure
import numpy as np
from matplotlib.lines import Line2D

from .style import invalid_mask, shade_invalid_x, tidy_log_axis

__all__ = ["balance_figure_list", "balance_figure", "figure_stem"]

# per total-density dimension: (x label, free density variable, its label, what "every ... ionized" names, y label)
KINDS = {"donor_concentration": (r"donor concentration $N_D$ (cm$^{-3}$)", "free_electron_density",
                                 r"free electron density $n$ (cm$^{-3}$)", "donors", r"ionized fraction $N_D^+/N_D$",
                                 "$n = N_D$", "donor"),
         "carrier_density": (r"pair density $n_{eh}$ (cm$^{-3}$)", "free_pair_density",
                             r"free pair density $n$ (cm$^{-3}$)", "pairs", r"ionized fraction $n/n_{eh}$",
                             "$n = n_{eh}$", "exciton")}


def balance_figure_list(kind="donors") -> list:
    """(stem, caption, report category, subcategory) of a semiconductor balance sweep's figures."""
    if kind == "excitons":
        return [("exciton_balance", "exciton_balance.rst", "Populations", "exciton balance")]
    return [("donor_freeze_out", "donor_freeze_out.rst", "Populations", "donor freeze-out")]


def figure_stem(ds) -> str:
    return "donor_freeze_out" if "donor_concentration" in ds.dims else "exciton_balance"


def _loss_1s(ds, i, dim):
    """The total density at which the 1s (l = 0, n_r = 0) is lost with all of it ionized, per T."""
    name = f"loss_{dim}"
    if name not in ds or 0 not in ds["l"].values:
        return None
    return ds[name].sel(l=0).isel(n_r=0).values[i]


def balance_figure(ds):
    """Upper row: the ionized-donor fraction N_D⁺/N_D against N_D, one curve per T, one column per
    donor charge; a triangle in the curve's colour on the top axis marks the N_D at which the 1s is
    lost when every donor is ionized (``loss_donor_concentration``), a circle a cell with several
    self-consistent solutions (the ionized one shown).  Lower row: the free-electron density n."""
    dim = ds["ionized_fraction"].dims[1]
    x_label, free_name, free_label, all_of, y_label, diagonal, who = KINDS[dim]
    n_d, T = ds[dim].values, ds["temperature"].values
    zs = ds["strength"].values
    colours = matplotlib.colormaps.get_cmap("viridis")(np.linspace(0.0, 0.85, max(T.size, 1)))
    fig = Figure(figsize=(4.2 * zs.size + 1.8, 6.2), layout="constrained")  # no pyplot: no global figure
    axes = fig.subplots(2, zs.size, squeeze=False, sharex=True)
    mask = invalid_mask(ds)
    for i, z in enumerate(zs):
        top, bottom = axes[0, i], axes[1, i]
        fraction = ds["ionized_fraction"].values[i]
        free = ds[free_name].values[i]
        several = ds["balance_solutions"].values[i] > 1
        loss = _loss_1s(ds, i, dim)
        for j, colour in enumerate(colours):
            top.plot(n_d, fraction[:, j], color=colour, lw=1.4, marker=".", ms=4)
            top.plot(n_d[several[:, j]], fraction[several[:, j], j], ls="none", marker="o", mfc="none", mec=colour,
                     ms=7)
            bottom.plot(n_d, free[:, j], color=colour, lw=1.4, marker=".", ms=4)
            if loss is not None and np.isfinite(loss[j]):
                top.plot([loss[j]], [1.0], marker="v", color=colour, ms=9, clip_on=False, ls="none",
                         transform=top.get_xaxis_transform(), zorder=5)
        bottom.plot(n_d, n_d, color="0.5", lw=0.8, ls="--")  # all of it ionized
        if mask is not None:
            shade_invalid_x(top, n_d, mask.all(axis=1))
        top.set_xscale("log"), top.set_ylim(-0.02, 1.02)
        bottom.set_xscale("log"), bottom.set_yscale("log")
        top.set_title(f"{'donor' if who == 'donor' else 'pair'} charge $Z$ = {float(z):g}", pad=14)
        bottom.set_xlabel(x_label)
        tidy_log_axis(bottom.xaxis, n_d.min(), n_d.max())
    axes[0, 0].set_ylabel(y_label)
    axes[1, 0].set_ylabel(free_label)
    handles = [Line2D([], [], color=c, lw=1.4, label=f"$T$ = {t:.3g} K") for c, t in zip(colours, T)]
    handles += [Line2D([], [], color="0.3", ls="none", marker="v", ms=8, label=f"1s lost, all {all_of} ionized"),
                Line2D([], [], color="0.3", ls="none", marker="o", mfc="none", ms=7, label="several solutions"),
                Line2D([], [], color="0.5", ls="--", lw=0.8, label=diagonal)]
    fig.legend(handles=handles, loc="outside right upper", fontsize=7)
    fig.suptitle("self-consistent donor freeze-out" if who == "donor" else "self-consistent exciton balance")
    return fig
