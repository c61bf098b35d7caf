"""File formats recognised from file names (extension, case-insensitive, optional .gz)."""

from __future__ import annotations

import os
from pathlib import Path

from .errors import LibraryError

INPUT_FORMATS: tuple[str, ...] = ("csv", "tsv", "parquet", "smi", "sdf")
"""Formats open_library() reads."""

OUTPUT_FORMATS: tuple[str, ...] = ("csv", "tsv", "parquet", "sdf")
"""Formats write_table() writes."""

TEXT_FORMATS: frozenset[str] = frozenset({"csv", "tsv", "smi", "sdf"})
"""Formats that may be wrapped in gzip and whose cells are read as text."""


def split_format(path: str | os.PathLike[str], accepted: tuple[str, ...]) -> tuple[str, bool]:
    """Return (format, gzipped) for path's name, or raise LibraryError naming the accepted endings."""
    name = Path(path).name.lower()
    gzipped = name.endswith(".gz")
    if gzipped:
        name = name[: -len(".gz")]
    stem, dot, ext = name.rpartition(".")
    if dot and stem and ext in accepted:
        if gzipped and ext not in TEXT_FORMATS:
            raise LibraryError(
                f"{path}: Parquet files are compressed internally and cannot be gzipped; "
                "use a plain .parquet name"
            )
        return ext, gzipped
    raise LibraryError(f"unknown file type for {path}; {_accepted_phrase(accepted)}")


def _accepted_phrase(accepted: tuple[str, ...]) -> str:
    """'use .csv, .tsv or .sdf (...)' for an error message."""
    exts = [f".{ext}" for ext in accepted]
    listed = ", ".join(exts[:-1]) + f" or {exts[-1]}" if len(exts) > 1 else exts[0]
    gz = ", ".join(f".{ext}" for ext in accepted if ext in TEXT_FORMATS)
    return f"use {listed} ({gz} may also end in .gz)"


def output_format(path: str | os.PathLike[str]) -> str:
    """Format that write_table() would use for path ("csv", "tsv", "parquet" or "sdf").

    Raises LibraryError when the name has no writable extension.
    """
    return split_format(path, OUTPUT_FORMATS)[0]
