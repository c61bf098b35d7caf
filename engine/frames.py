"""Typed tables from Python rows: a value that does not fit its column raises, it never wraps round."""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np
import pandas as pd


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
    return frame.astype(dict(types))
