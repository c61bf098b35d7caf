"""On-disk cache of perception results, so re-opening a library is near-instant.

Entries are keyed by the exact input SMILES string (which fixes the canonical
structure; looking up by canonical SMILES would mean parsing every row again,
the very cost the cache exists to avoid) and by a fingerprint of the engine
code that produces them: change the perception code or its parameters and
the old entries are simply not found.

Nothing on disk is trusted. A shard (three Parquet files) becomes visible
only when its manifest, written last, names them with their sizes and
SHA-256 digests; every read checks the digests, the schemas and the row
links, so a flipped byte, a truncated or replaced file is a miss, never a
wrong answer. A damaged shard is deleted and its structures perceived
again. The cache never stops a screen: when it cannot be used, a
:class:`CacheWarning` says so in one line and the screen goes on without it.

Shards hold at most :data:`SHARD_ROWS` structures and a key index
(:mod:`halosift.engine.cache_index`) names the shard of each key, so a lookup
reads only the shards that hold its keys: its cost follows the library, not
the size of the cache. The index is only a hint (see there): a hit always
comes from a verified shard holding that very key.
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import shutil
import time
import uuid
import warnings
from collections.abc import Sequence
from dataclasses import dataclass
from functools import cache
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq
from halosift.engine.cache_index import IndexDamaged, IndexUnavailable, KeyIndex
from halosift.engine.nbs import frame_from_rows
from halosift.engine.perception import ALLYLIC_SCHEMA, SITE_SCHEMA, STRUCTURE_SCHEMA, Perception

#: Every engine module perception runs (a test derives the list from the imports).
_FINGERPRINTED = (
    "conditions.py", "contenders.py", "kernels.py", "molecules.py", "nbs.py", "nbs_kernels.py", "orbit_counts.py",
    "parameters.py", "perception.py", "rates.py", "rdkit_log.py", "reagents.py", "shares.py", "site_classes.py",
    "sites.py", "solvent.py", "special_sites.py", "stereo.py",
)
#: Merge the small shards when there are more than this many of them.
MAX_SHARDS = 8
#: Most structures in one shard: a lookup reads (and checks) whole shards, so this bounds its cost per hit shard.
SHARD_ROWS = 2048
#: Most bytes one engine fingerprint may hold; the least recently used shards go first.
MAX_BYTES = 4 * 1024**3
#: Version of the on-disk layout, part of the folder name: another layout is another (stale) folder.
CACHE_FORMAT = 2
#: Temp files and manifest-less data files older than this were left by a killed run.
STALE_TEMP_S = 15 * 60
#: Folders of other engine fingerprints unused this long are deleted (a concurrent other version keeps its own).
STALE_FOLDER_S = 24 * 3600
_PARTS = ("structures", "sites", "allylic")
_FOLDER = re.compile(r"perception-[0-9a-z-]+")
_INDEX_FILE = re.compile(r"perception-[0-9a-z-]+\.index\.sqlite(-journal)?")


@cache
def engine_fingerprint() -> str:
    """Hash of the code and data that perception depends on."""
    from halosift.engine import __version__

    h = hashlib.sha256(__version__.encode())
    here = Path(__file__).parent
    for name in _FINGERPRINTED:
        h.update((here / name).read_bytes())
    return h.hexdigest()[:16]


class CacheWarning(UserWarning):
    """The perception cache could not be used or held damaged entries; the screen went on without them."""


def default_folder() -> Path | None:
    """``$HALOSIFT_CACHE_DIR`` or the user's cache folder; None when there is no home to put it in."""
    env = os.environ.get("HALOSIFT_CACHE_DIR")
    if env:
        return Path(env).absolute()
    from platformdirs import user_cache_dir

    try:
        folder = Path(user_cache_dir("halosift"))
    except (KeyError, OSError, RuntimeError):  # no HOME and no password entry
        return None
    # Without a home, "~" stays unexpanded: a relative path would scatter caches into working folders.
    return folder if folder.is_absolute() else None


