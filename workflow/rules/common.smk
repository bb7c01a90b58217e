# Shared by the other .smk files: the validated config, the plan of tiles and the targets.
# The plan is cheap and deterministic from the config, so it is computed at parse time:
# the tile list is known before any job starts and no checkpoint is needed.
import json
import sys
from pathlib import Path

from snakemake.exceptions import WorkflowError
from snakemake.utils import validate

from boundscape.physics import presets as _presets
from boundscape.report_layout import arrange, figure_label
from boundscape.cube.netcdf import unwritable
from boundscape.errors import InputError
from boundscape.sweep import SCHEMA_PATH, plan, schema_error
from boundscape.sweep.config import read_config_files
from boundscape.sweep.limits import check_limits
from boundscape.sweep.plan import CRITICAL_FILE, TILE_FILE

# Snakemake read the config files with its own YAML loader, which keeps the last of a key given
# twice and reads 1e308 as a string: read them again as boundscape does. Then a sweep over a
# limit (cells, levels per l, l) stops here, before anything is built.
try:
    _config = read_config_files(workflow.configfiles, workflow.overwrite_configfiles,
                                workflow.config_settings.config)
    check_limits(_config)
except InputError as exc:
    sys.exit(f"boundscape: {exc}")
config.clear()
config.update(_config)

# Before any job: unknown keys, wrong types and impossible values, each naming the key and
# the value. The package's check runs first: Snakemake's own quotes the whole schema, and on
# a wrong type (a string where a list belongs) it stops in its default-filling instead.
if (_message := schema_error(config)) is not None:
    sys.exit(f"boundscape: {_message}")
try:
    validate(config, str(SCHEMA_PATH))
except WorkflowError:
    sys.exit(f"boundscape: {schema_error(config)}")

try:
    PLAN = plan(config)
    # A preset that does not fit the sweep fails before any job starts, naming the key.
    PRESET = _presets.from_config(config.get("preset"))
    PRESET.unit_system(PLAN.engine["mass"])  # the mass the plan settled on (a preset may give it)
except InputError as exc:
    sys.exit(f"boundscape: {exc}")

RESULTS = f"results/{PLAN.sweep}"
FIGURES = f"{RESULTS}/figures"
TILES = {tile.name: tile for tile in PLAN.tiles}
CRITICAL_BLOCKS = {block.name: block for block in PLAN.critical_blocks}
TILE_PATHS = PLAN.tile_paths(RESULTS)  # as the rules' {TILE_FILE} names them; faster than expand()
CRITICAL_PATHS = PLAN.critical_paths(RESULTS)
# A sweep over the trade's conditions has its threshold maps over them, and no separate condition map.
HAS_CONDITION_MAP = PRESET.has_condition_map and PLAN.conditions is None
# (stem, caption, report category, subcategory) of each figure: a PNG in the report, a PDF beside it.
FIGURE_LIST = [(f"threshold_map_l{l}", "threshold_map.rst", "Threshold maps", f"l = {l}") for l in PLAN.l]
FIGURE_LIST.append(("level_fan", "level_fan.rst", "Level fans", None))
if PLAN.engine.get("resonances"):
    FIGURE_LIST.append(("resonance_fan", "resonance_fan.rst", "Resonance fans", None))
if HAS_CONDITION_MAP:
    FIGURE_LIST.append(("condition_map", "condition_map.rst", "Physical conditions", None))
FIGURE_LIST += [(f"line_shift_{line}", "line_shift.rst", "Spectral lines", line) for line in PLAN.lines]
if PLAN.lines:
    FIGURE_LIST.append(("line_survival", "line_survival.rst", "Spectral lines", "survival"))
if PLAN.scattering is not None:  # scattering: true, or {energies: [...]} (plots/scattering.py)
    FIGURE_LIST.append(("inverse_scattering_length", "inverse_scattering_length.rst", "Scattering", "1/a"))
    if PLAN.scattering["energies"]:
        FIGURE_LIST.append(("phase_shifts", "phase_shifts.rst", "Scattering", "phase shifts"))
if PLAN.engine.get("populations"):  # ionization maps, U and the continuum lowering (plots/populations.py)
    from boundscape.plots.populations import figure_list as _population_figures

    FIGURE_LIST += _population_figures(PLAN)
# the report's categories in a reader's order, readable names, the l = 0 map's own caption
FIGURE_LIST, CATEGORIES = arrange(FIGURE_LIST)
TABLES = ("critical_screening_lengths.csv", "sweep_config.yaml")
CRITICAL_COUPLINGS = PLAN.critical_strengths  # the nuclear critical coupling at each range, a table of its own


def all_targets():
    """The cube, every figure (PNG and PDF), the tables and the report's run summary."""
    figures = [f"{FIGURES}/{stem}.{ext}" for stem, *_ in FIGURE_LIST for ext in ("png", "pdf")]
    tables = TABLES + (("critical_couplings.csv",) if CRITICAL_COUPLINGS else ())
    return [f"{RESULTS}/levels.nc", *figures, *(f"{FIGURES}/{name}" for name in tables),
            f"{RESULTS}/report/run_summary.txt"]


def tile_spec(wildcards):
    """The cells and engine settings of one tile: a changed tile reruns through params."""
    return json.dumps(PLAN.tile_spec(TILES[wildcards.tile]))


def critical_spec(wildcards):
    return json.dumps(PLAN.critical_spec(CRITICAL_BLOCKS[wildcards.block]))


RESONANCES = bool(PLAN.engine.get("resonances"))
TRAJECTORIES = f"{RESULTS}/resonance_trajectories.json"


# A tabulated potential's table is an input, so editing the table reruns the tiles; with
# resonances on, the poles' trajectories (computed once, rules/resonances.smk) are one too.
ENGINE_INPUTS = ([PLAN.engine["table"]] if "table" in PLAN.engine else []) + ([TRAJECTORIES] if RESONANCES else [])
TRAJECTORY_OPTION = f"--trajectories {TRAJECTORIES}" if RESONANCES else ""


def check_writable():
    """Before the first job (onstart): a results folder that cannot be written is one line."""
    if (problem := unwritable(RESULTS)) is not None:
        sys.exit(f"boundscape: {problem}")


def print_summary():
    summary = Path(RESULTS) / "summary.txt"
    if summary.exists():
        print(summary.read_text(), end="")
