"""What the Arrow ↔ pandas conversions cost, against the perception they carry, measured in one run.

A perception is built in pandas (engine/perception.py), crosses from a worker
process as Arrow record batches (engine/parallel.py), becomes pandas again for
weighing, and is written to the cache as Parquet (engine/cache.py). Keeping the
tables in Arrow end to end would remove the conversions — this script measures
whether that would be worth anything: it perceives N distinct generated
structures once (timing it), tiles that perception to M structures, and times
each conversion at M against the perception time scaled to M.

Usage: python benchmarks/bench_arrow_edges.py [--unique N] [--rows M]
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import numpy as np
import pyarrow as pa

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent))

from halosift.engine.cache import take  # noqa: E402
from halosift.engine.parallel import _from_batches  # noqa: E402
from halosift.engine.perception import ALLYLIC_SCHEMA, SITE_SCHEMA, STRUCTURE_SCHEMA, perceive  # noqa: E402
from library_gen import make_library  # noqa: E402


def _best_of(fn, repeats: int = 3) -> float:
    best = float("inf")
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--unique", type=int, default=2000, help="structures perceived (default 2000)")
    ap.add_argument("--rows", type=int, default=1_000_000, help="structures after tiling (default 1,000,000)")
    args = ap.parse_args()

    smiles = make_library(args.unique, seed=7)
    t0 = time.perf_counter()
    small = perceive(smiles)
    perceive_s = time.perf_counter() - t0
    reps = -(-args.rows // len(small.structures))
    big = take(small, np.tile(np.arange(len(small.structures)), reps)[: args.rows])
    n = len(big.structures)
    scaled = perceive_s * n / len(small.structures)
    print(f"perception: {len(small.structures):,} distinct structures in {perceive_s:.2f} s on one core "
          f"({perceive_s / len(small.structures) * 1e6:.0f} µs each); tiled to {n:,} structures, "
          f"{len(big.sites):,} site rows, {len(big.allylic):,} NBS rows")
    print(f"one core would perceive {n:,} in {scaled:.0f} s; each conversion below is timed at {n:,} (best of 3)")

    def to_arrow():
        return (pa.RecordBatch.from_pandas(big.structures, schema=STRUCTURE_SCHEMA, preserve_index=False),
                pa.RecordBatch.from_pandas(big.sites, schema=SITE_SCHEMA, preserve_index=False),
                pa.RecordBatch.from_pandas(big.allylic, schema=ALLYLIC_SCHEMA, preserve_index=False))

    batches = to_arrow()
    steps = {
        "worker: pandas → Arrow batches (to send)": to_arrow,
        "screen: Arrow batches → pandas (to weigh)": lambda: _from_batches(*batches),
        "cache: pandas → Arrow table (to write Parquet)": lambda: [
            pa.Table.from_pandas(f, preserve_index=False) for f in (big.structures, big.sites, big.allylic)],
    }
    total = 0.0
    for name, fn in steps.items():
        s = _best_of(fn)
        total += s
        print(f"  {name:<48} {s:6.2f} s  ({s / scaled * 100:.2f} % of perception)")
    print(f"all conversions: {total:.2f} s, {total / scaled * 100:.2f} % of the perception they carry, "
          f"{total / 120 * 100:.1f} % of the 2-minute budget for 1,000,000 new structures "
          "(an all-Arrow design could remove at most this; weighing reads numpy arrays of the pandas tables)")


if __name__ == "__main__":
    main()
