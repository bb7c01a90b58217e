# Past the threshold (config resonances: true): each pole's trajectory from its threshold,
# computed once for the whole sweep; every tile and critical block reads it instead of
# tracing it again (boundscape.sweep.resonance_tiles).
rule resonance_trajectories:
    input:
        kernels=f"{RESULTS}/engine_kernels.txt",
    output:
        TRAJECTORIES,
    params:
        spec=json.dumps(PLAN.critical_spec(PLAN.critical_blocks[0])),
    log:
        f"{RESULTS}/logs/resonance_trajectories.log",
    benchmark:
        f"{RESULTS}/benchmarks/resonance_trajectories.tsv"
    threads: 1
    resources:
        mem_mb=1000,
        runtime=30,
    conda:
        "../envs/boundscape.yaml"
    shell:
        "python -m boundscape.cli.steps trajectories --spec {params.spec:q} --output {output:q} > {log:q} 2>&1"
