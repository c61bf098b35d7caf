"""Which rows of a library a report describes: by verdict, by an ID list, or given rows."""

from __future__ import annotations

import os
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd


@dataclass(frozen=True)
class Selection:
    """The rows a report covers, and how they were chosen."""

    rows: np.ndarray
    """0-based input rows, in input order (int64)."""
    description: str
    """One line for the report header, e.g. 'verdict selective; 12 IDs from picks.txt'."""
    missing_ids: tuple[str, ...] = ()
    """IDs from the list that no row of the library carries."""


def read_ids(path: str | os.PathLike[str]) -> list[str]:
    """IDs from a text file, one per line (surrounding spaces and blank lines ignored), in file order.

    Raises engine.LibraryError (one line) when the file cannot be read or holds no IDs.
    """
    from halosift.engine.io import LibraryError
    from halosift.engine.io.readers import not_regular

    path = Path(path)
    try:
        kind = not_regular(path.stat().st_mode)  # before opening: a named pipe would wait for a writer
        if kind is not None and kind != "a directory":
            raise LibraryError(f"ID list {path} is {kind}, not a regular file")
        text = path.read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise LibraryError(f"no such ID list: {path}") from None
    except IsADirectoryError:
        raise LibraryError(f"ID list {path} is a folder") from None
    except UnicodeDecodeError:
        raise LibraryError(f"ID list {path} is not UTF-8 text") from None
    except OSError as exc:
        raise LibraryError(f"cannot read ID list {path}: {exc.strerror or exc}") from None
    ids = [line.strip() for line in text.splitlines() if line.strip()]
    if not ids:
        raise LibraryError(f"ID list {path} holds no IDs (one per line)")
    return list(dict.fromkeys(ids))


def select_rows(
    result: pd.DataFrame,
    ids_column: pd.Series | None,
    *,
    only: Sequence[str] = (),
    ids: Iterable[str] | None = None,
    ids_source: str = "",
) -> Selection:
    """Rows of ``result`` (from Library.evaluate) whose verdict is in ``only`` and whose ID is in ``ids``.

    An empty ``only`` keeps every verdict and the rejected rows; ``ids`` None
    keeps every ID. ``ids_column`` holds the library's identifiers (the
    library's input column); it is required when ``ids`` is given. IDs are
    compared as text with surrounding spaces removed.
    """
    from halosift.engine.io import LibraryError

    keep = np.ones(len(result), dtype=bool)
    parts: list[str] = []
    if only:
        wanted = list(dict.fromkeys(only))
        keep &= result["verdict"].isin(wanted).to_numpy()
        parts.append("verdict " + " or ".join(wanted))
    missing: tuple[str, ...] = ()
    if ids is not None:
        if ids_column is None:
            raise LibraryError("the library has no ID column to match the ID list against; name one with --id-column")
        wanted_ids = list(dict.fromkeys(ids))
        have = ids_column.astype("string").str.strip()
        keep &= have.isin(wanted_ids).fillna(False).to_numpy(dtype=bool)
        present = set(have.dropna())
        missing = tuple(i for i in wanted_ids if i not in present)
        listed = "1 ID" if len(wanted_ids) == 1 else f"{len(wanted_ids):,} IDs"
        parts.append(listed + (f" from {ids_source}" if ids_source else ""))
    return Selection(
        rows=np.flatnonzero(keep).astype(np.int64),
        description="; ".join(parts) if parts else "all rows",
        missing_ids=missing,
    )
