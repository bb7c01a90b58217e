"""The sweep: a configuration (checked against the schema shipped here) → a plan of cells →
tiles, each solved with the engine.  No numerics of its own."""

from .config import SCHEMA_PATH, config_text, load_config, schema_error, validate_config
from .plan import Plan, Tile, plan
from .tiles import CRITICAL_FLAGS, solve_criticals, solve_tile

__all__ = ["SCHEMA_PATH", "config_text", "load_config", "schema_error", "validate_config", "Plan", "Tile", "plan",
           "CRITICAL_FLAGS", "solve_criticals", "solve_tile"]
