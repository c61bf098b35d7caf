"""The app's words: counts, flag labels, each dialog's own footer keys, repeats named in the detail."""

from __future__ import annotations

import importlib
import inspect
import pkgutil

import numpy as np
from halosift.engine.special_sites import FLAGS
from halosift.tui.app import HalosiftApp
from halosift.tui.conditions import ConditionsScreen
from halosift.tui.detail import DetailScreen
from halosift.tui.export import ConfirmScreen, ExportScreen
from halosift.tui.filter_form import FilterForm
from halosift.tui.filters import flag_label
from halosift.tui.id_list import IdListScreen
from halosift.tui.table import LibraryTable
from halosift.tui.wording import counted
from textual.screen import ModalScreen
from textual.widgets._footer import FooterKey
from tui_helpers import QX_ROWS, async_test, plain, settle, write_library

from halosift import tui

SIZE = (120, 40)


def test_counted_takes_the_number_of_its_noun() -> None:
    assert [counted(n, "row") for n in (0, 1, 2, 1234)] == ["0 rows", "1 row", "2 rows", "1,234 rows"]
    assert counted(1, "marked row") == "1 marked row" and counted(3, "ID") == "3 IDs"
    assert counted(2, "entry", "entries") == "2 entries"


def test_no_count_message_in_the_app_writes_a_fixed_plural() -> None:
    # The class of "1 rows marked": a number formatted straight before a plural noun. Every count goes through
    # counted() instead (counts that are never 1, e.g. "N of M", do not match).
    import re

    pattern = re.compile(r"\{[^{}]*:,\}\s+(rows|marks|IDs|entries|steps)\b")
    for info in pkgutil.iter_modules(tui.__path__):
        source = inspect.getsource(importlib.import_module(f"halosift.tui.{info.name}"))
        assert not pattern.findall(source), info.name


def test_every_flag_has_display_text() -> None:
    assert all("_" not in flag_label(flag) and flag_label(flag) for flag in FLAGS)
    assert flag_label("central_bond") == "central C–C bond"


def _footer_keys(screen) -> set[str]:
    return {key.description for key in screen.query(FooterKey)}


def _own_descriptions(screen_class) -> set[str]:
    return {b.description for b in screen_class.BINDINGS if b.show}


def test_every_dialog_is_covered_below() -> None:
    dialogs = set()
    for info in pkgutil.iter_modules(tui.__path__):
        module = importlib.import_module(f"halosift.tui.{info.name}")
        dialogs |= {c for _, c in inspect.getmembers(module, inspect.isclass)
                    if issubclass(c, ModalScreen) and c.__module__ == module.__name__}
    assert dialogs == {ConditionsScreen, ExportScreen, ConfirmScreen, FilterForm, IdListScreen}


@async_test
async def test_every_dialog_shows_its_own_keys_not_the_tables(tmp_path) -> None:
    app = HalosiftApp(str(write_library(tmp_path)))
    table_keys = {b.description for b in LibraryTable.BINDINGS if b.show}
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        for key, dialog in (("f", FilterForm), ("t", ConditionsScreen), ("m", IdListScreen), ("e", ExportScreen)):
            await pilot.press(key)
            await pilot.pause()
            assert isinstance(app.screen, dialog)
            shown = _footer_keys(app.screen)
            assert _own_descriptions(dialog) <= shown and not shown & table_keys, (dialog, shown)
            if dialog is ExportScreen:  # the Replace? dialog, over the export form
                existing = tmp_path / "there.csv"
                existing.write_text("x\n", encoding="utf-8")
                app.screen.query_one("#export-path").value = str(existing)
                await pilot.press("enter")
                await pilot.pause()
                assert isinstance(app.screen, ConfirmScreen)
                shown = _footer_keys(app.screen)
                assert _own_descriptions(ConfirmScreen) <= shown and not shown & table_keys, shown
                await pilot.press("n")
                await pilot.pause()
            await pilot.press("escape")
            await pilot.pause()
            assert not isinstance(app.screen, ModalScreen)


@async_test
async def test_undo_toast_counts_in_the_singular(tmp_path) -> None:
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("space")  # one row marked by hand
        await pilot.press("a", "z")  # mark all shown, then undo it
        await pilot.pause()
        assert int(app.marked.sum()) == 1
        messages = [n.message for n in app._notifications]
        assert any(m.endswith("; 1 row marked") for m in messages), messages
        assert not any("1 rows" in m for m in messages)


@async_test
async def test_detail_names_the_row_a_repeat_repeats(tmp_path) -> None:
    ids = [i for i, _ in QX_ROWS]
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        table = app.query_one(LibraryTable)
        first, repeat = ids.index("QX-0003"), ids.index("QX-0011")  # CC(C)C twice, written differently
        assert app.frame["duplicate_of"].iloc[repeat] == first + 1
        for row, says in ((repeat, f"same structure as input row {first + 1}"), (first, None)):
            table.cursor = int(np.flatnonzero(table.rows == row)[0])
            await pilot.press("enter")
            await settle(pilot)
            assert isinstance(app.screen, DetailScreen)
            head = plain(app.screen.query_one("#detail-head"))
            assert (says in head) if says else ("Repeat:" not in head), head
            await pilot.press("escape")
            await pilot.pause()
