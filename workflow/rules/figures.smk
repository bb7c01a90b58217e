# Figures and the critical-lengths table, rendered from the cube alone (no physics here).
from boundscape import presets as _presets

try:
    # A preset that does not fit the sweep fails before any job starts, naming the key.
    PRESET = _presets.from_config(config.get("preset"))
    _presets.cube_units(PRESET, float(config["potential"].get("mass", 1.0)))
except InputError as exc:
    sys.exit(f"boundscape: {exc}")

FIGURES = f"{RESULTS}/figures"
HAS_CONDITION_MAP = isinstance(PRESET, (_presets.Plasma, _presets.Semiconductor))


def _figure(stem, caption, category, subcategory=None):
    """A PNG shown in the report and the PDF beside it."""
    labels = {"figure": Path(stem).name}
    return [report(f"{FIGURES}/{stem}.png", caption=f"../report/{caption}", category=category,
                   subcategory=subcategory, labels=labels),
            f"{FIGURES}/{stem}.pdf"]


FIGURE_OUTPUTS = {
    **{f"threshold_map_l{l}": _figure(f"threshold_map_l{l}", "threshold_map.rst", "Threshold maps", f"l = {l}")
       for l in PLAN.l},
    "level_fan": _figure("level_fan", "level_fan.rst", "Level fans"),
    "table": report(f"{FIGURES}/critical_screening_lengths.csv", caption="../report/critical_table.rst",
                    category="Tables", labels={"table": "critical screening lengths"}),
}
if HAS_CONDITION_MAP:
    FIGURE_OUTPUTS["condition_map"] = _figure("condition_map", "condition_map.rst", "Physical conditions")

ALL_TARGETS += [path for paths in FIGURE_OUTPUTS.values() for path in (paths if isinstance(paths, list) else [paths])]


rule figures:
    input:
        cube=f"{RESULTS}/levels.nc",
    output:
        **FIGURE_OUTPUTS,
    params:
        outdir=FIGURES,
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
