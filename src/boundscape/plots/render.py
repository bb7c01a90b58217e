"""Every figure and table of a cube, under one directory (the workflow's figures step)."""

from __future__ import annotations

from pathlib import Path

import matplotlib

from ..cube.physical import preset_of
from .conditions import condition_map
from .level_fan import level_fan
from .line_maps import line_shift_map
from .line_survival import line_survival_chart
from .loss_table import write_critical_csv
from .populations import population_figures
from .resonance_fan import resonance_fan
from .scattering import inverse_length_figure, phase_shift_figure
from .style import RC, save
from .threshold_map import threshold_map

__all__ = ["render_all"]


def render_all(ds, outdir):
    """Every figure and the critical-lengths table of a cube, under ``outdir``; returns the paths."""
    outdir = Path(outdir)
    preset, settings = preset_of(ds)
    written = []
    with matplotlib.rc_context(RC):
        for l in ds["l"].values:
            written += save(threshold_map(ds, int(l), preset)[0], outdir / f"threshold_map_l{int(l)}")
        written += save(level_fan(ds, preset=preset)[0], outdir / "level_fan")
        if "resonance_energy" in ds:  # a cube with resonances: always drawn, empty panels say so
            written += save(resonance_fan(ds, preset=preset)[0], outdir / "resonance_fan")
        fig, _ = condition_map(ds, preset, settings)
        if fig is not None:
            written += save(fig, outdir / "condition_map")
        if "line_energy" in ds:
            for m, label in enumerate(ds["line_label"].values):
                written += save(line_shift_map(ds, m, preset)[0], outdir / f"line_shift_{label}")
            written += save(line_survival_chart(ds, preset)[0], outdir / "line_survival")
        if "inverse_scattering_length" in ds:  # scattering: true (plots/scattering.py)
            written += save(inverse_length_figure(ds, preset)[0], outdir / "inverse_scattering_length")
        if "phase_shift" in ds:
            written += save(phase_shift_figure(ds, preset)[0], outdir / "phase_shifts")
        if "partition_function" in ds:  # populations: true (plots/populations.py)
            for stem, fig in population_figures(ds):
                written += save(fig, outdir / stem)
    write_critical_csv(ds, outdir / "critical_screening_lengths.csv", preset)
    tables = [outdir / "critical_screening_lengths.csv"]
    if "critical_coupling" in ds:
        tables.append(outdir / "critical_couplings.csv")
    # The configuration the cube was computed from, as stored in it, for the report.
    config = outdir / "sweep_config.yaml"
    config.write_text(f"# config_sha256: {ds.attrs.get('config_sha256', 'unknown')}\n{ds.attrs.get('config_yaml', '')}")
    return written + tables + [config]
