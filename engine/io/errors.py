"""The one exception type the file layer raises for whole-file problems."""

from __future__ import annotations

import re

_LINE_BREAKS = re.compile(r"\s*[\r\n\v\f\x85\u2028\u2029]+\s*")


class LibraryError(Exception):
    """A whole-file problem; str(err) is one line fit to show the user."""

    def __str__(self) -> str:
        # Messages embed paths and pieces of library text; a stray line break
        # would break the one-line promise, so breaks become single spaces.
        return _LINE_BREAKS.sub(" ", super().__str__()).strip()
