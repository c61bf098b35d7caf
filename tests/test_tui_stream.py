"""Pilot tests: rows appear while the library is perceived, Esc keeps them (cached), r resumes with only the rest."""

from __future__ import annotations

import threading
from pathlib import Path

import numpy as np
import pytest
from halosift.engine import parallel
from halosift.engine.cache import PerceptionCache
from halosift.tui.app import HalosiftApp
from halosift.tui.filters import FilterSpec
from halosift.tui.table import LibraryTable
from tui_helpers import QX_ROWS, async_test, plain, settle, write_library

SIZE = (120, 40)
#: Strings per chunk: QX_ROWS (14 distinct strings) takes four chunks.
CHUNK = 4


class Gate:
    """Stands in for the engine's perception: the first chunk goes through, later ones wait to be let go."""

    def __init__(self, monkeypatch: pytest.MonkeyPatch) -> None:
        self.open = threading.Event()
        self.calls: list[list[str]] = []
        real = parallel.perceive

        def gated(chunk, *args, **kwargs):
            if self.calls:
                self.open.wait(20)
            self.calls.append(list(chunk))
            return real(chunk, *args, **kwargs)

        monkeypatch.setattr(parallel, "CHUNK", CHUNK)
        monkeypatch.setattr(parallel, "perceive", gated)

    def perceived(self) -> list[str]:
        return [s for chunk in self.calls for s in chunk]


async def until(pilot, test, rounds: int = 500) -> None:
    """Pause until ``test()`` holds."""
    for _ in range(rounds):
        if test():
            return
        await pilot.pause(0.02)
    raise AssertionError("the app never got there")


