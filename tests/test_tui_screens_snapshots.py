"""Snapshot tests of the conditions panel, the detail's working state and the 80×24 layout.

Update with --snapshot-update, only after looking at the new pictures. Every
snapshot waits for screening and table updates first; the library is a small
file of invented IDs written here.
"""

from __future__ import annotations

import threading
from pathlib import Path

import numpy as np
from halosift.tui.app import HalosiftApp
from halosift.tui.table import LibraryTable
from tui_helpers import settle, write_library


def make_app(folder: Path) -> HalosiftApp:
    return HalosiftApp(str(write_library(folder)))


def test_conditions_panel_refusing_a_value_80x24(snap_compare, tmp_path):
    async def refuse(pilot) -> None:
        await settle(pilot)
        await pilot.press("t")
        await pilot.pause()
        while pilot.app.focused.id != "cond-threshold":
            await pilot.press("tab")
        await pilot.press("end", "backspace", "backspace", "1", "0", "1", "enter")
        await settle(pilot)

    assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=refuse)


def test_conditions_panel_pending_80x24(snap_compare, tmp_path):
    async def pending(pilot) -> None:
        await settle(pilot)
        await pilot.press("t")
        await pilot.pause()
        while pilot.app.focused.id != "cond-br2":
            await pilot.press("tab")
        await pilot.press("end", "backspace", "backspace", "backspace", "7", "0")
        await settle(pilot)

    assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=pending)


def test_detail_working_80x24(snap_compare, tmp_path, monkeypatch):
    gate = threading.Event()
    from halosift.engine.library import Library

    original = Library.products

    def slow(self, row, conditions=None):
        gate.wait(30)
        return original(self, row, conditions)

    async def open_slow(pilot) -> None:
        await settle(pilot)
        monkeypatch.setattr(Library, "products", slow)
        app = pilot.app
        table = app.query_one(LibraryTable)
        row = int(np.flatnonzero(app.frame["smiles"].to_numpy() == "CCc1ccccc1")[0])
        table.cursor = int(np.flatnonzero(table.rows == row)[0])
        await pilot.press("enter")
        await pilot.pause(0.2)

    try:
        assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=open_slow)
    finally:
        gate.set()


def test_scrolled_right_with_filters_80x24(snap_compare, tmp_path):
    """ID and verdict stay at the left, numbers are whole, the header keeps whole phrases."""

    async def scrolled(pilot) -> None:
        from halosift.tui.filters import FilterSpec

        await settle(pilot)
        pilot.app.filters = FilterSpec(min_br2_pct=50.0, max_products=4, site_types=frozenset({"tertiary", "primary"}))
        await pilot.press("o")
        await settle(pilot)
        for _ in range(9):
            await pilot.press("right")
        await pilot.pause()

    assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=scrolled)
