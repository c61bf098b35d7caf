"""Pilot tests: the footer shows the table's keys at 80 columns in every phase, and a key that does nothing now says why."""

from __future__ import annotations

from pathlib import Path

import pytest
from halosift.tui.app import TABLE_ACTIONS, HalosiftApp
from halosift.tui.detail import DetailScreen
from halosift.tui.help import HelpScreen
from halosift.tui.table import LibraryTable
from test_tui_stream import CHUNK, Gate, until
from textual.binding import Binding
from textual.widgets._footer import FooterKey
from tui_helpers import QX_ROWS, async_test, settle, write_library

SIZE = (80, 24)
#: The keys a chemist needs while the table is shown; the footer must show each in full.
TABLE_KEYS = {"f": "Filter", "t": "Conditions", "v": "View", "e": "Export"}


@pytest.fixture
def cache_dir(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    folder = tmp_path / "cache"
    monkeypatch.setenv("HALOSIFT_CACHE_DIR", str(folder))
    return folder


def footer_problems(app: HalosiftApp, needed: dict[str, str]) -> list[str]:
    """Footer keys that run past the screen's right edge, and needed keys that are not shown."""
    width = app.size.width
    keys = list(app.screen.query(FooterKey))
    problems = [f"{k.key_display} {k.description} ends at {k.region.right} > {width}"
                for k in keys if k.region.right > width or k.region.width == 0]
    shown = {k.key_display: k.description for k in keys}
    problems += [f"{key} {label} not shown" for key, label in needed.items() if shown.get(key) != label]
    return problems


def key_of(action: str) -> str:
    """The first key bound to one of the app's actions, as Pilot presses it."""
    binding = next(b for b in HalosiftApp.BINDINGS if isinstance(b, Binding) and b.action == action)
    return binding.key.split(",")[0]


def messages(app: HalosiftApp) -> list[str]:
    return [n.message for n in app._notifications]


@async_test
async def test_footer_fits_80_columns_in_every_phase_and_screen(tmp_path, cache_dir, monkeypatch):
    gate = Gate(monkeypatch)
    app = HalosiftApp(str(write_library(tmp_path)), sessions=False)
    async with app.run_test(size=SIZE) as pilot:
        table = app.query_one(LibraryTable)
        await until(pilot, lambda: app.phase == "streaming" and len(table.rows) > 0)
        await pilot.pause(0.1)
        assert footer_problems(app, TABLE_KEYS) == [], "streaming"
        await pilot.press("escape")
        gate.open.set()
        await until(pilot, lambda: app.phase == "stopped")
        await settle(pilot, app)
        await pilot.pause(0.1)
        assert footer_problems(app, TABLE_KEYS) == [], "stopped"
        await pilot.press("r")
        await settle(pilot, app)
        assert app.phase == "ready"
        await pilot.pause(0.1)
        assert footer_problems(app, TABLE_KEYS) == [], "ready"
        for key, screen in (("enter", "detail"), ("question_mark", "help"), ("f", "filter form"),
                            ("t", "conditions"), ("e", "export"), ("m", "marks from a file")):
            await pilot.press(key)
            await pilot.pause(0.3)
            assert len(app.screen_stack) == 2, screen
            assert footer_problems(app, {}) == [], screen
            await pilot.press("escape")
            await pilot.pause(0.2)


@async_test
async def test_every_key_disabled_while_screening_says_why(tmp_path, cache_dir, monkeypatch):
    gate = Gate(monkeypatch)
    gate.calls.append([])  # every chunk waits at the gate: no rows yet
    app = HalosiftApp(str(write_library(tmp_path)), sessions=False)
    async with app.run_test(size=SIZE) as pilot:
        await until(pilot, lambda: app.phase == "screening")
        for action in sorted(TABLE_ACTIONS | {"rescreen"}):
            assert not app.check_action(action, ()), action
            app.clear_notifications()
            await pilot.press(key_of(action))
            await pilot.pause()
            said = messages(app)
            assert len(said) == 1 and "\n" not in said[0], (action, said)
            assert ("under way" if action == "rescreen" else "Wait for the first rows") in said[0], action
        gate.open.set()
        await settle(pilot, app)
        assert app.phase == "ready"
        for action, words in (("rescreen", "only after a stop"), ("cancel_screening", "Nothing to cancel")):
            app.clear_notifications()
            await pilot.press(key_of(action))
            await pilot.pause()
            assert any(words in m for m in messages(app)), (action, messages(app))
        # Over the detail and the help, the table's keys are not theirs: each says so.
        for opener, screen in (("enter", DetailScreen), ("question_mark", HelpScreen)):
            await pilot.press(opener)
            await until(pilot, lambda screen=screen: isinstance(app.screen, screen))
            for action in sorted(TABLE_ACTIONS):
                app.clear_notifications()
                await pilot.press(key_of(action))
                await pilot.pause()
                assert isinstance(app.screen, screen), action
                assert any("Esc goes back" in m for m in messages(app)), (screen.__name__, action, messages(app))
            await pilot.press("escape")
            await until(pilot, lambda: len(app.screen_stack) == 1)


@async_test
async def test_export_while_rows_stream_in_says_how_far_perception_got(tmp_path, cache_dir, monkeypatch):
    gate = Gate(monkeypatch)
    app = HalosiftApp(str(write_library(tmp_path)), sessions=False)
    async with app.run_test(size=SIZE) as pilot:
        table = app.query_one(LibraryTable)
        await until(pilot, lambda: app.phase == "streaming" and len(table.rows) > 0)
        await until(pilot, lambda: app._applied_generation == app._generation)
        assert app.check_action("export", ()) is None  # greyed in the footer
        app.clear_notifications()
        await pilot.press("e")
        await pilot.pause()
        assert len(app.screen_stack) == 1
        expected = f"Export waits for the whole library: {CHUNK} of {len(QX_ROWS)} rows perceived"
        assert messages(app) == [expected]
        await pilot.press("escape")
        gate.open.set()
        await until(pilot, lambda: app.phase == "stopped")
        await settle(pilot, app)
        app.clear_notifications()
        await pilot.press("e")
        await pilot.pause()
        assert len(messages(app)) == 1 and messages(app)[0].endswith("rows perceived (r resumes)")
