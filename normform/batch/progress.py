"""Progress: a tqdm bar on a terminal, periodic plain log lines otherwise."""

from __future__ import annotations

import sys
import time
from typing import TextIO


class Progress:
    def __init__(self, total: int | None, *, quiet: bool = False, stream: TextIO | None = None,
                 initial: int = 0, interval: float = 5.0) -> None:
        self.stream = stream or sys.stderr
        self.quiet, self.total, self.done = quiet, total, initial
        self.interval, self.start, self.last = interval, time.monotonic(), time.monotonic()
        self.initial = initial
        self.bar = None
        if not quiet and self.stream.isatty():
            from tqdm import tqdm

            self.bar = tqdm(total=total, initial=initial, unit=" lines", file=self.stream,
                            dynamic_ncols=True, smoothing=0.1, desc="clean")

    def update(self, n: int) -> None:
        self.done += n
        if self.quiet:
            return
        if self.bar is not None:
            self.bar.update(n)
            return
        now = time.monotonic()
        if now - self.last >= self.interval:
            self.last = now
            self.stream.write(self.line(now) + "\n")
            self.stream.flush()

    def line(self, now: float) -> str:
        rate = (self.done - self.initial) / max(now - self.start, 1e-9)
        text = f"clean: {self.done:,} items"
        if self.total:
            text += f" of {self.total:,} ({100 * self.done / self.total:.0f}%)"
            if rate > 0:
                text += f", ETA {max(self.total - self.done, 0) / rate:.0f}s"
        return text + f", {rate:,.0f} items/s"

    def close(self, finished: bool = False) -> None:
        """``finished``: every item is done, so the bar ends at 100 %.

        The total is counted fast from line ends, blank lines included (and an
        entry line of JSON Lines may hold several items), so it is only an
        estimate; a finished run shows what it really did.
        """
        if self.bar is not None:
            if finished and self.bar.n != self.bar.total:
                self.bar.total = self.bar.n
                self.bar.refresh()
            self.bar.close()
