"""What an exported file carries besides its rows: the metadata keys and the rounding of percentages.

Every format writes the same key/value pairs, made by :func:`file_metadata`: the
Parquet schema metadata, the first record of an SD file, and the ``.about.txt``
sidecar beside a CSV/TSV. Callers name keys without a namespace (``version``,
``conditions``, ...); the namespace is added here and only here, so no writer can
double it (a key that arrives already prefixed is refused).
"""

from __future__ import annotations

import re
from collections.abc import Mapping

import numpy as np
import pandas as pd
from halosift.engine.outcomes import PCT_DECIMALS  # exports round as outcomes decide
from pandas.api.types import is_float_dtype

METADATA_PREFIX = "halosift_"
"""Namespace of every metadata key in every exported file (e.g. ``halosift_version``)."""


PCT_PRECISION = (
    "percentages (the result columns ending _pct) are rounded to the nearest 0.1 percentage point; the model's "
    "unrounded shares are not written; outcomes, verdicts and serves are decided on these rounded shares, so a "
    "share written as 90.0 is clean at a 90 % threshold"
)
"""The rounding rule, as every exported file states it (key ``halosift_percent_precision``)."""

_KEY = re.compile(r"[a-z][a-z0-9_]*")


def file_metadata(metadata: Mapping[str, object]) -> dict[str, str]:
    """The key/value pairs a file records: each key becomes ``halosift_<key>``, each value text.

    Raises ValueError for a key that already starts with the namespace (it would be
    doubled, as ``halosift_halosift_version`` once was) or is not lower-case
    letters, digits and underscores (it must survive as an SDF property name).
    """
    out: dict[str, str] = {}
    for key, value in metadata.items():
        key = str(key)
        if key.startswith(METADATA_PREFIX):
            raise ValueError(f"metadata key {key!r} already carries the {METADATA_PREFIX!r} namespace")
        if not _KEY.fullmatch(key):
            raise ValueError(f"metadata key {key!r} must be lower-case letters, digits and underscores")
        out[METADATA_PREFIX + key] = str(value)
    return out


def percent_columns(columns: list[object]) -> list[object]:
    """The columns of a screen's result that hold percentages (RESULT_COLUMNS ending in ``_pct``).

    Input columns keep their values: a clashing input column is renamed ``input_<name>``
    by the screen, so a column bearing a result name is the result's.
    """
    from halosift.engine.library import RESULT_COLUMNS  # lazily: the library module imports this package

    pct = {c for c in RESULT_COLUMNS if c.endswith("_pct")}
    return [c for c in columns if c in pct]


def round_percentages(frame: pd.DataFrame) -> pd.DataFrame:
    """``frame`` with its result percentages rounded to :data:`PCT_DECIMALS` (copied only if one changes)."""
    wanted = set(percent_columns(list(frame.columns)))
    out = frame
    for position, column in enumerate(frame.columns):
        if column not in wanted:
            continue
        series = frame.iloc[:, position]
        if not is_float_dtype(series.dtype):
            continue
        rounded = np.round(series.to_numpy(dtype=float), PCT_DECIMALS)
        if out is frame:
            out = frame.copy()
        out.iloc[:, position] = rounded
    return out
