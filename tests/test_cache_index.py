"""The perception cache's key index: a lookup reads only the shards holding its keys, and a damaged, stale or
missing index never changes an answer (it only costs misses, or a rebuild with one note)."""

from __future__ import annotations

import sqlite3
import subprocess
import sys
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from halosift.engine import cache as cache_mod
from halosift.engine.cache import CacheWarning, PerceptionCache, take

from halosift import engine

ROOT = Path(__file__).resolve().parents[1]
SMILES = ["CCCC", "CC(C)C", "C1CCCCC1", "C=CCC", "Cc1ccccc1", "CC(C)CC", "CCC(C)(C)C", "C1CCC1"]


@pytest.fixture(scope="module")
def base() -> engine.Perception:
    return engine.perceive(SMILES)


def _synthetic(base: engine.Perception, n: int, tag: str) -> tuple[list[str], engine.Perception]:
    """``n`` entries with made-up keys, their perception copied from the real structures in turn."""
    rows = np.arange(n) % len(SMILES)
    return [f"{tag}-{i}" for i in range(n)], take(base, rows)


def _noting(fn):  # type: ignore[no-untyped-def]
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        out = fn()
    return out, [str(w.message) for w in caught if issubclass(w.category, CacheWarning)]


def _same(a: engine.Perception, b: engine.Perception) -> None:
    pd.testing.assert_frame_equal(a.structures, b.structures)
    pd.testing.assert_frame_equal(a.sites, b.sites)
    pd.testing.assert_frame_equal(a.allylic, b.allylic)


def test_lookup_reads_only_the_shards_holding_its_keys(tmp_path: Path, base, monkeypatch) -> None:
    monkeypatch.setattr(cache_mod, "SHARD_ROWS", 16)
    store = PerceptionCache(tmp_path)
    for tag in "abcde":
        store.store(*_synthetic(base, 16, tag))
    assert len(list(store.folder.glob("*.manifest.json"))) == 5
    read = []
    real = cache_mod._read_shard
    monkeypatch.setattr(cache_mod, "_read_shard", lambda m: read.append(m) or real(m))
    keys, want = _synthetic(base, 16, "c")
    hit, got = PerceptionCache(tmp_path).lookup(keys[3:9] + ["not cached"])
    assert hit.tolist() == [True] * 6 + [False]
    _same(got, take(want, np.arange(3, 9)))
    assert len(read) == 1


def test_damaged_index_is_rebuilt_once_and_answers_stay(tmp_path: Path, base) -> None:
    store = PerceptionCache(tmp_path)
    keys, want = _synthetic(base, 40, "k")
    store.store(keys, want)
    store.index.path.write_bytes(b"\x00this is no database\x00" * 50)
    (hit, got), notes = _noting(lambda: PerceptionCache(tmp_path).lookup(keys))
    assert hit.all()
    _same(got, want)
    assert len(notes) == 1 and "index" in notes[0]
    (hit, _), notes = _noting(lambda: PerceptionCache(tmp_path).lookup(keys))
    assert hit.all() and notes == []


def test_missing_index_is_rebuilt_from_the_shards(tmp_path: Path, base) -> None:
    store = PerceptionCache(tmp_path)
    keys, want = _synthetic(base, 30, "m")
    store.store(keys, want)
    store.index.path.unlink()
    (hit, got), notes = _noting(lambda: PerceptionCache(tmp_path).lookup(keys))
    assert hit.all() and notes == []
    _same(got, want)


