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


SNIFF_BYTES = 65_536
"""How much of a stream sniff_format() looks at."""


def sniff_format(head: bytes) -> tuple[str, bool]:
    """(format, gzipped) guessed from the first bytes of a library with no file name (standard input).

    Parquet by its magic number; gzip by its own, then the text inside is sniffed.
    Text: an SD file has "M  END" or "$$$$"; otherwise the first non-blank line
    decides: a tab makes TSV (unless the line is two fields neither of which is a
    column name halosift knows: a SMILES and its name), a comma or semicolon CSV, a
    single word that is a SMILES column name a one-column CSV, anything else (a
    SMILES and a name) SMI. ``--in-format`` overrides the guess.
    """
    if head.startswith(b"PAR1"):
        return "parquet", False
    if head.startswith(b"\x1f\x8b"):
        import zlib

        try:
            inner = zlib.decompressobj(wbits=31).decompress(head, SNIFF_BYTES)
        except zlib.error:
            inner = b""
        fmt, _ = sniff_format(inner)
        if fmt == "parquet":
            raise LibraryError("gzipped Parquet is not read: Parquet is compressed internally")
        return fmt, True
    text = head.decode("utf-8", errors="replace")
    if "M  END" in text or "\n$$$$" in text or text.startswith("$$$$"):
        return "sdf", False
    from .columns import ID_NAMES, SMILES_NAMES

    known = {*SMILES_NAMES, *ID_NAMES}
    first = next((line for line in text.splitlines() if line.strip()), "")
    if "\t" in first:
        fields = [f.strip().lower() for f in first.split("\t")]
        if len(fields) == 2 and not known & set(fields):
            return "smi", False
        return "tsv", False
    if "," in first or ";" in first:
        return "csv", False
    words = first.split()
    if len(words) == 1 and words[0].strip().lower() in SMILES_NAMES:
        return "csv", False
    return "smi", False
