"""The command line refuses a request beyond the engine's limits before it starts computing, and
long runs report progress on standard error (never on standard output, which scripts parse)."""

from __future__ import annotations

import importlib
import io
import json

import pytest

from boundscape.cli.options import parse_l_values
from boundscape.cli.progress import Progress
from boundscape.engine.limits import MAX_CRITICAL_STATES, MAX_L, LimitError

cli_main = importlib.import_module("boundscape.cli.main")  # the module; boundscape.cli.main is also the function


def test_l_range_refused_before_it_is_expanded():
    # A range of 10^14 values would fill memory if it were expanded before the check.
    with pytest.raises(LimitError, match=r"l = 100000000000000 is beyond"):
        parse_l_values("0-100000000000000")
    with pytest.raises(LimitError, match=rf"l ≤ {MAX_L}"):
        parse_l_values("2,0-100000")
    assert parse_l_values(f"0,{MAX_L - 1}-{MAX_L}") == [0, MAX_L - 1, MAX_L]


def test_bad_l_text_keeps_its_own_message():
    with pytest.raises(ValueError, match="runs backwards"):
        parse_l_values("3-1")
    with pytest.raises(ValueError, match="integers like 0-3"):
        parse_l_values("x")


def _no_search(*args, **kwargs):
    raise AssertionError("a critical search ran before the request was checked")


@pytest.mark.parametrize("extra", [[], ["--vary", "strength", "--screening-length", "10"]])
def test_critical_n_max_refused_before_any_search(monkeypatch, capsys, extra):
    monkeypatch.setattr(cli_main, "critical_screening_length", _no_search)
    monkeypatch.setattr(cli_main, "critical_strength", _no_search)
    strength = [] if extra else ["--strength", "1"]  # --vary strength finds the strength
    status = cli_main.main(["critical", "--family", "yukawa", *strength, "--n-max", "1000", *extra])
    err = capsys.readouterr().err
    assert status == 2
    assert f"n_r ≤ {MAX_CRITICAL_STATES - 1} per l" in err and "--n-max 1000" in err


def test_critical_at_the_limit_is_accepted(monkeypatch, capsys):
    # n_r = MAX_CRITICAL_STATES - 1 at l = 0 is allowed: the check must not be off by one.
    calls = []
    monkeypatch.setattr(cli_main, "critical_screening_length", lambda *a, **k: calls.append(a) or 5.0)
    status = cli_main.main(["critical", "--family", "yukawa", "--strength", "1", "--l", "0",
                            "--n-max", str(MAX_CRITICAL_STATES), "--format", "json"])
    assert status == 0
    assert len(calls) == MAX_CRITICAL_STATES
    assert len(json.loads(capsys.readouterr().out)["states"]) == MAX_CRITICAL_STATES


def test_progress_is_quiet_for_short_runs_and_counts_long_ones():
    quiet = io.StringIO()
    p = Progress(3, "levels", stream=quiet)  # the default waits 3 s before the first line
    for l in range(3):
        p.step(f"l = {l}")
    assert quiet.getvalue() == ""
    loud = io.StringIO()
    p = Progress(4, "critical states", after=0.0, every=0.0, stream=loud)
    for i in range(4):
        p.step(f"state {i}")
    lines = loud.getvalue().splitlines()
    assert len(lines) == 4
    assert lines[-1].startswith("boundscape: critical states: 4 of 4 done, state 3")
