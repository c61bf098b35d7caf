"""Key index of the perception cache: which shard holds a key, found in a B-tree, not by reading every shard.

The index is a hint, never an answer. It maps a key to the name of the shard that
holds it; the shard is then read and verified as before, and a structure counts as
cached only when the verified shard itself holds that exact key. A damaged,
stale or missing index can therefore only cost misses (structures perceived
again), never change a result. SQLite from the standard library keeps it: one
file beside the engine's folder, transactions for atomic updates, its file locks
for several writers at once.
"""

from __future__ import annotations

import os
import sqlite3
import uuid
from collections.abc import Callable, Iterable, Sequence
from pathlib import Path
from typing import TypeVar

_T = TypeVar("_T")

#: Seconds a writer waits for another writer's lock before giving up on the index (then: no index this time).
BUSY_S = 30.0
#: Keys per query: below SQLite's limit on bound parameters.
_BATCH = 900
_SCHEMA = """
CREATE TABLE IF NOT EXISTS meta (name TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS shards (name TEXT PRIMARY KEY);
CREATE TABLE IF NOT EXISTS keys (key TEXT PRIMARY KEY, shard TEXT NOT NULL) WITHOUT ROWID;
CREATE INDEX IF NOT EXISTS keys_by_shard ON keys (shard);
"""


class IndexDamaged(Exception):
    """The index file is not a database SQLite can read: it must be rebuilt from the shards."""


class IndexUnavailable(Exception):
    """The index cannot be opened or written now (read-only folder, lock held too long): go on without it."""


def _classify(exc: sqlite3.Error) -> Exception:
    """OperationalError is a state (locked, read-only, no file); any other DatabaseError is a damaged file."""
    if isinstance(exc, sqlite3.OperationalError) and "malformed" not in str(exc):
        return IndexUnavailable(str(exc))
    return IndexDamaged(str(exc))


class KeyIndex:
    """``key → shard name`` in one SQLite file; every method raises only IndexDamaged or IndexUnavailable."""

    def __init__(self, path: Path) -> None:
        self.path = path
        """The SQLite file."""

    def _connect(self) -> sqlite3.Connection:
        # A connection per call: worker processes fork, and a SQLite connection must not cross a fork.
        con = sqlite3.connect(self.path, timeout=BUSY_S, isolation_level=None)
        try:
            con.executescript(_SCHEMA)
        except BaseException:
            con.close()
            raise
        return con

    def _run(self, work: Callable[[sqlite3.Connection], _T], *, write: bool = True) -> _T:
        """Run ``work(connection)`` (a write: in one transaction); SQLite errors become IndexDamaged/IndexUnavailable."""
        try:
            con = self._connect()
        except sqlite3.Error as exc:
            raise _classify(exc) from None
        try:
            if not write:  # readers take no write lock, so lookups run side by side
                return work(con)
            con.execute("BEGIN IMMEDIATE")
            out = work(con)
            con.execute("COMMIT")
            return out
        except sqlite3.Error as exc:
            raise _classify(exc) from None
        finally:
            con.close()

    def complete(self) -> bool:
        """Whether the index was once built from every shard (a new or emptied file was not)."""
        return bool(self._run(lambda con: con.execute("SELECT 1 FROM meta WHERE name = 'complete'").fetchone(),
                              write=False))

    def find(self, keys: Sequence[str]) -> dict[str, str]:
        """The shard named for each of ``keys`` that the index knows."""
        unique = list(dict.fromkeys(keys))

        def work(con: sqlite3.Connection) -> dict[str, str]:
            found: dict[str, str] = {}
            for i in range(0, len(unique), _BATCH):
                part = unique[i : i + _BATCH]
                marks = ",".join("?" * len(part))
                found.update(con.execute(f"SELECT key, shard FROM keys WHERE key IN ({marks})", part).fetchall())
            return found

        return self._run(work, write=False)

    def shards(self) -> set[str]:
        """Names of the shards whose keys are indexed."""
        return self._run(lambda con: {name for (name,) in con.execute("SELECT name FROM shards")}, write=False)

    def add(self, entries: Iterable[tuple[str, Sequence[str]]], *, mark_complete: bool = False) -> None:
        """Index each (shard name, its keys); a key already indexed now points at the newer shard."""
        entries = list(entries)

        def work(con: sqlite3.Connection) -> None:
            for name, keys in entries:
                con.execute("INSERT OR IGNORE INTO shards VALUES (?)", (name,))
                con.executemany("INSERT OR REPLACE INTO keys VALUES (?, ?)", ((k, name) for k in keys))
            if mark_complete:
                con.execute("INSERT OR REPLACE INTO meta VALUES ('complete', '1')")

        self._run(work)

    def forget(self, names: Iterable[str]) -> None:
        """Drop shards (removed, damaged or vanished) and every key pointing at them."""
        names = list(names)
        if not names:
            return

        def work(con: sqlite3.Connection) -> None:
            con.executemany("DELETE FROM keys WHERE shard = ?", ((n,) for n in names))
            con.executemany("DELETE FROM shards WHERE name = ?", ((n,) for n in names))

        self._run(work)

    def replace(self, entries: Iterable[tuple[str, Sequence[str]]]) -> None:
        """Build a new complete index from ``entries`` in a temp file and move it over this one (a damaged file)."""
        tmp = self.path.with_name(f".{self.path.name}.{uuid.uuid4().hex[:8]}.tmp")
        try:
            KeyIndex(tmp).add(entries, mark_complete=True)
            # A journal left beside a damaged file would be played back into the new one: it goes first.
            Path(f"{self.path}-journal").unlink(missing_ok=True)
            os.replace(tmp, self.path)
        except OSError as exc:
            raise IndexUnavailable(str(exc)) from None
        finally:
            tmp.unlink(missing_ok=True)
            Path(f"{tmp}-journal").unlink(missing_ok=True)
