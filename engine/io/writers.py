"""write_table(): one entry point for CSV, TSV, Parquet and SDF output, always atomic."""

from __future__ import annotations

import os
import shutil
import tempfile
from collections.abc import Iterable, Mapping
from pathlib import Path
from typing import BinaryIO

import pandas as pd

from .atomic import atomic_path, exists_error
from .delimited import FORMULA_RULE, write_delimited
from .errors import LibraryError
from .formats import OUTPUT_FORMATS, split_format
from .metadata import PCT_PRECISION, file_metadata, round_percentages
from .parquet import write_parquet
from .readers import not_regular
from .sdf import write_sdf

ABOUT_SUFFIX = ".about.txt"
"""Ending added to a CSV/TSV output's name for its metadata sidecar."""


def about_path(path: str | os.PathLike[str]) -> Path:
    """The metadata sidecar that goes with a CSV/TSV output (e.g. short.csv -> short.csv.about.txt)."""
    path = Path(path)
    return path.with_name(path.name + ABOUT_SUFFIX)


def _same_file(a: Path, b: Path) -> bool:
    """True when a and b name the same file (through symlinks or hard links too)."""
    try:
        if a.exists() and b.exists():
            return os.path.samefile(a, b)
    except OSError:
        pass
    return a.resolve() == b.resolve()


def about_text(metadata: Mapping[str, str]) -> str:
    """The sidecar's text: "key: value" lines; continuation lines of multi-line values are indented two spaces."""
    out = []
    for key, value in metadata.items():
        first, *rest = str(value).splitlines() or [""]
        out.append(f"{key}: {first}\n")
        out.extend(f"  {line}\n" for line in rest)
    return "".join(out)


def _remove_if_same(path: Path, made: os.stat_result | None) -> None:
    """Remove ``path`` if it is still the file this run created (``made``: its stat), else leave it."""
    if made is None:
        return
    try:
        now = path.stat()
        if (now.st_dev, now.st_ino) == (made.st_dev, made.st_ino):
            path.unlink()
    except OSError:
        pass


def guard_output(
    path: str | os.PathLike[str],
    *,
    force: bool = False,
    protect: Iterable[str | os.PathLike[str]] = (),
    companions: Iterable[Path] = (),
) -> Path:
    """Raise LibraryError unless ``path`` (and its ``companions``) may be written: not an input, not a
    folder, not existing unless ``force``, in a folder that exists. Format is not checked here."""
    path = Path(path).expanduser()
    for guarded in protect:
        guarded = Path(guarded).expanduser()
        for target in (path, *companions):
            if _same_file(target, guarded):
                raise LibraryError(f"refusing to write over the input file {guarded}")
    if path.is_dir():
        raise LibraryError(f"cannot write {path}: it is a directory")
    try:
        kind = not_regular(path.stat().st_mode)
    except OSError:  # absent (or unreachable): nothing there to be replaced
        kind = None
    if kind is not None:
        # Not even with force: replacing a pipe or device node would swap it for a plain file.
        raise LibraryError(f"cannot write {path}: it is {kind}, not a regular file")
    if (path.exists() or path.is_symlink()) and not force:
        raise exists_error(path)
    if not path.parent.is_dir():
        raise LibraryError(f"cannot write {path}: folder {path.parent} does not exist")
    return path


def check_output(
    path: str | os.PathLike[str], *, force: bool = False, protect: Iterable[str | os.PathLike[str]] = ()
) -> Path:
    """Raise LibraryError now if writing ``path`` would fail the rules (format, input, existing, folder)."""
    path = Path(path).expanduser()
    fmt, _ = split_format(path, OUTPUT_FORMATS)
    companions = [about_path(path)] if fmt in ("csv", "tsv") else []
    return guard_output(path, force=force, protect=protect, companions=companions)


def export_contents(frame: pd.DataFrame, metadata: Mapping[str, str]) -> tuple[pd.DataFrame, dict[str, str]]:
    """What every export writes, whatever the format: the rows with percentages rounded
    (:data:`.metadata.PCT_PRECISION`) and the file's metadata keys (:func:`.metadata.file_metadata`),
    stating the rounding and the spreadsheet-formula rule."""
    meta = file_metadata({**metadata, "percent_precision": PCT_PRECISION, "formula_cells": FORMULA_RULE})
    return round_percentages(frame), meta


