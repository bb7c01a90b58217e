"""No figure hides a stored state, every line has a legend entry, and figure text has no ASCII
subscripts.

A small plasma sweep over Z × λ with resonances and a line, built through the workflow's own steps
(trajectories -> tiles -> criticals -> collect), in process.  Its λ grid is coarse on purpose: some
resonance windows λ_d < λ < λ_c hold no grid point, the case in which the resonance fan used to
lose a state.
"""

import json
import re
from pathlib import Path

import matplotlib
import matplotlib.lines
import matplotlib.text
import numpy as np
import pytest

from boundscape.cli import steps
from boundscape.cube.physical import preset_of
from boundscape.physics.presets import Semiconductor
from boundscape.plots import condition_map, level_fan, render_all, threshold_map
from boundscape.plots.condition_maps import binding_curves
from boundscape.plots.line_maps import line_shift_map
from boundscape.plots.line_survival import line_survival_chart
from boundscape.plots.resonance_fan import resonance_fan
from boundscape.plots.style import RC
from boundscape.plots.trajectories import read_trajectories
from workflow_steps import build_cube

pytestmark = pytest.mark.filterwarnings("error")

STRENGTHS = [1.0, 2.0, 3.0, 6.0]  # four: the level fan once drew three of them
CONFIG = {"sweep": "hidden", "potential": {"family": "yukawa", "mass": 1.0}, "resonances": True,
          "grid": {"strength": STRENGTHS,
                   "screening_length": {"start": 0.6, "stop": 40.0, "num": 8, "spacing": "log"},
                   "l": [0, 1], "n_r_max": 4},
          "lines": ["1s-2p"], "tiles": {"cells": 16},
          "preset": {"kind": "plasma", "temperature_eV": 10.0}}


def _build(directory: Path, config: dict):
    """(cube, trajectories path or None) of ``config`` through the workflow's steps, in process."""
    traced = bool(config.get("resonances"))
    cube, _ = build_cube(directory, config, trajectories=traced)
    return cube, (directory / "resonance_trajectories.json" if traced else None)
@pytest.fixture(scope="module")
def built(tmp_path_factory):
    return _build(tmp_path_factory.mktemp("hidden"), CONFIG)


def _windows_without_a_cell(cube):
    """(strength, state) lost on the λ axis with no grid cell past its threshold holding a
    resonance (its window λ_d < λ < λ_c, and the dissolved stretch below it, fall between grid
    points): computed from the cube's stored values alone."""
    lam = cube["screening_length"].values
    out = set()
    for z in cube["strength"].values:
        for n_r in cube["n_r"].values:
            state = cube.sel(strength=z, l=1, n_r=n_r)
            lc = float(state["critical_screening_length"])
            if not (lam.min() <= lc <= lam.max()):
                continue
            if not (np.isfinite(state["resonance_energy"].values) & np.isfinite(state["resonance_width"].values)).any():
                out.add((float(z), f"{n_r + 2}p"))
    return out


def test_level_fan_draws_every_stored_strength(built):
    cube, _ = built
    preset, _ = preset_of(cube)
    with matplotlib.rc_context(RC):
        fig, data = level_fan(cube, preset=preset)
    rows = {key for key, _ in data["lines"]}
    assert rows == set(STRENGTHS)
    titles = {ax.get_title() for ax in fig.axes}
    assert all(any(t.startswith(f"Z = {z:g},") for t in titles) for z in STRENGTHS)
    # Beyond the row limit it draws some and names what it leaves out, in the figure itself.
    with matplotlib.rc_context(RC):
        fig, data = level_fan(cube, strengths=STRENGTHS[:2], preset=preset)
    note = fig._supxlabel.get_text()
    assert "Note: 2 of the 4 stored strengths drawn (Z = 1, Z = 2)" in note


