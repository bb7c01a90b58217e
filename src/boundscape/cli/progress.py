"""Progress on standard error for command-line runs that take more than a few seconds.

Quiet for short runs, so that scripts and tests see nothing; standard output (a table or JSON)
is never touched.
"""

from __future__ import annotations

import sys
import time

__all__ = ["Progress"]


class Progress:
    """Report ``done of total`` on stderr once ``after`` seconds have passed, then every ``every`` s."""

    def __init__(self, total: int, what: str, *, after: float = 3.0, every: float = 2.0, stream=None):
        self.total, self.what = int(total), what
        self.after, self.every = after, every
        self.stream = sys.stderr if stream is None else stream
        self.start = time.monotonic()
        self.last = None
        self.done = 0

    def step(self, label: str = "") -> None:
        """Count one unit of work done; ``label`` names the one just finished (``l = 3``)."""
        self.done += 1
        now = time.monotonic()
        if now - self.start < self.after or (self.last is not None and now - self.last < self.every):
            return
        self.last = now
        rate = self.done / (now - self.start)
        left = (self.total - self.done) / rate if rate > 0 else float("nan")
        tail = f", {label}" if label else ""
        print(f"boundscape: {self.what}: {self.done} of {self.total} done{tail} "
              f"({now - self.start:.0f} s, about {left:.0f} s left)", file=self.stream, flush=True)
