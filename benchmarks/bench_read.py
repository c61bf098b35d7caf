"""Reading a 1,000,000-row CSV: the Arrow fast path against the careful per-row reader, in one run.

    python benchmarks/bench_read.py [--rows N]

Prints each reader's time to open the file and stream every batch (what a
screen does before any chemistry), and their ratio. The file is generated in
a temporary folder: invented catalogue IDs and SMILES of small alkanes.
"""

from __future__ import annotations

import argparse
import random
import statistics
import tempfile
import time
from pathlib import Path

import halosift.engine.io.delimited as delimited
from halosift.engine.io import open_library


def _write(path: Path, rows: int) -> None:
    rng = random.Random(3)
    shapes = ["CCC", "CC(C)C", "CCCC", "C1CCCCC1", "CC(C)(C)C", "CCC(C)CC", "C1CC1C", "CCCCCCC"]
    with open(path, "w") as out:
        out.write("catalogue_id,smiles\n")
        for i in range(rows):
            out.write(f"WS-{i:07d},{rng.choice(shapes)}\n")


def _read(path: Path) -> float:
    start = time.perf_counter()
    source = open_library(path)
    n = sum(len(batch) for batch in source.iter_batches())
    elapsed = time.perf_counter() - start
    assert n > 0
    return elapsed


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=1_000_000)
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "catalogue.csv"
        _write(path, args.rows)
        fast, careful = [], []
        real = delimited.read_fast
        for _ in range(args.repeats):  # alternate, so drift in machine speed hits both alike
            delimited.read_fast = real
            fast.append(_read(path))
            delimited.read_fast = lambda data, delimiter: None
            careful.append(_read(path))
        delimited.read_fast = real
    f, c = statistics.median(fast), statistics.median(careful)
    print(f"CSV read, {args.rows:,} rows x 2 columns, open + stream every batch, median of {args.repeats}")
    print(f"  fast path (pyarrow.csv)  {f:6.2f} s   runs {', '.join(f'{t:.2f}' for t in fast)}")
    print(f"  careful reader           {c:6.2f} s   runs {', '.join(f'{t:.2f}' for t in careful)}")
    print(f"  careful / fast           {c / f:6.1f}x")


if __name__ == "__main__":
    main()
