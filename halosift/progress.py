"""A one-line progress bar on stderr, and the end-of-run summary."""

from __future__ import annotations

import sys
import time
from collections import Counter
from typing import TextIO

import pandas as pd


class ProgressLine:
    """Rows done, rows/s and time left, redrawn in place on a terminal."""

    def __init__(self, *, enabled: bool = True, stream: TextIO | None = None, min_interval: float = 0.2) -> None:
        # The stderr of the moment (default None), not the one at import: a caller may have redirected it since.
        self.stream = stream = sys.stderr if stream is None else stream
        self.min_interval = min_interval
        self.start = time.monotonic()
        self._last = 0.0
        self._shown = False
        self.enabled = enabled and stream.isatty()

    def __call__(self, done: int, total: int) -> None:
        """Engine callback: ``done`` of ``total`` input rows processed."""
        if not self.enabled or total <= 0:
            return
        now = time.monotonic()
        if done < total and now - self._last < self.min_interval:
            return
        self._last = now
        frac = done / total
        rows = done
        elapsed = now - self.start
        rate = rows / elapsed if elapsed > 0 else 0.0
        left = (total - rows) / rate if rate > 0 else float("nan")
        width = 28
        bar = "#" * int(frac * width) + "-" * (width - int(frac * width))
        eta = f"{left:5.0f} s left" if left == left else "   ... "
        self.stream.write(f"\r[{bar}] {rows:>9,}/{total:,} rows  {rate:9,.0f} rows/s  {eta}")
        self.stream.flush()
        self._shown = True

    def close(self) -> None:
        """End the line so later output starts cleanly."""
        if self._shown:
            self.stream.write("\n")
            self.stream.flush()


def summary_lines(result: pd.DataFrame, wall_s: float) -> list[str]:
    """Rows read, ok, rejected by reason, verdict counts, wall time."""
    n = len(result)
    ok = int((result["status"] == "ok").sum())
    lines = [f"rows read {n:,}; ok {ok:,}; rejected {n - ok:,}"]
    rejected = result.loc[result["status"] != "ok", "reason"]
    # Group by the reason's kind (its text before any quoted detail) to keep the list short.
    kinds = Counter(r.split(" '")[0].split(' "')[0] for r in rejected.astype(str))
    for reason, count in kinds.most_common():
        lines.append(f"  rejected {count:>8,}  {reason}")
    verdicts = result.loc[result["status"] == "ok", "verdict"].value_counts()
    from halosift.engine.outcomes import VERDICTS

    for verdict in VERDICTS:
        lines.append(f"  {verdict:<13}{int(verdicts.get(verdict, 0)):>8,}")
    lines.append(f"wall time {wall_s:.2f} s")
    return lines
