"""Opening libraries: a file by its extension, or an in-memory DataFrame."""

from __future__ import annotations

import os
import stat
from collections.abc import Iterator
from pathlib import Path

import pandas as pd
from pandas.api.types import is_object_dtype, is_string_dtype

from .columns import choose
from .delimited import open_delimited
from .errors import LibraryError
from .formats import INPUT_FORMATS, split_format
from .parquet import open_parquet
from .sdf import open_sdf
from .smi import open_smi
from .source import LibrarySource, RawBatch, structure_cells


def not_regular(mode: int) -> str | None:
    """What a file of this st_mode is when it is not a regular file ("a named pipe (FIFO)" ...), else None.

    A library or ID list is read twice over (checked, then streamed) and must end: a pipe
    would block until something writes to it, and a device may never end.
    """
    if stat.S_ISREG(mode):
        return None
    if stat.S_ISDIR(mode):
        return "a directory"
    if stat.S_ISFIFO(mode):
        return "a named pipe (FIFO)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def _check_readable(path: Path) -> None:
    """Raise LibraryError unless path is an existing, readable regular file."""
    try:
        # stat first: opening a named pipe would wait, silently, for a writer.
        kind = not_regular(path.stat().st_mode)
        if kind == "a directory":
            raise LibraryError(f"{path} is a directory")
        if kind is not None:
            raise LibraryError(f"{path} is {kind}, not a regular file; save the library to a file first")
        with open(path, "rb"):
            pass
    except FileNotFoundError:
        raise LibraryError(f"no such file: {path}") from None
    except PermissionError:
        raise LibraryError(f"permission denied: {path}") from None
    except OSError as exc:
        raise LibraryError(f"cannot read {path}: {exc.strerror or exc}") from None


def open_library(
    path: str | os.PathLike[str], *, smiles_column: str | None = None, id_column: str | None = None
) -> LibrarySource:
    """Open and check a library file so problems surface before any work starts.

    The format comes from the extension (case-insensitive; CSV, TSV, SMI and SDF
    may be gzipped, e.g. lib.csv.gz). The SMILES and ID columns are found by name
    unless given (a given name must exist; case may differ). Whole-file problems
    raise LibraryError with a one-line message.
    """
    path = Path(path).expanduser()
    _check_readable(path)
    fmt, gzipped = split_format(path, INPUT_FORMATS)
    if fmt in ("csv", "tsv"):
        return open_delimited(path, fmt, gzipped, smiles_column, id_column)
    if fmt == "smi":
        return open_smi(path, gzipped, smiles_column, id_column)
    if fmt == "sdf":
        return open_sdf(path, gzipped, smiles_column, id_column)
    return open_parquet(path, smiles_column, id_column)


def open_frame(
    frame: pd.DataFrame, *, smiles_column: str | None = None, id_column: str | None = None
) -> LibrarySource:
    """A source over an in-memory DataFrame (format "frame", path None); dtypes are kept.

    The frame is not copied: do not change it while batches are being read.
    """
    if not isinstance(frame, pd.DataFrame):
        raise LibraryError(f"expected a pandas DataFrame, got {type(frame).__name__}")
    columns = list(frame.columns)
    if len(set(columns)) != len(columns):
        dupes = sorted({str(c) for c in columns if columns.count(c) > 1})
        raise LibraryError(f"the DataFrame has repeated column names: {', '.join(dupes)}")
    smiles, ident = choose(columns, "the DataFrame", smiles_column, id_column, hint="pass smiles_column=")
    dtype = frame[smiles].dtype
    if not (is_object_dtype(dtype) or is_string_dtype(dtype) or isinstance(dtype, pd.CategoricalDtype)):
        raise LibraryError(f"column {smiles!r} of the DataFrame holds {dtype} values, not SMILES text")

    def read(batch_rows: int) -> Iterator[RawBatch]:
        for start in range(0, len(frame), batch_rows):
            part = frame.iloc[start : start + batch_rows].reset_index(drop=True)
            cells, errors = structure_cells(part[smiles].tolist())
            yield RawBatch(start_row=start, frame=part, smiles=cells, row_errors=errors)

    return LibrarySource(
        path=None,
        format="frame",
        columns=tuple(columns),
        smiles_column=smiles,
        id_column=ident,
        total_rows=len(frame),
        _read=read,
    )
