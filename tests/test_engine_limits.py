"""Every engine call is bounded: a request beyond a limit is one line naming the limit, in bounded
time and memory, never a traceback, a hang or an out-of-memory kill (the engine's limits,
boundscape.engine.limits; the command line's exit status 2 for bad input)."""

from __future__ import annotations

import resource
import subprocess
import sys

import pytest

import boundscape as bs
from boundscape.engine.limits import MAX_CRITICAL_STATES, MAX_L, MAX_LEVELS, MAX_LOST, LimitError
from boundscape.errors import InputError

COMMAND = "import sys; from boundscape.cli import main; sys.exit(main())"


@pytest.mark.parametrize("args, says", [
    # a screening length far beyond the levels' size: ~10^6 s states, too many to count on any grid
    # within the limit (before: 12-24 GB and an out-of-memory kill)
    (["levels", "--family", "yukawa", "--strength", "1", "--screening-length", "1e12", "--l", "0", "--n-r-max", "3"],
     "beyond the engine's limit of 4e+06 nodes"),
    (["levels", "--family", "yukawa", "--strength", "1e308", "--screening-length", "10", "--l", "0"],
     "beyond what double precision carries"),
    (["levels", "--family", "yukawa", "--strength", "1", "--screening-length", "1e300", "--l", "0"],
     "beyond what the solver can grid"),
    (["levels", "--family", "coulomb", "--strength", "1", "--l", "0", "--n-r-max", "100000"],
     f"limit of {MAX_LEVELS}"),
    (["levels", "--family", "yukawa", "--strength", "1", "--screening-length", "10", "--l", "2000"],
     f"l ≤ {MAX_L}"),
    (["resonances", "--family", "yukawa", "--strength", "1", "--screening-length", "4.3", "--l", "0", "--n-max", "1000"],
     f"limit of {MAX_LOST}"),
])
def test_a_request_beyond_a_limit_is_one_line(args, says):
    before = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss
    run = subprocess.run([sys.executable, "-c", COMMAND, *args], capture_output=True, text=True, timeout=120)
    peak_kb = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss
    assert run.returncode == 2, run.stderr
    lines = run.stderr.strip().splitlines()
    assert len(lines) == 1 and says in lines[0] and "Traceback" not in run.stderr, run.stderr
    # the largest child so far: bounded (a few hundred MB is the interpreter, numba and the kernels)
    assert max(peak_kb, before) < 1_000_000, f"peak memory {peak_kb} kB"


def test_the_limits_are_engine_errors_naming_the_limit():
    pot = bs.potential("yukawa", 1.0, 10.0)
    with pytest.raises(LimitError, match=f"{MAX_L}"):
        bs.bound_levels(pot, MAX_L + 1)
    with pytest.raises(LimitError, match=f"{MAX_CRITICAL_STATES}"):
        bs.critical_screening_length("yukawa", 1.0, 0, MAX_CRITICAL_STATES)
    with pytest.raises(LimitError, match=f"{MAX_LOST}"):
        bs.resonances(pot, 0, n_r_max=MAX_LOST + 10)
    assert issubclass(LimitError, InputError)  # a sweep's tile flags such a cell input_rejected


def test_a_screening_length_within_reach_still_counts_exactly():
    # λ = 10^6 bohr is far beyond hydrogen's levels but still countable: 1128 s states (the count
    # grows like √λ, common practice, no source), and 1s stays at its Coulomb value minus Z/λ to first
    # order (first-order perturbation of −Z e^{−r/λ}/r = −Z/r + Z/λ − …, common practice)
    res = bs.bound_levels(bs.potential("yukawa", 1.0, 1e6), 0, n_r_max=1)
    assert res.num_bound > 1000
    assert res.energy[0] == pytest.approx(-0.5 + 1e-6, rel=1e-9)
