"""The sweep gives the same cube on a real SLURM cluster as on this machine.

Runs the demo sweep (config/config.yaml, in larger tiles) twice, each in its
own copy of the workflow: once with the local profile, once with the SLURM profile (Snakemake's SLURM executor plugin
submitting every job with sbatch to the single-node cluster that
tests/cluster/start_slurm.sh starts), then compares the two cubes.

Runs against whatever single-node cluster answers here, whatever its partitions are called:
the profile names none, so jobs go to the cluster's default partition (when the cluster has
no default, the test names its first partition on the command line, as a user would).
Skips, with the reason, only when no SLURM cluster answers here.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import xarray as xr
import yaml

REPO = Path(__file__).resolve().parents[1]
# Every SLURM job costs some 10 s of Snakemake start-up on the node, so the
# demo's grid goes in a few large tiles (three for the demo's 3 x 325 x 3 engine
# cells, one per nuclear charge): SLURM still runs jobs side by side, and tile
# size does not change the cube.
TILE_CELLS = 1000
# What a workflow run needs; results/ and .snakemake/ are left behind.
WORKFLOW_PATHS = ("workflow", "config")
RUN_TIMEOUT_S = 900


def slurm_unavailable_reason() -> str | None:
    """Why no SLURM cluster can take jobs here, or None when one can."""
    hint = "start one as root with: bash tests/cluster/start_slurm.sh"
    if shutil.which("sinfo") is None or shutil.which("sbatch") is None:
        return f"sinfo/sbatch not found (Debian package slurm-wlm); {hint}"
    try:
        probe = subprocess.run(
            ["sinfo", "--noheader", "--Node", "--format=%N %T"],
            capture_output=True, text=True, timeout=30, stdin=subprocess.DEVNULL,
        )
    except subprocess.TimeoutExpired:
        return f"sinfo did not answer within 30 s; {hint}"
    if probe.returncode != 0:
        first = (probe.stderr.strip().splitlines() or ["no message"])[0]
        return f"SLURM controller not responding ({first}); {hint}"
    nodes = [line.split() for line in probe.stdout.splitlines() if line.strip()]
    usable = [n for n in nodes if len(n) == 2 and n[1] in ("idle", "mixed", "allocated")]
    if not usable:
        return f"no SLURM node can take jobs (sinfo: {probe.stdout.strip() or 'no nodes'}); {hint}"
    return None


def partitions() -> tuple[list[str], str | None]:
    """The cluster's partitions that are up, and its default one (sinfo marks it with *), if any."""
    out = subprocess.run(["sinfo", "--noheader", "--format=%P %a"], capture_output=True, text=True, timeout=30,
                         stdin=subprocess.DEVNULL).stdout
    names, default = [], None
    for line in out.splitlines():
        name, _, state = line.strip().partition(" ")
        if state.strip() != "up":
            continue
        if name.endswith("*"):
            name = name[:-1]
            default = name
        names.append(name)
    return names, default


def demo_config() -> dict:
    """The demo config, in tiles of TILE_CELLS cells."""
    config = yaml.safe_load((REPO / "config" / "config.yaml").read_text())
    config.setdefault("tiles", {})["cells"] = TILE_CELLS
    return config


def cube_path() -> str:
    return f"results/{demo_config()['sweep']}/levels.nc"


def workflow_copy(dest: Path) -> Path:
    """Copy what the workflow needs into dest, so runs never touch the repo's results/."""
    dest.mkdir()
    for name in WORKFLOW_PATHS:
        src = REPO / name
        if src.is_dir():
            shutil.copytree(src, dest / name, ignore=shutil.ignore_patterns(".snakemake", "__pycache__"))
        else:
            shutil.copy2(src, dest / name)
    (dest / "cluster_check.yaml").write_text(yaml.safe_dump(demo_config(), sort_keys=False))
    return dest


def code_snapshot(dest: Path) -> Path:
    """Freeze the package source for both runs, so an edit between them cannot differ them.

    Returns the directory to put on PYTHONPATH (the schema is package data inside it).
    """
    ignore = shutil.ignore_patterns("__pycache__", "*.egg-info")
    shutil.copytree(REPO / "src", dest / "src", ignore=ignore)
    return dest / "src"


