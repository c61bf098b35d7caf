"""The app's library-view filters on a 1,000,000-row evaluated frame: the older filters against all of them, in one run.

    python benchmarks/bench_filters.py [--rows N]

A small invented library is screened once and its evaluated frame tiled to N
rows (so every column has the engine's own dtypes), then halosift.tui.filters
.filter_mask runs with (a) verdict + Br2 minimum + site types, and (b) those
plus flags has/lacks, two reagents' outcomes, confidence and duplicates.
Prints the median of five runs of each and their ratio.
"""

from __future__ import annotations

import argparse
import statistics
import time

import pandas as pd
from halosift.tui.filters import FilterSpec, filter_mask

from halosift import engine

SMILES = ["CCC", "CC(C)C", "CCCC", "C1CCCCC1", "CC1CC1", "CC1=CCCCC1", "CCc1ccccc1", "CCC(C)CC", "C(C)C", "O"]


def _frame(rows: int) -> pd.DataFrame:
    small = engine.load_library(pd.DataFrame({"smiles": SMILES}), use_cache=False).evaluate(engine.Conditions())
    reps = -(-rows // len(small))
    return pd.concat([small] * reps, ignore_index=True).iloc[:rows]


def _median(frame: pd.DataFrame, spec: FilterSpec) -> tuple[float, int]:
    times, kept = [], 0
    for _ in range(5):
        start = time.perf_counter()
        kept = int(filter_mask(frame, spec).sum())
        times.append(time.perf_counter() - start)
    return statistics.median(times), kept


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=1_000_000)
    rows = parser.parse_args().rows
    frame = _frame(rows)
    older = FilterSpec(verdicts=frozenset({"selective", "by-symmetry"}), min_br2_pct=50.0,
                       site_types=frozenset({"primary", "secondary"}))
    every = FilterSpec(verdicts=older.verdicts, min_br2_pct=older.min_br2_pct, site_types=older.site_types,
                       flags_has=frozenset(), flags_lacks=frozenset({"alkene", "cyclopropane"}),
                       outcomes=frozenset({("br2", "clean"), ("cl2", "clean"), ("cl2", "mixture")}),
                       confidence=frozenset({"measured", "textbook", "estimate"}), duplicates="hide")
    t_old, n_old = _median(frame, older)
    t_all, n_all = _median(frame, every)
    print(f"rows {rows:,}")
    print(f"older filters: {t_old * 1000:8.1f} ms  ({n_old:,} rows kept)")
    print(f"every filter:  {t_all * 1000:8.1f} ms  ({n_all:,} rows kept)")
    print(f"ratio every/older: {t_all / t_old:.2f}")


if __name__ == "__main__":
    main()