def test_resonance_fan_draws_each_trajectory_with_its_cells(built):
    cube, traj = built
    hidden = _windows_without_a_cell(cube)
    assert hidden, "the grid must leave some resonance window without a grid point (the case tested)"
    with matplotlib.rc_context(RC):
        fig, data = resonance_fan(cube)
    assert set(data["hidden"]) == hidden  # without the trajectories: named, not dropped silently
    names = ", ".join(sorted({name for _, name in hidden}))
    assert f"lost on the axis with no grid cell in its resonance window: {names}" in fig._supxlabel.get_text()
    with matplotlib.rc_context(RC):
        fig, data = resonance_fan(cube, trajectories=traj)
    assert data["hidden"] == [] and "Note" not in fig._supxlabel.get_text()
    lam = cube["screening_length"].values
    for z in STRENGTHS:
        for n_r in cube["n_r"].values:
            state = cube.sel(strength=z, l=1, n_r=n_r)
            lc = float(state["critical_screening_length"])
            if not lam.min() <= lc <= lam.max():
                continue
            x, e_r, width = data["paths"][(z, f"{n_r + 2}p")]
            # The threshold the trajectory starts from is the cube's λ_c, computed by the criticals
            # step from the zero-energy solution (another computation than the pole tracer's).
            gid = f"trajectory:{n_r + 2}p"
            line = next(li for ax in fig.axes for li in ax.get_lines() if li.get_gid() == gid
                        and ax.get_title().startswith(f"strength {z:g},"))
            assert line.get_xdata()[0] == pytest.approx(lc, rel=1e-4)
            # The grid cells lie on the drawn curve (the cube's refined poles vs the traced ones).
            er = state["resonance_energy"].values
            on = np.isfinite(er) & (lam >= x.min()) & (lam <= x.max())
            order = np.argsort(x)
            drawn = np.exp(np.interp(np.log(lam[on]), np.log(x[order]), np.log(e_r[order])))
            np.testing.assert_allclose(drawn, er[on], rtol=0.02)
            # Γ reaches E_r on the curve at the cube's dissolution length (brentq on refined poles).
            ld = float(state["dissolution_screening_length"])
            over = np.flatnonzero(width > e_r)
            if np.isfinite(ld) and over.size and over[0] > 0:
                assert x[over[0]] <= ld * 1.02 and x[over[0] - 1] >= ld * 0.98


def test_figures_step_finds_the_trajectories_beside_the_cube(built, tmp_path):
    cube, traj = built
    cube_path = traj.with_name("levels.nc")
    assert steps.main(["figures", str(cube_path), str(tmp_path / "figs")]) == 0
    assert (tmp_path / "figs" / "resonance_fan.png").stat().st_size > 10_000


# --- legend entries -------------------------------------------------------------------------

def _legend_handles(fig):
    legends = [a.get_legend() for a in fig.axes if a.get_legend()] + list(fig.legends)
    return [h for leg in legends for h in leg.legend_handles]


def _unexplained_lines(fig):
    """Lines drawn with data that no legend entry explains: an entry explains a line with its
    colour and line style, or, if grey (a 'kind' entry standing for every colour), with its line
    style and marker."""
    handles = [h for h in _legend_handles(fig) if isinstance(h, matplotlib.lines.Line2D)]

    def grey(h):
        r, g, b, _ = matplotlib.colors.to_rgba(h.get_color())
        return r == g == b and 0 < r < 1

    # A grey entry drawn as a line and a marker stands for lines of either.
    kinds = {kind for h in handles if grey(h) for kind in ((h.get_linestyle(), h.get_marker()),
                                                           (h.get_linestyle(), "None"), ("None", h.get_marker()))}
    styles = {(matplotlib.colors.to_hex(h.get_color()), h.get_linestyle()) for h in handles}
    missing = []
    for ax in fig.axes:
        for line in ax.get_lines():
            if len(line.get_xdata()) == 0 or not line.get_visible():
                continue
            key = (matplotlib.colors.to_hex(line.get_color()), line.get_linestyle())
            if (line.get_linestyle(), line.get_marker()) not in kinds and key not in styles:
                missing.append((ax.get_title(), line.get_gid(), key, line.get_marker()))
    return missing


def test_every_condition_map_line_has_a_legend_entry(built):
    cube, _ = built
    semi = Semiconductor(effective_mass=0.067, permittivity=12.9, screening="thomas_fermi")
    debye = Semiconductor(effective_mass=0.067, permittivity=12.9, screening="debye")
    with matplotlib.rc_context(RC):
        one_d, _ = condition_map(cube, semi, {"strengths": [1.0]})  # the one line that had none
        two_d, _ = condition_map(cube, debye, {"strengths": [1.0], "temperature_K": [10.0, 100.0]})
    for fig in (one_d, two_d):
        assert _unexplained_lines(fig) == []
    # The check itself catches a line without an entry.
    one_d.axes[0].plot([1e15, 1e16], [1, 2], "-", color="magenta")
    assert len(_unexplained_lines(one_d)) == 1


