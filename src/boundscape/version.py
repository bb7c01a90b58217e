"""The installed package's version, for provenance."""

from importlib.metadata import PackageNotFoundError, version

try:
    VERSION = version("boundscape")
except PackageNotFoundError:  # running from a source tree that was not installed
    VERSION = "0.0.0+unknown"
