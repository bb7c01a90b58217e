# Figures and the critical-lengths table, rendered from the cube alone (no physics here).
import sys
from pathlib import Path

from boundscape import presets as _presets
from boundscape.errors import InputError

try:
    # A preset that does not fit the sweep fails before any job starts, naming the key.
    PRESET = _presets.from_config(config.get("preset"))
    _presets.cube_units(PRESET, float(config["potential"].get("mass", 1.0)))
except InputError as exc:
    sys.exit(f"boundscape: {exc}")

FIGURES = f"{RESULTS}/figures"
HAS_CONDITION_MAP = isinstance(PRESET, (_presets.Plasma, _presets.Semiconductor))


# (stem, caption, report category, subcategory) of each figure: a PNG in the report, a PDF beside it.
_FIGURE_LIST = [(f"threshold_map_l{l}", "threshold_map.rst", "Threshold maps", f"l = {l}") for l in PLAN.l]
_FIGURE_LIST.append(("level_fan", "level_fan.rst", "Level fans", None))
if HAS_CONDITION_MAP:
    _FIGURE_LIST.append(("condition_map", "condition_map.rst", "Physical conditions", None))

# (Snakemake's parser reads `report` at the start of a line as its keyword: keep it mid-line.)
FIGURE_OUTPUTS = {"table": report(f"{FIGURES}/critical_screening_lengths.csv", caption="../report/critical_table.rst",
                                  category="Tables", labels={"table": "critical screening lengths"}),
                  "config": report(f"{FIGURES}/sweep_config.yaml", caption="../report/sweep_config.rst",
                                   category="Run", labels={"file": "configuration"})}
for _stem, _caption, _category, _subcategory in _FIGURE_LIST:
    FIGURE_OUTPUTS[_stem] = [report(f"{FIGURES}/{_stem}.png", caption=f"../report/{_caption}", category=_category,
                                    subcategory=_subcategory, labels={"figure": _stem}),
                             f"{FIGURES}/{_stem}.pdf"]

ALL_TARGETS += [path for paths in FIGURE_OUTPUTS.values() for path in (paths if isinstance(paths, list) else [paths])]


rule figures:
    input:
        cube=f"{RESULTS}/levels.nc",
    output:
        **FIGURE_OUTPUTS,
    params:
        outdir=lambda wildcards, output: Path(output.table).parent,
    log:
        f"{RESULTS}/logs/figures.log",
    benchmark:
        f"{RESULTS}/benchmarks/figures.tsv"
    threads: 1
    resources:
        mem_mb=2000,
        runtime=10,
    conda:
        "../envs/boundscape.yaml"
    shell:
        "python -m boundscape.figures {input.cube:q} {params.outdir:q} > {log:q} 2>&1"