@pytest.mark.parametrize("temperatures", [[10.0], [3.0, 30.0]])
def test_condition_sweep_figures_explain_every_line_in_mathtext(tmp_path, temperatures):
    # A plasma sweep over n_e x T_e: with one temperature the maps are binding-energy curves.
    config = {"sweep": "conditions", "potential": {"family": "yukawa"}, "resonances": True,
              "grid": {"strength": [1.0, 2.0], "electron_density": {"start": 1e21, "stop": 1e24, "num": 5,
                                                                    "spacing": "log"},
                       "electron_temperature": temperatures, "l": [0, 1], "n_r_max": 2},
              "preset": {"kind": "plasma"}}
    cube, traj = _build(tmp_path, config)
    preset, _ = preset_of(cube)
    with matplotlib.rc_context(RC):
        figures = {f"threshold map l = {l}": threshold_map(cube, int(l), preset)[0] for l in (0, 1)}
        figures["binding energies"] = level_fan(cube, preset=preset)[0]
        figures["resonance fan"], data = resonance_fan(cube, preset=preset, trajectories=traj)
    assert data["paths"] and data["hidden"] == []
    assert {name: _text_with_ascii_subscripts(fig) for name, fig in figures.items()
            if _text_with_ascii_subscripts(fig)} == {}
    assert {name: _unexplained_lines(fig) for name, fig in figures.items() if _unexplained_lines(fig)} == {}
    if len(temperatures) == 1:
        # Six strengths (the cube's two, relabelled: the figure is checked against the cube, not
        # physics): the binding-energy curves draw four panels and say which.
        import xarray as xr

        six = xr.concat([cube.assign_coords(strength=cube["strength"] + 10 * k) for k in range(3)], "strength",
                        data_vars="all", coords="different", compat="equals", join="outer")
        with matplotlib.rc_context(RC):
            fig = binding_curves(six, 0, preset)[0]
        assert "Note: 4 of the 6 stored strengths drawn" in fig._supxlabel.get_text()


# --- figure text ----------------------------------------------------------------------------

MATH = re.compile(r"(?<!\\)\$.*?(?<!\\)\$")


def _text_with_ascii_subscripts(fig):
    """Every visible text of ``fig`` (titles, labels, legends, colour bars, annotations, ticks)
    with an underscore outside matplotlib mathtext ($...$)."""
    fig.draw_without_rendering()  # ticks and legends are made at draw time
    found = []
    for text in fig.findobj(matplotlib.text.Text):
        shown = text.get_text()
        if text.get_visible() and shown and "_" in MATH.sub("", shown):
            found.append(shown)
    return found


def test_no_ascii_subscripts_and_a_legend_entry_per_line_in_every_figure(built):
    cube, traj = built
    preset, settings = preset_of(cube)
    with matplotlib.rc_context(RC):
        figures = {f"threshold map l = {l}": threshold_map(cube, int(l), preset)[0] for l in cube["l"].values}
        figures["level fan"] = level_fan(cube, preset=preset)[0]
        figures["resonance fan"] = resonance_fan(cube, preset=preset, trajectories=traj)[0]
        figures["resonance fan, cells only"] = resonance_fan(cube, preset=preset)[0]
        figures["condition map"] = condition_map(cube, preset, settings)[0]
        figures["line shift"] = line_shift_map(cube, 0, preset)[0]
        figures["line survival"] = line_survival_chart(cube, preset)[0]
        semi = Semiconductor(effective_mass=0.067, permittivity=12.9, screening="debye")
        figures["semiconductor condition map"] = condition_map(cube, semi, {"strengths": [1.0],
                                                                            "temperature_K": [10.0, 100.0]})[0]
    assert all(fig is not None for fig in figures.values())
    found = {name: _text_with_ascii_subscripts(fig) for name, fig in figures.items()}
    assert {name: texts for name, texts in found.items() if texts} == {}
    # Every kind of figure: a legend entry for every line drawn.
    unexplained = {name: _unexplained_lines(fig) for name, fig in figures.items()}
    assert {name: lines for name, lines in unexplained.items() if lines} == {}
    # The scan catches one.
    figures["level fan"].axes[0].set_title("n_r = 0")
    assert _text_with_ascii_subscripts(figures["level fan"]) == ["n_r = 0"]


def test_line_shift_colour_bars_say_red_or_blue_shifted(built):
    cube, _ = built
    preset, _ = preset_of(cube)
    with matplotlib.rc_context(RC):
        fig = line_shift_map(cube, 0, preset)[0]
    fig.draw_without_rendering()
    texts = " ".join(t.get_text() for t in fig.findobj(matplotlib.text.Text))
    assert "(red)" not in texts and "(blue)" not in texts
    bars = [ax.get_ylabel() for ax in fig.axes if ax.get_label() == "<colorbar>"]
    assert len(bars) == 2
    assert all(bar.endswith((", red-shifted", ", blue-shifted", ", shifted both ways")) for bar in bars)


