"""Where a SMILES string may be broken across lines (string rules only, no RDKit).

One rule for every place that wraps SMILES: the app's detail and the HTML report.
"""

from __future__ import annotations

import re

_TOKEN = re.compile(r"\[[^\]]*\]|Br|Cl|%\d\d|.", re.DOTALL)
_RING_DIGIT = re.compile(r"\d|%\d\d")
#: Symbols that belong with the atom after them: a line never ends on one.
_LEADING = ("(", "=", "#", "/", "\\", "-", ":", "$")


def smiles_tokens(smiles: str) -> list[str]:
    """The SMILES split into tokens (bracket atoms, Cl/Br, ring closures, single characters); joined they give it back."""
    return _TOKEN.findall(smiles)


def break_quality(tokens: list[str], k: int) -> int:
    """How good a break after ``tokens[k]`` is: 2 good, 1 acceptable, 0 never.

    Good after a ring-closure digit, after a branch closes, after '.', or before a
    branch opens; never before a ring-closure digit or a branch's ')' (they belong to
    the atom before them) nor after a branch or bond symbol (it belongs to the atom after it).
    """
    here = tokens[k]
    after = tokens[k + 1] if k + 1 < len(tokens) else ""
    if _RING_DIGIT.fullmatch(after) or after == ")":
        return 0
    if here in _LEADING:
        return 0
    if here in (".", ")") or _RING_DIGIT.fullmatch(here) or after == "(":
        return 2
    return 1
