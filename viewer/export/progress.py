"""Progress for long work: a bar with frames per second and time left on a terminal,
plain lines (one every few seconds) when the output is not a terminal, and a one-line
summary at the end. The clock is injectable so tests can drive it.
"""

from __future__ import annotations

import sys
import time
from collections.abc import Callable
from typing import TextIO


def _clock_text(seconds: float) -> str:
    seconds = max(0.0, seconds)
    h, rem = divmod(int(round(seconds)), 3600)
    m, s = divmod(rem, 60)
    return f"{h}:{m:02d}:{s:02d}" if h else f"{m:d}:{s:02d}"


class Progress:
    """Counts ``total`` steps of work called ``what`` ("frames")."""

    def __init__(self, total: int, what: str = "frames", stream: TextIO | None = None,
                 clock: Callable[[], float] = time.monotonic, every_s: float = 5.0,
                 width: int = 28) -> None:
        self.total = max(0, int(total))
        self.what = what
        self.stream = stream if stream is not None else sys.stderr
        self.clock = clock
        self.every_s = every_s
        self.width = width
        self.done = 0
        self.skipped = 0
        self.start = clock()
        self._last_line = -1e300
        self.is_tty = bool(getattr(self.stream, "isatty", lambda: False)())

    def rate(self) -> float:
        """Steps per second so far (skipped steps do not count)."""
        elapsed = self.clock() - self.start
        worked = self.done - self.skipped
        return worked / elapsed if elapsed > 0 and worked > 0 else 0.0

    def advance(self, n: int = 1, skipped: bool = False) -> None:
        self.done += n
        if skipped:
            self.skipped += n
        now = self.clock()
        rate = self.rate()
        left = (self.total - self.done) / rate if rate > 0 else float("nan")
        eta = _clock_text(left) if left == left else "?"
        if self.is_tty:
            frac = self.done / self.total if self.total else 1.0
            fill = int(round(frac * self.width))
            bar = "#" * fill + "-" * (self.width - fill)
            self.stream.write(f"\r[{bar}] {self.done}/{self.total} {self.what} "
                              f"{rate:5.1f}/s  {eta} left ")
            self.stream.flush()
        elif now - self._last_line >= self.every_s or self.done == self.total:
            self._last_line = now
            self.stream.write(f"{self.done}/{self.total} {self.what}, {rate:.1f}/s, "
                              f"{eta} left\n")
            self.stream.flush()

    def finish(self, where: str = "") -> str:
        """Print and return the summary line."""
        elapsed = self.clock() - self.start
        parts = [f"{self.done - self.skipped} {self.what} in {_clock_text(elapsed)}"]
        if self.done - self.skipped and elapsed > 0:
            parts.append(f"{(self.done - self.skipped) / elapsed:.1f}/s")
        if self.skipped:
            parts.append(f"{self.skipped} already complete, skipped")
        line = ", ".join(parts) + (f" -> {where}" if where else "")
        if self.is_tty:
            self.stream.write("\r" + " " * (self.width + 60) + "\r")
        self.stream.write(line + "\n")
        self.stream.flush()
        return line
