"""CSV and TSV: streaming reader that accounts for every line, and the writer."""

from __future__ import annotations

import csv
import re
from collections.abc import Iterator
from pathlib import Path
from typing import TextIO

import pandas as pd
import pyarrow as pa
from pandas.api.types import is_object_dtype, is_string_dtype

from .columns import choose, unique_names
from .errors import LibraryError
from .fastcsv import read_fast
from .source import LibrarySource, RawBatch
from .textfile import (
    _PROBE_BYTES,
    UNDECODABLE,
    MarkedLines,
    encoding_of,
    open_output_text,
    read_bytes,
    read_errors,
    text_of,
)

UNBALANCED_QUOTE = "unbalanced quote in row"
"""row_errors text for the line where a quoted field opened and never closed cleanly."""


class _Rows:
    """Parses delimited text into a header and data rows padded or cut to the header's width.

    Blank lines are not rows. A record that spans several physical lines and either
    lacks the header's field count or leaves a quote open (or closes one oddly) is
    taken to be a stray quote swallowing the lines after it: each of its lines is
    re-read as a row of its own, the first marked "unbalanced quote in row".
    """

    def __init__(self, text: TextIO, delimiter: str) -> None:
        self._lines = MarkedLines(text)
        # strict: a quote left open to the end of the file is an error rather than
        # one giant field, so the lines it swallowed can be re-read as rows.
        self._reader = csv.reader(iter(self._lines), delimiter=delimiter, strict=True)
        self._delimiter = delimiter
        self._prev = 0  # number of the last physical line already turned into rows
        self.header: list[str] | None = None
        self._pending: list[tuple[list[str], str]] = []
        self._rows = self._generate()

    def read_header(self) -> list[str] | None:
        """The header fields (None for a file of blank lines); call before iterating."""
        try:
            self._pending.append(next(self._rows))
        except StopIteration:
            pass
        return self.header

    def __iter__(self) -> Iterator[tuple[list[str], str]]:
        """(fields, error) per data row; error is "" for a clean row."""
        while self._pending:
            yield self._pending.pop(0)
        yield from self._rows

    def _generate(self) -> Iterator[tuple[list[str], str]]:
        reader, lines = self._reader, self._lines
        width = -1  # no header yet: matches no row, so every record takes the slow path
        while True:
            try:
                for fields in reader:
                    end = reader.line_num
                    if end - self._prev == 1 and not lines.bad and len(fields) == width:
                        self._prev = end  # the common case: one clean line
                        yield fields, ""
                        continue
                    if not fields:  # a blank line
                        lines.claim_bad(self._prev + 1, end)
                        self._prev = end
                        continue
                    if self.header is None:
                        lines.claim_bad(self._prev + 1, end)
                        self._prev = end
                        self.header = fields
                        width = len(fields)
                        continue
                    if end - self._prev > 1 and len(fields) != width:
                        yield from self._resplit(end, UNBALANCED_QUOTE, width)
                        continue
                    bad = lines.claim_bad(self._prev + 1, end)
                    self._prev = end
                    yield self._fit(fields, width, bad)
                return
            except csv.Error as exc:
                end = max(reader.line_num, self._prev + 1)
                if end - self._prev == 1:
                    # A one-line quirk (text after a closing quote): read it leniently.
                    line = lines.line(end)
                    fields = self._single(line) if line is not None else []
                    if self.header is None:
                        lines.claim_bad(self._prev + 1, end)
                        self._prev = end
                        self.header, width = fields, len(fields)
                        continue
                    bad = lines.claim_bad(self._prev + 1, end)
                    self._prev = end
                    yield self._fit(fields, width, bad)
                    continue
                if self.header is None:
                    raise LibraryError(f"the header line cannot be read ({exc})") from None
                quote = "end of data" in str(exc) or "expected after" in str(exc)
                yield from self._resplit(end, UNBALANCED_QUOTE if quote else f"unreadable row ({exc})", width)

    def _resplit(self, end: int, first_error: str, width: int) -> Iterator[tuple[list[str], str]]:
        """Rows for physical lines prev+1..end read one by one; the first carries first_error."""
        bad_lines = set(self._lines.claim_bad_lines(self._prev + 1, end))
        for number in range(self._prev + 1, end + 1):
            line = self._lines.line(number)
            first = number == self._prev + 1
            if line is None:  # no longer held; still account for the row
                fields, error = [], "row could not be re-read"
            else:
                if not line.strip() and not first:
                    continue
                fields, error = self._single(line), ""
            fields, fit_error = self._fit(fields, width, number in bad_lines)
            reasons = [r for r in (first_error if first else "", error, fit_error) if r]
            yield fields, "; ".join(reasons)
        self._prev = end

    def _single(self, line: str) -> list[str]:
        """Fields of one physical line on its own."""
        try:
            return next(csv.reader([line], delimiter=self._delimiter, strict=False), [])
        except csv.Error:
            return line.rstrip("\r\n").split(self._delimiter)

    @staticmethod
    def _fit(fields: list[str], width: int, bad: bool) -> tuple[list[str], str]:
        """Fields padded with "" or cut to width, and the row's error text."""
        reasons = []
        if len(fields) != width:
            reasons.append(f"row has {len(fields)} fields, header has {width}")
            fields = (fields + [""] * width)[:width]
        if bad:
            reasons.append(UNDECODABLE)
        return fields, "; ".join(reasons)


