"""Nothing on screen is cut mid-word or without a mark: table cells end in '…' where cut, form labels show whole.

The checks read the screen as drawn (the compositor's lines), not the widgets'
own lines: a vertical scrollbar drawn over a table's last cells, or a container
narrower than a label, cuts text that the widget itself rendered whole.
"""

from __future__ import annotations

from pathlib import Path

import pandas as pd
from halosift.tui.app import HalosiftApp
from halosift.tui.filter_form import FilterForm, FlowGrid
from halosift.tui.table import LibraryTable, clip, fit
from halosift.tui.toggles import ChoiceButton, TickBox
from textual.widgets import Static
from tui_helpers import async_test, settle

#: Long prose and long SMILES of the kinds the table shows (reasons, flags, majors), invented.
TEXTS = (
    "contains oxygen; only hydrocarbons (C, H) are screened",
    "isotope-labelled atoms; kinetic isotope effects are not modelled",
    "CC(C)(C)C(C)(C)C(C)(C)CCl",
    "C" * 70 + "(C)C",
    "cyclopropylmethyl, bridgehead, cage",
    "WRS-X99939-LONG-IDENTIFIER",
    "a b",
    "word",
)

#: Invented rows (Wrenfield Saturates, IDs made up): enough rows for a vertical scrollbar at 24 lines,
#: long SMILES, long majors, and rejected rows with long reasons.
ROWS = [
    ("WRS-C0001", "CC(C)(C)C(C)(C)C(C)(C)C"),
    ("WRS-C0002", "CC(C)CC(C)(C)CC(C)(C)CC(C)C"),
    ("WRS-C0003", "C1CC2CCC1C2"),
    ("WRS-C0004", "CC1CC2CCC1C2"),
    ("WRS-C0005", "CCC#C"),
    ("WRS-C0006", "CC(C)C#C"),
    ("WRS-C0007", "CC#CC"),
    ("WRS-C0008", "C=CC(C)CC1CC1"),
    ("WRS-C0009", "CCCCCCCCCCCCCCCCCC(C)CCCC"),
    ("WRS-C0010", "CC(C)Cc1ccccc1"),
    ("WRS-C0011", "CCO"),
    ("WRS-C0012", "[2H]C"),
    ("WRS-C0013", "CC.CCC"),
    ("WRS-C0014", "C[CH2]"),
] + [(f"WRS-C{n:04d}", "C" * (n % 9 + 2)) for n in range(15, 45)]


def write_rows(folder: Path) -> Path:
    """Write :data:`ROWS` as a CSV and return its path."""
    path = folder / "cuts.csv"
    frame = pd.DataFrame(ROWS, columns=["id", "smiles"])
    frame["purity_pct"] = [99.5 - 0.25 * i for i in range(len(frame))]  # the input's own numbers (shown with c)
    frame.to_csv(path, index=False)
    return path


def screen_lines(app) -> list[str]:
    """The screen's text as drawn, one string per line."""
    return [strip.text for strip in app.screen._compositor.render_strips()]


def test_cut_text_ends_in_an_ellipsis_at_every_width():
    for text in TEXTS:
        for width in range(0, len(text) + 3):
            cell = fit(text, width)
            assert len(cell) == width, (text, width)
            if len(text) <= width:
                assert cell.rstrip() == text
                continue
            shown = cell.rstrip()
            if width:
                assert shown.endswith("…"), (text, width, cell)
                assert text.startswith(shown[:-1]), (text, width, cell)
            # Prose is cut between words when a boundary is near; the kept words are whole.
            if " " in text[:width] and width >= 8:
                kept = shown[:-1]
                assert text[len(kept)] in " ,;:" or " " not in kept, (text, width, cell)
    assert clip("contains oxygen; only hydrocarbons (C, H) are screened", 46) == (
        "contains oxygen; only hydrocarbons (C, H) are…"
    )
    assert clip("isotope-labelled atoms; kinetic isotope effects", 44) == "isotope-labelled atoms; kinetic isotope…"


