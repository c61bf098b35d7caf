"""SMILES list files (.smi): one structure per line, optionally followed by a name."""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path

import pandas as pd

from .columns import choose
from .errors import LibraryError
from .source import LibrarySource, RawBatch
from .textfile import UNDECODABLE, MarkedLines, open_text, probe_encoding, read_errors

COLUMNS: tuple[str, str] = ("smiles", "name")
"""The columns of every .smi library."""

_HEADER_WORDS = frozenset({"smiles", "smi"})


def _split(line: str) -> list[str]:
    """[smiles, name]: the first whitespace-separated token and the rest of the line."""
    parts = line.strip().split(None, 1)
    return [parts[0], parts[1].strip() if len(parts) > 1 else ""]


def _is_header(line: str) -> bool:
    """True for a header line such as "smiles name" or "SMILES\tID"."""
    return line.split(None, 1)[0].lower() in _HEADER_WORDS


def _rows(lines: MarkedLines) -> Iterator[tuple[list[str], str]]:
    """(fields, error) per row. Blank lines are not rows; a first line whose
    first word is "smiles" (any case) is a header and is skipped."""
    seen_first = False
    for number, line in enumerate(lines, start=1):
        if not line.strip():
            lines.claim_bad(number, number)
            continue
        bad = lines.claim_bad(number, number)
        if not seen_first:
            seen_first = True
            if _is_header(line):
                continue
        yield _split(line), UNDECODABLE if bad else ""


def open_smi(
    path: Path, gzipped: bool, smiles_column: str | None, id_column: str | None
) -> LibrarySource:
    """Check a .smi file and return its source (columns smiles and name)."""
    encoding = probe_encoding(path, gzipped)
    with read_errors(path), open_text(path, gzipped, encoding, newline=None) as text:
        if next(_rows(MarkedLines(text)), None) is None:
            raise LibraryError(f"{path} has a header line but no rows")
    smiles, ident = choose(list(COLUMNS), str(path), smiles_column, id_column)
    smiles_at = COLUMNS.index(smiles)

    def read(batch_rows: int) -> Iterator[RawBatch]:
        start = 0
        rows: list[list[str]] = []
        errors: list[str] = []
        with read_errors(path), open_text(path, gzipped, encoding, newline=None) as text:
            for fields, error in _rows(MarkedLines(text)):
                rows.append(fields)
                errors.append(error)
                if len(rows) == batch_rows:
                    yield _batch(start, rows, errors, smiles_at)
                    start += len(rows)
                    rows, errors = [], []
        if rows:
            yield _batch(start, rows, errors, smiles_at)

    return LibrarySource(
        path=path,
        format="smi",
        columns=COLUMNS,
        smiles_column=smiles,
        id_column=ident,
        total_rows=None,
        _read=read,
    )


def _batch(start: int, rows: list[list[str]], errors: list[str], smiles_at: int) -> RawBatch:
    """One RawBatch of .smi rows."""
    frame = pd.DataFrame(rows, columns=list(COLUMNS), dtype=str)
    smiles = [None if e else (r[smiles_at] or None) for r, e in zip(rows, errors)]
    return RawBatch(start_row=start, frame=frame, smiles=smiles, row_errors=errors)
