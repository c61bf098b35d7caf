"""How many CPU cores this process may use (worker processes, re-weighing threads)."""

from __future__ import annotations

import os


def usable_cores() -> int:
    """All cores this process may use: its CPU affinity where the OS reports one, else the CPU count."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not Linux
        return max(1, os.cpu_count() or 1)


def capped_workers(requested: int | None) -> int:
    """Worker count to run: ``requested`` (None: all usable cores), at least 1 and at most :func:`usable_cores`.

    More CPU-bound workers than cores only add start-up time and memory (each
    holds its own interpreter and RDKit), never speed.
    """
    cores = usable_cores()
    return cores if requested is None else max(1, min(requested, cores))
