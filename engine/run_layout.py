"""How the site table is laid out for weighing: runs of equal-share products, blocks and slices.

Consecutive products of one structure with the same site class and H count always
share equally, so each such run is weighed once; structures are laid out in blocks
with equally many runs (engine.shares.blocks_by_length) so per-structure sums are
whole-array passes. Program layout only: nothing here changes a result.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: Runs per slice of a block in the per-reagent pass: sized so that the temporaries of a pass stay
#: in cache and are reused from one pass to the next (tuning only).
_SLICE_RUNS = 1 << 18


def run_starts(struct: np.ndarray) -> np.ndarray:
    """Start index of each run of equal ``struct`` (sites are grouped by structure)."""
    if len(struct) == 0:
        return np.zeros(0, dtype=np.int64)
    return np.flatnonzero(np.r_[True, struct[1:] != struct[:-1]])


@dataclass(frozen=True)
class Block:
    """Structures with equally many runs: one column per structure, one row per run (in site-table order)."""

    struct: np.ndarray
    """Structure rows, one per column."""
    code: np.ndarray
    """Site code of each run."""
    h: np.ndarray
    """H count of each product of the run."""
    count: np.ndarray
    """Products in the run."""
    first: np.ndarray
    """Site-table row of the run's first product."""

    def slices(self) -> list[Block]:
        """Column slices of about :data:`_SLICE_RUNS` runs each (views)."""
        width, m = self.code.shape
        step = max(1, _SLICE_RUNS // width)
        return [
            Block(self.struct[i : i + step], self.code[:, i : i + step], self.h[:, i : i + step],
                   self.count[:, i : i + step], self.first[:, i : i + step])
            for i in range(0, m, step)
        ]


def runs(struct: np.ndarray, codes: np.ndarray, h: np.ndarray) -> np.ndarray:
    """First row of each run of rows with equal structure, site code and H count."""
    if len(struct) == 0:
        return np.zeros(0, dtype=np.int64)
    change = np.empty(len(struct), dtype=bool)
    change[0] = True
    np.not_equal(struct[1:], struct[:-1], out=change[1:])
    change[1:] |= codes[1:] != codes[:-1]
    change[1:] |= h[1:] != h[:-1]
    return np.flatnonzero(change)


def chunk_bounds(struct: np.ndarray, size: int) -> list[int]:
    """Row bounds of consecutive chunks of about ``size`` rows, each cut between two structures."""
    bounds = [0]
    while bounds[-1] + size < len(struct):
        cut = bounds[-1] + size
        while cut < len(struct) and struct[cut] == struct[cut - 1]:
            cut += 1
        bounds.append(cut)
    if bounds[-1] < len(struct):
        bounds.append(len(struct))
    return bounds
