"""How many CPU cores this process may use (worker processes, re-weighing threads)."""

from __future__ import annotations

import os


def usable_cores() -> int:
    """All cores this process may use: its CPU affinity where the OS reports one, else the CPU count."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not Linux
        return max(1, os.cpu_count() or 1)
