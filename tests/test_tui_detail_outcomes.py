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


#: 1-hexene (Cl2, Br2, SO2Cl2 add to its C=C; NBS substitutes), 4-cyclopropyltoluene (Br2 and NBS ruled out:
#: Br· opens the ring, though NBS has a benzylic CH3), propane and isobutane (every reagent but NBS weighed).
RULED_ROWS = [("WX-1", "CCC"), ("WX-2", "C=CCCCC"), ("WX-3", "Cc1ccc(cc1)C1CC1"), ("WX-4", "CC(C)C")]


@async_test
async def test_ruled_out_reagents_show_no_share_in_table_or_detail(tmp_path):
    import numpy as np
    from halosift.tui.table import LibraryTable

    path = tmp_path / "wx.csv"
    pd.DataFrame(RULED_ROWS, columns=["id", "smiles"]).to_csv(path, index=False)
    app = HalosiftApp(str(path))
    async with app.run_test(size=(160, 40)) as pilot:
        await settle(pilot)
        table = app.query_one(LibraryTable)
        frame = app.frame
        hexene = int(np.flatnonzero(frame["smiles"].to_numpy() == "C=CCCCC")[0])
        assert frame["br2_outcome"].iloc[hexene] == "ruled-out"
        lines = [table.render_line(y).text for y in range(table.size.height)]
        line = next(x for x in lines if "WX-2" in x)
        assert "99.2" not in line and "63.7" not in line  # what Br2 and Cl2 would give if they substituted
        # Sorting on Br2 %: the blank (ruled-out) cells come last, whichever way.
        keys = [c.key for c in table.columns]
        table.picked = keys.index("br2_major_pct")
        for _ in range(2):
            await pilot.press("s")
            await settle(pilot)
            ruled = set(np.flatnonzero((frame["br2_outcome"] == "ruled-out").to_numpy()).tolist())
            assert set(table.rows[-len(ruled):].tolist()) == ruled
        # The detail: a ruled-out line instead of the reagent's bars, and no polyhalide figures for it.
        for smiles, off, kept in (("C=CCCCC", ("Cl2", "Br2"), ()), ("Cc1ccc(cc1)C1CC1", ("Br2", "NBS"), ("Cl2",))):
            table.cursor = int(np.flatnonzero(table.rows == int(np.flatnonzero(frame["smiles"] == smiles)[0]))[0])
            await pilot.press("enter")
            await settle(pilot)
            screen = app.screen
            assert isinstance(screen, DetailScreen)
            bars = plain(screen.query_one("#detail-bars"))
            nbs = plain(screen.query_one("#detail-nbs"))
            poly = plain(screen.query_one("#detail-poly"))
            for label in off:
                shown = bars if label != "NBS" else nbs
                assert any(x.startswith(label) and "ruled out" in x for x in shown.splitlines()), (smiles, shown)
                assert f"{label}:" not in poly
            for label in kept:
                assert f"{label} at" in bars and "%" in bars and f"{label}:" in poly
            if not kept:
                assert "%" not in bars and poly.strip() == ""
            assert "99.2" not in bars
            await pilot.press("escape")
            await settle(pilot)


@async_test
async def test_norbornane_diastereomers_are_defined_alike_in_detail_and_help(tmp_path):
    """2-chloronorbornane (exo/endo from achiral norbornane) is 'diastereomers'; detail and help define it so."""
    from halosift.engine.stereo import STEREO_DOCS
    from halosift.tui.help import HelpScreen

    meaning = STEREO_DOCS["diastereomers"]
    assert "exo/endo" in meaning and "among themselves" in meaning  # not only "beside existing ones"
    path = tmp_path / "norbornane.csv"
    pd.DataFrame({"id": ["WF-N1"], "smiles": ["C1CC2CCC1C2"]}).to_csv(path, index=False)
    app = HalosiftApp(str(path), sessions=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot, app)
        assert app.frame["stereo"].iloc[0] == "diastereomers"
        await pilot.press("enter")
        await settle(pilot, app)
        assert isinstance(app.screen, DetailScreen)
        notes = " ".join(plain(app.screen.query_one("#detail-notes")).split())
        assert f"diastereomers: {meaning}" in notes
        await pilot.press("escape", "question_mark")
        await pilot.pause(0.3)
        assert isinstance(app.screen, HelpScreen)
        verdicts = " ".join(plain(app.screen.query_one("#help-verdicts")).split())
        assert f"diastereomers {meaning}" in verdicts
