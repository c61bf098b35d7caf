"""The opened-library handle and the batches it streams."""

from __future__ import annotations

import math
from collections.abc import Callable, Hashable, Iterable, Iterator
from dataclasses import dataclass, field
from pathlib import Path

import pandas as pd

from .coerce import settle_types
from .formats import TEXT_FORMATS


@dataclass(frozen=True)
class RawBatch:
    """A run of consecutive input rows, as read, before any chemistry."""

    start_row: int
    """0-based input row number of the first row in this batch."""

    frame: pd.DataFrame
    """The input columns for these rows (RangeIndex from 0). Parquet and DataFrame
    sources keep their dtypes; text formats (CSV, TSV, SMI, SDF) hold str cells,
    "" when empty - use LibrarySource.settle_types() on the concatenated frame
    to turn fully numeric columns into numbers."""

    smiles: list[str | None]
    """Per row: the structure text (stripped), or None when the row has no usable
    structure text - empty cell, unreadable row, or any row whose row_errors entry
    is set."""

    row_errors: list[str]
    """Per row: "" when the row was read cleanly, else a one-line reason (ragged line,
    undecodable bytes, unreadable molblock...). A row with a reason has smiles None."""

    def __len__(self) -> int:
        return len(self.smiles)


@dataclass(frozen=True)
class LibrarySource:
    """An opened library file (or DataFrame): checked, with columns known, ready to stream."""

    path: Path | None
    """The file, or None for a DataFrame source."""

    format: str
    """"csv", "tsv", "parquet", "smi", "sdf", or "frame" for a DataFrame."""

    columns: tuple[Hashable, ...]
    """Input columns in file order (str for files; a DataFrame's own labels). For SDF these come from the first record; a property
    first seen later is appended as a new column in the batches from then on."""

    smiles_column: Hashable
    """The column the structure text is taken from."""

    id_column: Hashable | None
    """The column of compound identifiers, or None when there is none."""

    total_rows: int | None
    """Row count when cheaply known (Parquet metadata, DataFrame length), else None."""

    _read: Callable[[int], Iterator[RawBatch]] = field(repr=False, compare=False)
    """Format-specific batch reader taking the batch size (internal)."""

    def iter_batches(self, batch_rows: int = 50_000) -> Iterator[RawBatch]:
        """Stream the rows in order, batch_rows at a time (the last batch may be shorter).

        Each call starts again from the first row. Damage found only part-way
        (a truncated gzip stream, a corrupt Parquet page) raises LibraryError.
        """
        if batch_rows < 1:
            raise ValueError("batch_rows must be at least 1")
        return self._read(batch_rows)

    def settle_types(self, frame: pd.DataFrame) -> pd.DataFrame:
        """Give a text-format frame its numeric columns (a no-op for Parquet and DataFrames).

        Apply this once to the concatenated batches: a column becomes numeric only when
        every non-empty cell in the whole file parses as a number, and deciding that batch
        by batch would give one column different dtypes in different batches. The SMILES
        and ID columns always stay text. Cells missing because a later SDF batch added a
        column become "".
        """
        if self.format not in TEXT_FORMATS:
            return frame
        keep = [c for c in (self.smiles_column, self.id_column) if c is not None]
        return settle_types(frame, keep=keep)

    def read_all(self, batch_rows: int = 50_000) -> RawBatch:
        """The whole library as one batch, with settle_types() applied (for small inputs and notebooks)."""
        return concat_batches(self, self.iter_batches(batch_rows))


def concat_batches(source: LibrarySource, batches: Iterable[RawBatch]) -> RawBatch:
    """Join consecutive batches of one source into a single batch with settled types."""
    batches = list(batches)
    frames = [b.frame for b in batches]
    if frames:
        frame = pd.concat(frames, ignore_index=True) if len(frames) > 1 else frames[0]
    else:
        frame = pd.DataFrame({c: pd.Series([], dtype=str) for c in source.columns})
    frame = source.settle_types(frame)
    smiles = [s for b in batches for s in b.smiles]
    errors = [e for b in batches for e in b.row_errors]
    return RawBatch(start_row=0, frame=frame, smiles=smiles, row_errors=errors)


def structure_cells(values: Iterable[object]) -> tuple[list[str | None], list[str]]:
    """(smiles, row_errors) for the raw cells of a SMILES column from a typed source.

    Text is stripped and "" becomes None; missing cells give None without an
    error; anything else (a number in the SMILES column) gives None with a reason.
    """
    smiles: list[str | None] = []
    errors: list[str] = []
    for value in values:
        if isinstance(value, str):
            value = value.strip()
            smiles.append(value or None)
            errors.append("")
        elif _is_missing(value):
            smiles.append(None)
            errors.append("")
        else:
            smiles.append(None)
            errors.append(f"SMILES cell holds a {type(value).__name__}, not text")
    return smiles, errors


def _is_missing(value: object) -> bool:
    """True for None, NaN, pd.NA, NaT."""
    if value is None or value is pd.NA or value is pd.NaT:
        return True
    return isinstance(value, float) and math.isnan(value)
