"""The site detail lists each reagent's outcome (clean / mixture / ruled-out, with the reason) as explain does."""

from __future__ import annotations

import pandas as pd
import pytest
from halosift.tui.app import HalosiftApp
from halosift.tui.detail import OUTCOME_LABELS, DetailScreen, outcomes_text
from tui_helpers import async_test, plain, settle, write_library

from halosift import engine

#: Substrates chosen for different outcomes: selective, by symmetry, a cyclopropane (Br2 ruled out),
#: an alkene (addition at room temperature), a benzylic one (NBS clean or mixture).
SMILES = ["CCC", "C1CCCCC1", "CC1CC1", "CC1=CCCCC1", "CCc1ccccc1", "CC(C)C"]


@pytest.fixture(scope="module")
def evaluated() -> pd.DataFrame:
    library = engine.load_library(pd.DataFrame({"smiles": SMILES}), use_cache=False)
    return library.evaluate(engine.Conditions())


@pytest.mark.parametrize("i", range(len(SMILES)))
def test_detail_outcomes_say_what_explain_says(evaluated: pd.DataFrame, i: int) -> None:
    cond = engine.Conditions()
    text = outcomes_text(evaluated.iloc[i], cond).plain
    lines = {line.split()[0]: line for line in text.splitlines()[1:]}
    explained = engine.explain(SMILES[i], cond)
    assert [o.reagent for o in explained.outcomes] == list(OUTCOME_LABELS)
    for o in explained.outcomes:
        line = lines[OUTCOME_LABELS[o.reagent]]
        assert line.split()[3] == o.outcome, line
        assert f"{o.temp_c:g} °C" in line
        if o.reason:
            assert o.reason in line
        else:
            assert "—" not in line
        if o.major and o.outcome != "ruled-out":
            assert f"major {o.major} {o.major_pct:.1f} %" in line


def test_ruled_out_reason_is_shown(evaluated: pd.DataFrame) -> None:
    text = outcomes_text(evaluated.iloc[2], engine.Conditions()).plain  # methylcyclopropane
    br2 = next(line for line in text.splitlines() if line.startswith("Br2"))
    assert "ruled-out" in br2 and "—" in br2


@async_test
async def test_detail_screen_shows_the_outcomes_at_once(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("enter")
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, DetailScreen)
        shown = plain(screen.query_one("#detail-outcomes"))
        record = app.frame.iloc[screen.row]
        for reagent, label in OUTCOME_LABELS.items():
            assert any(line.startswith(label) and record[f"{reagent}_outcome"] in line for line in shown.splitlines())
