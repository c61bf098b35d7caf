"""Turning text columns that hold only numbers into numeric columns."""

from __future__ import annotations

import re
from collections.abc import Hashable, Iterable

import pandas as pd
from pandas.api.types import is_object_dtype, is_string_dtype

# Text that looks numeric but is a code, not a quantity: leading zeros ("007")
# would be lost, and 16+ digit integers do not survive float64.
_CODE_LIKE = r"^[+-]?(?:0\d|\d{16,})"
_INTEGER = r"^[+-]?\d+$"
_FLOAT_SPELLINGS = re.compile(r"^[+-]?(?:nan|inf|infinity)$", re.IGNORECASE)


def settle_types(frame: pd.DataFrame, keep: Iterable[Hashable] = ()) -> pd.DataFrame:
    """Copy of a frame of text cells with fully numeric columns converted to numbers.

    A column converts when it has at least one non-empty cell and every non-empty
    cell parses as a number; empty cells then become missing (NaN, or <NA> in an
    integer column, which becomes pandas' nullable Int64). Columns in keep, and
    columns holding codes with leading zeros or 16+ digit integers, stay text.
    Missing cells in the text columns that stay become "".
    """
    keep = set(keep)
    out = {}
    for column in frame.columns:
        series = frame[column]
        if not (is_object_dtype(series.dtype) or is_string_dtype(series.dtype)):
            out[column] = series
            continue
        text = series.fillna("").astype(str)
        converted = None if column in keep else _as_numeric(text)
        out[column] = text if converted is None else converted
    result = pd.DataFrame(out, index=frame.index)
    result.columns = frame.columns
    return result


def _as_numeric(text: pd.Series) -> pd.Series | None:
    """The column as numbers, or None when some non-empty cell is not a plain number."""
    stripped = text.str.strip()
    present = stripped != ""
    if not present.any():
        return None
    values = stripped[present]
    if values.str.match(_CODE_LIKE).any() or values.str.match(_FLOAT_SPELLINGS).any():
        return None
    numbers = pd.to_numeric(values, errors="coerce")
    if numbers.isna().any():
        return None
    if present.all():
        # pd.to_numeric already chose int64 or float64 for a complete column.
        return pd.Series(numbers.to_numpy(), index=text.index)
    if values.str.match(_INTEGER).all():
        result = pd.Series(pd.NA, index=text.index, dtype="Int64")
    else:
        result = pd.Series(float("nan"), index=text.index, dtype="float64")
    result[present] = numbers.to_numpy()
    return result
