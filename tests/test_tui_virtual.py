"""The library table stays virtual: 100,000 rows open, sort and filter without a widget or object per row."""

from __future__ import annotations

import gc

import numpy as np
import pandas as pd
from halosift.tui.app import HalosiftApp
from halosift.tui.filters import FilterSpec
from halosift.tui.table import LibraryTable, fit, format_values
from tui_helpers import async_test, settle

N_ROWS = 100_000
#: Structures repeated down the synthetic library (IDs invented).
STRUCTURES = ["CC", "CCC", "CC(C)C", "Cc1ccccc1", "CCc1ccccc1", "C1CCCCC1", "CC1=CCCCC1", "c1ccccc1", "O", "CCC(C)CC"]


def big_library() -> pd.DataFrame:
    """100,000 rows of repeated structures with unique invented IDs."""
    index = np.arange(N_ROWS)
    return pd.DataFrame(
        {
            "id": [f"QX-{i:06d}" for i in index],
            "smiles": np.array(STRUCTURES, dtype=object)[index % len(STRUCTURES)],
        }
    )


@async_test
async def test_100k_rows_open_sort_and_filter_virtually(monkeypatch):
    lines: list[int] = []
    original = LibraryTable.render_line

    def counting(self, y):
        lines.append(y)
        return original(self, y)

    monkeypatch.setattr(LibraryTable, "render_line", counting)
    app = HalosiftApp(big_library(), use_cache=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot, app)
        table = app.query_one(LibraryTable)
        n_ok = int((app.frame["status"] == "ok").sum())
        assert n_ok == N_ROWS - N_ROWS // len(STRUCTURES)  # every "O" row is rejected
        assert len(table.rows) == n_ok
        height = table.size.height
        widgets = len(list(app.screen.query("*")))
        assert widgets < 60  # a fixed layout, however many rows
        # Only lines on screen were ever asked for, and only a screenful of rows was formatted.
        assert lines and max(lines) < height
        assert table.formatted_rows <= 3 * table.page_height

        gc.collect()
        objects_before = len(gc.get_objects())
        lines.clear()
        formatted_before = table.formatted_rows

        # Sort by SMILES (descending), jump to the end, page up.
        while table.columns[table.picked].key != "smiles":
            await pilot.press("right")
        await pilot.press("s", "s")
        await settle(pilot, app)
        assert app.sort.column == "smiles" and app.sort.descending
        smiles = app.frame["smiles"].to_numpy()[table.rows]
        assert (smiles[:-1] >= smiles[1:]).all()
        await pilot.press("end")
        await pilot.pause()
        assert table.cursor == len(table.rows) - 1
        await pilot.press("pageup")
        await pilot.pause()
        assert table.cursor == len(table.rows) - 1 - table.page_height

        # Filter: by-symmetry only, then a text match.
        app.filters = FilterSpec(verdicts=frozenset({"by-symmetry"}))
        await settle(pilot, app)
        assert len(table.rows) == 3 * N_ROWS // len(STRUCTURES)  # CC, Cc1ccccc1, C1CCCCC1
        app.filters = FilterSpec(text="QX-00001")
        await settle(pilot, app)
        assert sorted(app.frame["id"].to_numpy()[table.rows]) == [
            f"QX-00001{i}" for i in range(10) if STRUCTURES[(10 + i) % len(STRUCTURES)] != "O"
        ]

        assert lines and max(lines) < height
        # A handful of screens were drawn: formatted rows grow by screenfuls, not by the row count.
        assert table.formatted_rows - formatted_before < 20 * table.page_height
        assert len(list(app.screen.query("*"))) == widgets
        gc.collect()
        # No Python object per row was kept (the view is numpy arrays).
        assert len(gc.get_objects()) - objects_before < N_ROWS // 10


def test_fit_and_format_values():
    assert fit("abcdef", 4) == "abc…"
    assert fit("ab", 4) == "ab  "
    assert fit("7", 3, right=True) == "  7"
    values = np.array([12.345, np.nan, None], dtype=object)
    assert format_values("pct", values, np.arange(3)) == ["12.3", "", ""]
    assert format_values("count", np.array([2, pd.NA], dtype=object), np.arange(2)) == ["2", ""]
    assert format_values("verdict", np.array(["by-symmetry", ""], dtype=object), np.arange(2)) == ["by-symmetry", "rejected"]
    assert format_values("row", None, np.array([0, 41])) == ["1", "42"]