def _take_rows(frame: pd.DataFrame, n: int, rows: np.ndarray) -> pd.DataFrame:
    """Rows of a per-structure table (grouped by ``struct``) for structures ``rows``, renumbered from 0."""
    struct = frame["struct"].to_numpy()
    counts = np.bincount(struct, minlength=n) if len(struct) else np.zeros(n, dtype=np.int64)
    starts = np.concatenate([[0], np.cumsum(counts)[:-1]]) if n else np.zeros(0, dtype=np.int64)
    want = counts[rows]
    offsets = np.repeat(starts[rows] - np.concatenate([[0], np.cumsum(want)[:-1]]), want)
    picked = frame.iloc[np.arange(int(want.sum())) + offsets].reset_index(drop=True)
    picked["struct"] = np.repeat(np.arange(len(rows), dtype=np.int32), want)
    return picked


def take(perception: Perception, rows: np.ndarray) -> Perception:
    """The perception of structures ``rows`` (in that order), renumbered from 0."""
    rows = np.asarray(rows)
    n = len(perception.structures)
    new_structs = perception.structures.iloc[rows].reset_index(drop=True)
    return Perception(new_structs, _take_rows(perception.sites, n, rows), _take_rows(perception.allylic, n, rows))


@dataclass(frozen=True)
class _Shard:
    """One shard read from disk and verified."""

    manifest: Path
    """Its manifest file; touched when the shard serves a hit, so eviction drops the least recently used."""
    structures: pd.DataFrame
    """Per-structure rows with the ``key`` column first."""
    sites: pd.DataFrame
    """Site-group rows, ``struct`` counting this shard's structures from 0."""
    allylic: pd.DataFrame
    """NBS rows, ``struct`` as for ``sites``."""


class _Damaged(Exception):
    """A shard failed verification; the message says how, for the note."""


def _expected_schemas() -> dict[str, pa.Schema]:
    return {
        "structures": pa.schema([pa.field("key", pa.string()), *STRUCTURE_SCHEMA]),
        "sites": SITE_SCHEMA,
        "allylic": ALLYLIC_SCHEMA,
    }


def _same_columns(got: pa.Schema, want: pa.Schema) -> bool:
    """Same column names and types in the same order (metadata aside)."""
    return [(f.name, f.type) for f in got] == [(f.name, f.type) for f in want]


def _check_struct_links(frame: pd.DataFrame, n: int, part: str) -> None:
    """``struct`` must count structures of the shard in order: every lookup relies on that grouping."""
    struct = frame["struct"].to_numpy()
    if len(struct) and (struct.min() < 0 or struct.max() >= n or (np.diff(struct) < 0).any()):
        raise _Damaged(f"{part} rows point at missing structures")


def _data_path(manifest: Path, part: str) -> Path:
    return manifest.with_name(manifest.name.replace(".manifest.json", f".{part}.parquet"))


def _read_shard(manifest: Path) -> _Shard:
    """Read and verify one shard; _Damaged on any mismatch, FileNotFoundError when it vanished meanwhile."""
    try:
        about = json.loads(manifest.read_bytes())
        files = {part: about["files"][part] for part in _PARTS}
        if about["format"] != CACHE_FORMAT:
            raise _Damaged("unknown layout")
    except (ValueError, KeyError, TypeError) as exc:
        raise _Damaged(f"unreadable manifest ({type(exc).__name__})") from None
    frames: dict[str, pd.DataFrame] = {}
    for part, want in _expected_schemas().items():
        data = _data_path(manifest, part).read_bytes()
        if len(data) != files[part].get("bytes") or hashlib.sha256(data).hexdigest() != files[part].get("sha256"):
            raise _Damaged(f"{part} file does not match its checksum")
        try:
            table = pq.read_table(pa.BufferReader(data))
        except (pa.ArrowException, OSError, ValueError) as exc:
            raise _Damaged(f"{part} file unreadable ({exc})") from None
        if not _same_columns(table.schema, want):
            raise _Damaged(f"{part} file has other columns")
        if table.num_rows != files[part].get("rows"):
            raise _Damaged(f"{part} file has another row count")
        frames[part] = table.to_pandas()
    structs = frames["structures"]
    if structs["key"].isna().any():
        raise _Damaged("a key is missing")
    _check_struct_links(frames["sites"], len(structs), "site")
    _check_struct_links(frames["allylic"], len(structs), "NBS")
    return _Shard(manifest, structs, frames["sites"], frames["allylic"])


