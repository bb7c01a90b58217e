# The plan is cheap and deterministic from the config, so it is computed at parse time:
# the tile list is known before any job starts and no checkpoint is needed.
import json
import sys

from boundscape import sweep
from boundscape.errors import InputError

try:
    PLAN = sweep.plan(config)
except InputError as exc:
    sys.exit(f"boundscape: {exc}")

RESULTS = f"results/{PLAN.sweep}"
TILES = {tile.name: tile for tile in PLAN.tiles}
CRITICAL_BLOCKS = {block.name: block for block in PLAN.critical_blocks}
ALL_TARGETS = [f"{RESULTS}/levels.nc"]


def tile_spec(wildcards):
    """The cells and engine settings of one tile: a changed tile reruns through params."""
    return json.dumps(PLAN.tile_spec(TILES[wildcards.tile]))


def critical_spec(wildcards):
    return json.dumps(PLAN.critical_spec(CRITICAL_BLOCKS[wildcards.block]))


def engine_inputs(wildcards):
    """A tabulated potential's table is an input, so editing the table reruns the tiles."""
    return [PLAN.engine["table"]] if "table" in PLAN.engine else []
