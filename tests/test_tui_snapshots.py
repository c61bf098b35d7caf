"""Snapshot tests of the app's screens (pytest-textual-snapshot). Update with --snapshot-update.

Every snapshot waits for screening and table updates to finish first, and the
library is a small file of invented IDs written here, so nothing in view
depends on timing, paths or the bundled sample's contents.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
from halosift.tui.app import HalosiftApp
from halosift.tui.table import LibraryTable
from tui_helpers import settle, write_library


def make_app(folder: Path) -> HalosiftApp:
    return HalosiftApp(str(write_library(folder)))


async def open_detail_of_ethylbenzene(pilot) -> None:
    await settle(pilot)
    app = pilot.app
    table = app.query_one(LibraryTable)
    row = int(np.flatnonzero(app.frame["smiles"].to_numpy() == "CCc1ccccc1")[0])
    table.cursor = int(np.flatnonzero(table.rows == row)[0])
    await pilot.press("enter")
    await settle(pilot)  # the products are worked out in a worker


async def mark_and_sort(pilot) -> None:
    """Mark two rows, sort by Br2 % (largest first) and leave the cursor on row 3."""
    await settle(pilot)
    await pilot.press("space", "space")
    table = pilot.app.query_one(LibraryTable)
    while table.columns[table.picked].key != "br2_major_pct":
        await pilot.press("right")
    await pilot.press("s", "s")
    await settle(pilot)
    await pilot.press("down", "down")
    await pilot.pause()


def test_main_80x24(snap_compare, tmp_path):
    assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=settle)


def test_main_120x40(snap_compare, tmp_path):
    assert snap_compare(make_app(tmp_path), terminal_size=(120, 40), run_before=mark_and_sort)


def test_detail_120x40(snap_compare, tmp_path):
    assert snap_compare(make_app(tmp_path), terminal_size=(120, 40), run_before=open_detail_of_ethylbenzene)


def test_detail_80x24(snap_compare, tmp_path):
    assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=open_detail_of_ethylbenzene)


def test_help_80x24(snap_compare, tmp_path):
    async def open_help(pilot) -> None:
        await settle(pilot)
        await pilot.press("question_mark")
        await pilot.pause()

    assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=open_help)


def test_filter_form_80x24(snap_compare, tmp_path):
    async def open_filters(pilot) -> None:
        await settle(pilot)
        await pilot.press("f")
        await pilot.pause()

    assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=open_filters)


#: Invented rows (Wrenfield Saturates, IDs made up) whose sites have the longest names the form offers.
LONG_SITE_ROWS = [
    ("WRS-F0001", "C1CC2CCC1C2"),
    ("WRS-F0002", "CC1CC2CCC1C2"),
    ("WRS-F0003", "CCC#C"),
    ("WRS-F0004", "CC(C)C#C"),
    ("WRS-F0005", "CC#CC"),
    ("WRS-F0006", "C=CC(C)CC1CC1"),
    ("WRS-F0007", "CC(C)Cc1ccccc1"),
]


def long_site_app(folder: Path) -> HalosiftApp:
    import pandas as pd

    path = folder / "long_sites.csv"
    pd.DataFrame(LONG_SITE_ROWS, columns=["id", "smiles"]).to_csv(path, index=False)
    return HalosiftApp(str(path))


def test_filter_form_long_site_names_80x24(snap_compare, tmp_path):
    """Site names up to 'propargylic-secondary' flow onto more lines instead of being cut."""

    async def open_filters(pilot) -> None:
        await settle(pilot)
        await pilot.press("f")
        await pilot.pause()

    assert snap_compare(long_site_app(tmp_path), terminal_size=(80, 24), run_before=open_filters)


def test_filter_form_end_80x24(snap_compare, tmp_path):
    """The foot of the form: flags, confidence levels and duplicate modes, every label whole."""

    async def open_filters_at_end(pilot) -> None:
        await settle(pilot)
        await pilot.press("f")
        await pilot.pause()
        pilot.app.screen.query_one("#filter-box").scroll_end(animate=False, immediate=True)
        await pilot.pause()

    assert snap_compare(long_site_app(tmp_path), terminal_size=(80, 24), run_before=open_filters_at_end)


def test_rejected_view_80x24(snap_compare, tmp_path):
    async def rejected(pilot) -> None:
        await settle(pilot)
        await pilot.press("v", "v")
        await settle(pilot)

    assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=rejected)


def test_main_monochrome_80x24(snap_compare, tmp_path, monkeypatch):
    """With NO_COLOR set, verdicts, cursor and marks still read from text and symbols."""
    monkeypatch.setenv("NO_COLOR", "1")
    assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=mark_and_sort)
