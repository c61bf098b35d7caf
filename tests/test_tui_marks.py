"""The shortlist's safety net: undo of bulk marks, marks from an ID-list file, exports in the table's order."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from halosift.tui.app import HalosiftApp
from halosift.tui.export import ExportScreen
from halosift.tui.id_list import IdListScreen, match_ids, read_ids
from halosift.tui.table import LibraryTable
from tui_helpers import async_test, plain, settle, write_library

SIZE = (120, 40)



@async_test
async def test_undo_restores_marks_before_mark_all_and_unmark_all(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("space", "space")
        two = app.marked.copy()
        assert int(two.sum()) == 2
        await pilot.press("a")
        shown = app.query_one(LibraryTable).rows
        assert app.marked[shown].all()
        all_shown = app.marked.copy()
        await pilot.press("u")
        assert not app.marked.any()
        await pilot.press("z")
        assert (app.marked == all_shown).all()
        await pilot.press("z")
        assert (app.marked == two).all()
        await pilot.press("z")  # nothing left to undo: the marks stay
        assert (app.marked == two).all()
        # The table draws the restored marks.
        assert app.query_one(LibraryTable)._marked is app.marked


@async_test
async def test_mark_rows_listed_in_a_file_and_undo(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    listing = tmp_path / "wanted.txt"
    listing.write_text("# Wrenfield order 7\nQX-0002\n\n QX-0005 \nQX-9999\nQX-0002\n", encoding="utf-8")
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("m")
        assert isinstance(app.screen, IdListScreen)
        app.screen.query_one("#ids-path").value = str(listing)
        await pilot.press("enter")
        await settle(pilot)
        ids = app.frame["id"].to_numpy()
        assert sorted(ids[app.marked]) == ["QX-0002", "QX-0005"]
        await pilot.press("z")
        assert not app.marked.any()


def test_read_ids_from_text_and_tables(tmp_path):
    text = tmp_path / "ids.txt"
    text.write_text("\ufeffA1\n# note\nA2\nA1\n\n", encoding="utf-8")
    assert read_ids(text, "id") == ["A1", "A2"]
    csv = tmp_path / "ids.csv"
    pd.DataFrame({"supplier": ["x", "y"], "id": ["A2", "A3"]}).to_csv(csv, index=False)
    assert read_ids(csv, "id") == ["A2", "A3"]
    single = tmp_path / "single.tsv"
    single.write_text("code\nA4\n", encoding="utf-8")
    assert read_ids(single, "id") == ["A4"]
    with pytest.raises(ValueError, match="no column named 'id'"):
        pd.DataFrame({"a": ["1"], "b": ["2"]}).to_csv(tmp_path / "two.csv", index=False)
        read_ids(tmp_path / "two.csv", "id")
    with pytest.raises(ValueError, match="no such file"):
        read_ids(tmp_path / "absent.txt", "id")
    empty = tmp_path / "empty.txt"
    empty.write_text("# nothing\n\n", encoding="utf-8")
    with pytest.raises(ValueError, match="lists no IDs"):
        read_ids(empty, "id")


def test_match_ids_compares_as_text():
    library = pd.Series([101, 102, 101, None])  # numeric IDs read from a file, one missing
    match = match_ids(library, ["101", "103"])
    assert match.rows.tolist() == [0, 2] and match.n_ids == 2 and match.missing == ("103",)


@async_test
async def test_exports_follow_the_table_order_and_say_so(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        table = app.query_one(LibraryTable)
        await pilot.press("a")  # every screened row on the shortlist
        while table.columns[table.picked].key != "br2_major_pct":
            await pilot.press("right")
        await pilot.press("s", "s")  # Br2 % largest first
        await settle(pilot)
        assert app.sort.descending
        shown = table.rows.copy()
        out = tmp_path / "short.csv"
        await pilot.press("e")
        screen = app.screen
        assert isinstance(screen, ExportScreen)
        assert "table's order: Br2 % ▼" in plain(screen.query_one("#export-order"))
        screen.query_one("#export-path").value = str(out)
        await pilot.press("enter")
        await settle(pilot)
        written = pd.read_csv(out, keep_default_na=False)
        assert written["input_row"].tolist() == [int(r) + 1 for r in shown]
        pct = pd.to_numeric(written["br2_major_pct"], errors="coerce").dropna().to_numpy()  # inert rows: blank
        assert len(pct) > 3 and (np.diff(pct) <= 0).all()
        about = Path(str(out) + ".about.txt").read_text(encoding="utf-8")
        assert "order: Br2 % ▼" in about
