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


rule solve_tile:
    input:
        engine_inputs,
        kernels=f"{RESULTS}/engine_kernels.txt",
    output:
        f"{RESULTS}/tiles/tile_{{tile}}.nc",
    params:
        spec=tile_spec,
        trajectories=trajectory_option,
    log:
        f"{RESULTS}/logs/solve_tile_{{tile}}.log",
    benchmark:
        f"{RESULTS}/benchmarks/solve_tile_{{tile}}.tsv"
    wildcard_constraints:
        tile=r"\d{4}",
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
        engine_inputs,
        kernels=f"{RESULTS}/engine_kernels.txt",
    output:
        f"{RESULTS}/criticals/criticals_{{block}}.nc",
    params:
        spec=critical_spec,
        trajectories=trajectory_option,
    log:
        f"{RESULTS}/logs/criticals_{{block}}.log",
    benchmark:
        f"{RESULTS}/benchmarks/criticals_{{block}}.tsv"
    wildcard_constraints:
        block=r"\d{4}",
    threads: 1
    resources:
        mem_mb=1000,
        runtime=30,
    conda:
        "../envs/boundscape.yaml"
    shell:
        "python -m boundscape.cli.steps criticals --spec {params.spec:q} --output {output:q} {params.trajectories} > {log:q} 2>&1"
