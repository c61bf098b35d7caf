"""Counts in the app's words: one helper, so no message says "1 rows"."""

from __future__ import annotations


def counted(n: int, noun: str, plural: str | None = None) -> str:
    """``n`` with thousands separators and ``noun`` in the number it takes: 1 row, 0 rows, 2,500 rows.

    ``plural`` is for nouns that do not just add an s (the default).
    """
    return f"{n:,} {noun if n == 1 else (plural or noun + 's')}"
