"""Figures of a cube's populations (``populations: true``), drawn from the stored variables only:
the ionization map over (n_e, T_e) per Z, the partition function against n_e at each T_e, and
the continuum lowering against n_e beside Stewart–Pyatt and Ecker–Kröll."""

from __future__ import annotations

import matplotlib
from matplotlib.figure import Figure
import numpy as np
from matplotlib.lines import Line2D

from .balances import balance_figure_list, balance_figure, figure_stem
from .style import HALO, cell_edges, invalid_mask, shade_invalid, shade_invalid_x, tidy_log_axis

__all__ = ["figure_list", "population_figures", "ionization_map", "partition_function_curves",
           "continuum_lowering_curves"]

DENSITY = r"electron density $n_e$ (cm$^{-3}$)"
TEMPERATURE = r"electron temperature $T_e$ (eV)"
# At most this many temperatures on the lowering figure: three line styles per temperature.
LOWERING_TEMPERATURES = 3


def _z_stem(z) -> str:
    return f"ionization_map_Z{float(z):g}"


def figure_list(plan) -> list:
    """(stem, caption, report category, subcategory) of every populations figure of a sweep's plan."""
    if plan.engine["populations"].get("kind") in ("donors", "excitons"):
        return balance_figure_list(plan.engine["populations"]["kind"])
    strengths = plan.strength
    out = [(_z_stem(z), "ionization_map.rst", "Populations", f"Z = {float(z):g}") for z in strengths]
    out += [("partition_function", "partition_function.rst", "Populations", "partition function"),
            ("continuum_lowering", "continuum_lowering.rst", "Populations", "continuum lowering")]
    return out


def population_figures(ds):
    """(stem, figure) of every populations figure of a cube."""
    if "balance_status" in ds:  # a semiconductor's self-consistent balance
        return [(figure_stem(ds), balance_figure(ds))]
    out = [(_z_stem(z), ionization_map(ds, i)) for i, z in enumerate(ds["strength"].values)]
    out.append(("partition_function", partition_function_curves(ds)))
    out.append(("continuum_lowering", continuum_lowering_curves(ds)))
    return out


def _title(ds, z):
    model = ds.attrs.get("screening_model")
    return f"hydrogen-like ion, $Z$ = {float(z):g}" + (f"\n({model.replace('_', '-')} screening)" if model else "")


def ionization_map(ds, index: int):
    """The Saha ionized fraction over (n_e, T_e) at the ``index``-th Z, 1/2 contoured, the cells
    where the ion binds nothing outlined, and the screening model's failures hatched."""
    z = ds["strength"].values[index]
    n_e, T_e = ds["electron_density"].values, ds["electron_temperature"].values
    fraction = ds["ionized_fraction"].values[index]  # (n_e, T_e)
    fig = Figure(figsize=(6.4, 5.2), layout="constrained")  # no pyplot: no global figure left behind
    ax = fig.subplots()
    x_edges, y_edges = cell_edges(n_e), cell_edges(T_e)
    mesh = ax.pcolormesh(x_edges, y_edges, fraction.T, cmap="viridis", vmin=0.0, vmax=1.0, shading="flat")
    fig.colorbar(mesh, ax=ax, label=r"ionized fraction $n_Z/(n_Z + n_{Z-1})$")
    handles = []
    if n_e.size > 1 and T_e.size > 1 and np.nanmin(fraction) < 0.5 < np.nanmax(fraction):
        ax.contour(n_e, T_e, fraction.T, levels=[0.5], colors="white", linewidths=1.4)
        handles.append(Line2D([], [], color="white", lw=1.4, path_effects=HALO, label="half ionized (Saha)"))
    empty = ds["bound_state_count"].values[index] == 0
    if empty.any() and n_e.size > 1 and T_e.size > 1:
        ax.contour(n_e, T_e, empty.T.astype(float), levels=[0.5], colors="orangered", linewidths=1.4,
                   linestyles="--")
        handles.append(Line2D([], [], color="orangered", lw=1.4, ls="--", label="beyond: no bound level"))
    incomplete = ds["level_set_status"].values[index] != 0  # truncated (U a lower bound) or unknown
    if incomplete.any():
        a, b = np.nonzero(incomplete)
        ax.plot(n_e[a], T_e[b], ls="none", marker="x", ms=4, mew=0.8, color="white", path_effects=HALO, zorder=3)
        handles.append(Line2D([], [], ls="none", marker="x", ms=4, color="white", path_effects=HALO,
                              label="level set incomplete: U a lower bound"))
    mask = invalid_mask(ds)
    if mask is not None:
        hatch = shade_invalid(ax, x_edges, y_edges, mask)
        if hatch is not None:
            handles.append(hatch)
    ax.set_xscale("log"), ax.set_yscale("log")
    ax.set_xlim(x_edges[0], x_edges[-1]), ax.set_ylim(y_edges[0], y_edges[-1])
    ax.set_xlabel(DENSITY), ax.set_ylabel(TEMPERATURE)
    ax.set_title(f"Saha ionized fraction of the {_title(ds, z)}")
    if handles:  # below the map, so that it hides no cell
        fig.legend(handles=handles, loc="outside lower center", ncols=2, fontsize=7)
    return fig