def test_stale_and_wrong_index_entries_are_misses_never_answers(tmp_path: Path, base, monkeypatch) -> None:
    monkeypatch.setattr(cache_mod, "SHARD_ROWS", 10)
    store = PerceptionCache(tmp_path)
    keys, want = _synthetic(base, 20, "s")
    store.store(keys, want)
    con = sqlite3.connect(store.index.path)
    with con:
        (other,) = {s for (s,) in con.execute("SELECT shard FROM keys WHERE key = ?", (keys[15],))}
        con.execute("UPDATE keys SET shard = ? WHERE key = ?", (other, keys[0]))  # points at the wrong shard
        con.execute("UPDATE keys SET shard = 'no-such-shard' WHERE key = ?", (keys[1],))  # at a vanished one
        con.execute("INSERT INTO keys VALUES ('made-up key', ?)", (other,))  # a key no shard holds
    con.close()
    asked = [keys[0], keys[15], keys[1], "made-up key"]
    (hit, got), notes = _noting(lambda: PerceptionCache(tmp_path).lookup(asked))
    assert notes == []
    # Only the verified shard's own rows answer: the misdirected, vanished and made-up keys are misses.
    assert hit.tolist() == [False, True, False, False]
    _same(got, take(want, np.array([15])))
    # Screened again, they are stored again and found.
    store.store([keys[0], keys[1]], take(want, np.array([0, 1])))
    hit, got = PerceptionCache(tmp_path).lookup(keys)
    assert hit.all()
    _same(got, want)


_WRITER = """
import sys, warnings
import numpy as np
from halosift import engine
from halosift.engine import cache
from halosift.engine.cache import CacheWarning, PerceptionCache, take

cache.SHARD_ROWS = 8
cache.MAX_SHARDS = 2  # merge often, so merges overlap the other writer's stores and lookups
warnings.simplefilter("error", CacheWarning)
base = engine.perceive(%r)
tag = sys.argv[2]
for round in range(10):
    keys = [f"{tag}-{round}-{i}" for i in range(12)]
    store = PerceptionCache(sys.argv[1])
    store.store(keys, take(base, np.arange(12) %% len(base.structures)))
    hit, _ = PerceptionCache(sys.argv[1]).lookup(keys)
    assert hit.all(), (round, hit)
print("ok")
""" % (SMILES,)  # noqa: UP031 - the braces of the code inside would need doubling


def test_concurrent_writers_keep_one_index(tmp_path: Path, base) -> None:
    script = tmp_path / "writer.py"
    script.write_text(_WRITER)
    root = tmp_path / "cache"
    env = {"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin"}
    procs = [subprocess.Popen([sys.executable, str(script), str(root), tag], cwd=ROOT, env=env,
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True) for tag in ("x", "y")]
    outs = [p.communicate(timeout=180) for p in procs]
    for proc, (out, err) in zip(procs, outs):
        assert proc.returncode == 0 and out.strip() == "ok", err[-2000:]
    keys = [f"{t}-{r}-{i}" for t in "xy" for r in range(10) for i in range(12)]
    (hit, got), notes = _noting(lambda: PerceptionCache(root).lookup(keys))
    assert hit.all() and notes == []
    _same(got, take(base, np.tile(np.arange(12) % len(SMILES), 20)))
    assert not [p for p in root.rglob(".*") if p.is_file()]


def test_an_earlier_single_big_shard_is_split(tmp_path: Path, base, monkeypatch) -> None:
    store = PerceptionCache(tmp_path)
    keys, want = _synthetic(base, 50, "big")
    store.store(keys, want)  # one shard of 50
    monkeypatch.setattr(cache_mod, "SHARD_ROWS", 16)
    store.store(*_synthetic(base, 3, "new"))
    rows = sorted(cache_mod._manifest_rows(m) for m in store.folder.glob("*.manifest.json"))
    assert max(rows) <= 16 and sum(rows) == 53
    hit, got = PerceptionCache(tmp_path).lookup(keys)
    assert hit.all()
    _same(got, want)


def test_index_of_a_removed_engine_version_is_removed(tmp_path: Path, base) -> None:
    store = PerceptionCache(tmp_path)
    store.store(*_synthetic(base, 5, "t"))
    gone = tmp_path / "perception-2-0123456789abcdef.index.sqlite"  # its folder was deleted as stale
    gone.write_bytes(b"old index")
    alive = tmp_path / "perception-2-fedcba9876543210.index.sqlite"  # another version, its folder in use
    alive.write_bytes(b"in use")
    (tmp_path / "perception-2-fedcba9876543210").mkdir()
    hit, _ = PerceptionCache(tmp_path).lookup(["t-0"])
    assert hit.all() and not gone.exists() and alive.exists() and store.index.path.exists()
