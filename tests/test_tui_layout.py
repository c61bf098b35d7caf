"""80×24 layout: key columns pinned, numbers never cut, whole phrases in the header, user-facing titles, dialog widths."""

from __future__ import annotations



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
    assert fit_phrases(phrases, 3) == "aaaa │ bbbb"  # nothing shorter: the widget adds the ellipsis


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
        one = engine.Conditions(cl2_temp_c=400.0)
        app.conditions = one
        await settle(pilot)
        box = app.query_one("#warnings")
        assert box.display and plain(box) == "\n".join(f"! {w}" for w in one.warnings())
        assert box.size.height >= 2  # wrapped, not cut
        many = engine.Conditions(cl2_temp_c=400.0, br2_temp_c=400.0, nbs_temp_c=400.0)
        app.conditions = many
        await settle(pilot)
        assert plain(box).startswith(f"! {len(many.warnings())} warnings about these conditions")
