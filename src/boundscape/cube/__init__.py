"""The cube: the CF data model of a sweep's results, its NetCDF files and the collect step."""

from .model import CELL_DIMS, CRITICAL_DIMS, LEVEL_DIMS, build_cube
from .netcdf import open_cube, read_part, write_cube, write_part
from .display import readable
from .physical import add_physical_coordinates, preset_of

__all__ = ["CELL_DIMS", "CRITICAL_DIMS", "LEVEL_DIMS", "build_cube", "open_cube", "read_part", "write_cube",
           "write_part", "add_physical_coordinates", "preset_of", "readable"]