def _temperature_colours(count):
    return matplotlib.colormaps.get_cmap("plasma")(np.linspace(0.0, 0.85, max(count, 1)))


def _per_z_axes(ds, ylabel):
    zs = ds["strength"].values
    fig = Figure(figsize=(3.6 * zs.size + 1.6, 4.0), layout="constrained")  # no pyplot: no global figure
    axes = fig.subplots(1, zs.size, squeeze=False, sharey=True)
    for ax, z in zip(axes[0], zs):
        ax.set_xscale("log"), ax.set_yscale("log")
        ax.set_xlabel(DENSITY)
        ax.set_title(f"$Z$ = {float(z):g}")
    axes[0, 0].set_ylabel(ylabel)
    return fig, axes[0]


def partition_function_curves(ds):
    """U against n_e, one curve per T_e and one panel per Z (solid: this model's complete set;
    dashed: Planck–Larkin's, which does not depend on n_e); cells where nothing is bound (U = 0)
    end a curve."""
    n_e, T_e = ds["electron_density"].values, ds["electron_temperature"].values
    colours = _temperature_colours(T_e.size)
    fig, axes = _per_z_axes(ds, r"partition function $U$")
    mask = invalid_mask(ds)
    for i, ax in enumerate(axes):
        u = ds["partition_function"].values[i]
        pl = ds["planck_larkin_partition_function"].values[i]
        for j, colour in enumerate(colours):
            shown = np.where(u[:, j] > 0, u[:, j], np.nan)
            ax.plot(n_e, shown, color=colour, lw=1.3, marker=".", ms=3)
            ax.plot(n_e, pl[:, j], color=colour, lw=0.8, ls="--")
        if mask is not None:  # hatched where the model fails at every temperature shown
            shade_invalid_x(ax, n_e, mask.all(axis=1))
        tidy_log_axis(ax.xaxis, n_e.min(), n_e.max())
    handles = [Line2D([], [], color=c, lw=1.3, label=f"$T_e$ = {t:.3g} eV") for c, t in zip(colours, T_e)]
    handles += [Line2D([], [], color="0.3", lw=1.3, label="complete level set"),
                Line2D([], [], color="0.3", lw=0.8, ls="--", label="Planck–Larkin (unscreened)")]
    fig.legend(handles=handles, loc="outside right upper", fontsize=7)
    fig.suptitle("partition function of the screened hydrogen-like ion against density")
    return fig


def _lowering_temperatures(T_e):
    if T_e.size <= LOWERING_TEMPERATURES:
        return list(range(T_e.size))
    return sorted({0, T_e.size // 2, T_e.size - 1})


def continuum_lowering_curves(ds):
    """ΔI against n_e per Z at the lowest, middle and highest T_e: this model (solid; from the
    complete level set, I₀ − I) beside Stewart–Pyatt (dashed) and Ecker–Kröll (dotted); the
    horizontal line is I₀, which ΔI reaches when the 1s is lost."""
    n_e, T_e = ds["electron_density"].values, ds["electron_temperature"].values
    picks = _lowering_temperatures(T_e)
    colours = _temperature_colours(len(picks))
    fig, axes = _per_z_axes(ds, r"continuum lowering $\Delta I$ (eV)")
    styles = {"continuum_lowering": "-", "continuum_lowering_stewart_pyatt": "--",
              "continuum_lowering_ecker_kroll": ":"}
    for i, ax in enumerate(axes):
        for colour, j in zip(colours, picks):
            for name, style in styles.items():
                values = ds[name].values[i, :, j]
                ax.plot(n_e, np.where(values > 0, values, np.nan), color=colour, ls=style, lw=1.3)
        i0 = float(ds["ionization_energy"].values[i].flat[0] + ds["continuum_lowering"].values[i].flat[0])
        ax.axhline(i0, color="0.4", lw=0.8)
        ax.annotate(r"$I_0$", (n_e.min(), i0), xytext=(2, 2), textcoords="offset points", fontsize=8, color="0.3")
        tidy_log_axis(ax.xaxis, n_e.min(), n_e.max())
    handles = [Line2D([], [], color=c, lw=1.3, label=f"$T_e$ = {T_e[j]:.3g} eV") for c, j in zip(colours, picks)]
    handles += [Line2D([], [], color="0.3", ls=s, lw=1.3, label=label) for s, label in
                (("-", "this model, $I_0 - I$"), ("--", "Stewart–Pyatt"), (":", "Ecker–Kröll"))]
    fig.legend(handles=handles, loc="outside right upper", fontsize=7)
    fig.suptitle("continuum lowering against density")
    return fig
