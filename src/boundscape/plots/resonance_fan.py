"""Resonance fans: each l ≥ 1 state's energy against λ (or, in a sweep over conditions, against
the density) on both sides of its threshold — the bound branch E < 0 (as in the level fan) and,
past the threshold, the resonance E_r > 0 with a band of ±Γ/2.  Drawn from a cube
(``resonances: true``) and the trajectories its sweep traced (:mod:`.trajectories`): each
resonance is the continuous trajectory with the cube's grid cells marked on it, so a narrow
window λ_d < λ < λ_c between grid points does not hide it.  Without the trajectories only the
grid cells are drawn, and the figure says which states have none."""

from __future__ import annotations

import dataclasses
import math

import matplotlib
import matplotlib.lines
import matplotlib.patches
import matplotlib.transforms
import numpy as np
from matplotlib.figure import Figure

from ..labels import state_label
from ..physics.presets import NO_PRESET
from .level_fan import LABEL_WIDTH, ROW_POINTS, place_in_rows
from .style import STATE_FONTSIZE, energy_unit, family_title, shade_invalid_x, tidy_log_axis, unit_names, with_note
from .trajectories import agrees, length_to_condition, read_trajectories, state_path
from .views import fan_view

__all__ = ["resonance_fan", "draw_trajectory"]

OK, DISSOLVED = 0, 2  # resonance_status codes (the cube's flag_values)