def test_render_all_writes_every_figure(built, tmp_path):
    cube, traj = built
    written = render_all(cube, tmp_path, trajectories=traj)
    assert {Path(p).name for p in written} >= {"level_fan.png", "resonance_fan.png", "line_shift_1s-2p.png"}




@pytest.mark.parametrize("points", [1, 2, 5])
def test_a_trajectory_with_few_points_on_the_axis_is_drawn(points):
    # A trajectory that only enters the axis at its edge keeps a point or two (the nuclear sweep's
    # strongest coupling did): it is drawn, solid where Γ ≤ E_r and dashed past it.
    from matplotlib.figure import Figure

    from boundscape.plots.resonance_fan import draw_trajectory
    from boundscape.plots.trajectories import StatePath

    x = np.geomspace(8.0, 5.0, points)
    e_r = np.geomspace(1e-4, 1e-2, points)
    path = StatePath(x, e_r, np.geomspace(1e-6, 3e-2, points), threshold=8.2)
    ax = Figure().add_subplot()
    draw_trajectory(ax, path, "C1", "2p")
    solid, dashed = (next(li for li in ax.get_lines() if li.get_gid() == gid)
                     for gid in ("trajectory:2p", "trajectory_dissolved:2p"))
    assert solid.get_xdata().size == points + 1 and dashed.get_xdata().size == points
    assert np.isfinite(solid.get_ydata()).sum() == 1 + (path.width <= path.e_r).sum()


def test_trajectories_that_do_not_read_leave_the_cells_and_a_note(built, tmp_path):
    cube, traj = built
    text = traj.read_text()
    assert read_trajectories(text, "yukawa").keys() == read_trajectories(traj, "yukawa").keys()
    broken = tmp_path / "broken.json"
    broken.write_text(text[: len(text) // 2])  # truncated
    other = json.loads(text)
    other["family"] = "exponential_cosine"
    cases = {"truncated": broken, "missing": tmp_path / "none.json", "another family": json.dumps(other)}
    for why, source in cases.items():
        with matplotlib.rc_context(RC):
            fig, data = resonance_fan(cube, trajectories=source)
        note = fig._supxlabel.get_text()
        assert data["paths"] == {} and data["resonances"], why
        assert "the trajectories did not read" in note and "no grid cell in its resonance window" in note, why


POPULATED = {"sweep": "populated", "potential": {"family": "yukawa"}, "populations": True,
             "scattering": {"energies": [1.0, 10.0]},  # eV under the plasma preset
             "grid": {"strength": [1.0, 2.0], "electron_density": [1e19, 1e21, 1e23],
                      "electron_temperature": [3.0, 30.0], "l": [0, 1], "n_r_max": 2},
             "tiles": {"cells": 8}, "preset": {"kind": "plasma"}}


def test_populations_and_scattering_figures_have_mathtext_and_legend_entries(tmp_path):
    # The figures merged after the scan above was written: the same two checks.
    from boundscape.plots.populations import population_figures
    from boundscape.plots.scattering import inverse_length_figure, phase_shift_figure

    cube, _ = _build(tmp_path, POPULATED)
    preset, _ = preset_of(cube)
    with matplotlib.rc_context(RC):
        figures = dict(population_figures(cube))
        figures["inverse scattering length"] = inverse_length_figure(cube, preset)[0]
        figures["phase shifts"] = phase_shift_figure(cube, preset)[0]
    assert len(figures) == 2 + 2 + 2  # an ionization map per Z, U, the lowering, 1/a, δ_l
    found = {name: _text_with_ascii_subscripts(fig) for name, fig in figures.items()}
    assert {name: texts for name, texts in found.items() if texts} == {}
    unexplained = {name: _unexplained_lines(fig) for name, fig in figures.items()}
    assert {name: lines for name, lines in unexplained.items() if lines} == {}


def test_no_figure_module_uses_pyplot():
    # pyplot keeps a global current figure: a figure made through it becomes the canvas of a
    # user's next xarray .plot() in the same session (seen with the populations figures).
    import ast

    import boundscape.plots

    offenders = []
    for path in Path(boundscape.plots.__file__).parent.glob("*.py"):
        for node in ast.walk(ast.parse(path.read_text())):
            names = ([a.name for a in node.names] if isinstance(node, ast.Import) else
                     [f"{node.module}.{a.name}" for a in node.names] if isinstance(node, ast.ImportFrom) and node.module
                     else [])
            offenders += [(path.name, n) for n in names if n.startswith("matplotlib.pyplot")]
    assert offenders == []
