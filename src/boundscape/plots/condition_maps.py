"""Threshold maps of a sweep over a trade's conditions: per strength, the (density, temperature)
plane at one l shaded by the exact bound-state count, with the density at which each state is
lost at each temperature, and the cells where the screening model fails hatched.  Where a map
would be a single row or column (one temperature; one strength of a sweep over screening
lengths) the figure is the binding energy of every state against the axis instead.  Drawn from a
cube alone."""

from __future__ import annotations

import matplotlib
import matplotlib.lines
import numpy as np
from matplotlib.figure import Figure

from ..engine import INPUT_REJECTED
from ..labels import state_label
from ..physics.presets import NO_PRESET
from .style import (HALO, axis_label, cell_edges, count_colorbar, count_norm, cube_dims, energy_unit, family_title,
                    invalid_mask, shade_invalid, shade_invalid_x, tidy_log_axis, unit_names, with_note)
from .views import fan_view, picks

__all__ = ["condition_threshold_map", "binding_curves"]

MAX_PANELS = 6


def _panel_strengths(values):
    return values if values.size <= MAX_PANELS else values[picks(values.size, 4)]


def condition_threshold_map(ds, l, preset=NO_PRESET):
    """Per strength, the (density, temperature) plane at one l: the count of bound states, the
    loss density of every stored state at each temperature, the model's failures hatched.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``count`` maps each strength drawn to its (density × temperature) count, ``curves`` maps
        (strength, state) to the (loss density, temperature) arrays drawn.
    """
    strength_dim, (x_dim, y_dim) = cube_dims(ds)
    if ds.sizes[y_dim] == 1:
        return binding_curves(ds, l, preset)
    x, y = ds[x_dim].values, ds[y_dim].values
    strengths = _panel_strengths(ds[strength_dim].values)
    top = int(ds.sizes["n_r"])
    cmap, norm = count_norm(top)
    ncols = min(2, strengths.size)
    nrows = -(-strengths.size // ncols)
    fig = Figure(figsize=(4.4 * ncols + 1.4, 3.5 * nrows + 0.9), layout="constrained")
    axes = fig.subplots(nrows, ncols, sharex=True, sharey=True, squeeze=False).ravel()
    bad = invalid_mask(ds)
    loss_name = f"loss_{x_dim}"
    counts, curves, handles = {}, {}, []
    mesh = None
    for ax, z in zip(axes, strengths):
        cell = ds.sel({strength_dim: z, "l": l})
        count = cell["num_bound"].values.astype(float)  # (x, y)
        count[cell["status"].values == INPUT_REJECTED] = np.nan  # no count: blank, not "0 states"
        counts[float(z)] = count
        mesh = ax.pcolormesh(cell_edges(x), cell_edges(y), np.ma.masked_invalid(np.minimum(count, top)).T,
                             cmap=cmap, norm=norm, rasterized=True)
        ax.set(xscale="log", yscale="log", xlim=cell_edges(x)[[0, -1]], ylim=cell_edges(y)[[0, -1]],
               title=f"{preset.strength_text(float(z), ds[strength_dim].attrs)}, $l$ = {l}")
        if bad is not None and (shaded := shade_invalid(ax, cell_edges(x), cell_edges(y), bad)) is not None:
            handles = handles or [shaded]
        flagged = np.argwhere(cell["status"].values != 0)
        if flagged.size:
            ax.plot(x[flagged[:, 0]], y[flagged[:, 1]], "x", color="red", ms=5, gid="flagged")
        if loss_name not in ds:
            continue
        for k, n_r in enumerate(ds["n_r"].values):
            loss = cell[loss_name].sel(n_r=n_r).values  # over y
            ok = np.isfinite(loss) & (loss > 0)
            if not ok.any():
                continue
            name = state_label(int(ds["n"].sel(l=l, n_r=n_r)), int(l))
            curves[(float(z), name)] = (loss[ok], y[ok])
            ax.plot(loss[ok], y[ok], "-", color="white", lw=1.3, path_effects=HALO, gid=f"loss:{name}")
            inside = np.flatnonzero(ok & (loss > x.min()) & (loss < x.max()))
            if inside.size:
                i = inside[int(round((0.85 - 0.25 * (k % 3)) * (inside.size - 1)))]
                ax.annotate(name, (loss[i], y[i]), xytext=(3, 0), textcoords="offset points", ha="left",
                            va="center", color="white", fontsize=7.5, path_effects=HALO)
    for ax in axes[strengths.size:]:
        ax.set_visible(False)
    for ax in axes[:strengths.size]:
        tidy_log_axis(ax.xaxis, x.min(), x.max())
        tidy_log_axis(ax.yaxis, y.min(), y.max())
        if ax.get_subplotspec().is_last_row():
            ax.set_xlabel(axis_label(ds, x_dim, preset))
        if ax.get_subplotspec().is_first_col():
            ax.set_ylabel(axis_label(ds, y_dim, preset))
    count_colorbar(fig, mesh, list(axes[:strengths.size]), top, f"bound states with $l$ = {l}", capped=True)
    legend = [matplotlib.lines.Line2D([], [], color="white", lw=1.3, path_effects=HALO,
                                      label="density above which the state is lost")]
    if any(line.get_gid() == "flagged" for ax in axes for line in ax.get_lines()):
        legend.append(matplotlib.lines.Line2D([], [], color="red", marker="x", ls="none", label="solver flagged"))
    legend += handles
    fig.legend(handles=legend, loc="outside lower center", fontsize=7, ncols=len(legend), facecolor="0.85")
    shown = "" if strengths.size == ds.sizes[strength_dim] else \
        f" ({strengths.size} of the {ds.sizes[strength_dim]} strengths)"
    fig.suptitle(f"{family_title(ds)}, $l$ = {l}: bound states over {axis_label(ds, x_dim, preset).split(' (')[0]} "
                 f"and {axis_label(ds, y_dim, preset).split(' (')[0]}{shown}", fontsize=9)
    return fig, {"count": counts, "curves": curves}


def binding_curves(ds, l, preset=NO_PRESET):
    """The binding energy of every stored state of one l against the condition axis, one panel
    per strength (and temperature): what a one-row or one-column threshold map shows, as curves.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``lines`` maps (row key, state) to the (x, −E) arrays drawn, ``lost`` to the x value
        where the state is lost; ``count`` the number of bound states of l per row (over x).
    """
    view = fan_view(ds, preset, most=4)
    x = view.x
    colors = matplotlib.colormaps["viridis"](np.linspace(0, 0.85, ds.sizes["n_r"]))
    ncols = min(2, len(view.rows))
    nrows = -(-len(view.rows) // ncols)
    fig = Figure(figsize=(4.6 * ncols + 1.6, 3.3 * nrows + 0.8), layout="constrained")
    axes = fig.subplots(nrows, ncols, sharex=True, squeeze=False).ravel()
    e_unit, e_factor = energy_unit(ds, preset)
    lines, lost, counts = {}, {}, {}
    invalid = None
    for ax, row in zip(axes, view.rows):
        invalid = shade_invalid_x(ax, x, row.invalid) or invalid
        depth = -row.cube["energy"].sel(l=l).values  # (x, n_r)
        counts[row.key] = row.cube["num_bound"].sel(l=l).values
        for k, n_r in enumerate(ds["n_r"].values):
            name = state_label(int(ds["n"].sel(l=l, n_r=n_r)), int(l))
            keep = np.isfinite(depth[:, k]) & (depth[:, k] > 0)
            if keep.any():
                lines[(row.key, name)] = (x[keep], depth[keep, k])
                ax.plot(x[keep], depth[keep, k], "-o", ms=2.5, color=colors[k], lw=1.3, label=name, gid=f"level:{name}")
            edge = float(row.critical.sel(l=l, n_r=n_r)) if row.critical is not None else np.nan
            if np.isfinite(edge) and x.min() <= edge <= x.max():
                lost[(row.key, name)] = edge
                ax.axvline(edge, color=colors[k], ls=":", lw=1.0, gid=f"lost:{name}")
        ax.set(xscale="log", yscale="log", xlim=(x.min(), x.max()), title=f"{row.title}, $l$ = {l}")
        tidy_log_axis(ax.xaxis, x.min(), x.max())
        if e_unit:
            right = ax.secondary_yaxis("right", functions=(lambda v, f=e_factor: v * f, lambda v, f=e_factor: v / f))
            right.set_ylabel(f"−E ({e_unit})")
        if not ax.get_lines():
            ax.text(0.5, 0.5, f"no state with $l$ = {l} is bound here", transform=ax.transAxes, ha="center",
                    va="center", color="0.4")
    for ax in axes[len(view.rows):]:
        ax.set_visible(False)
    handles = [matplotlib.lines.Line2D([], [], color=colors[k], lw=1.3, marker="o", ms=2.5,
                                       label=state_label(int(ds["n"].sel(l=l, n_r=n_r)), int(l)))
               for k, n_r in enumerate(ds["n_r"].values)]
    where = "$\\lambda_c$" if view.lost_towards_small else "loss density"
    handles.append(matplotlib.lines.Line2D([], [], color="0.3", ls=":", label=f"state lost here ({where})"))
    if invalid is not None:
        handles.append(invalid)
    fig.legend(handles=handles, loc="outside right center", fontsize=7, title="state", title_fontsize=7)
    fig.supxlabel(with_note(view.x_label, view.omitted.replace("; the threshold maps show every one", "")),
                  fontsize="medium")
    fig.supylabel(f"binding energy −E ({unit_names(preset)[1]})", fontsize="medium")
    fig.suptitle(f"{family_title(ds)}, $l$ = {l}: binding energy against {view.x_label.rsplit(' (', 1)[0]}",
                 fontsize=9)
    return fig, {"lines": lines, "lost": lost, "count": counts}
