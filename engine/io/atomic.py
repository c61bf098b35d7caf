"""Atomic file replacement: write beside the target, then os.replace."""

from __future__ import annotations

import os
import re
import secrets
import stat
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

from .errors import LibraryError

TEMP_SUFFIX = ".halosift-tmp"
"""Ending of the temporary files atomic_path() creates (hidden: their names start with a dot)."""
STALE_TEMP_S = 15 * 60
"""A temporary file untouched this long was left by a killed run; a write in progress is far younger."""
_TEMP_NAME = re.compile(r"\..+\.[0-9a-f]{8}" + re.escape(TEMP_SUFFIX))


def remove_stale_temps(folder: Path, max_age_s: float = STALE_TEMP_S) -> int:
    """Delete temporary files of atomic_path() in ``folder`` older than ``max_age_s``; returns how many.

    A killed run (SIGKILL, power loss) cannot remove its own temporary file,
    so the next write into the folder does. Younger files may belong to a
    write in progress and are left alone; any error just leaves a file.
    """
    removed = 0
    cutoff = time.time() - max_age_s
    try:
        entries = list(os.scandir(folder))
    except OSError:
        return 0
    for entry in entries:
        if not _TEMP_NAME.fullmatch(entry.name):
            continue
        try:
            if entry.is_file(follow_symlinks=False) and entry.stat(follow_symlinks=False).st_mtime < cutoff:
                os.unlink(entry.path)
                removed += 1
        except OSError:
            pass
    return removed


def _create_temp(path: Path) -> Path:
    """Create an empty, uniquely named temporary file in path's folder.

    os.open with mode 0o666 lets the umask decide permissions, as for any new file
    (mkstemp would force 0o600 onto the finished output).
    """
    folder = path.parent
    if not folder.exists():
        raise LibraryError(f"cannot write {path}: folder {folder} does not exist")
    if not folder.is_dir():
        raise LibraryError(f"cannot write {path}: {folder} is not a folder")
    remove_stale_temps(folder)
    for _ in range(100):
        temp = folder / f".{path.name}.{secrets.token_hex(4)}{TEMP_SUFFIX}"
        try:
            fd = os.open(temp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
        except FileExistsError:
            continue
        except PermissionError:
            raise LibraryError(f"permission denied: cannot write in {folder}") from None
        except OSError as exc:
            raise LibraryError(f"cannot write {path}: {exc.strerror or exc}") from None
        os.close(fd)
        return temp
    raise LibraryError(f"cannot write {path}: no free temporary name in {folder}")


def _flush_to_disk(temp: Path) -> None:
    """fsync the finished temp file so the rename never exposes a half-written file after a crash."""
    fd = os.open(temp, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def exists_error(path: Path) -> LibraryError:
    """The one-line refusal to replace an existing file without --force."""
    return LibraryError(f"{path} exists; use --force to replace it")


def _create_exclusively(temp: Path, path: Path) -> None:
    """Give the finished temp file the name ``path`` only if no file has that name yet.

    A hard link is made or refused in one step, so of two writers creating the same new
    file exactly one succeeds; the other gets :func:`exists_error`. Where the file system
    has no hard links, an O_EXCL placeholder claims the name, and the temp file then
    replaces it.
    """
    try:
        os.link(temp, path)
    except FileExistsError:
        raise exists_error(path) from None
    except OSError:
        try:
            os.close(os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666))
        except FileExistsError:
            raise exists_error(path) from None
        os.replace(temp, path)
        return
    temp.unlink()


@contextmanager
def atomic_path(path: str | os.PathLike[str], *, exclusive: bool = False) -> Iterator[Path]:
    """Yield a temporary path in path's folder; on success it replaces path, on failure it is removed.

    ``exclusive``: create path only if it does not exist yet, even when another process
    makes it meanwhile (LibraryError "exists"); otherwise replace it atomically. The
    target keeps its permission bits when it already exists. Creation and replacement
    problems raise LibraryError; exceptions from the block propagate after the
    temporary file is deleted.
    """
    path = Path(path)
    temp = _create_temp(path)
    try:
        yield temp
        if not exclusive and path.exists():
            os.chmod(temp, stat.S_IMODE(path.stat().st_mode))
        _flush_to_disk(temp)
        try:
            if exclusive:
                _create_exclusively(temp, path)
            else:
                os.replace(temp, path)
        except LibraryError:
            raise
        except IsADirectoryError:
            raise LibraryError(f"cannot write {path}: it is a directory") from None
        except OSError as exc:
            raise LibraryError(f"cannot write {path}: {exc.strerror or exc}") from None
    except BaseException:
        try:
            temp.unlink()
        except FileNotFoundError:
            pass
        raise
