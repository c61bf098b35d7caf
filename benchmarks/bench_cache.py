"""Perception cache lookup of a 1,000-structure library against caches of 100,000 and 1,000,000 entries, in one run.

    python benchmarks/bench_cache.py [--sizes 100000 1000000] [--library 1000]

Each cache is built in a temporary folder through the real write path
(``PerceptionCache.store``, in batches as screens store them): made-up keys, the
perception rows copied from a few real structures. The library was screened
once before, so its entries were stored together, half of the other entries
before it and half after. Prints the lookup time (median of 5, a fresh cache
object each time, as every screen makes one) for each size and the ratio
largest/smallest; with the index that ratio stays near 1. For the smallest size
it also prints the lookup without the index (every shard read), the cost the
index removes.
"""

from __future__ import annotations

import argparse
import statistics
import tempfile
import time
import warnings
from pathlib import Path

import numpy as np
from halosift.engine.cache import PerceptionCache, take

from halosift import engine

SHAPES = ["CCCC", "CC(C)C", "C1CCCCC1", "C=CCC", "Cc1ccccc1", "CC(C)CC", "CCC(C)(C)C", "C1CCC1", "CC1CCCC1",
          "CCC=C(C)C"]
#: Entries per store call while building (a large screen's worth).
BATCH = 20_000


def _build(folder: Path, size: int, library: list[str], base: engine.Perception) -> float:
    """Fill ``folder`` with ``size`` other entries around ``library``; seconds taken."""
    started = time.perf_counter()
    store = PerceptionCache(folder)
    pattern = take(base, np.arange(BATCH) % len(SHAPES))
    half = size // 2
    done = 0
    for target in (half, size):
        while done < target:
            n = min(BATCH, target - done)
            store.store([f"WS-filler-{done + i:08d}" for i in range(n)], pattern if n == BATCH else
                        take(base, np.arange(n) % len(SHAPES)))
            done += n
        if target == half:
            store.store(library, take(base, np.arange(len(library)) % len(SHAPES)))
    return time.perf_counter() - started


def _time_lookup(folder: Path, library: list[str], *, indexed: bool = True) -> float:
    times = []
    for _ in range(5):
        cache = PerceptionCache(folder)
        if not indexed:
            cache._indexed_shards = lambda keys: None  # type: ignore[method-assign]  # the pre-index path
        started = time.perf_counter()
        hit, _ = cache.lookup(library)
        times.append(time.perf_counter() - started)
        assert hit.all()
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", type=int, nargs="+", default=[100_000, 1_000_000])
    parser.add_argument("--library", type=int, default=1_000)
    args = parser.parse_args()
    warnings.simplefilter("error")  # any cache note would make the figures meaningless
    base = engine.perceive(SHAPES)
    library = [f"WS-lib-{i:05d}" for i in range(args.library)]
    results = {}
    for size in args.sizes:
        with tempfile.TemporaryDirectory() as tmp:
            folder = Path(tmp)
            built = _build(folder, size, library, base)
            files = sum(1 for _ in folder.rglob("*.manifest.json"))
            disk = sum(p.stat().st_size for p in folder.rglob("*") if p.is_file()) / 1e6
            results[size] = _time_lookup(folder, library)
            print(f"cache of {size:>9,} entries ({files} shards, {disk:,.0f} MB, built in {built:.1f} s): "
                  f"lookup of {len(library):,} keys {results[size] * 1000:.1f} ms")
            if size == min(args.sizes):
                full = _time_lookup(folder, library, indexed=False)
                print(f"    same cache without the index (every shard read): {full * 1000:.1f} ms "
                      f"({full / results[size]:.0f}x slower)")
    big, small = max(results), min(results)
    print(f"ratio lookup({big:,}) / lookup({small:,}): {results[big] / results[small]:.2f}")


if __name__ == "__main__":
    main()
