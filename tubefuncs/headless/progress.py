"""Progress on a terminal for long recalculations; silent otherwise.

Shown on standard error only when it is a terminal and the work has taken
more than a second; redrawn at most ten times a second; the line is cleared
when the work ends, so logs of piped runs stay clean.
"""

from __future__ import annotations

import sys
import time


class Progress:
    def __init__(self, label: str, stream=None, delay: float = 1.0, enabled: bool | None = None):
        self.label = label
        self.stream = stream if stream is not None else sys.stderr
        self.delay = delay
        if enabled is None:
            isatty = getattr(self.stream, "isatty", None)
            enabled = bool(isatty and isatty())
        self.enabled = enabled
        self.start = time.monotonic()
        self._last = 0.0
        self._stage = ""
        self._shown = False

    def phase(self, stage: str) -> None:
        self._stage = stage
        self._draw(f"{self.label}: {stage}...")

    def update(self, done: int, total: int) -> None:
        pct = 100.0 * done / total if total else 100.0
        self._draw(f"{self.label}: {self._stage} {done:,}/{total:,} formula cells ({pct:.0f}%)")

    def _draw(self, text: str) -> None:
        if not self.enabled:
            return
        now = time.monotonic()
        if now - self.start < self.delay or now - self._last < 0.1:
            return
        self._last = now
        self.stream.write("\r" + text[:120].ljust(60))
        self.stream.flush()
        self._shown = True

    def close(self) -> None:
        if self._shown:
            self.stream.write("\r" + " " * 120 + "\r")
            self.stream.flush()
            self._shown = False

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()
        return False
