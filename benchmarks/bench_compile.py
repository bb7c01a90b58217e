"""The engine's first compilation and its load from the cache, side by side with another tree.

    python benchmarks/bench_compile.py [--against OTHER/src] [--rounds 2]

Runs ``python -m boundscape.engine.warmup`` in a fresh process into an empty ``$NUMBA_CACHE_DIR``
(the first compilation a new machine pays), then again into the filled one (what each of a
sweep's jobs pays), for this tree's ``src`` and, with ``--against``, for another checkout's
``src`` (an earlier version), alternating the two so that a change of load hits both. Prints
wall times per round and the ratio of the medians.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parents[1] / "src"


def _warm_up(src: Path, cache: str) -> float:
    env = dict(os.environ, PYTHONPATH=str(src), NUMBA_CACHE_DIR=cache)
    start = time.perf_counter()
    subprocess.run([sys.executable, "-m", "boundscape.engine.warmup"], env=env, check=True,
                   stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    return time.perf_counter() - start


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--against", type=Path, default=None, help="another checkout's src directory")
    parser.add_argument("--rounds", type=int, default=2)
    args = parser.parse_args(argv)
    trees = {"this tree": HERE} | ({"other tree": args.against.resolve()} if args.against else {})
    times = {name: {"first": [], "cached": []} for name in trees}
    for round_ in range(1, args.rounds + 1):
        for name, src in trees.items():
            with tempfile.TemporaryDirectory() as cache:
                first = _warm_up(src, cache)
                cached = _warm_up(src, cache)
            times[name]["first"].append(first)
            times[name]["cached"].append(cached)
            print(f"round {round_}, {name}: first compilation {first:.2f} s, from the cache {cached:.2f} s")
    print(f"load average: {os.getloadavg()[0]:.2f}")
    for kind in ("first", "cached"):
        medians = {name: statistics.median(t[kind]) for name, t in times.items()}
        line = ", ".join(f"{name} {value:.2f} s" for name, value in medians.items())
        if len(medians) == 2:
            line += f"; ratio {medians['this tree'] / medians['other tree']:.2f}"
        print(f"median {kind}: {line}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
