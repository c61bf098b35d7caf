"""The fast path for plainly well-formed CSV/TSV: one pyarrow.csv parse of the whole file.

The careful reader in :mod:`halosift.engine.io.delimited` accounts for every damaged line
(stray quotes, ragged rows, undecodable bytes) but runs Python per row. Most
catalogues are clean, so the file is first offered to Arrow's C++ parser under
conditions in which both readers are known to agree cell for cell; anything
outside them (a quote character, a lone carriage return, a ragged row, invalid
UTF-8, a blank-looking header) returns None and the careful reader takes the
file instead. A test holds the two readers to identical batches.
"""

from __future__ import annotations

from dataclasses import dataclass

import pyarrow as pa
import pyarrow.csv as pacsv

_BOM = b"\xef\xbb\xbf"
#: Parse block size: large enough that no sane line straddles two blocks (which Arrow refuses).
_BLOCK_BYTES = 1 << 24


@dataclass(frozen=True)
class FastTable:
    """A delimited file read in one pass by Arrow."""

    header: list[str]
    """The header fields exactly as written (before names are made unique)."""

    rows: pa.Table
    """Every data row, one string column per header field, in file order; blank lines are not rows."""


def _header_line(data: bytes) -> tuple[bytes, int] | None:
    """The first non-empty line and the offset just past it, or None when it is only whitespace."""
    start = 0
    while start < len(data):
        end = data.find(b"\n", start)
        stop = len(data) if end < 0 else end
        line = data[start:stop].rstrip(b"\r")
        after = len(data) if end < 0 else end + 1
        if line:
            return (line, after) if line.strip() else None
        start = after
    return None


def read_fast(data: bytes, delimiter: str) -> FastTable | None:
    """The file parsed by Arrow, or None when the careful reader must decide.

    ``data`` is the whole file, UTF-8 (a BOM is dropped). None for: any ``"``
    (quoting rules and their quirks are the careful reader's), a ``\\r`` not
    followed by ``\\n``, a header that is blank or whitespace, a row whose field
    count differs from the header's, bytes that are not UTF-8.
    """
    if data.startswith(_BOM):
        data = data[len(_BOM):]
    if b'"' in data or data.count(b"\r") != data.count(b"\r\n"):
        return None
    found = _header_line(data)
    if found is None:
        return None
    line, after = found
    try:
        header = line.decode("utf-8").split(delimiter)
    except UnicodeDecodeError:
        return None
    names = [f"c{i}" for i in range(len(header))]
    try:
        rows = pacsv.read_csv(
            pa.py_buffer(data[after:]),
            read_options=pacsv.ReadOptions(column_names=names, block_size=_BLOCK_BYTES, use_threads=True),
            parse_options=pacsv.ParseOptions(
                delimiter=delimiter, quote_char=False, escape_char=False, newlines_in_values=False,
                ignore_empty_lines=True,
            ),
            convert_options=pacsv.ConvertOptions(
                column_types={n: pa.string() for n in names},
                strings_can_be_null=False,
                quoted_strings_can_be_null=False,
                check_utf8=True,
            ),
        )
    except (pa.ArrowInvalid, pa.ArrowNotImplementedError):
        return None
    return FastTable(header=header, rows=rows)
