"""write_table(): one entry point for CSV, TSV, Parquet and SDF output, always atomic."""

from __future__ import annotations

import os
from collections.abc import Iterable, Mapping
from pathlib import Path

import pandas as pd

from .atomic import atomic_path, exists_error
from .delimited import FORMULA_RULE, write_delimited
from .errors import LibraryError
from .formats import OUTPUT_FORMATS, split_format
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


def _about_text(metadata: Mapping[str, str]) -> str:
    """ "key: value" lines; continuation lines of multi-line values are indented two spaces."""
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
    formula prefixed with ' (delimited.FORMULA_RULE, stated in the sidecar too), plus
    metadata in the sidecar <path>.about.txt. parquet: dtypes kept, metadata in the schema metadata. sdf
    (optionally .gz): one record per row, the molecule from smiles_column, metadata
    as halosift_<key> properties on every record. Refuses to replace a path in
    protect, or an existing file unless force. Problems raise LibraryError.
    """
    path = check_output(path, force=force, protect=protect)
    fmt, gzipped = split_format(path, OUTPUT_FORMATS)
    meta = {str(k): str(v) for k, v in metadata.items()}
    # Without force the file is created only if still absent when it is finished: of two runs
    # making the same new file, the second is refused rather than silently replacing the first.
    exclusive = not force
    try:
        if fmt == "parquet":
            with atomic_path(path, exclusive=exclusive) as temp:
                write_parquet(frame, temp, meta)
        elif fmt == "sdf":
            with atomic_path(path, exclusive=exclusive) as temp:
                write_sdf(frame, temp, gzipped, smiles_column, meta)
        else:
            # The sidecar says which cells were defused (see delimited.FORMULA_RULE).
            meta = {**meta, "formula_cells": FORMULA_RULE}
            # The data file is placed first (inner block exits first), then its sidecar.
            made: os.stat_result | None = None
            try:
                with atomic_path(about_path(path), exclusive=exclusive) as about_temp:
                    with atomic_path(path, exclusive=exclusive) as temp:
                        write_delimited(frame, temp, fmt, gzipped)
                        about_temp.write_text(_about_text(meta), encoding="utf-8")
                    made = path.stat() if exclusive else None
            except LibraryError:
                _remove_if_same(path, made)  # a sidecar that appeared meanwhile: take back the data file made
                raise
    except OSError as exc:
        raise LibraryError(f"could not write {path}: {exc.strerror or exc}") from None
    return path
