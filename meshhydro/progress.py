"""A small progress bar on standard error for runs longer than a second or so."""
from __future__ import annotations

import sys
import time
from typing import TextIO


class Progress:
    """Call once per unit of work; draws only on a terminal and only after ``delay`` seconds."""

    def __init__(self, total: int, label: str, *, enabled: bool | None = None, stream: TextIO | None = None,
                 delay: float = 1.0) -> None:
        self.total = max(int(total), 1)
        self.label = label
        self.stream = stream or sys.stderr
        self.enabled = (hasattr(self.stream, "isatty") and self.stream.isatty()) if enabled is None else enabled
        self.done = 0
        self.t0 = time.perf_counter()
        self.delay = delay
        self.drawn = False

    def __call__(self, n: int = 1) -> None:
        self.done += n
        if not self.enabled:
            return
        el = time.perf_counter() - self.t0
        if el < self.delay and self.done < self.total:
            return
        frac = min(self.done / self.total, 1.0)
        width = 30
        bar = "#" * int(frac * width) + "-" * (width - int(frac * width))
        eta = el / frac - el if frac > 0 else 0.0
        self.stream.write(f"\r{self.label} [{bar}] {self.done}/{self.total} {el:5.1f}s eta {eta:5.1f}s")
        self.stream.flush()
        self.drawn = True

    def close(self) -> None:
        if self.drawn:
            self.stream.write("\n")
            self.stream.flush()