def _remove_shard(manifest: Path) -> None:
    """Delete a shard, manifest first, so no reader sees it half removed."""
    for path in (manifest, *(_data_path(manifest, part) for part in _PARTS)):
        try:
            path.unlink(missing_ok=True)
        except OSError:
            pass  # read-only: it stays a miss


def _shard_bytes(manifest: Path) -> int:
    """Bytes a shard holds on disk (0 when it vanished)."""
    total = 0
    for path in (manifest, *(_data_path(manifest, part) for part in _PARTS)):
        try:
            total += path.stat().st_size
        except OSError:
            pass
    return total


def _manifest_rows(manifest: Path) -> int | None:
    """Structures a shard holds, as its manifest says; None when the manifest cannot be read."""
    try:
        return int(json.loads(manifest.read_bytes())["files"]["structures"]["rows"])
    except (OSError, ValueError, KeyError, TypeError):
        return None


def _mtime(path: Path) -> float:
    try:
        return path.stat().st_mtime
    except OSError:
        return 0.0


class PerceptionCache:
    """Verified Parquet shards of (key, structures, sites, allylic) in one folder per engine fingerprint."""

    def __init__(self, folder: str | os.PathLike[str] | None = None) -> None:
        self.root = Path(folder) if folder is not None else default_folder()
        """The folder holding one subfolder per engine fingerprint (None: no usable place)."""
        self.folder = self.root / f"perception-{CACHE_FORMAT}-{engine_fingerprint()}" if self.root else None
        """This engine's subfolder."""
        self.index = KeyIndex(self.root / f"perception-{CACHE_FORMAT}-{engine_fingerprint()}.index.sqlite") \
            if self.root else None
        """Key → shard index beside the subfolder (outside it: the subfolder holds shards only)."""
        self._unusable_noted = False

    # ------------------------------------------------------------------ notes

    def _unusable(self, why: str) -> None:
        """Say once per cache that it cannot be used; the screen goes on without it."""
        if not self._unusable_noted:
            self._unusable_noted = True
            warnings.warn(f"perception cache not used: {why}; screening without it", CacheWarning, stacklevel=3)

    # ------------------------------------------------------------------ reading

    def _manifests(self) -> list[Path]:
        if self.folder is None or not self.folder.is_dir():
            return []
        try:
            return sorted(self.folder.glob("*.manifest.json"))
        except OSError:
            return []

    def _read_all(self, manifests: Sequence[Path] | None = None, gone: list[Path] | None = None) -> list[_Shard]:
        """Every shard (of ``manifests``, default all) that verifies; damaged ones are deleted and reported in one note.

        Shards damaged or vanished meanwhile are appended to ``gone`` when it is given.
        """
        shards, damaged = [], []
        for manifest in self._manifests() if manifests is None else manifests:
            try:
                shards.append(_read_shard(manifest))
            except _Damaged as exc:
                damaged.append(str(exc))
                _remove_shard(manifest)
                if gone is not None:
                    gone.append(manifest)
            except FileNotFoundError:
                if manifest.exists():  # a data file is gone for good, not merely removed by a compaction
                    damaged.append("a file is missing")
                    _remove_shard(manifest)
                if gone is not None:
                    gone.append(manifest)
            except OSError as exc:
                self._unusable(f"cannot read {manifest.parent} ({exc.strerror or exc})")
        if damaged:
            what = "a damaged entry" if len(damaged) == 1 else f"{len(damaged)} damaged entries"
            warnings.warn(f"perception cache: removed {what} ({'; '.join(dict.fromkeys(damaged))}); "
                          "their structures are perceived again", CacheWarning, stacklevel=3)
        return shards

    def _join(self, shards: list[_Shard]) -> tuple[pd.Index, Perception, np.ndarray] | None:
        """All shards as one perception: (keys, perception, shard number of each structure), duplicates dropped."""
        if not shards:
            return None
        structs, sites, allylic, origin, offset = [], [], [], [], 0
        for number, shard in enumerate(shards):
            t, a = shard.sites.copy(), shard.allylic.copy()
            t["struct"] = (t["struct"] + offset).astype("int32")
            a["struct"] = (a["struct"] + offset).astype("int32")
            offset += len(shard.structures)
            structs.append(shard.structures)
            sites.append(t)
            allylic.append(a)
            origin.append(np.full(len(shard.structures), number, dtype=np.int32))
        all_structs = pd.concat(structs, ignore_index=True)
        keys = pd.Index(all_structs.pop("key"))
        perception = Perception(
            all_structs, pd.concat(sites, ignore_index=True), frame_from_rows(pd.concat(allylic, ignore_index=True))
        )
        owner = np.concatenate(origin)
        if not keys.is_unique:  # two screens stored the same structure at once
            first = np.flatnonzero(~keys.duplicated())
            perception = take(perception, first)
            keys, owner = keys[first], owner[first]
        return keys, perception, owner

    def _load(self) -> tuple[pd.Index, Perception] | None:
        """Every verified entry: (keys, perception), or None when there is none."""
        joined = self._join(self._read_all())
        return None if joined is None else joined[:2]

    def lookup(self, keys: Sequence[str]) -> tuple[np.ndarray, Perception | None]:
        """Which ``keys`` are cached (bool mask) and their perception, in order of the hits."""
        if self.root is None:
            self._unusable("no home folder to keep it in (set HALOSIFT_CACHE_DIR)")
            return np.zeros(len(keys), dtype=bool), None
        self._tidy()
        if self.folder is None or not self.folder.is_dir():
            return np.zeros(len(keys), dtype=bool), None
        shards = self._indexed_shards(keys)
        if shards is None:  # no usable index now: read every shard, as the cache did before it had one
            shards = self._read_all()
        joined = self._join(shards)
        if joined is None:
            return np.zeros(len(keys), dtype=bool), None
        cached_keys, perception, owner = joined
        pos = cached_keys.get_indexer(pd.Index(keys))
        hit = pos >= 0
        now = time.time()
        for number in np.unique(owner[pos[hit]]):
            try:
                os.utime(shards[number].manifest, (now, now))  # recently used: evicted last
            except OSError:
                pass
        return hit, take(perception, pos[hit])

    # ------------------------------------------------------------------ the key index

    def _manifest_of(self, name: str) -> Path:
        assert self.folder is not None
        return self.folder / f"{name}.manifest.json"

    @staticmethod
    def _name_of(manifest: Path) -> str:
        return manifest.name.removesuffix(".manifest.json")

    def _index_ready(self) -> KeyIndex | None:
        """The index, built from the shards first when it is new or damaged; None when it cannot be used now."""
        index = self.index
        if index is None:
            return None
        try:
            try:
                if not index.complete():
                    self._reconcile(index, complete=True)
                return index
            except IndexDamaged:
                warnings.warn("perception cache: its key index was damaged and is rebuilt from the entries",
                              CacheWarning, stacklevel=4)
                index.replace((self._name_of(s.manifest), list(s.structures["key"])) for s in self._read_all())
                return index
        except (IndexDamaged, IndexUnavailable):
            return None

    def _reconcile(self, index: KeyIndex, *, complete: bool = False) -> None:
        """Index the shards the index does not know (a writer killed before indexing) and forget vanished ones."""
        on_disk = {self._name_of(m): m for m in self._manifests()}
        known = index.shards()
        gone: list[Path] = []
        fresh = self._read_all([on_disk[n] for n in sorted(on_disk.keys() - known)], gone)
        index.add(((self._name_of(s.manifest), list(s.structures["key"])) for s in fresh), mark_complete=complete)
        index.forget((known - on_disk.keys()) | {self._name_of(m) for m in gone})

    def _indexed_shards(self, keys: Sequence[str], *, retry: bool = True) -> list[_Shard] | None:
        """The verified shards the index names for ``keys``; None when there is no usable index."""
        index = self._index_ready()
        if index is None:
            return None
        try:
            names = set(index.find(keys).values())
            gone: list[Path] = []
            shards = self._read_all([self._manifest_of(n) for n in sorted(names)], gone)
            if gone:
                # Moved by a concurrent compaction, removed, or damaged: bring the index up to date and ask again.
                index.forget(self._name_of(m) for m in gone)
                self._reconcile(index)
                have = {self._name_of(s.manifest) for s in shards}
                more = set(index.find(keys).values()) - have
                shards += self._read_all([self._manifest_of(n) for n in sorted(more)])
            return shards
        except IndexDamaged:  # damaged under our feet: rebuilt once, then asked again
            if retry:
                warnings.warn("perception cache: its key index was damaged and is rebuilt from the entries",
                              CacheWarning, stacklevel=3)
                try:
                    index.replace((self._name_of(s.manifest), list(s.structures["key"])) for s in self._read_all())
                except (IndexDamaged, IndexUnavailable):
                    return None
                return self._indexed_shards(keys, retry=False)
            return None
        except IndexUnavailable:
            return None

    def _index_update(self, added: Sequence[tuple[Path, Sequence[str]]], removed: Sequence[Path] = ()) -> None:
        """Record written and removed shards in the index; a failure only costs misses until the next reconcile."""
        if self.index is None:
            return
        try:
            self.index.add((self._name_of(m), list(k)) for m, k in added)
            self.index.forget(self._name_of(m) for m in removed)
        except (IndexDamaged, IndexUnavailable):
            pass  # the next lookup or store rebuilds or reconciles it

    # ------------------------------------------------------------------ writing

    def store(self, keys: Sequence[str], perception: Perception) -> None:
        """Add entries, then compact and trim to :data:`MAX_BYTES`; a folder that cannot be written is noted, not raised."""
        if len(keys) == 0 or self.folder is None:
            return
        try:
            self.folder.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            self._unusable(f"cannot create {self.folder} ({exc.strerror or exc})")
            return
        try:
            self._write_chunks(list(keys), perception)
            index = self._index_ready()
            if index is not None:
                try:
                    self._reconcile(index)
                except (IndexDamaged, IndexUnavailable):
                    pass
            self._compact()
            self._trim()
        except OSError as exc:
            self._unusable(f"cannot write in {self.folder} ({exc.strerror or exc})")
        except pa.ArrowException as exc:  # a frame that does not fit the schema is a bug, but never a failed screen
            self._unusable(f"cannot store these entries ({exc})")

    def _write_chunks(self, keys: list[str], perception: Perception) -> list[Path]:
        """Write ``keys`` as shards of at most :data:`SHARD_ROWS` structures, each indexed once it is visible."""
        written = []
        for start in range(0, len(keys), SHARD_ROWS):
            rows = np.arange(start, min(start + SHARD_ROWS, len(keys)))
            part = take(perception, rows) if len(rows) < len(keys) else perception
            structs = part.structures.copy()
            structs.insert(0, "key", pd.array(keys[start : start + SHARD_ROWS], dtype="string"))
            manifest = self._write_shard(structs, part.sites, part.allylic)
            self._index_update([(manifest, keys[start : start + SHARD_ROWS])])
            written.append(manifest)
        return written

    def _write_shard(self, structs: pd.DataFrame, sites: pd.DataFrame, allylic: pd.DataFrame) -> Path:
        """Write one shard: data files first, the manifest with their digests last (that makes it visible)."""
        assert self.folder is not None
        name = uuid.uuid4().hex
        schemas = _expected_schemas()
        frames = {"structures": structs, "sites": sites, "allylic": allylic}
        manifest = self.folder / f"{name}.manifest.json"
        written: list[Path] = []
        files: dict[str, dict[str, object]] = {}
        try:
            for part in _PARTS:
                table = pa.Table.from_pandas(frames[part], schema=schemas[part], preserve_index=False)
                sink = pa.BufferOutputStream()
                pq.write_table(table, sink)
                data = sink.getvalue().to_pybytes()
                files[part] = {"bytes": len(data), "rows": table.num_rows, "sha256": hashlib.sha256(data).hexdigest()}
                written.append(self._put(_data_path(manifest, part), data))
            about = {"format": CACHE_FORMAT, "engine": engine_fingerprint(), "files": files}
            self._put(manifest, json.dumps(about, indent=1).encode())
        except BaseException:
            for path in written:  # data without a manifest is invisible; do not leave it behind
                path.unlink(missing_ok=True)
            raise
        return manifest

    @staticmethod
    def _put(final: Path, data: bytes) -> Path:
        """Write ``data`` to a temp file beside ``final`` and move it into place; the temp never outlives an error."""
        tmp = final.with_name(f".{final.name}.{uuid.uuid4().hex[:8]}.tmp")
        try:
            tmp.write_bytes(data)
            os.replace(tmp, final)
        except BaseException:
            tmp.unlink(missing_ok=True)
            raise
        return final

    def _compact(self) -> None:
        """Merge small shards (fewer files per lookup) and split oversized ones (an earlier layout's single shard).

        Full shards are left alone, so a store's work does not grow with the cache either.
        """
        small, oversized = [], []
        for manifest in self._manifests():
            rows = _manifest_rows(manifest)
            if rows is None or rows < SHARD_ROWS // 2:
                small.append(manifest)  # an unreadable manifest is read (and removed) with the small ones
            elif rows > SHARD_ROWS:
                oversized.append(manifest)
        if len(small) <= MAX_SHARDS and not oversized:
            return
        shards = self._read_all(small + oversized)
        joined = self._join(shards)
        if joined is None or (len(shards) < 2 and not oversized):
            return
        keys, perception, _ = joined
        self._write_chunks(list(keys), perception)
        for shard in shards:
            _remove_shard(shard.manifest)
        self._index_update([], [s.manifest for s in shards])

    def _trim(self) -> None:
        """Delete the least recently used shards until this fingerprint holds at most :data:`MAX_BYTES`."""
        manifests = sorted(self._manifests(), key=_mtime)
        sizes = [_shard_bytes(m) for m in manifests]
        total = sum(sizes)
        dropped = []
        for manifest, size in zip(manifests, sizes):
            if total <= MAX_BYTES:
                break
            _remove_shard(manifest)
            dropped.append(manifest)
            total -= size
        self._index_update([], dropped)

    # ------------------------------------------------------------------ housekeeping

    def _tidy(self) -> None:
        """Remove what killed runs and old engine versions left: temp files, orphan data, stale folders."""
        assert self.root is not None and self.folder is not None
        now = time.time()
        if self.folder.is_dir():
            try:
                os.utime(self.folder, (now, now))  # in use: not stale for other versions sharing the root
                entries = list(os.scandir(self.folder))
            except OSError:
                entries = []
            names = {e.name for e in entries}
            for entry in entries:
                name = entry.name
                left_over = name.startswith(".") and name.endswith(".tmp")
                orphan = name.endswith(".parquet") and not name.startswith(".") and (
                    name.split(".", 1)[0] + ".manifest.json") not in names
                if left_over or orphan:
                    try:
                        if entry.stat(follow_symlinks=False).st_mtime < now - STALE_TEMP_S:
                            os.unlink(entry.path)
                    except OSError:
                        pass
        try:
            others = [e for e in os.scandir(self.root) if e.is_dir(follow_symlinks=False)
                      and _FOLDER.fullmatch(e.name) and e.name != self.folder.name]
        except OSError:
            return
        for entry in others:
            try:
                if entry.stat(follow_symlinks=False).st_mtime < now - STALE_FOLDER_S:
                    shutil.rmtree(entry.path, ignore_errors=True)
            except OSError:
                pass
        try:
            indexes = [e for e in os.scandir(self.root) if _INDEX_FILE.fullmatch(e.name)]
        except OSError:
            return
        for entry in indexes:  # indexes of engine versions whose folder is gone
            if not entry.name.startswith(self.folder.name + ".") and not (
                    self.root / entry.name.split(".", 1)[0]).is_dir():
                try:
                    os.unlink(entry.path)
                except OSError:
                    pass

    def clear(self) -> None:
        """Remove every entry of this engine fingerprint."""
        manifests = self._manifests()
        for manifest in manifests:
            _remove_shard(manifest)
        self._index_update([], manifests)
