# Figures and the critical-lengths table, rendered from the cube alone (no physics here).
# (Snakemake's parser reads `report` at the start of a line as its keyword: keep it mid-line.)
FIGURE_OUTPUTS = {"table": report(f"{FIGURES}/critical_screening_lengths.csv", caption="../report/critical_table.rst",
                                  category=CATEGORIES["Tables"], labels={"table": "Critical screening lengths (CSV file)"}),
                  "config": report(f"{FIGURES}/sweep_config.yaml", caption="../report/sweep_config.rst",
                                   category=CATEGORIES["Run"], labels={"page": "Configuration (YAML file)"})}
if CRITICAL_COUPLINGS:
    FIGURE_OUTPUTS["couplings"] = report(f"{FIGURES}/critical_couplings.csv", caption="../report/critical_couplings.rst",
                                         category=CATEGORIES["Tables"], labels={"table": "Critical couplings (CSV file)"})
for _stem, _caption, _category, _subcategory in FIGURE_LIST:
    FIGURE_OUTPUTS[_stem] = [report(f"{FIGURES}/{_stem}.png", caption=f"../report/{_caption}", category=_category,
                                    subcategory=_subcategory, labels={"figure": figure_label(_stem)}),
                             f"{FIGURES}/{_stem}.pdf"]


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
        "python -m boundscape.cli.steps figures {input.cube:q} {params.outdir:q} > {log:q} 2>&1"
