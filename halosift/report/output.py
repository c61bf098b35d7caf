"""Writing a report file: the same rules as table exports (no silent replacement, never the input), atomically."""

from __future__ import annotations

import os
from collections.abc import Iterable
from pathlib import Path

#: File endings a report may have (case-insensitive).
REPORT_SUFFIXES: tuple[str, ...] = (".html", ".htm")


def is_report_path(path: str | os.PathLike[str]) -> bool:
    """True when the file name ends in .html or .htm (what the app and CLI treat as a report)."""
    return Path(path).name.lower().endswith(REPORT_SUFFIXES)


def check_report_output(
    path: str | os.PathLike[str], *, force: bool = False, protect: Iterable[str | os.PathLike[str]] = ()
) -> Path:
    """Raise engine.LibraryError (one line) now if the report could not or should not be written to ``path``."""
    from halosift.engine.io import LibraryError, guard_output

    path = Path(path).expanduser()
    if not is_report_path(path):
        raise LibraryError(f"a report is an HTML file: {path} should end in .html")
    return guard_output(path, force=force, protect=protect)


def write_report(
    html: str, path: str | os.PathLike[str], *, force: bool = False, protect: Iterable[str | os.PathLike[str]] = ()
) -> Path:
    """Write the page to ``path`` atomically (UTF-8); return the path. Problems raise engine.LibraryError."""
    from halosift.engine.io import LibraryError, atomic_path

    path = check_report_output(path, force=force, protect=protect)
    try:
        with atomic_path(path, exclusive=not force) as temp:  # without force: created only if still absent
            temp.write_text(html, encoding="utf-8")
    except OSError as exc:
        raise LibraryError(f"could not write {path}: {exc.strerror or exc}") from None
    return path
