"""Per-structure shares of per-row weights, and per-structure blocks for reductions over few rows each.

The normalisation here is the one every reagent's split uses. Also the checked cast that
turns per-structure rows into the typed tables these work on.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np
import pandas as pd


def percent_of_structure(weights: np.ndarray, struct: np.ndarray, n_struct: int) -> np.ndarray:
    """Each row's weight as a percent of its structure's total (0 where the total is 0)."""
    totals = np.bincount(struct, weights=weights, minlength=n_struct)
    out = totals[struct] if len(struct) else np.zeros(0)
    # In place, one array: this runs on every row of a library at each re-weighing.
    # Divide first: 100·w/total can round to 99.99999999999999 for a lone product.
    np.divide(weights, out, out=out, where=out > 0)  # a total of 0 stays 0
    out *= 100.0
    return out


def blocks_by_length(starts: np.ndarray, lengths: np.ndarray) -> list[tuple[np.ndarray, np.ndarray]]:
    """Segments (``lengths[j]`` entries from ``starts[j]``) grouped by length; empty segments left out.

    Per distinct length L: the segment numbers (ascending) and an (L, m) matrix of
    their entries' positions, one column per segment. Gathered this way, a
    per-segment reduction is a reduction along axis 0 of a dense array, done in
    whole-array passes; ``np.add.reduceat`` steps once per segment, which costs
    more than the arithmetic when segments hold a few entries each.
    """
    lengths = np.asarray(lengths)
    if len(lengths) == 0:
        return []
    top = int(lengths.max())
    # A stable sort of small integers is a radix sort in numpy: keys narrowed when they fit.
    keys = lengths.astype(np.int16) if top < 2**15 else lengths
    order = np.argsort(keys, kind="stable")
    cuts = np.flatnonzero(np.diff(lengths[order])) + 1
    out = []
    for group in np.split(order, cuts):
        width = int(lengths[group[0]])
        if width:
            out.append((group, np.asarray(starts)[group][None, :] + np.arange(width)[:, None]))
    return out


def cast_checked(frame: pd.DataFrame, types: Mapping[str, object]) -> pd.DataFrame:
    """``frame.astype(types)``, raising OverflowError where an integer lies outside its target type.

    pandas narrows int64 to int32 by wrapping (2**40 becomes 0), which would turn one
    structure's huge count into a wrong answer rather than an error.
    """
    for column, kind in types.items():
        if kind is object or not len(frame):
            continue
        target = np.dtype(kind)  # type: ignore[call-overload]
        values = frame[column]
        if target.kind in "iu" and values.dtype.kind in "iu":
            info = np.iinfo(target)
            low, high = values.min(), values.max()
            if low < info.min or high > info.max:
                worst = high if high > info.max else low
                raise OverflowError(f"{column} holds {worst}, beyond {target}")
    return frame.astype({column: kind for column, kind in types.items()})  # type: ignore[misc]
