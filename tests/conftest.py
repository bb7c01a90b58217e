"""Helpers shared by several test modules."""

from __future__ import annotations

import importlib.resources
import json
import shutil
import subprocess
from pathlib import Path

import pytest


def _standard_name_table():
    try:
        table = importlib.resources.files("compliance_checker") / "data" / "cf-standard-name-table.xml"
    except ModuleNotFoundError:
        return None
    return table if table.is_file() else None


@pytest.fixture
def cf_findings(tmp_path):
    """``cf_findings(path)``: every finding of an independent CF checker on a NetCDF file, as
    (check name, message) pairs; the test skips where the checker is not installed.

    The checker is IOOS compliance-checker, CF-1.10 suite, strict, offline with the
    standard-name table its wheel ships."""
    if shutil.which("compliance-checker") is None or _standard_name_table() is None:
        pytest.skip("compliance-checker not installed (pip install compliance-checker)")

    def findings(path):
        report = tmp_path / f"{Path(path).stem}.cf.json"
        subprocess.run(["compliance-checker", "--test", "cf:1.10", "--criteria", "strict", "--format", "json",
                        "-o", str(report), str(path)], capture_output=True, text=True, timeout=300)
        result = json.loads(report.read_text())["cf:1.10"]
        return [(p["name"], msg) for level in ("high_priorities", "medium_priorities", "low_priorities")
                for p in result[level] for msg in p["msgs"]]

    return findings
