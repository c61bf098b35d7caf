"""Navigation: a new sort starts at the top; the detail's n/p move the table cursor; each row's detail starts at its top."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
from halosift.tui.app import HalosiftApp
from halosift.tui.detail import DetailScreen
from halosift.tui.table import LibraryTable
from tui_helpers import async_test, settle


def long_library(folder: Path, n: int = 120) -> Path:
    """Enough invented rows (linear and branched alkanes, repeated) to scroll."""
    smiles = ["C" * (2 + i % 9) for i in range(n // 2)] + ["CC(C)" + "C" * (i % 7) for i in range(n - n // 2)]
    path = folder / "qx_long.csv"
    pd.DataFrame({"id": [f"QX-{i:04d}" for i in range(1, n + 1)], "smiles": smiles}).to_csv(path, index=False)
    return path


@async_test
async def test_a_new_sort_goes_to_the_top(tmp_path):
    app = HalosiftApp(str(long_library(tmp_path)))
    async with app.run_test(size=(100, 24)) as pilot:
        await settle(pilot)
        table = app.query_one(LibraryTable)
        await pilot.press("pagedown", "pagedown", "down")
        assert table.cursor > 20 and table.scroll_offset.y > 0
        while table.columns[table.picked].key != "br2_major_pct":
            await pilot.press("right")
        await pilot.press("s")
        await settle(pilot)
        assert table.cursor == 0 and table.scroll_offset.y == 0
        # Reversing the order also starts at the (new) top.
        await pilot.press("pagedown")
        await pilot.press("s")
        await settle(pilot)
        assert app.sort.descending and table.cursor == 0 and table.scroll_offset.y == 0
        # Other updates (a mark, a filter) keep the cursor on its row.
        await pilot.press("down", "down")
        row = table.cursor_row
        await pilot.press("space")
        await settle(pilot)
        assert table.cursor_row != row  # Space steps down
        await pilot.press("up")
        assert table.cursor_row == row


@async_test
async def test_detail_steps_move_the_table_cursor_and_reset_scroll(tmp_path):
    app = HalosiftApp(str(long_library(tmp_path)))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        table = app.query_one(LibraryTable)
        await pilot.press("down", "down", "enter")
        await settle(pilot)
        screen = app.screen
        assert isinstance(screen, DetailScreen) and screen.position == 2
        body = screen.query_one("#detail-body")
        body.scroll_end(animate=False)
        await pilot.pause()
        assert body.scroll_offset.y > 0
        await pilot.press("n", "n", "n")
        await settle(pilot)
        assert screen.position == 5
        assert body.scroll_offset.y == 0  # the new row starts at its top
        await pilot.press("p")
        await settle(pilot)
        shown = screen.row
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, DetailScreen)
        assert table.cursor == 4 and table.cursor_row == shown