def _write_format(
    frame: pd.DataFrame, temp: Path, fmt: str, gzipped: bool, smiles_column: str, meta: Mapping[str, str]
) -> None:
    """Write the rows of a Parquet or SDF file, or the data part of a CSV/TSV one, to ``temp``."""
    if fmt == "parquet":
        write_parquet(frame, temp, meta)
    elif fmt == "sdf":
        write_sdf(frame, temp, gzipped, smiles_column, meta)
    else:
        write_delimited(frame, temp, fmt, gzipped)


def write_table(
    frame: pd.DataFrame,
    path: str | os.PathLike[str],
    *,
    metadata: Mapping[str, str],
    smiles_column: str = "canonical_smiles",
    force: bool = False,
    protect: Iterable[str | os.PathLike[str]] = (),
) -> Path:
    """Write frame to path atomically, in the format its extension names; return the path.

    csv/tsv (optionally .gz): header row then data, text that a spreadsheet would run as a
    formula prefixed with ' (delimited.FORMULA_RULE), plus the metadata in the sidecar
    <path>.about.txt. parquet: dtypes kept, metadata in the schema metadata. sdf
    (optionally .gz): one record per row, the molecule from smiles_column, the metadata
    as properties of the first record only. Every format gets the same metadata keys
    (``halosift_<key>``, :func:`export_contents`) and the result's percentages rounded to
    0.1. Refuses to replace a path in protect, or an existing file unless force.
    Problems raise LibraryError.
    """
    path = check_output(path, force=force, protect=protect)
    fmt, gzipped = split_format(path, OUTPUT_FORMATS)
    frame, meta = export_contents(frame, metadata)
    # Without force the file is created only if still absent when it is finished: of two runs
    # making the same new file, the second is refused rather than silently replacing the first.
    exclusive = not force
    try:
        if fmt in ("parquet", "sdf"):
            with atomic_path(path, exclusive=exclusive) as temp:
                _write_format(frame, temp, fmt, gzipped, smiles_column, meta)
        else:
            # The data file is placed first (inner block exits first), then its sidecar.
            made: os.stat_result | None = None
            try:
                with atomic_path(about_path(path), exclusive=exclusive) as about_temp:
                    with atomic_path(path, exclusive=exclusive) as temp:
                        _write_format(frame, temp, fmt, gzipped, smiles_column, meta)
                        about_temp.write_text(about_text(meta), encoding="utf-8")
                    made = path.stat() if exclusive else None
            except LibraryError:
                _remove_if_same(path, made)  # a sidecar that appeared meanwhile: take back the data file made
                raise
    except OSError as exc:
        raise LibraryError(f"could not write {path}: {exc.strerror or exc}") from None
    return path


def write_stream(
    frame: pd.DataFrame,
    stream: BinaryIO,
    fmt: str,
    *,
    metadata: Mapping[str, str],
    smiles_column: str = "canonical_smiles",
) -> dict[str, str]:
    """Write frame in ``fmt`` (csv, tsv, parquet or sdf, not gzipped) to a binary stream such as stdout.

    The bytes are those write_table() would put in a file of that format. A CSV/TSV
    stream has no room for the sidecar, so its metadata is returned (as it is for
    every format) for the caller to show elsewhere. Problems raise LibraryError.
    """
    if fmt not in OUTPUT_FORMATS:
        raise LibraryError(f"unknown output format {fmt!r}; use {', '.join(OUTPUT_FORMATS)}")
    frame, meta = export_contents(frame, metadata)
    try:
        # Parquet needs a seekable file, so every format goes through one: the same code as for files.
        with tempfile.TemporaryDirectory(prefix="halosift-") as folder:
            temp = Path(folder) / f"out.{fmt}"
            _write_format(frame, temp, fmt, False, smiles_column, meta)
            with open(temp, "rb") as written:
                shutil.copyfileobj(written, stream)
            stream.flush()
    except BrokenPipeError:
        raise  # the reader went away (e.g. | head): the caller ends quietly
    except OSError as exc:
        raise LibraryError(f"could not write the output: {exc.strerror or exc}") from None
    return meta
