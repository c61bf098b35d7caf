"""Header lines that fit their width by shortening whole phrases, never by cutting one in the middle."""

from __future__ import annotations

from collections.abc import Hashable, Sequence
from dataclasses import dataclass
from typing import Any

#: Between the phrases of a header line.
SEPARATOR = " │ "


@dataclass(frozen=True)
class Phrase:
    """One phrase of a header line, in forms from longest to shortest."""

    forms: tuple[str, ...]
    """Longest first; an empty last form means the phrase may be left out."""
    keep: int
    """Higher keeps its longer forms longer (the lowest is shortened first)."""


def fit_phrases(phrases: Sequence[Phrase], width: int, separator: str = SEPARATOR) -> str:
    """The phrases joined in order, each in the longest form that lets the whole line fit ``width``.

    The phrase with the lowest ``keep`` is shortened first, one form at a time.
    If even the shortest forms do not fit, whole phrases are left out, the lowest
    ``keep`` first, so no phrase is ever cut in the middle; only a single phrase
    wider than the line is returned as it is (the widget then ends it in '…').
    """
    chosen = [0] * len(phrases)
    dropped: set[int] = set()

    def line() -> str:
        return separator.join(f for k, (p, i) in enumerate(zip(phrases, chosen)) if k not in dropped and (f := p.forms[i]))

    text = line()
    while len(text) > width:
        candidates = [k for k, p in enumerate(phrases) if chosen[k] < len(p.forms) - 1]
        if not candidates:
            break
        k = min(candidates, key=lambda k: (phrases[k].keep, k))
        chosen[k] += 1
        text = line()
    while len(text) > width:
        shown = [k for k, p in enumerate(phrases) if k not in dropped and p.forms[chosen[k]]]
        if len(shown) <= 1:
            break
        dropped.add(min(shown, key=lambda k: (phrases[k].keep, -k)))
        text = line()
    return text


def column_title(key: Hashable, known: dict[Hashable, str]) -> str:
    """The title a chemist reads for a frame column: its table label, else a readable form of its name."""
    if key in known:
        return known[key]
    from halosift.engine.outcomes import OUTCOME_REAGENTS

    name = str(key)
    for reagent in OUTCOME_REAGENTS:
        if name.startswith(reagent + "_"):
            name = reagent.capitalize() + " " + name[len(reagent) + 1:]
    name = name.replace("_pct", " %").replace("_", " ")
    return name[:1].upper() + name[1:]


@dataclass(frozen=True)
class Cl2Forms:
    """The Cl2 conditions in words, in two lengths for the header."""

    long: str
    """Temperature, phase and solvent with its molarity, e.g. 'Cl2 25 °C liquid in 4 M benzene'."""
    short: str
    """Temperature, phase and solvent name only, e.g. 'Cl2 25 °C liquid (benzene)'."""


def cl2_forms(conditions: Any) -> Cl2Forms:
    """The Cl2 conditions described: temperature, phase and solvent.

    The phase is always named: gas-phase and liquid-phase chlorinations use
    different rate tables, so the same temperature can give different splits.
    """
    temp = f"Cl2 {conditions.cl2_temp_c:g} °C"
    phase = conditions.cl2_phase
    if conditions.cl2_solvent != "none":
        solvent = "CS2" if conditions.cl2_solvent == "cs2" else conditions.cl2_solvent
        return Cl2Forms(f"{temp} {phase} in {conditions.cl2_solvent_molar:g} M {solvent}", f"{temp} {phase} ({solvent})")
    return Cl2Forms(f"{temp} {phase}", f"{temp} {phase}")  # liquid without a solvent: the neat hydrocarbon
