"""80×24 layout: key columns pinned, numbers never cut, whole phrases in the header, user-facing titles, dialog widths."""

from __future__ import annotations

import pytest
from halosift.tui.app import HalosiftApp
from halosift.tui.filters import FilterSpec, SortSpec
from halosift.tui.header import Phrase, column_title, fit_phrases
from halosift.tui.table import _GUTTER, LibraryTable, fit
from tui_helpers import async_test, plain, settle, write_library


@async_test
async def test_keys_stay_pinned_and_numbers_are_whole_at_every_scroll_position(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("o")  # more columns: plenty to scroll through
        await settle(pilot)
        table = app.query_one(LibraryTable)
        cols = table.columns
        keys = [c.key for c in cols]
        verdict = keys.index("verdict")
        id_width = cols[0].width
        fixed = table._fixed_width()
        visible = table.size.width - fixed
        widest = table.virtual_size.width - fixed
        checked_numbers = 0
        for x in range(0, max(1, widest - visible) + 1):
            table.scroll_to(x=x, animate=False, force=True)
            await pilot.pause()
            assert int(table.scroll_offset.x) == x
            table._fill_window()
            for y in range(1, 1 + min(table.page_height, len(table.rows))):
                line = table.render_line(y).text
                position = int(table.scroll_offset.y) + y - 1
                cells = table._window[position]
                # ID and verdict are drawn at the left whatever the scroll position.
                assert line[_GUTTER:_GUTTER + id_width] == fit(cells[0], id_width)
                start = _GUTTER + id_width + 1
                assert line[start:start + cols[verdict].width] == fit(cells[verdict], cols[verdict].width)
                for i in table._scrolling:
                    if not cols[i].number:
                        continue
                    a, b = table._column_span(i)
                    lo, hi = max(a, x), min(b, x + visible)
                    if hi <= lo:
                        continue
                    shown = line[fixed + lo - x:fixed + hi - x]
                    whole = fit(cells[i], cols[i].width, True)
                    assert shown == whole or not shown.strip(), (x, cols[i].label, shown)
                    checked_numbers += bool(shown.strip())
        assert checked_numbers > 0


@async_test
async def test_header_lines_keep_whole_phrases_at_80_columns(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        app.filters = FilterSpec(verdicts=frozenset({"selective", "by-symmetry"}), min_br2_pct=50.0, max_products=3,
                                 site_types=frozenset({"benzylic-secondary", "tertiary"}), text="QX-00")
        app.sort = SortSpec("br2_major_pct", True)
        await settle(pilot)
        width = app.query_one("#settings").size.width
        settings = plain(app.query_one("#settings"))
        counts = plain(app.query_one("#counts"))
        for line in (settings, counts):
            assert len(line) <= width and not line.endswith("…")
        assert settings.startswith("Cl2 25 °C liquid · Br2 125 °C · threshold 90 %")
        assert "Br2 % ▼" in settings and "5 filters on" in settings
        assert "0 marked" in counts


@async_test
async def test_only_user_facing_titles_in_the_header(tmp_path):
    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=(100, 24)) as pilot:
        await settle(pilot)
        app.sort = SortSpec("br2_major_pct", False)
        await settle(pilot)
        await pilot.press("v", "v")  # the rejected view has no Br2 % column
        await settle(pilot)
        assert app.view == "rejected"
        settings = plain(app.query_one("#settings"))
        assert "br2_major_pct" not in settings and "Br2 % ▲" in settings


def test_column_title_never_shows_an_internal_name():
    assert column_title("br2_major_pct", {}) == "Br2 major %"
    assert column_title("cl2_poly_pct", {}) == "Cl2 poly %"
    assert column_title("confidence", {}) == "Confidence"
    assert column_title("br2_major_pct", {"br2_major_pct": "Br2 %"}) == "Br2 %"


def test_fit_phrases_shortens_the_least_important_first():
    phrases = [Phrase(("aaaa aaaa", "aaaa"), keep=1), Phrase(("bbbb bbbb", "bbbb"), keep=2), Phrase(("cc", ""), keep=0)]
    assert fit_phrases(phrases, 100) == "aaaa aaaa │ bbbb bbbb │ cc"
    assert fit_phrases(phrases, 21) == "aaaa aaaa │ bbbb bbbb"
    assert fit_phrases(phrases, 16) == "aaaa │ bbbb bbbb"
    assert fit_phrases(phrases, 11) == "aaaa │ bbbb"
    assert fit_phrases(phrases, 10) == "bbbb"  # nothing shorter: the least important phrase goes whole
    assert fit_phrases(phrases, 3) == "bbbb"  # one phrase wider than the line: the widget adds the ellipsis


@pytest.mark.parametrize("width", range(1, 90))
def test_fit_phrases_never_cuts_a_phrase(width):
    """The class of error: whatever the width, the line is whole phrases in one of their forms, in order."""
    phrases = [Phrase(("Cl2 60 °C solution in 4 M benzene · Br2 125 °C · threshold 90 %",
                       "Cl2 60 °C solution (benzene) · Br2 125 °C · threshold 90 %"), keep=4),
               Phrase(("sort Verdict ▲", "Verdict ▲"), keep=3),
               Phrase(("verdict is selective, max products 3", "2 filters on", "filtered"), keep=2)]
    text = fit_phrases(phrases, width)
    parts = text.split(" │ ")
    forms = [set(p.forms) for p in phrases]
    positions = [next(i for i, f in enumerate(forms) if part in f) for part in parts]
    assert positions == sorted(set(positions))  # whole forms, each phrase at most once, in order
    if len(parts) > 1 or min(len(f) for f in phrases[positions[0]].forms) <= width:
        assert len(text) <= width


@async_test
async def test_dialogs_use_the_width_they_have(tmp_path):
    for size, expected in (((80, 24), 80), ((200, 50), 110)):
        app = HalosiftApp(str(write_library(tmp_path)))
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            await pilot.press("space", "e")
            await pilot.pause()
            assert app.screen.query_one("#export-box").outer_size.width == expected
            await pilot.press("escape", "f")
            await pilot.pause()
            assert app.screen.query_one("#filter-box").outer_size.width == expected


@async_test
async def test_condition_warnings_are_whole_or_summed_up(tmp_path):
    from halosift import engine

    app = HalosiftApp(str(write_library(tmp_path)))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        one = engine.Conditions(cl2_temp_c=150.0)  # a neat liquid accepts ≤ 200 °C; its rate data end at 98 °C
        app.conditions = one
        await settle(pilot)
        box = app.query_one("#warnings")
        assert box.display and plain(box) == "\n".join(f"! {w}" for w in one.warnings())
        assert box.size.height >= 2  # wrapped, not cut
        many = engine.Conditions(cl2_temp_c=150.0, br2_temp_c=400.0, so2cl2_temp_c=150.0)
        app.conditions = many
        await settle(pilot)
        assert plain(box).startswith(f"! {len(many.warnings())} warnings about these conditions")


def long_smiles_library(folder):
    """An invented list (Wrenfield Saturates, IDs made up) with one SMILES far longer than 20 characters."""
    import pandas as pd

    path = folder / "long.csv"
    rows = [("WS-3101", "C" * 70 + "(C)C"), ("WS-3102", "CC(C)CC1CCC(CC1)C(C)(C)CC")]
    pd.DataFrame(rows, columns=["id", "smiles"]).to_csv(path, index=False)
    return path, rows


def visible_numbers(table) -> set[str]:
    """Labels of the number columns shown whole at scroll position 0."""
    cols = table.columns
    x, shown = table._fixed_width(), set()
    for i in table._scrolling:
        x += cols[i].width + 1
        if x - 1 <= table.size.width and cols[i].number:
            shown.add(cols[i].label)
    return shown


@async_test
async def test_smiles_column_grows_with_the_terminal_and_stays_20_at_80(tmp_path):
    path, rows = long_smiles_library(tmp_path)
    app = HalosiftApp(str(path))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        table = app.query_one(LibraryTable)

        def smiles_column():
            return next(c for c in table.columns if c.label == "SMILES")

        assert smiles_column().width == 20  # the 80×24 layout is unchanged
        table._fill_window()
        # ID and verdict stay pinned; the long SMILES is cut with an ellipsis, never silently.
        first = table.render_line(1).text
        cols = table.columns
        verdict_at = _GUTTER + cols[0].width + 1
        assert first[_GUTTER:].startswith("WS-3101")
        v = [c.key for c in cols].index("verdict")
        assert first[verdict_at:verdict_at + cols[v].width].strip() == table._window[0][v]
        assert fit(rows[0][1], 20) in first and fit(rows[0][1], 20).endswith("…")
        whole_at_20 = visible_numbers(table)
        await pilot.resize_terminal(160, 30)
        await settle(pilot)
        grown_width = smiles_column().width
        assert 20 < grown_width < len(rows[0][1])
        assert visible_numbers(table) >= whole_at_20  # growing never pushes a number out of view
        table._fill_window()
        assert fit(rows[0][1], grown_width) in table.render_line(1).text
        assert rows[1][1] in table.render_line(2).text  # a SMILES that fits is shown whole
        await pilot.resize_terminal(400, 30)
        await settle(pilot)
        assert smiles_column().width == len(rows[0][1])  # never wider than the longest value
        await pilot.resize_terminal(80, 24)
        await settle(pilot)
        assert smiles_column().width == 20


def test_grown_leaves_fixed_columns_alone():
    from halosift.tui.table import Column, grown

    cols = [Column("id", "ID", 8), Column("s", "SMILES", 20, grow_to=50), Column("v", "Verdict", 12, "verdict")]
    assert grown(cols, 80) == cols
    assert [c.width for c in grown(cols, 120)] == [8, 50, 12]  # everything fits: the SMILES takes all it needs
    assert [c.width for c in grown(cols, 400)] == [8, 50, 12]
    # Beyond the last number column shown whole, the cells go to the growing column as far as it needs (every
    # number in view stays in view); the text column after it is then whole or out of view, never a stub ("di…").
    with_number = [*cols, Column("m", "Br2 major", 40), Column("p", "Br2 %", 7, "pct"), Column("t", "text", 30)]
    end = 2 + 9 + 13 + 21 + 41 + 7  # gutter, ID, verdict, SMILES, Br2 major, Br2 % (with the cells between)
    assert [c.width for c in grown(with_number, 120)][1] == 20 + (120 - end)
    # Two growing columns share the cells; one that reaches its longest value passes the rest on.
    two = [Column("id", "ID", 8), Column("s", "SMILES", 20, grow_to=24), Column("r", "Reason", 56, grow_to=160)]
    assert [c.width for c in grown(two, 120)] == [8, 24, 120 - 2 - 9 - 25]
    assert [c.width for c in grown(with_number, 80)][1] == 20


@async_test
async def test_rejection_reasons_take_the_room_a_wide_terminal_has(tmp_path):
    import pandas as pd

    bad = "not a smiles " * 6  # an invented unparsable entry: its reason quotes it, so it is long
    path = tmp_path / "bad.csv"
    pd.DataFrame([("WS-3201", bad.strip()), ("WS-3202", "CCC")], columns=["id", "smiles"]).to_csv(path, index=False)
    app = HalosiftApp(str(path), sessions=False)
    async with app.run_test(size=(200, 30)) as pilot:
        await settle(pilot)
        await pilot.press("v", "v")
        await settle(pilot)
        table = app.query_one(LibraryTable)
        reason = app.frame["reason"].iloc[0]
        assert len(reason) > 80
        table._fill_window()
        line = table.render_line(1).text
        assert reason in line and "…" not in line  # room enough: the reason and the SMILES are whole