def resonance_fan(ds, strengths=None, preset=NO_PRESET, trajectories=None):
    """E against λ for every l ≥ 1 state: bound (E < 0) and past threshold E_r ± Γ/2.

    Parameters
    ----------
    trajectories : str, Path or None
        The sweep's traced trajectories (``resonance_trajectories.json``, or its text): each
        resonance is drawn as its continuous trajectory, the grid cells marked on it.

    Returns
    -------
    fig : matplotlib.figure.Figure
    data : dict
        ``resonances`` maps (row key, state name) to the (x, E_r, Γ) arrays of the grid cells;
        ``bound`` maps them to the (x, E) arrays of the bound branch; ``paths`` to the
        (x, E_r, Γ) of each trajectory drawn; ``hidden`` lists the (row key, state name) lost
        on the axis with neither a grid cell nor a trajectory past the threshold.
    """
    ls = [int(l) for l in ds["l"].values if l >= 1]
    if not ls or not np.isfinite(ds["screening_length"].values).all():
        fig = Figure(figsize=(6.4, 2.4), layout="constrained")
        ax = fig.add_subplot()
        ax.set_axis_off()
        why = ("no screening length axis: no state is lost" if ls else
               "no l ≥ 1 in this sweep: its lost states are virtual states (see virtual_state_kappa)")
        ax.text(0.5, 0.5, why, ha="center", va="center", transform=ax.transAxes)
        fig.suptitle(f"Resonance fan of the {family_title(ds)}")
        return fig, {"resonances": {}, "bound": {}, "paths": {}, "hidden": []}
    view = fan_view(ds, preset, strengths)
    lam = view.x
    near_end = -1 if view.lost_towards_small else 0  # the resonance next to the threshold
    fig = Figure(figsize=(max(3.3 * len(ls) + 3.6, 8.0), 2.9 * len(view.rows) + 0.8), layout="constrained")
    axes = fig.subplots(len(view.rows), len(ls), sharex=True, sharey="row", squeeze=False)
    colors = matplotlib.colormaps["viridis"](np.linspace(0, 0.85, ds.sizes["n_r"]))
    drawn_res, drawn_bound, drawn_paths, hidden, mismatched = {}, {}, {}, [], []
    traced, unread = {}, ""
    if trajectories is not None:
        try:
            traced = read_trajectories(trajectories, ds.attrs.get("family", ""))
        except (OSError, ValueError) as exc:  # the figure is still drawn, from the cells, and says why
            unread = f"the trajectories did not read ({exc}): resonances at the grid cells only"
    mass = float(ds.attrs.get("mass", 1.0))
    # energies in the preset's unit (eV, meV, MeV) where it has one, else the cube's own
    e_unit, e_factor = energy_unit(ds, preset)
    e_unit, e_factor = (e_unit, e_factor) if e_unit is not None else (unit_names(preset)[1], 1.0)
    invalid = None
    for row, fan in enumerate(view.rows):
        cell = fan.cube
        z = fan.key
        e_r = cell["resonance_energy"].values * e_factor
        finite = e_r[np.isfinite(e_r) & (e_r > 0)]
        # The symlog axis is linear within ±linthresh: about the smallest resonance energy shown.
        linthresh = 10.0 ** math.floor(math.log10(finite.min())) if finite.size else 1e-4
        bound = cell["energy"].values * e_factor
        deepest = np.nanmax(-bound[np.isfinite(bound)]) if np.isfinite(bound).any() else 1.0
        highest = e_factor * np.nanmax((cell["resonance_energy"] + cell["resonance_width"] / 2).values) \
            if finite.size else linthresh
        for col, l in enumerate(ls):
            ax = axes[row, col]
            invalid = shade_invalid_x(ax, lam, fan.invalid) or invalid
            k_l = int(np.flatnonzero(ds["l"].values == l)[0])
            ax.axhline(0.0, color="0.5", lw=0.6, zorder=1)
            marks = []
            for k, n_r in enumerate(ds["n_r"].values):
                name = state_label(int(ds["n"].sel(l=l, n_r=n_r)), l)
                e = bound[:, k_l, k]
                keep = np.isfinite(e)
                if keep.any():
                    drawn_bound[(z, name)] = (lam[keep], e[keep])
                    ax.plot(lam[keep], e[keep], "-", color=colors[k], lw=1.2, zorder=2, gid=f"bound:{name}")
                er = e_r[:, k_l, k]
                width = cell["resonance_width"].values[:, k_l, k] * e_factor
                status = cell["resonance_status"].values[:, k_l, k]
                has = np.isfinite(er) & np.isfinite(width)
                lc = math.nan if fan.critical is None else float(fan.critical.sel(l=l, n_r=n_r))
                lost_here = math.isfinite(lc) and lam.min() <= lc <= lam.max()
                path = _path(traced.get((l, int(n_r))), cell, lam, mass, e_factor)
                if path is not None and not agrees(path, lam, er):
                    mismatched.append(name)
                    path = None
                if path is not None:
                    drawn_paths[(z, name)] = (path.x, path.e_r, path.width)
                    draw_trajectory(ax, path, colors[k], name)
                    highest = max(highest, 1.5 * float(np.max(path.e_r)))
                if has.any():
                    drawn_res[(z, name)] = (lam[has], er[has], width[has])
                    if path is None:  # the band between the cells (the trajectory draws its own)
                        low = np.maximum(er[has] - width[has] / 2, 0.0)
                        ax.fill_between(lam[has], low, er[has] + width[has] / 2, color=colors[k],
                                        alpha=0.3, lw=0, zorder=2, gid=f"band:{name}")
                        ax.errorbar(lam[has], er[has], yerr=(er[has] - low, width[has] / 2), fmt="none",
                                    ecolor=colors[k], elinewidth=1.0, capsize=0, zorder=3)
                    ok = has & (status == OK)
                    ax.plot(lam[ok], er[ok], "o", color=colors[k], ms=4, zorder=4, gid=f"resonance:{name}")
                    gone = has & (status == DISSOLVED)
                    ax.plot(lam[gone], er[gone], "o", mfc="white", mec=colors[k], ms=4, zorder=4,
                            gid=f"dissolved:{name}")
                elif path is None:
                    if lost_here:
                        hidden.append((z, name))
                    continue
                if lost_here:
                    ax.plot([lc], [0.0], "|", color=colors[k], ms=9, mew=1.5, zorder=4)
                    if keep.any():  # dotted guide (not computed values): the bound branch's last cell to E = 0
                        last = np.flatnonzero(keep)[-1 - near_end]
                        ax.plot([lam[last], lc], [e[last], 0.0], ":", color=colors[k], lw=1.0, zorder=2)
                if path is not None:
                    at = _label_point(path)
                    marks.append((math.log10(path.x[at]), path.e_r[at] + path.width[at] / 2, name, colors[k]))
                elif lost_here:
                    # Dotted guide from the threshold to the resonance cell nearest it.
                    near = np.flatnonzero(has)[near_end]
                    ax.plot([lc, lam[near]], [0.0, er[near]], ":", color=colors[k], lw=1.0, zorder=2)
                    marks.append((math.log10(lam[near]), er[near] + width[near] / 2, name, colors[k]))
            top = 4 * max(highest, linthresh)
            span = math.log10(lam.max() / lam.min()) or 1.0
            # Names in rows down from the panel's top (x in data, y in axes units): no two meet, none
            # leaves the panel, each above its trajectory's end in its colour.
            names_at = matplotlib.transforms.blended_transform_factory(ax.transData, ax.transAxes)
            for (x, _, name, color), r in zip(marks, place_in_rows([m[0] for m in marks], LABEL_WIDTH * span)):
                ax.annotate(name, (10 ** x, 0.97), xycoords=names_at, xytext=(0, -0.8 * ROW_POINTS * r),
                            textcoords="offset points", ha="center", va="top", fontsize=STATE_FONTSIZE, color=color,
                            zorder=5, gid=f"label:{name}",
                            bbox={"boxstyle": "square,pad=0.05", "facecolor": "white", "edgecolor": "none",
                                  "alpha": 0.8})
            ax.set(xscale="log", yscale="symlog", xlim=(lam.min(), lam.max()),
                   ylim=(-2 * deepest, top * 30))
            ax.set_yscale("symlog", linthresh=linthresh, linscale=0.6)
            ax.set_title(f"{fan.title}, $l$ = {l}", fontsize=9)
            ax.text(0.98, 0.03, "bound: E < 0", transform=ax.transAxes, ha="right", va="bottom", fontsize=7,
                    color="0.3")
    tidy_log_axis(axes[-1, 0].xaxis, lam.min(), lam.max())
    handles = [matplotlib.lines.Line2D([], [], color=c, lw=1.2, label=f"$n_r$ = {k}") for k, c in enumerate(colors)]
    threshold = "$\\lambda_c$ (E = 0)" if view.lost_towards_small else "loss density (E = 0)"
    handles += [matplotlib.lines.Line2D([], [], color="0.3", marker="o", ls="none", label="resonance, $\\Gamma < E_r$"),
                matplotlib.lines.Line2D([], [], color="0.3", marker="o", mfc="white", ls="none",
                                        label="dissolved, $\\Gamma > E_r$"),
                matplotlib.patches.Patch(color="0.3", alpha=0.3, label="$E_r \\pm \\Gamma/2$"),
                matplotlib.lines.Line2D([], [], color="0.3", marker="|", ms=9, ls="none", label=threshold),
                matplotlib.lines.Line2D([], [], color="0.5", lw=0.6, label="threshold E = 0"),
                matplotlib.lines.Line2D([], [], color="0.3", lw=1.0, ls=":",
                                        label="guide to the eye: last bound cell to E = 0")]
    if drawn_paths:
        handles += [matplotlib.lines.Line2D([], [], color="0.3", lw=1.4, label="trajectory, $\\Gamma \\leq E_r$"),
                    matplotlib.lines.Line2D([], [], color="0.3", lw=1.0, ls="--", label="trajectory, $\\Gamma > E_r$")]
    if invalid is not None:
        handles.append(invalid)
    fig.legend(handles=handles, loc="outside right center", fontsize=8, title="$n = n_r + l + 1$", title_fontsize=8)
    fig.supxlabel(with_note(view.x_label, "; ".join(filter(None, [
        view.omitted, _trajectory_note(trajectories, unread, traced, hidden, mismatched)]))), fontsize="medium")
    fig.supylabel(f"energy E ({e_unit}; symmetric log scale)", fontsize="medium")
    fig.suptitle(f"Resonance fan of the {family_title(ds)}: each state bound (E < 0), then past its threshold a "
                 "resonance $E_r - i\\Gamma/2$", fontsize=9)
    return fig, {"resonances": drawn_res, "bound": drawn_bound, "paths": drawn_paths, "hidden": hidden}


