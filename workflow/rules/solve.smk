# The engine's compiled kernels, compiled (or loaded from numba's cache) once before the
# parallel jobs, which then load them instead of each compiling (boundscape.engine.jitcache).
rule engine_kernels:
    output:
        f"{RESULTS}/engine_kernels.txt",
    log:
        f"{RESULTS}/logs/engine_kernels.log",
    benchmark:
        f"{RESULTS}/benchmarks/engine_kernels.tsv"
    threads: 1
    resources:
        mem_mb=2000,
        runtime=30,
    conda:
        "../envs/boundscape.yaml"
    shell:
        "python -m boundscape.engine.warmup > {output:q} 2> {log:q}"


# Tiles and critical blocks are named by index, four digits or more (boundscape.sweep.plan).
# Inputs that are the same for every job are constants, not functions: Snakemake calls and
# inspects a function once per job, which a 20,000-tile sweep pays for in planning time.
rule solve_tile:
    input:
        ENGINE_INPUTS,
        kernels=f"{RESULTS}/engine_kernels.txt",
    output:
        f"{RESULTS}/{TILE_FILE}",
    params:
        spec=tile_spec,
        trajectories=TRAJECTORY_OPTION,
    log:
        f"{RESULTS}/logs/solve_tile_{{tile}}.log",
    benchmark:
        f"{RESULTS}/benchmarks/solve_tile_{{tile}}.tsv"
    wildcard_constraints:
        tile=r"\d\d\d\d+",
    threads: 1
    resources:
        mem_mb=1000,
        runtime=30,
    conda:
        "../envs/boundscape.yaml"
    shell:
        "python -m boundscape.cli.steps solve-tile --spec {params.spec:q} --output {output:q} {params.trajectories} > {log:q} 2>&1"


rule criticals:
    input:
        ENGINE_INPUTS,
        kernels=f"{RESULTS}/engine_kernels.txt",
    output:
        f"{RESULTS}/{CRITICAL_FILE}",
    params:
        spec=critical_spec,
        trajectories=TRAJECTORY_OPTION,
    log:
        f"{RESULTS}/logs/criticals_{{block}}.log",
    benchmark:
        f"{RESULTS}/benchmarks/criticals_{{block}}.tsv"
    wildcard_constraints:
        block=r"\d\d\d\d+",
    threads: 1
    resources:
        mem_mb=1000,
        runtime=30,
    conda:
        "../envs/boundscape.yaml"
    shell:
        "python -m boundscape.cli.steps criticals --spec {params.spec:q} --output {output:q} {params.trajectories} > {log:q} 2>&1"
