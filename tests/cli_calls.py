"""Calling the ``boundscape`` command in the test process: its JSON, or its one-line error."""

from __future__ import annotations

import json

from boundscape.cli import main as cli_main


def run_json(capsys, *argv):
    """The JSON a command prints with ``--format json`` (exit status 0)."""
    assert cli_main([*argv, "--format", "json"]) == 0
    return json.loads(capsys.readouterr().out)


def message(capsys, *argv):
    """The one-line error of a refused command (exit status 2)."""
    assert cli_main(list(argv)) == 2
    text = capsys.readouterr().err.strip()
    assert text.startswith("boundscape: error: ") and "\n" not in text, text
    return text