def _sniff_delimiter(header_line: str, fmt: str) -> str:
    """Tab for TSV; for CSV a comma unless the header has none but has semicolons or tabs."""
    if fmt == "tsv":
        return "\t"
    if "," not in header_line:
        for other in (";", "\t"):
            if other in header_line:
                return other
    return ","


def open_delimited(
    path: Path, fmt: str, gzipped: bool, smiles_column: str | None, id_column: str | None
) -> LibrarySource:
    """Check a CSV/TSV file (encoding, header, at least one row) and return its source.

    The file is opened once: its bytes are read whole, offered to Arrow's parser
    (:mod:`halosift.engine.io.fastcsv`) and, when that declines, streamed from memory by the
    careful reader.
    """
    data = read_bytes(path, gzipped)
    encoding = encoding_of(data[:_PROBE_BYTES], path)
    with read_errors(path), text_of(data, encoding, newline="") as text:
        first_line = next((line for line in text if line.strip()), "")
    delimiter = _sniff_delimiter(first_line, fmt)
    fast = read_fast(data, delimiter) if encoding == "utf-8-sig" else None
    if fast is not None and fast.rows.num_rows:
        names = unique_names(fast.header)
        smiles, ident = choose(names, str(path), smiles_column, id_column)
        table = fast.rows.rename_columns(names)

        def read(batch_rows: int) -> Iterator[RawBatch]:
            return _fast_batches(table, names.index(smiles), batch_rows)

    else:
        with read_errors(path), text_of(data, encoding, newline="") as text:
            rows = _Rows(text, delimiter)
            header = rows.read_header()
            if header is None:
                raise LibraryError(f"{path} is empty")
            if next(iter(rows), None) is None:
                raise LibraryError(f"{path} has a header line but no rows")
        names = unique_names(header)
        smiles, ident = choose(names, str(path), smiles_column, id_column)

        def read(batch_rows: int) -> Iterator[RawBatch]:
            return _batches(path, data, encoding, delimiter, names, names.index(smiles), batch_rows)

    return LibrarySource(
        path=path,
        format=fmt,
        columns=tuple(names),
        smiles_column=smiles,
        id_column=ident,
        total_rows=fast.rows.num_rows if fast is not None and fast.rows.num_rows else None,
        _read=read,
    )


def _fast_batches(table: pa.Table, smiles_at: int, batch_rows: int) -> Iterator[RawBatch]:
    """RawBatches of batch_rows rows from a table Arrow parsed (every row clean)."""
    for start in range(0, table.num_rows, batch_rows):
        part = table.slice(start, batch_rows)
        # astype: the text dtype pd.DataFrame(rows, dtype=str) gives in the careful reader, on any pandas.
        frame = part.to_pandas().astype(str)
        smiles = [cell.strip() or None for cell in part.column(smiles_at).to_pylist()]
        yield RawBatch(start_row=start, frame=frame, smiles=smiles, row_errors=[""] * len(smiles))


def _batches(
    path: Path,
    data: bytes,
    encoding: str,
    delimiter: str,
    names: list[str],
    smiles_at: int,
    batch_rows: int,
) -> Iterator[RawBatch]:
    """Stream RawBatches of batch_rows rows through the careful reader."""
    start = 0
    rows: list[list[str]] = []
    errors: list[str] = []
    with read_errors(path), text_of(data, encoding, newline="") as text:
        parsed = _Rows(text, delimiter)
        parsed.read_header()
        for fields, error in parsed:
            rows.append(fields)
            errors.append(error)
            if len(rows) == batch_rows:
                yield _batch(start, rows, errors, names, smiles_at)
                start += len(rows)
                rows, errors = [], []
    if rows:
        yield _batch(start, rows, errors, names, smiles_at)


