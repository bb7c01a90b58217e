"""Figures and tables rendered from a cube alone: threshold maps, level fans, condition maps and
the loss table.  Nothing here solves the radial equation.  Each figure function returns its
figure together with the arrays it plotted, so tests can hold the picture against the cube."""

from .conditions import condition_map, surviving_levels
from .level_fan import fan_strengths, level_fan
from .loss_table import critical_rows, write_critical_csv
from .render import render_all
from .style import save
from .threshold_map import threshold_map

__all__ = ["condition_map", "surviving_levels", "fan_strengths", "level_fan", "critical_rows", "write_critical_csv",
           "render_all", "save", "threshold_map"]
