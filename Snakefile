# boundscape sweep workflow: config -> tiles (one job each) -> one CF NetCDF cube.
# Thin on purpose: the rules live in workflow/rules/, the logic in src/boundscape.
import sys
from pathlib import Path

from snakemake.exceptions import WorkflowError
from snakemake.utils import min_version, validate

from boundscape.sweep import schema_error

min_version("8.10")


# The demo sweep, unless one is given with --configfile: a given sweep replaces the demo
# rather than being merged into it (Snakemake would otherwise keep the demo's other keys).
if not workflow.overwrite_configfiles:

    configfile: "config/config.yaml"


# Before any job: unknown keys, wrong types and impossible values, each naming the key.
try:
    validate(config, "config/schema.yaml")
except WorkflowError:
    # Snakemake's own message quotes the whole schema; one line naming the key says it all.
    sys.exit(f"boundscape: {schema_error(config)}")


include: "workflow/rules/plan.smk"
include: "workflow/rules/solve.smk"
include: "workflow/rules/collect.smk"
# ---- figures and report (figures engineer): add the include: lines here, and append
# ---- the figure/report targets to ALL_TARGETS in those files (e.g. ALL_TARGETS += [...]).
include: "workflow/rules/figures.smk"
include: "workflow/rules/report.smk"
# ---- end of figures and report


rule all:
    default_target: True
    input:
        ALL_TARGETS,


onsuccess:
    summary = Path(RESULTS) / "summary.txt"
    if summary.exists():
        print(summary.read_text(), end="")
