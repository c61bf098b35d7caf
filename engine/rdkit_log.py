"""Silence RDKit's C++ log (it writes to stderr, which would tear a terminal UI)."""

from __future__ import annotations

import threading
from collections.abc import Iterator
from contextlib import contextmanager

from rdkit import RDLogger, rdBase

_LOCK = threading.Lock()
_depth = 0
_saved: list[str] = []


def _enabled_channels() -> list[str]:
    """Names of the RDKit log channels that are currently switched on."""
    enabled = []
    for entry in rdBase.LogStatus().splitlines():
        name, _, state = entry.partition(":")
        if state.strip() == "enabled":
            enabled.append(name.strip())
    return enabled


@contextmanager
def quiet_rdkit() -> Iterator[None]:
    """Disable every RDKit log channel inside the block, then restore the previous state.

    Nested and concurrent uses are counted so that only the outermost exit
    restores the channels that were on before the first entry.
    """
    global _depth, _saved
    with _LOCK:
        if _depth == 0:
            _saved = _enabled_channels()
            RDLogger.DisableLog("rdApp.*")  # type: ignore[attr-defined]  # absent from RDKit's stubs
        _depth += 1
    try:
        yield
    finally:
        with _LOCK:
            _depth -= 1
            if _depth == 0:
                for channel in _saved:
                    RDLogger.EnableLog(channel)  # type: ignore[attr-defined]
                _saved = []
