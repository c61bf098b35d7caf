"""Parquet: streaming reader keeping the stored types, and the writer."""

from __future__ import annotations

from collections.abc import Iterator, Mapping
from pathlib import Path

import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq
from pandas.api.types import is_object_dtype

from .columns import choose
from .errors import LibraryError
from .source import LibrarySource, RawBatch, structure_cells
from .textfile import read_errors


def _reason(exc: BaseException) -> str:
    """pyarrow's message cut to its first sentence, for a one-line error."""
    text = " ".join(str(exc).split()) or type(exc).__name__
    first = text.split(". ")[0].rstrip(".")
    return first if len(first) <= 120 else first[:117] + "..."


def _is_text(kind: pa.DataType) -> bool:
    """True for Arrow types that can hold SMILES text (or nothing at all)."""
    if pa.types.is_dictionary(kind):
        kind = kind.value_type
    return (
        pa.types.is_string(kind)
        or pa.types.is_large_string(kind)
        or getattr(pa.types, "is_string_view", lambda _: False)(kind)
        or pa.types.is_null(kind)
    )


def _data_columns(schema: pa.Schema) -> list[str]:
    """Column names without the index columns pandas may have stored."""
    meta = schema.pandas_metadata or {}
    stored_index = {c for c in meta.get("index_columns", []) if isinstance(c, str)}
    return [name for name in schema.names if name not in stored_index]


def open_parquet(path: Path, smiles_column: str | None, id_column: str | None) -> LibrarySource:
    """Check a Parquet file (footer, SMILES column type, rows) and return its source."""
    with read_errors(path):
        if path.stat().st_size == 0:
            raise LibraryError(f"{path} is empty")
        try:
            with pq.ParquetFile(path) as handle:
                schema = handle.schema_arrow
                total = handle.metadata.num_rows
        except pa.ArrowException as exc:
            raise LibraryError(f"{path} is not a readable Parquet file ({_reason(exc)})") from None
    columns = _data_columns(schema)
    repeated = sorted({c for c in columns if columns.count(c) > 1})
    if repeated:
        # Arrow can store two columns of one name, but neither can be picked out by it.
        raise LibraryError(f"{path} has repeated column names: {', '.join(repeated)}")
    smiles, ident = choose(columns, str(path), smiles_column, id_column)
    kind = schema.field(smiles).type
    if not _is_text(kind):
        raise LibraryError(f"column {smiles!r} in {path} holds {kind} values, not SMILES text")
    if total == 0:
        raise LibraryError(f"{path} has no rows")

    def read(batch_rows: int) -> Iterator[RawBatch]:
        start = 0
        with read_errors(path):
            try:
                with pq.ParquetFile(path) as handle:
                    for record_batch in handle.iter_batches(batch_size=batch_rows, columns=columns):
                        frame = record_batch.to_pandas().reset_index(drop=True)
                        cells, errors = structure_cells(frame[smiles].tolist())
                        yield RawBatch(start_row=start, frame=frame, smiles=cells, row_errors=errors)
                        start += len(frame)
            except pa.ArrowException as exc:
                raise LibraryError(f"{path} is damaged ({_reason(exc)})") from None

    return LibrarySource(
        path=path,
        format="parquet",
        columns=tuple(columns),
        smiles_column=smiles,
        id_column=ident,
        total_rows=total,
        _read=read,
    )


def _text_or_null(value: object) -> str | None:
    """str(value), keeping missing values missing."""
    if value is None or value is pd.NA or value is pd.NaT:
        return None
    if isinstance(value, float) and value != value:  # NaN
        return None
    return str(value)


def to_arrow(frame: pd.DataFrame, metadata: Mapping[str, str]) -> pa.Table:
    """Arrow table for frame with its dtypes kept; object columns Arrow cannot type
    (mixed kinds) become strings. metadata joins pandas' own schema metadata."""
    if "pandas" in metadata:
        raise ValueError("metadata key 'pandas' is reserved by pandas")
    fixed = {}
    for position, column in enumerate(frame.columns):
        series = frame.iloc[:, position]
        if is_object_dtype(series.dtype):
            try:
                pa.array(series, from_pandas=True)
            except (pa.ArrowInvalid, pa.ArrowTypeError, pa.ArrowNotImplementedError):
                series = series.map(_text_or_null).astype(object)
        fixed[str(column)] = series.reset_index(drop=True)
    if len(fixed) != len(frame.columns):
        raise ValueError("column names must be unique (after str()) to write Parquet")
    table = pa.Table.from_pandas(pd.DataFrame(fixed), preserve_index=False)
    merged = dict(table.schema.metadata or {})
    merged.update({str(k).encode("utf-8"): str(v).encode("utf-8") for k, v in metadata.items()})
    return table.replace_schema_metadata(merged)


def write_parquet(frame: pd.DataFrame, target: Path, metadata: Mapping[str, str]) -> None:
    """Write frame as Parquet with metadata in the schema's key/value metadata."""
    pq.write_table(to_arrow(frame, metadata), target)