@pytest.fixture
def cache_dir(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    folder = tmp_path / "cache"
    monkeypatch.setenv("HALOSIFT_CACHE_DIR", str(folder))
    return folder


def sorted_descending(values: np.ndarray) -> bool:
    """Largest first, missing values last."""
    missing = np.isnan(values)
    present = values[~missing]
    return bool((present[:-1] >= present[1:]).all() and not missing[: len(present)].any())


def shown_ids(app: HalosiftApp) -> list[str]:
    return app.frame["id"].to_numpy()[app.query_one(LibraryTable).rows].tolist()


@async_test
async def test_rows_appear_before_perception_finishes_and_sort_and_filter_follow(tmp_path, cache_dir, monkeypatch):
    gate = Gate(monkeypatch)
    app = HalosiftApp(str(write_library(tmp_path)), sessions=False)
    async with app.run_test(size=SIZE) as pilot:
        table = app.query_one(LibraryTable)
        await until(pilot, lambda: app.phase == "streaming" and len(table.rows) > 0)
        assert len(gate.calls) == 1  # the rest is still waiting: these rows came from the first chunk
        assert shown_ids(app) == [i for i, _ in QX_ROWS[:CHUNK]]  # perceived rows only, none pending
        counts = plain(app.query_one("#counts"))
        assert f"{CHUNK} of {len(QX_ROWS)} rows perceived" in counts and "Esc stops" in counts

        # Sort by Br2 % (descending) and filter on the partial rows.
        app.sort = app.sort.__class__("br2_major_pct", True)
        await until(pilot, lambda: not app._applied_generation != app._generation)
        pct = app.frame["br2_major_pct"].to_numpy()[table.rows]
        assert sorted_descending(pct) and len(pct) == CHUNK
        app.filters = FilterSpec(verdicts=frozenset({"by-symmetry"}))
        await until(pilot, lambda: not app._applied_generation != app._generation)
        ready = app.frame["status"] != "pending"
        expected = set(app.frame.loc[ready & (app.frame["verdict"] == "by-symmetry"), "id"])
        assert set(shown_ids(app)) == expected == {"QX-0001", "QX-0004"}  # ethane, toluene (one abstractable class)
        app.filters = FilterSpec()
        await until(pilot, lambda: len(table.rows) == CHUNK)
        await pilot.press("down")  # the chemist reads the second row shown
        reading = table.cursor_row

        gate.open.set()
        await settle(pilot, app)
        assert app.phase == "ready"
        assert table.cursor_row == reading  # more rows came; the cursor stayed on the row being read
        pct = app.frame["br2_major_pct"].to_numpy()[table.rows]
        assert sorted_descending(pct) and len(pct) > CHUNK  # the sort was applied to the rows that came later
        counts = plain(app.query_one("#counts"))
        assert "perceived" not in counts and f"{len(QX_ROWS)} rows" in counts
        # Every input row is in the final table: screened ones in the library view, the rest with a reason.
        library_view = set(shown_ids(app))
        await pilot.press("v", "v")
        await settle(pilot, app)
        rejected = app.frame.iloc[table.rows]
        assert library_view | set(rejected["id"]) == {i for i, _ in QX_ROWS}
        assert set(rejected["id"]) == {"QX-0009", "QX-0012"} and (rejected["reason"] != "").all()


@async_test
async def test_escape_keeps_done_rows_cached_and_r_resumes_with_only_the_rest(tmp_path, cache_dir, monkeypatch):
    gate = Gate(monkeypatch)
    app = HalosiftApp(str(write_library(tmp_path)), sessions=False)
    async with app.run_test(size=SIZE) as pilot:
        table = app.query_one(LibraryTable)
        await until(pilot, lambda: app.phase == "streaming" and len(table.rows) > 0)
        await pilot.press("space")  # mark the first row while the rest is perceived
        marked = int(table.rows[0])
        await pilot.press("escape")
        gate.open.set()  # the chunk being perceived finishes; then the screen stops
        await until(pilot, lambda: app.phase == "stopped")
        await settle(pilot, app)
        done = gate.perceived()
        assert len(done) < len(QX_ROWS)
        # The rows perceived stay listed and usable; the header says how far it got and how to go on.
        assert shown_ids(app) == [i for i, _ in QX_ROWS[:CHUNK]]
        counts = plain(app.query_one("#counts"))
        assert f"{CHUNK} of {len(QX_ROWS)} rows perceived" in counts and "r resumes" in counts
        assert app.check_action("export", ()) is None  # greyed: not every row is perceived
        # What was perceived is in the cache.
        keys = [s for _, s in QX_ROWS]
        hit, _ = PerceptionCache(cache_dir).lookup(keys)
        assert sorted(np.array(keys)[hit]) == sorted(done)

        gate.calls.clear()
        await pilot.press("r")
        await settle(pilot, app)
        assert app.phase == "ready"
        assert sorted(gate.perceived()) == sorted(set(keys) - set(done))  # only the rest perceived again
        assert bool(app.marked[marked]) and int(app.marked.sum()) == 1  # the mark made meanwhile is kept
        assert len(app.frame) == len(QX_ROWS) and (app.frame["status"].isin(["ok", "rejected"])).all()


@async_test
async def test_reopening_a_stopped_library_shows_the_cached_rows_at_once(tmp_path, cache_dir, monkeypatch):
    gate = Gate(monkeypatch)
    path = write_library(tmp_path)
    app = HalosiftApp(str(path), sessions=False)
    async with app.run_test(size=SIZE) as pilot:
        await until(pilot, lambda: app.phase == "streaming")
        await pilot.press("escape")
        gate.open.set()
        await until(pilot, lambda: app.phase == "stopped")
        await settle(pilot, app)
    done = gate.perceived()

    gate.calls.clear()
    gate.open.clear()
    gate.calls.append([])  # every chunk of the new screen now waits at the gate
    again = HalosiftApp(str(path), sessions=False)
    async with again.run_test(size=SIZE) as pilot:
        table = again.query_one(LibraryTable)
        await until(pilot, lambda: again.phase == "streaming" and len(table.rows) > 0)
        cached_rows = {i for i, s in QX_ROWS if s in done}
        await until(pilot, lambda: not again._applied_generation != again._generation)
        screened = {i for i in shown_ids(again)}
        assert screened <= cached_rows and screened  # listed from the cache before anything new is perceived
        assert gate.perceived() == []
        gate.open.set()
        await settle(pilot, again)
        assert again.phase == "ready"
        assert not set(gate.perceived()) & set(done)


@async_test
async def test_the_screening_thread_goes_on_only_once_a_delivery_is_drawn(tmp_path, cache_dir, monkeypatch):
    """The hand-over that keeps the interface thread alone with the interpreter lock while it draws."""
    import halosift.tui.app_screening as screening_module

    monkeypatch.setattr(screening_module, "SHOWN_WAIT_S", 60.0)  # a missed release would stall the test, not pass it
    gate = Gate(monkeypatch)
    gate.open.set()
    from halosift import engine

    real_load = engine.load_library
    asked: list[dict] = []

    def load(*args, **kwargs):
        asked.append(kwargs)
        return real_load(*args, **{**kwargs, "partial_interval": 0.0})  # every chunk is a delivery

    monkeypatch.setattr(engine, "load_library", load)
    deliveries: list[threading.Event] = []
    seen_at_chunk: list[list[bool]] = []
    real_perceive = parallel.perceive

    def watching(chunk, *args, **kwargs):
        seen_at_chunk.append([event.is_set() for event in deliveries])
        return real_perceive(chunk, *args, **kwargs)

    monkeypatch.setattr(parallel, "perceive", watching)
    real_take = screening_module.ScreeningMixin.on_screening_partial

    def take(self, message):
        deliveries.append(message.shown)
        real_take(self, message)

    # On the class that defines it: Textual calls the handler of every class in the MRO that has one.
    monkeypatch.setattr(screening_module.ScreeningMixin, "on_screening_partial", take)
    app = HalosiftApp(str(write_library(tmp_path)), sessions=False)
    async with app.run_test(size=SIZE) as pilot:
        await until(pilot, lambda: app.phase == "ready")
        await settle(pilot, app)
    assert len(deliveries) >= 2 and all(event is not None for event in deliveries)
    # Each chunk after the first began only when every delivery before it had been drawn.
    assert [len(seen) for seen in seen_at_chunk[1:]] == list(range(1, len(seen_at_chunk)))
    assert all(all(seen) for seen in seen_at_chunk)
    assert all(event.is_set() for event in deliveries)
    assert asked[0]["background"] is True  # and its worker processes yield the CPU to the interface


@async_test
async def test_a_delivery_never_drawn_holds_the_screen_up_only_briefly(tmp_path, cache_dir, monkeypatch):
    import halosift.tui.app_screening as screening_module

    monkeypatch.setattr(screening_module, "SHOWN_WAIT_S", 0.2)
    monkeypatch.setattr(HalosiftApp, "_release_screening", lambda self: None)  # the app never says "drawn"
    gate = Gate(monkeypatch)
    gate.open.set()
    app = HalosiftApp(str(write_library(tmp_path)), sessions=False)
    async with app.run_test(size=SIZE) as pilot:
        await until(pilot, lambda: app.phase == "ready")
        await settle(pilot, app)
        assert len(app.frame) == len(QX_ROWS) and (app.frame["status"].isin(["ok", "rejected"])).all()


@async_test
async def test_sort_before_the_first_rows_says_why_and_works_once_they_are_in(tmp_path, cache_dir, monkeypatch):
    release = threading.Event()
    real = parallel.perceive

    def held(chunk, *args, **kwargs):
        release.wait(20)
        return real(chunk, *args, **kwargs)

    monkeypatch.setattr(parallel, "perceive", held)
    notes: list[str] = []
    app = HalosiftApp(str(write_library(tmp_path)), sessions=False)
    monkeypatch.setattr(app, "notify", lambda message, **kw: notes.append(str(message)))
    async with app.run_test(size=SIZE) as pilot:
        await until(pilot, lambda: app.phase == "screening")
        await pilot.press("s")
        assert any("Wait for the first rows" in n for n in notes), notes
        release.set()
        await until(pilot, lambda: app.phase == "ready")
        await settle(pilot, app)
        app.set_focus(None)  # the table not focused: the app's own s still sorts
        await pilot.press("s")
        await settle(pilot, app)
        assert app.sort.column is not None and app.focused is app.query_one(LibraryTable)
