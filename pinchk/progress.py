"""Progress on the terminal for long work only.

``Progress`` counts steps and prints a one-line status to stderr, rewritten in place, but only when
stderr is a terminal and the work has already taken longer than ``after`` seconds: a short run prints
nothing, a run into a file or a pipe prints nothing. It never writes to stdout, so the output of a
command is the same with or without it.

    with Progress(total=len(jobs), what="jobs") as bar:
        for job in jobs:
            ...
            bar.step(job.name)
"""

from __future__ import annotations

import sys
import time


class Progress:
    """Steps done out of ``total``, shown on stderr when the work is long and stderr is a terminal."""

    def __init__(self, total: int | None = None, what: str = "steps", after: float = 2.0, stream=None,
                 clock=time.monotonic, every: float = 0.2):
        self.total, self.what, self.after, self.every = total, what, after, every
        self.stream = sys.stderr if stream is None else stream
        self.clock = clock
        self.done = 0
        self.shown = False
        self._t0 = clock()
        self._last = -1e9
        isatty = getattr(self.stream, "isatty", None)
        self.enabled = bool(isatty and isatty())

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()
        return False

    def step(self, label: str = "", n: int = 1) -> None:
        """Count ``n`` steps done; show the line if the work is long enough and a while has passed."""
        self.done += n
        if not self.enabled:
            return
        now = self.clock()
        if now - self._t0 < self.after or now - self._last < self.every:
            return
        self._last = now
        of = f"/{self.total}" if self.total else ""
        text = f"pinchk: {self.done}{of} {self.what}, {now - self._t0:.0f} s" + (f" ({label})" if label else "")
        self.stream.write("\r" + text[:100].ljust(100))
        self.stream.flush()
        self.shown = True

    def close(self) -> None:
        """Clear the line if one was shown."""
        if self.shown:
            self.stream.write("\r" + " " * 100 + "\r")
            self.stream.flush()
            self.shown = False
