rule collect:
    input:
        tiles=expand(f"{RESULTS}/tiles/tile_{{tile}}.nc", tile=TILES),
        criticals=expand(f"{RESULTS}/criticals/criticals_{{block}}.nc", block=CRITICAL_BLOCKS),
    output:
        cube=f"{RESULTS}/levels.nc",
        summary=f"{RESULTS}/summary.txt",
    params:
        config=json.dumps(config),
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
        "python -m boundscape.cli.steps collect --config-json {params.config:q} --tiles {input.tiles:q}"
        " --criticals {input.criticals:q} --output {output.cube:q} --summary {output.summary:q}"
        " > {log:q} 2>&1"
