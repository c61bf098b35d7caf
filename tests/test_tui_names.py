"""The app reads the engine's names (reagents, outcomes, verdicts, flags, confidence bases, stereo outcomes) from
the engine: no tui file writes out a list of them, so a name added or renamed there cannot be missed here."""

from __future__ import annotations

import ast
from pathlib import Path

from halosift.engine.outcomes import OUTCOME_REAGENTS, OUTCOMES, VERDICTS
from halosift.engine.rates import CONFIDENCE_BASES
from halosift.engine.reagents import REAGENT_LABELS
from halosift.engine.special_sites import FLAGS
from halosift.engine.stereo import OUTCOMES as STEREO_OUTCOMES

TUI = Path(__file__).resolve().parents[1] / "tui"
ENGINE_LISTS: dict[str, frozenset[str]] = {
    "engine.outcomes.OUTCOME_REAGENTS": frozenset(OUTCOME_REAGENTS),
    "engine.reagents.REAGENT_LABELS": frozenset(REAGENT_LABELS),
    "engine.outcomes.OUTCOMES": frozenset(OUTCOMES),
    "engine.outcomes.VERDICTS": frozenset(VERDICTS),
    "engine.special_sites.FLAGS": frozenset(FLAGS),
    "engine.rates.CONFIDENCE_BASES": frozenset(CONFIDENCE_BASES),
    "engine.stereo.OUTCOMES": frozenset(STEREO_OUTCOMES),
}


def copied_lists(source: str) -> list[tuple[int, str]]:
    """(line, engine list) for every tuple, list, set or dict literal naming two or more of one engine list's names."""
    found = []
    for node in ast.walk(ast.parse(source)):
        if isinstance(node, (ast.Tuple, ast.List, ast.Set)):
            items = node.elts
        elif isinstance(node, ast.Dict):
            items = [k for k in node.keys if k is not None]
        else:
            continue
        names = {item.value for item in items if isinstance(item, ast.Constant) and isinstance(item.value, str)}
        for what, engine_names in ENGINE_LISTS.items():
            if len(names & engine_names) >= 2:
                found.append((node.lineno, what))
    return found


def test_the_check_finds_a_copied_list() -> None:
    assert copied_lists('REAGENTS = ("cl2", "br2", "so2cl2")') == [
        (1, "engine.outcomes.OUTCOME_REAGENTS"), (1, "engine.reagents.REAGENT_LABELS")]
    assert copied_lists('LABELS = {"clean": "fine", "mixture": "mixed"}') == [(1, "engine.outcomes.OUTCOMES")]
    assert copied_lists('ONE = ("cl2", "the app")') == []


def test_no_tui_file_writes_out_an_engine_name_list() -> None:
    copies = [f"{path.name}:{line} copies {what}"
              for path in sorted(TUI.glob("*.py")) for line, what in copied_lists(path.read_text(encoding="utf-8"))]
    assert not copies, "read these from the engine instead: " + "; ".join(copies)
