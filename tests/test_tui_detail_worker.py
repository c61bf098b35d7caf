"""The site detail works out products in a worker: the screen stays live, Esc leaves at once, stale answers are dropped."""

from __future__ import annotations

import threading

import numpy as np
from halosift.tui.app import HalosiftApp
from halosift.tui.detail import WORKING_NOTE, DetailScreen
from halosift.tui.table import LibraryTable
from tui_helpers import async_test, plain, settle, write_library

SIZE = (120, 40)




def gate_products(monkeypatch, library, slow_rows: set[int]) -> threading.Event:
    """Make Library.products block for ``slow_rows`` until the returned event is set (a slow re-perception)."""
    gate = threading.Event()
    original = type(library).products

    def products(self, row, conditions=None):
        if row in slow_rows:
            assert gate.wait(30), "the test never opened the gate"
        return original(self, row, conditions)

    monkeypatch.setattr(type(library), "products", products)
    return gate


async def open_row(pilot, smiles: str) -> int:
    app = pilot.app
    table = app.query_one(LibraryTable)
    row = int(np.flatnonzero(app.frame["smiles"].to_numpy() == smiles)[0])
    table.cursor = int(np.flatnonzero(table.rows == row)[0])
    await pilot.press("enter")
    await pilot.pause()
    return row


@async_test
async def test_slow_detail_shows_working_and_the_screen_stays_live(tmp_path, monkeypatch):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        slow = int(np.flatnonzero(app.frame["smiles"].to_numpy() == "CCc1ccccc1")[0])
        gate = gate_products(monkeypatch, app.library, {slow})
        try:
            await open_row(pilot, "CCc1ccccc1")
            screen = app.screen
            assert isinstance(screen, DetailScreen) and screen.working
            assert "working…" in plain(screen.query_one("#detail-head"))
            assert plain(screen.query_one("#detail-products")) == WORKING_NOTE
            # The interface thread is free: a key is handled while the products are still being worked out.
            await pilot.press("space")
            await pilot.pause()
            assert app.marked[slow] and "on shortlist" in plain(screen.query_one("#detail-head"))
            # Esc leaves at once, before the work is done.
            await pilot.press("escape")
            await pilot.pause()
            assert not isinstance(app.screen, DetailScreen)
        finally:
            gate.set()
        await settle(pilot)
        assert not isinstance(app.screen, DetailScreen)


@async_test
async def test_answer_for_a_row_already_left_is_not_shown(tmp_path, monkeypatch):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        slow = int(np.flatnonzero(app.frame["smiles"].to_numpy() == "CCc1ccccc1")[0])
        gate = gate_products(monkeypatch, app.library, {slow})
        try:
            await open_row(pilot, "CCc1ccccc1")
            screen = app.screen
            assert screen.working and screen.row == slow
            await pilot.press("n")  # on to the next row while the slow one is still being worked out
            await settle(pilot)
            following = screen.row
            assert following != slow and not screen.working
            assert screen.result is not None and screen.result.row == following
            shown = plain(screen.query_one("#detail-products"))
        finally:
            gate.set()
        # The slow row's answer arrives now; it must not replace the row on screen.
        await pilot.pause(0.3)
        await settle(pilot)
        assert screen.row == following and screen.result.row == following
        assert plain(screen.query_one("#detail-products")) == shown
        expected = app.library.products(following, app.conditions)
        for p in expected.itertuples():
            assert p.product in shown


@async_test
async def test_a_failing_detail_is_one_line(tmp_path, monkeypatch):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)

        def broken(self, row, conditions=None):
            raise RuntimeError("perception\nbroke")

        monkeypatch.setattr(type(app.library), "products", broken)
        await open_row(pilot, "CCC")
        await settle(pilot)
        screen = app.screen
        assert isinstance(screen, DetailScreen) and not screen.working
        body = plain(screen.query_one("#detail-products"))
        assert body == "Could not work out this row's products: RuntimeError: perception broke"
