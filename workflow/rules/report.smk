# `snakemake --report results/<sweep>/report.html`: the figures with their captions, the run's
# summary, the configuration and Snakemake's own runtime statistics.
import mimetypes

# Python's mimetypes knows no .yaml: as text/plain the report shows the config inline instead
# of warning that it had to guess.
mimetypes.add_type("text/plain", ".yaml")


report: "../report/workflow.rst"


rule report_summary:
    input:
        f"{RESULTS}/summary.txt",
    output:
        report(f"{RESULTS}/report/run_summary.txt", caption="../report/run_summary.rst", category="Run",
               labels={"file": "run summary"}),
    log:
        f"{RESULTS}/logs/report_summary.log",
    localrule: True
    conda:
        "../envs/boundscape.yaml"
    shell:
        "cp {input:q} {output:q} 2> {log:q}"