async def check_table_cells(pilot, table: LibraryTable) -> int:
    """Every text cell on screen shows its whole value or ends in '…'; returns how many were cut."""
    cut_cells = 0
    table._fill_window()
    lines = screen_lines(pilot.app)
    left = table.scrollable_content_region.x
    right = left + table.view_width
    fixed = table._fixed_width()
    scroll_x = int(table.scroll_offset.x)
    cols = table.columns
    top = table.scrollable_content_region.y
    for y in range(1, 1 + min(table.page_height, len(table.rows))):
        line = lines[top + y]
        cells = table._window[int(table.scroll_offset.y) + y - 1]
        spans = []
        x = left + 2
        for i in table._pinned:
            spans.append((i, x, x + cols[i].width))
            x += cols[i].width + 1
        for i in table._scrolling:
            a, b = table._column_span(i)
            lo, hi = max(a, scroll_x), min(b, scroll_x + table.view_width - fixed)
            if hi > lo:
                spans.append((i, left + fixed + lo - scroll_x, left + fixed + hi - scroll_x))
        for i, a, b in spans:
            b = min(b, right)
            shown = line[a:b].strip()
            value = cells[i].strip()
            if cols[i].number:
                assert shown in (value, ""), (cols[i].label, value, line[a:b])  # whole or not at all
                continue
            if shown != value:
                assert shown.endswith("…"), (cols[i].label, value, line[a:b])
                assert value.startswith(shown[:-1]), (cols[i].label, value, line[a:b])
                cut_cells += 1
    return cut_cells


@async_test
async def test_every_cut_text_cell_on_screen_ends_in_an_ellipsis(tmp_path):
    path = write_rows(tmp_path)
    for size in ((80, 24), (64, 20), (101, 24), (150, 30)):
        app = HalosiftApp(str(path), sessions=False)  # a saved session would bring back the last size's toggles
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            await pilot.press("o")  # more columns: reasons, flags, other majors
            await settle(pilot, app)
            await pilot.press("c")  # and the input's own
            await settle(pilot, app)
            assert any(c.key == "purity_pct" and c.number for c in app.query_one(LibraryTable).columns), \
                [(c.key, c.kind) for c in app.query_one(LibraryTable).columns][-4:]
            table = app.query_one(LibraryTable)
            for _ in range(100):  # the scrollbar comes with a layout pass after the rows arrive
                if table.view_width < table.size.width:
                    break
                await pilot.pause(0.02)
            assert table.view_width < table.size.width  # a vertical scrollbar: the case that hid the '…'
            cut_cells = 0
            for x in range(0, table.virtual_size.width, 7):
                table.scroll_to(x=x, animate=False, force=True)
                await pilot.pause()
                cut_cells += await check_table_cells(pilot, table)
            while app.view != "rejected":
                await pilot.press("v")
                await settle(pilot)
            table.scroll_to(x=0, animate=False, force=True)
            await pilot.pause()
            cut_cells += await check_table_cells(pilot, table)
            assert cut_cells > 0, size  # the check saw cut cells, so it can fail


def full_text(widget) -> str:
    """The whole text a form widget is meant to show."""
    if isinstance(widget, (TickBox, ChoiceButton)):
        return str(widget.label)
    content = widget.content if isinstance(widget, Static) else ""
    return str(getattr(content, "plain", content))


@async_test
async def test_every_filter_form_label_shows_whole_at_80x24(tmp_path):
    app = HalosiftApp(str(write_rows(tmp_path)))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("f")
        await pilot.pause()
        form = app.screen
        assert isinstance(form, FilterForm)
        assert any("norbornyl" in s for s in form.sites) and any("propargylic" in s for s in form.sites)
        box = form.query_one("#filter-box")
        widgets = [w for w in form.query("Label, TickBox, ChoiceButton, #filter-title") if full_text(w)]
        assert len(widgets) > 40
        for widget in widgets:
            box.scroll_to_widget(widget, animate=False, immediate=True)
            await pilot.pause()
            region = widget.region
            clip_region = box.scrollable_content_region
            assert clip_region.contains_region(region), (full_text(widget), region, clip_region)
            lines = screen_lines(app)
            drawn = " ".join(lines[y][region.x:region.right] for y in range(region.y, region.bottom))
            want = " ".join(full_text(widget).split())
            assert want in " ".join(drawn.split()), (want, drawn)
        assert all(grid.styles.grid_size_columns * grid.cell_width <= grid.size.width for grid in form.query(FlowGrid))