def _path(trajectory, cell, x, mass, e_factor=1.0):
    """A state's trajectory on one row's x axis (None without one): the row's stored screening
    lengths map λ onto x (the identity in a sweep over λ)."""
    if trajectory is None or "strength" not in cell.coords or cell["strength"].size != 1:
        return None
    lengths = cell["screening_length"].values
    if lengths.shape != x.shape or not (np.isfinite(lengths).all() and (lengths > 0).all()):
        return None
    path = state_path(trajectory, float(cell["strength"]), mass, length_to_condition(lengths, x))
    if path is None or e_factor == 1.0:
        return path
    return dataclasses.replace(path, e_r=path.e_r * e_factor, width=path.width * e_factor)


def draw_trajectory(ax, path, color, name):
    """E_r along the trajectory, solid while Γ ≤ E_r and dashed past it, the band ±Γ/2 (cut at
    E = 0) where it is narrower than the energy, and the threshold joined to its first point."""
    narrow = path.width <= path.e_r
    ax.plot(np.concatenate([[path.threshold], path.x]), np.concatenate([[0.0], np.where(narrow, path.e_r, np.nan)]),
            "-", color=color, lw=1.4, zorder=3, gid=f"trajectory:{name}")
    broad = ~narrow  # widened by a point each way: it meets the solid part, one line
    broad[1:] |= ~narrow[:-1]
    broad[:-1] |= ~narrow[1:]
    ax.plot(path.x, np.where(broad, path.e_r, np.nan), "--", color=color, lw=1.0, zorder=3,
            gid=f"trajectory_dissolved:{name}")
    ax.fill_between(path.x, np.maximum(path.e_r - path.width / 2, 0.0), path.e_r + path.width / 2, where=narrow,
                    color=color, alpha=0.2, lw=0, zorder=2, gid=f"band:{name}")


def _label_point(path):
    """Where a trajectory is named: where it dissolves (Γ = E_r), else its far end."""
    over = np.flatnonzero(path.width > path.e_r)
    return int(over[0]) if over.size else path.x.size - 1


def _trajectory_note(trajectories, unread, traced, hidden, mismatched):
    """What the figure says about the resonances it could not draw as trajectories."""
    parts = []
    if unread:
        parts.append(unread)
    elif trajectories is None:
        parts.append("resonances at the grid cells only (the sweep's traced trajectories were not given)")
    elif not traced:
        parts.append("the trajectories file holds no l ≥ 1 trajectory: resonances at the grid cells only")
    if mismatched:
        parts.append(f"trajectories of {', '.join(sorted(set(mismatched)))} not drawn: they miss the cube's "
                     "own grid points by more than 5 %")
    if hidden:
        names = sorted({name for _, name in hidden})
        parts.append(f"lost on the axis with no grid cell in its resonance window: {', '.join(names)}")
    return "; ".join(parts)
