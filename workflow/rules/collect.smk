# Every part is read back against the plan first, in a job of its own: one that does not read
# back (truncated, damaged) or belongs to other cells (a copy) is solved again there. Snakemake
# deletes a job's outputs when the job starts, so a failure here, before collect, leaves the
# previous cube in place.
rule check_parts:
    input:
        ENGINE_INPUTS,
        tiles=TILE_PATHS,
        criticals=CRITICAL_PATHS,
    output:
        f"{RESULTS}/parts_checked.txt",
    params:
        config=json.dumps(config),
        results=lambda wildcards, output: Path(output[0]).parent,
        trajectories=TRAJECTORY_OPTION,
    log:
        f"{RESULTS}/logs/check_parts.log",
    benchmark:
        f"{RESULTS}/benchmarks/check_parts.tsv"
    threads: 1
    resources:
        mem_mb=1000,
        runtime=30,
    conda:
        "../envs/boundscape.yaml"
    shell:
        "python -m boundscape.cli.steps check-parts --config-json {params.config:q} --results {params.results:q}"
        " --output {output:q} {params.trajectories} > {log:q} 2>&1"


# The parts' paths are not on the command line (20,000 would overflow it): the step takes them
# from the plan, under {params.results}.
rule collect:
    input:
        checked=f"{RESULTS}/parts_checked.txt",
        tiles=TILE_PATHS,
        criticals=CRITICAL_PATHS,
    output:
        cube=f"{RESULTS}/levels.nc",
        summary=f"{RESULTS}/summary.txt",
    params:
        config=json.dumps(config),
        results=lambda wildcards, output: Path(output.cube).parent,
    log:
        f"{RESULTS}/logs/collect.log",
    benchmark:
        f"{RESULTS}/benchmarks/collect.tsv"
    threads: 1
    resources:
        mem_mb=4000,
        runtime=30,
    conda:
        "../envs/boundscape.yaml"
    shell:
        "python -m boundscape.cli.steps collect --config-json {params.config:q} --results {params.results:q}"
        " --output {output.cube:q} --summary {output.summary:q} > {log:q} 2>&1"
