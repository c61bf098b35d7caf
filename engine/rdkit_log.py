"""Silence RDKit's C++ log (it writes to stderr, which would tear a terminal UI)."""

from __future__ import annotations

import threading
from types import TracebackType

from rdkit import RDLogger, rdBase

_LOCK = threading.Lock()
_depth = 0
_saved: list[str] = []
#: Per thread, how many quiet blocks it is inside: a block nested in one of the same thread's
#: (every parse inside a perception) has nothing to switch and skips the lock.
_local = threading.local()


def _enabled_channels() -> list[str]:
    """Names of the RDKit log channels that are currently switched on."""
    enabled = []
    for entry in rdBase.LogStatus().splitlines():
        name, _, state = entry.partition(":")
        if state.strip() == "enabled":
            enabled.append(name.strip())
    return enabled


class _Quiet:
    """The context manager :func:`quiet_rdkit` returns (a class: a generator-based one cost µs per parse)."""

    __slots__ = ()

    def __enter__(self) -> None:
        global _depth, _saved
        mine = getattr(_local, "depth", 0)
        _local.depth = mine + 1
        if mine:
            return  # this thread's outer block keeps the log off until it ends, after this one
        with _LOCK:
            if _depth == 0:
                _saved = _enabled_channels()
                RDLogger.DisableLog("rdApp.*")  # type: ignore[attr-defined]  # absent from RDKit's stubs
            _depth += 1

    def __exit__(
        self, kind: type[BaseException] | None, exc: BaseException | None, tb: TracebackType | None
    ) -> None:
        global _depth, _saved
        mine = _local.depth - 1
        _local.depth = mine
        if mine:
            return
        with _LOCK:
            _depth -= 1
            if _depth == 0:
                for channel in _saved:
                    RDLogger.EnableLog(channel)  # type: ignore[attr-defined]
                _saved = []


def quiet_rdkit() -> _Quiet:
    """Disable every RDKit log channel inside the block, then restore the previous state.

    Nested and concurrent uses are counted so that only the outermost exit
    restores the channels that were on before the first entry.
    """
    return _Quiet()
