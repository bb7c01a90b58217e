rule solve_tile:
    input:
        engine_inputs,
    output:
        f"{RESULTS}/tiles/tile_{{tile}}.nc",
    params:
        spec=tile_spec,
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
        "python -m boundscape.cli.steps solve-tile --spec {params.spec:q} --output {output:q} > {log:q} 2>&1"


rule criticals:
    input:
        engine_inputs,
    output:
        f"{RESULTS}/criticals/criticals_{{block}}.nc",
    params:
        spec=critical_spec,
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
        "python -m boundscape.cli.steps criticals --spec {params.spec:q} --output {output:q} > {log:q} 2>&1"