def run_sweep(workdir: Path, profile: str, code: Path, extra=()) -> str:
    """Run the demo's cube in workdir with one of the project's profiles; return its log."""
    env = {k: v for k, v in os.environ.items() if not k.startswith("SLURM_")}
    # sbatch passes the environment on, so the jobs import the same frozen code.
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(code), env.get("PYTHONPATH")]))
    cmd = [
        sys.executable, "-m", "snakemake",
        cube_path(),  # first: --configfile takes every word after it
        "--snakefile", str(workdir / "workflow" / "Snakefile"),
        "--directory", str(workdir),
        "--profile", str(workdir / "workflow" / "profiles" / profile),
        *extra,
        "--configfile", str(workdir / "cluster_check.yaml"),
    ]
    try:
        proc = subprocess.run(
            cmd, cwd=workdir, env=env, capture_output=True, text=True,
            timeout=RUN_TIMEOUT_S, stdin=subprocess.DEVNULL,
        )
    except subprocess.TimeoutExpired as exc:
        pytest.fail(f"{profile} run did not finish in {RUN_TIMEOUT_S} s:\n{_tail(exc.stderr)}")
    log = proc.stdout + proc.stderr
    assert proc.returncode == 0, f"{profile} run failed (exit {proc.returncode}):\n{_essentials(log)}"
    return log


def _essentials(log: str) -> str:
    """The lines that say why a run failed (sbatch and job errors), then the last few lines."""
    lines = log.splitlines()
    why = [line for line in lines if any(w in line.lower() for w in ("error", "invalid", "sbatch:", "failed"))]
    return "\n".join(why[:15] + ["..."] + lines[-15:])


def same_attrs(a: dict, b: dict) -> bool:
    """Attribute dicts equal, array-valued ones (flag_values) compared elementwise."""
    return a.keys() == b.keys() and all(np.array_equal(np.asarray(a[k]), np.asarray(b[k])) for k in a)


def _tail(text: str | bytes | None, lines: int = 60) -> str:
    if isinstance(text, bytes):
        text = text.decode(errors="replace")
    return "\n".join((text or "").splitlines()[-lines:])


@pytest.fixture(scope="module")
def cluster():
    reason = slurm_unavailable_reason()
    if reason:
        pytest.skip(reason)
    names, default = partitions()
    if not names:
        pytest.skip("the SLURM cluster has no partition that is up")
    return names, default


def test_slurm_profile_names_no_partition():
    # A partition name is the cluster's own: the profile must not assume one.
    profile = yaml.safe_load((REPO / "workflow" / "profiles" / "slurm" / "config.yaml").read_text())
    assert "slurm_partition" not in profile.get("default-resources", {})
    assert not any("partition" in str(key) for key in profile)


@pytest.mark.cluster
def test_slurm_profile_gives_the_local_cube(cluster, tmp_path):
    names, default = cluster
    code = code_snapshot(tmp_path / "code")
    local_dir = workflow_copy(tmp_path / "local")
    slurm_dir = workflow_copy(tmp_path / "slurm")
    # With a default partition the profile runs as it is; without one, name the first.
    extra = () if default else ("--default-resources", f"slurm_partition={names[0]}", "runtime=30", "mem_mb=2000",
                                "cpus_per_task=1")

    local_log = run_sweep(local_dir, "local", code)
    slurm_log = run_sweep(slurm_dir, "slurm", code, extra)

    # The SLURM run really went through sbatch, not quietly through local jobs.
    assert "submitted with SLURM jobid" in slurm_log, _essentials(slurm_log)
    assert "submitted with SLURM jobid" not in local_log

    cube = cube_path()
    with xr.open_dataset(local_dir / cube) as local, xr.open_dataset(slurm_dir / cube) as slurm:
        # Two empty or all-NaN cubes would compare equal and prove nothing.
        assert int(np.isfinite(local["energy"]).sum()) > 0
        # Values, dimensions and coordinates; NaN (state not bound) equals NaN.
        xr.testing.assert_equal(local, slurm)
        # Units and flag meanings are part of the data; run times and history are not.
        for name, var in local.variables.items():
            assert same_attrs(var.attrs, slurm[name].attrs), name
        assert local.attrs["config_sha256"] == slurm.attrs["config_sha256"]
