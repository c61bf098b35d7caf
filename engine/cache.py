"""On-disk cache of perception results, so re-opening a library is near-instant.

Entries are keyed by the exact input SMILES string (which fixes the canonical
structure; looking up by canonical SMILES would mean parsing every row again,
the very cost the cache exists to avoid) and by a fingerprint of the engine
code that produces them: change the perception code or its parameters and
the old entries are simply not found.
"""

from __future__ import annotations

import hashlib
import os
import uuid
from collections.abc import Sequence
from functools import cache
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq

from engine.nbs import frame_from_rows
from engine.perception import ALLYLIC_SCHEMA, SITE_SCHEMA, STRUCTURE_SCHEMA, Perception

#: Every engine module perception runs (a test derives the list from the imports).
_FINGERPRINTED = (
    "conditions.py", "contenders.py", "molecules.py", "nbs.py", "parameters.py", "perception.py", "rates.py",
    "rdkit_log.py", "reagents.py", "shares.py", "site_classes.py", "sites.py", "solvent.py", "special_sites.py",
    "stereo.py",
)
#: Merge shards into one when there are more than this many.
MAX_SHARDS = 8


@cache
def engine_fingerprint() -> str:
    """Hash of the code and data that perception depends on."""
    from engine import __version__

    h = hashlib.sha256(__version__.encode())
    here = Path(__file__).parent
    for name in _FINGERPRINTED:
        h.update((here / name).read_bytes())
    return h.hexdigest()[:16]


def default_folder() -> Path:
    """``$HALOSIFT_CACHE_DIR`` or the user's cache folder."""
    env = os.environ.get("HALOSIFT_CACHE_DIR")
    if env:
        return Path(env)
    from platformdirs import user_cache_dir

    return Path(user_cache_dir("halosift"))


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


class PerceptionCache:
    """Parquet shards of (key, structures, sites, allylic) in one folder per engine fingerprint."""

    def __init__(self, folder: Path | None = None) -> None:
        self.folder = (folder or default_folder()) / f"perception-{engine_fingerprint()}"

    def _shards(self) -> list[Path]:
        if not self.folder.is_dir():
            return []
        return sorted(self.folder.glob("*.structures.parquet"))

    def _load(self) -> tuple[pd.Index, Perception] | None:
        structs, sites, allylic, offset = [], [], [], 0
        try:
            for path in self._shards():
                s = pq.read_table(path).to_pandas()
                t = pq.read_table(path.with_name(path.name.replace(".structures.", ".sites."))).to_pandas()
                a = pq.read_table(path.with_name(path.name.replace(".structures.", ".allylic."))).to_pandas()
                t["struct"] = (t["struct"] + offset).astype("int32")
                a["struct"] = (a["struct"] + offset).astype("int32")
                offset += len(s)
                structs.append(s)
                sites.append(t)
                allylic.append(a)
        except (OSError, pa.ArrowException, ValueError):
            return None  # a damaged cache is a miss, never an error
        if not structs:
            return None
        all_structs = pd.concat(structs, ignore_index=True)
        keys = pd.Index(all_structs.pop("key"))
        perception = Perception(
            all_structs, pd.concat(sites, ignore_index=True), frame_from_rows(pd.concat(allylic, ignore_index=True))
        )
        if not keys.is_unique:
            first = ~keys.duplicated()
            perception = take(perception, np.flatnonzero(first))
            keys = keys[first]
        return keys, perception

    def lookup(self, keys: Sequence[str]) -> tuple[np.ndarray, Perception | None]:
        """Which ``keys`` are cached (bool mask) and their perception, in order of the hits."""
        loaded = self._load()
        if loaded is None:
            return np.zeros(len(keys), dtype=bool), None
        cached_keys, perception = loaded
        pos = cached_keys.get_indexer(pd.Index(keys))
        hit = pos >= 0
        return hit, take(perception, pos[hit])

    def store(self, keys: Sequence[str], perception: Perception) -> None:
        """Add entries; silently does nothing when the folder cannot be written."""
        if len(keys) == 0:
            return
        try:
            self.folder.mkdir(parents=True, exist_ok=True)
            structs = perception.structures.copy()
            structs.insert(0, "key", pd.array(list(keys), dtype="string"))
            self._write_shard(structs, perception.sites, perception.allylic)
            if len(self._shards()) > MAX_SHARDS:
                self._compact()
        except (OSError, pa.ArrowException):
            pass

    def _write_shard(self, structs: pd.DataFrame, sites: pd.DataFrame, allylic: pd.DataFrame) -> None:
        name = uuid.uuid4().hex
        schema = pa.schema([pa.field("key", pa.string()), *STRUCTURE_SCHEMA])
        # Sites and NBS rows first: a shard is only visible once its structures file exists.
        for table, suffix in ((pa.Table.from_pandas(sites, schema=SITE_SCHEMA, preserve_index=False), "sites"),
                              (pa.Table.from_pandas(allylic, schema=ALLYLIC_SCHEMA, preserve_index=False), "allylic"),
                              (pa.Table.from_pandas(structs, schema=schema, preserve_index=False), "structures")):
            final = self.folder / f"{name}.{suffix}.parquet"
            tmp = final.with_name(f".{final.name}.tmp")
            pq.write_table(table, tmp)
            os.replace(tmp, final)

    def _compact(self) -> None:
        old = self._shards()
        loaded = self._load()
        if loaded is None:
            return
        keys, perception = loaded
        structs = perception.structures.copy()
        structs.insert(0, "key", pd.array(list(keys), dtype="string"))
        self._write_shard(structs, perception.sites, perception.allylic)
        for path in old:
            path.unlink(missing_ok=True)
            for part in (".sites.", ".allylic."):
                path.with_name(path.name.replace(".structures.", part)).unlink(missing_ok=True)

    def clear(self) -> None:
        """Remove every entry of this engine fingerprint."""
        for path in self.folder.glob("*.parquet") if self.folder.is_dir() else []:
            path.unlink(missing_ok=True)
