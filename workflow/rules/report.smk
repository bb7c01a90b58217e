# `snakemake --report results/<sweep>/report.html`: the figures with their captions, the run's
# summary, the configuration and the critical-length table shown inline (HTML pages), and
# Snakemake's own runtime statistics. The landing text is composed from the cube once it exists.
import mimetypes

# Python's mimetypes knows no .yaml: as text/plain the report offers it without guessing.
mimetypes.add_type("text/plain", ".yaml")

REPORT = f"{RESULTS}/report"
_LANDING = Path(REPORT, "landing.rst").resolve()


report: str(_LANDING) if _LANDING.exists() else "../report/workflow.rst"


rule report_pages:
    input:
        cube=f"{RESULTS}/levels.nc",
        summary=f"{RESULTS}/summary.txt",
        table=f"{FIGURES}/critical_screening_lengths.csv",
        config=f"{FIGURES}/sweep_config.yaml",
    output:
        text=f"{REPORT}/run_summary.txt",
        landing=f"{REPORT}/landing.rst",
        summary=report(f"{REPORT}/run_summary.html", caption="../report/run_summary.rst", category=CATEGORIES["Run"],
                       labels={"page": "Run summary"}),
        config=report(f"{REPORT}/configuration.html", caption="../report/sweep_config.rst",
                      category=CATEGORIES["Run"], labels={"page": "Configuration"}),
        table=report(f"{REPORT}/critical_screening_lengths.html", caption="../report/critical_table.rst",
                     category=CATEGORIES["Tables"], labels={"table": "Critical screening lengths"}),
    params:
        outdir=lambda wildcards, output: Path(output.landing).parent,
    log:
        f"{RESULTS}/logs/report_pages.log",
    localrule: True
    conda:
        "../envs/boundscape.yaml"
    shell:
        "(cp {input.summary:q} {output.text:q} && python -m boundscape.cli.steps report-pages --cube {input.cube:q}"
        " --summary {input.summary:q} --table {input.table:q} --config {input.config:q} --outdir {params.outdir:q})"
        " > {log:q} 2>&1"
