#!/usr/bin/env bash
# A non-editable install works: clone the committed tree, `pip install .` it into a fresh
# venv, and run a small sweep with that venv's package (the clone's workflow, the wheel's code).
# Called once by .ci/run; run it by hand with: bash tests/packaging/wheel_sweep.sh
set -euo pipefail

repo="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
say() { printf '[wheel] %s\n' "$*"; }

git clone -q "$repo" "$work/clone"
python -m venv "$work/venv"
say "pip install . (not editable) into a fresh venv"
"$work/venv/bin/python" -m pip install --disable-pip-version-check -q "$work/clone"

export PATH="$work/venv/bin:$PATH"
where="$(cd "$work" && python -c 'import boundscape; print(boundscape.__file__)')"
case "$where" in
    "$work/venv/"*) say "boundscape imported from $where" ;;
    *) say "FAILED: boundscape imported from $where, not the venv"; exit 1 ;;
esac

# PEP 561: the package declares its inline types with py.typed, which the wheel must ship.
(cd "$work" && python -c 'import importlib.resources as r; assert r.files("boundscape").joinpath("py.typed").is_file()') \
    || { say "FAILED: the installed package has no py.typed"; exit 1; }
say "py.typed shipped"

mkdir "$work/run"
cat >"$work/run/tiny.yaml" <<'YAML'
sweep: wheel
potential: {family: yukawa, mass: 1.0}
grid:
  strength: [1.0, 2.0]
  screening_length: {start: 0.5, stop: 50.0, num: 4, spacing: log}
  l: [0, 1]
  n_r_max: 2
tiles: {cells: 8}
YAML
say "running a 16-cell sweep with the installed package"
snakemake --snakefile "$work/clone/workflow/Snakefile" --directory "$work/run" \
    --configfile "$work/run/tiny.yaml" --cores 2 --quiet >"$work/run/snakemake.log" 2>&1 \
    || { tail -n 40 "$work/run/snakemake.log"; say "FAILED: the sweep did not run"; exit 1; }
python - "$work/run/results/wheel" <<'PY'
import sys
from pathlib import Path

import xarray as xr

out = Path(sys.argv[1])
with xr.open_dataset(out / "levels.nc") as ds:
    assert ds.sizes["strength"] == 2 and ds.sizes["screening_length"] == 4, ds.sizes
    assert int((ds.status == 0).sum()) == 16
assert (out / "figures" / "threshold_map_l0.png").stat().st_size > 0
print("[wheel] cube and figures written by the installed package")
PY
