"""Opening text library files (gzip, encoding sniffing, per-line decode checks) and text outputs."""

from __future__ import annotations

import gzip
import io
import re
import zlib
from collections import deque
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import BinaryIO, TextIO

from .errors import LibraryError

UNDECODABLE = "undecodable bytes in row"
"""row_errors text for a row whose bytes are not valid in the file's encoding."""

_PROBE_BYTES = 64 * 1024
_BLOCK_CHARS = 1 << 20
# surrogateescape turns each undecodable byte into a lone surrogate code point.
_SURROGATE = re.compile("[\ud800-\udfff]")


def open_binary(path: Path, gzipped: bool) -> BinaryIO:
    """The file's bytes, decompressed when gzipped."""
    return gzip.open(path, "rb") if gzipped else open(path, "rb")  # type: ignore[return-value]  # both are binary streams


def open_text(path: Path, gzipped: bool, encoding: str, newline: str | None) -> TextIO:
    """The file as text; undecodable bytes survive as lone surrogates for MarkedLines to flag."""
    return io.TextIOWrapper(
        open_binary(path, gzipped), encoding=encoding, errors="surrogateescape", newline=newline
    )


def read_bytes(path: Path, gzipped: bool) -> bytes:
    """The whole file's bytes, decompressed when gzipped, read in one opening."""
    with read_errors(path), open_binary(path, gzipped) as stream:
        return stream.read()


def text_of(data: bytes, encoding: str, newline: str | None) -> TextIO:
    """Bytes already read, as text the same way :func:`open_text` gives a file."""
    return io.TextIOWrapper(io.BytesIO(data), encoding=encoding, errors="surrogateescape", newline=newline)


def open_output_text(target: Path, gzipped: bool) -> TextIO:
    """UTF-8 text stream writing "\\n" line ends to target, gzipped when asked.

    The gzip header gets no file name (target is a temporary name) and a zero
    timestamp, so equal data gives equal bytes.
    """
    if not gzipped:
        return open(target, "w", encoding="utf-8", newline="\n")
    raw = open(target, "wb")
    try:
        packed = gzip.GzipFile(filename="", mode="wb", fileobj=raw, mtime=0)
    except BaseException:
        raw.close()
        raise
    return _ClosingText(packed, raw)


class _ClosingText(io.TextIOWrapper):
    """Text wrapper over a GzipFile that also closes the file underneath it
    (GzipFile leaves a fileobj it was given open)."""

    def __init__(self, packed: gzip.GzipFile, raw: BinaryIO) -> None:
        super().__init__(packed, encoding="utf-8", newline="\n")
        self._raw = raw

    def close(self) -> None:
        try:
            super().close()
        finally:
            self._raw.close()


@contextmanager
def read_errors(path: Path) -> Iterator[None]:
    """Turn I/O and decompression failures while reading path into one-line LibraryErrors."""
    try:
        yield
    except LibraryError:
        raise
    except FileNotFoundError:
        raise LibraryError(f"no such file: {path}") from None
    except IsADirectoryError:
        raise LibraryError(f"{path} is a directory") from None
    except PermissionError:
        raise LibraryError(f"permission denied: {path}") from None
    except gzip.BadGzipFile as exc:
        raise LibraryError(f"{path} is not a readable gzip file ({exc})") from None
    except (EOFError, zlib.error) as exc:
        reason = str(exc) or "the compressed stream ends early"
        raise LibraryError(f"{path} is not a readable gzip file ({reason})") from None
    except OSError as exc:
        raise LibraryError(f"cannot read {path}: {exc.strerror or exc}") from None


def probe_encoding(path: Path, gzipped: bool) -> str:
    """Encoding to read a text library with, after checking it is non-empty text.

    UTF-16 is recognised by its byte-order mark; everything else is read as UTF-8
    (a UTF-8 BOM is dropped). Raises LibraryError for empty or binary files.
    """
    with read_errors(path), open_binary(path, gzipped) as stream:
        head = stream.read(_PROBE_BYTES)
    return encoding_of(head, path)


def encoding_of(head: bytes, path: Path) -> str:
    """As :func:`probe_encoding`, from the first bytes of the file already read."""
    if not head.strip():
        raise LibraryError(f"{path} is empty")
    if head.startswith((b"\xff\xfe", b"\xfe\xff")):
        return "utf-16"
    if b"\x00" in head:
        raise LibraryError(f"{path} is not a text file (it contains NUL bytes)")
    return "utf-8-sig"


class MarkedLines:
    """Iterates a text stream's lines, replacing undecodable characters and noting where.

    Lines are numbered from 1 in the order they are yielded. Recent lines are
    kept so a reader can re-split a malformed multi-line record.
    """

    def __init__(self, text: TextIO) -> None:
        self._text = text
        self.bad: set[int] = set()
        """Numbers of lines that held undecodable bytes and have not been claimed yet."""
        self._blocks: deque[tuple[int, list[str]]] = deque(maxlen=3)

    def __iter__(self) -> Iterator[str]:
        done = 0
        while True:
            lines = self._text.readlines(_BLOCK_CHARS)
            if not lines:
                return
            # One pass over the whole block decides the common all-ASCII case.
            if not "".join(lines).isascii():
                for i, line in enumerate(lines):
                    if not line.isascii() and _SURROGATE.search(line):
                        self.bad.add(done + i + 1)
                        lines[i] = _SURROGATE.sub("\ufffd", line)
            self._blocks.append((done, lines))
            done += len(lines)
            yield from lines

    def claim_bad(self, first: int, last: int) -> bool:
        """True when any line numbered first..last was undecodable; forgets those lines."""
        return bool(self.bad) and bool(self.claim_bad_lines(first, last))

    def claim_bad_lines(self, first: int, last: int) -> list[int]:
        """Undecodable line numbers in first..last (forgetting them)."""
        hit = [n for n in self.bad if first <= n <= last]
        self.bad.difference_update(hit)
        return hit

    def line(self, number: int) -> str | None:
        """Text of line `number` if it is still held, else None."""
        for start, lines in self._blocks:
            if start < number <= start + len(lines):
                return lines[number - start - 1]
        return None
