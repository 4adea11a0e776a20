"""Progress on stderr: a bar on a terminal, plain periodic lines in a log."""

from __future__ import annotations

import sys
import time


def _clock(seconds: float) -> str:
    s = int(max(0, seconds))
    return f"{s // 3600}:{s // 60 % 60:02d}:{s % 60:02d}"


class Progress:
    """Counts frames done out of ``total``; prints rate (frames/min) and ETA."""

    def __init__(self, total: int, *, skipped: int = 0, stream=None, every_s: float = 10.0,
                 tty: bool | None = None, label: str = "render"):
        self.total = total
        self.skipped = skipped
        self.done = 0
        self.stream = stream if stream is not None else sys.stderr
        self.tty = self.stream.isatty() if tty is None else tty
        self.every_s = every_s
        self.label = label
        self.t0 = time.monotonic()
        self._last = -1e9

    def rate_per_min(self) -> float:
        dt = time.monotonic() - self.t0
        return 60.0 * self.done / dt if dt > 0 else 0.0

    def text(self) -> str:
        rate = self.rate_per_min()
        left = self.total - self.done
        eta = _clock(60.0 * left / rate) if rate > 0 else "?"
        return f"{self.done}/{self.total} frames, {rate:.1f} frames/min, ETA {eta}"

    def start(self) -> None:
        extra = f" ({self.skipped} already complete)" if self.skipped else ""
        self._print_line(f"{self.label}: {self.total} frames to do{extra}")

    def advance(self, n: int = 1) -> None:
        self.done += n
        now = time.monotonic()
        if self.tty:
            width = 30
            filled = int(width * self.done / self.total) if self.total else width
            self.stream.write(f"\r[{'#' * filled}{'.' * (width - filled)}] {self.text()}   ")
            self.stream.flush()
        elif now - self._last >= self.every_s or self.done == self.total:
            self._last = now
            self._print_line(f"{self.label}: {self.text()}")

    def finish(self, message: str) -> None:
        if self.tty and self.done:
            self.stream.write("\n")
        self._print_line(f"{self.label}: {message} in {_clock(time.monotonic() - self.t0)}")

    def _print_line(self, line: str) -> None:
        self.stream.write(line + "\n")
        self.stream.flush()
