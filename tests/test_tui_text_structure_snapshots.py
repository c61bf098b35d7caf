"""Snapshots of the site detail at 80×24 with the structure drawn in text (no inline images).

Update with --snapshot-update, only after looking at the new pictures. The
library is an invented supplier's list (Wrenfield Saturates, IDs made up),
written here; every snapshot waits for the detail's worker first.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from halosift.tui.app import HalosiftApp
from halosift.tui.table import LibraryTable
from tui_helpers import settle

ROWS = [
    ("WS-2201", "CC(C)CC"),  # isopentane
    ("WS-2202", "CC1CCCCC1"),  # methylcyclohexane
    ("WS-2203", "C1CC2CCC1C2"),  # norbornane
    ("WS-2204", "CC(C)Cc1ccccc1"),  # isobutylbenzene
]


def make_app(folder: Path) -> HalosiftApp:
    path = folder / "wrenfield.csv"
    pd.DataFrame(ROWS, columns=["id", "smiles"]).to_csv(path, index=False)
    return HalosiftApp(str(path), graphics=None)


def open_detail(smiles: str, *, scroll_to_structure: bool):
    async def run_before(pilot) -> None:
        await settle(pilot)
        app = pilot.app
        table = app.query_one(LibraryTable)
        row = int(np.flatnonzero(app.frame["smiles"].to_numpy() == smiles)[0])
        table.cursor = int(np.flatnonzero(table.rows == row)[0])
        await pilot.press("enter")
        await settle(pilot)
        if scroll_to_structure:
            body = app.screen.query_one("#detail-body")
            body.scroll_to_widget(app.screen.query_one("#detail-structure"), animate=False, top=True)
            await pilot.pause()

    return run_before


@pytest.mark.parametrize(
    ("smiles", "scrolled"),
    [("CC(C)CC", False), ("CC1CCCCC1", True), ("C1CC2CCC1C2", True), ("CC(C)Cc1ccccc1", True)],
    ids=["isopentane", "methylcyclohexane", "norbornane", "isobutylbenzene"],
)
def test_detail_text_structure_80x24(snap_compare, tmp_path, smiles, scrolled):
    assert snap_compare(make_app(tmp_path), terminal_size=(80, 24), run_before=open_detail(smiles, scroll_to_structure=scrolled))
