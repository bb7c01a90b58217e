# boundscape sweep workflow: config -> tiles (one job each) -> one CF NetCDF cube.
# Thin on purpose: the rules live in workflow/rules/, the logic in src/boundscape.
from pathlib import Path

from snakemake.utils import min_version, validate

min_version("8.10")


configfile: "config/config.yaml"


# Before any job: unknown keys, wrong types and impossible values, each naming the key.
validate(config, "config/schema.yaml")


include: "workflow/rules/plan.smk"
include: "workflow/rules/solve.smk"
include: "workflow/rules/collect.smk"
# ---- figures and report (figures engineer): add the include: lines here, and append
# ---- the figure/report targets to ALL_TARGETS in those files (e.g. ALL_TARGETS += [...]).
# ---- end of figures and report


rule all:
    default_target: True
    input:
        ALL_TARGETS,


onsuccess:
    summary = Path(RESULTS) / "summary.txt"
    if summary.exists():
        print(summary.read_text(), end="")