def _batch(start: int, rows: list[list[str]], errors: list[str], names: list[str], smiles_at: int) -> RawBatch:
    """Build one RawBatch from fitted rows."""
    frame = pd.DataFrame(rows, columns=names, dtype=str)
    smiles = [
        None if error else (row[smiles_at].strip() or None) for row, error in zip(rows, errors)
    ]
    return RawBatch(start_row=start, frame=frame, smiles=smiles, row_errors=errors)


FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")
"""A text cell beginning with one of these would be run as a formula by a spreadsheet."""

FORMULA_RULE = (
    "text cells (and column names) beginning with =, +, -, @, a tab or a carriage return are written with a "
    "leading ' so that spreadsheets show them as text rather than run them as formulas; plain numbers such as "
    "-3.5 are written unchanged; Parquet and SDF outputs keep the raw values"
)
"""The rule, as the .about.txt sidecar of a CSV/TSV output states it."""

# A plain decimal number: a spreadsheet reads it as a number, never as a formula.
_PLAIN_NUMBER = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?"
_FORMULA_START = "^[" + re.escape("".join(FORMULA_STARTS)) + "]"


def _defused_text(value: object) -> object:
    """One cell under :data:`FORMULA_RULE` (anything but text is left alone)."""
    if isinstance(value, str) and value.startswith(FORMULA_STARTS) and not re.fullmatch(_PLAIN_NUMBER, value):
        return "'" + value
    return value


def defuse_formulas(frame: pd.DataFrame) -> pd.DataFrame:
    """``frame`` with text cells and column names that a spreadsheet would run as formulas prefixed with '.

    Only text columns are looked at, and only cells that start with one of
    :data:`FORMULA_STARTS` and are not plain numbers change; numeric columns are
    written as numbers. The frame is copied only when something changes.
    """
    out = frame
    for position in range(frame.shape[1]):
        column = frame.iloc[:, position]
        if not (is_object_dtype(column.dtype) or is_string_dtype(column.dtype)):
            continue
        try:
            risky = column.str.contains(_FORMULA_START, regex=True, na=False)
        except (AttributeError, TypeError):  # object column of bytes, lists, … (.str refuses it): cell by cell
            risky = column.map(lambda v: _defused_text(v) is not v).astype(bool)
        if not risky.any():
            continue
        if out is frame:
            out = frame.copy()
        fixed = column[risky].map(_defused_text)
        out.iloc[:, position] = column.astype(object).where(~risky, fixed)
    names = [_defused_text(c) for c in frame.columns]
    if names != list(frame.columns):
        out = out.set_axis(names, axis=1) if out is not frame else frame.set_axis(names, axis=1)
    return out


def write_delimited(frame: pd.DataFrame, target: Path, fmt: str, gzipped: bool) -> None:
    """Write frame as a plain CSV/TSV (header row, then data; UTF-8; "" for missing), formulas defused.

    See :data:`FORMULA_RULE`: a supplier's ID such as ``=HYPERLINK(...)`` must not run when
    a chemist opens the result in a spreadsheet.
    """
    frame = defuse_formulas(frame)
    # The csv writer quotes a field only for the characters of its line end, and a bare CR
    # left unquoted would split the row when read back: when a cell holds one, lines end in CRLF.
    ending = "\r\n" if _holds_cr(frame) else "\n"
    with open_output_text(target, gzipped) as out:
        frame.to_csv(out, sep="\t" if fmt == "tsv" else ",", index=False, lineterminator=ending)


def _holds_cr(frame: pd.DataFrame) -> bool:
    """True when a text cell or a column name contains a carriage return."""
    if any("\r" in str(c) for c in frame.columns):
        return True
    for position in range(frame.shape[1]):
        column = frame.iloc[:, position]
        if is_object_dtype(column.dtype) or is_string_dtype(column.dtype):
            try:
                if column.str.contains("\r", regex=False, na=False).any():
                    return True
            except (AttributeError, TypeError):  # bytes, lists, …: as the csv writer will print each cell
                if column.map(lambda v: "\r" in str(v)).any():
                    return True
    return False
