"""Structure drawings in the app: detection, the drawing itself, and the text drawing where images are off."""

from __future__ import annotations

import asyncio

import pytest
from halosift.tui import structure_view as sv
from textual.app import App, ComposeResult
from textual.widgets import Static

from halosift import engine


@pytest.fixture
def propane_products():
    library = engine.load_library(__import__("pandas").DataFrame({"smiles": ["CCC"]}), use_cache=False)
    return library.products(0)


def test_images_can_be_turned_off(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv(sv.IMAGES_ENV, "off")
    assert sv.detect_graphics() is None
    monkeypatch.delenv(sv.IMAGES_ENV)
    assert sv.detect_graphics(enabled=False) is None


def test_no_terminal_means_no_images(monkeypatch: pytest.MonkeyPatch) -> None:
    # Under pytest stdout is not a terminal: detection must say so, not guess.
    monkeypatch.delenv(sv.IMAGES_ENV, raising=False)
    assert sv.detect_graphics() is None


def test_forced_unicode_mode(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv(sv.IMAGES_ENV, "unicode")
    assert sv.detect_graphics() == "unicode"


def test_marks_follow_the_products(propane_products) -> None:
    marks = sv.marks_for(propane_products)
    assert [m.letter for m in marks] == ["P1", "P2"]
    assert {m.site for m in marks} == {"primary", "secondary"}


def test_png_drawing_is_a_png(propane_products) -> None:
    from halosift.report.drawing import structure_png

    png = structure_png("CCC", sv.marks_for(propane_products))
    assert png[:8] == b"\x89PNG\r\n\x1a\n" and len(png) > 1000


#: Structures whose image labels are checked: a branch, a ring with a branch, a bridged ring, an arene side chain.
LABELLED = ["CC(C)CC", "CC1CCCCC1", "C1CC2CCC1C2", "CCc1ccccc1"]


def _table_and_layout(smiles: str):
    """The products table's first column, the products and the image drawing's layout for one structure."""
    import io

    import pandas as pd
    from halosift.tui.detail import products_table
    from rich.console import Console

    from halosift.report.drawing import png_layout

    library = engine.load_library(pd.DataFrame({"smiles": [smiles]}), use_cache=False)
    canonical = str(library.evaluate()["canonical_smiles"].iloc[0])
    products = library.products(0)
    console = Console(width=200, file=io.StringIO(), record=True, color_system=None)
    console.print(products_table(products))
    first_column = [line.split()[0] for line in console.export_text().splitlines()[1:] if line.strip()]
    return canonical, products, first_column, png_layout(canonical, sv.marks_for(products))


@pytest.mark.parametrize("smiles", LABELLED)
def test_image_labels_are_the_products_table_names(smiles: str) -> None:
    # The image path once lettered sites a, b, c … while the table said P1, P2 …: the drawn labels must be the table's.
    _, products, first_column, layout = _table_and_layout(smiles)
    assert len(products) >= 3
    assert [spot.letter for spot in layout.spots] == first_column
    marks = sv.marks_for(products)
    assert [m.atom for m in marks] == [int(a) for a in products["atom"]]  # one label per site, on its own carbon
    assert len({m.atom for m in marks}) == len(marks)
    # Labels never cover each other, and each found a spot clear of bonds and atoms.
    assert all(spot.clear for spot in layout.spots)
    for i, a in enumerate(layout.spots):
        for b in layout.spots[i + 1:]:
            assert not a.box.overlaps(b.box), (smiles, a.letter, b.letter)
    width, height = layout.size
    assert all(0 <= s.box.x0 and s.box.x1 <= width and 0 <= s.box.y0 and s.box.y1 <= height for s in layout.spots)


@pytest.mark.parametrize("smiles", LABELLED)
def test_image_and_text_drawings_carry_the_same_labels(smiles: str) -> None:
    from halosift.engine.depiction import depict
    from halosift.tui.text_structure import draw_structure

    canonical, products, _, layout = _table_and_layout(smiles)
    text = draw_structure(depict(canonical), sv.site_labels(products), 60, 16)
    assert sorted((p.atom, p.text) for p in text.labels) == sorted(
        (m.atom, s.letter) for m, s in zip(sv.marks_for(products), layout.spots)
    )


class _Host(App):
    def __init__(self, widget) -> None:
        super().__init__()
        self._widget = widget

    def compose(self) -> ComposeResult:
        yield self._widget


def test_fallback_is_a_text_drawing_labelled_as_the_table(propane_products) -> None:
    widget = sv.structure_widget(None, "CCC", propane_products)
    assert isinstance(widget, sv.TextStructure)

    async def scenario() -> None:
        async with _Host(widget).run_test(size=(80, 24)) as pilot:
            await pilot.pause()
            shown = widget.render().plain
            assert "P1" in shown and "P2" in shown and "P3" not in shown
            assert any(0x2800 < ord(ch) <= 0x28FF for ch in shown)  # bonds in braille dots
            assert widget.content_region.height == len(shown.splitlines())  # sized to the drawing

    asyncio.run(scenario())


def test_without_a_structure_the_note_stays(propane_products) -> None:
    widget = sv.structure_widget(None, "", propane_products)
    assert isinstance(widget, Static) and "no inline images" in str(widget.content)


def test_site_labels_are_the_products_table_names() -> None:
    # The drawing's labels must read exactly as the first column of the detail's products table.
    import io

    from halosift.tui.detail import products_table
    from rich.console import Console

    library = engine.load_library(__import__("pandas").DataFrame({"smiles": ["CC(C)Cc1ccccc1"]}), use_cache=False)
    products = library.products(0)
    console = Console(width=200, file=io.StringIO(), record=True, color_system=None)
    console.print(products_table(products))
    first_column = [line.split()[0] for line in console.export_text().splitlines()[1:] if line.strip()]
    labels = sv.site_labels(products)
    assert list(labels.values()) == first_column
    assert list(labels) == [int(a) for a in products["atom"]]


def test_image_widget_mounts_and_renders(propane_products) -> None:
    widget = sv.structure_widget("unicode", "CCC", propane_products)
    assert not isinstance(widget, Static)

    async def scenario() -> None:
        async with _Host(widget).run_test(size=(100, 30)) as pilot:
            await pilot.pause()
            assert widget.is_mounted and widget.size.width > 0

    asyncio.run(scenario())


def test_detail_screen_shows_drawing_or_note(tmp_path) -> None:
    # The app's detail screen mounts the image widget in image mode and the note otherwise.
    import pandas as pd
    from halosift.tui.app import HalosiftApp

    lib = tmp_path / "lib.csv"
    pd.DataFrame({"id": ["A1", "A2"], "smiles": ["CCC", "CC(C)C"]}).to_csv(lib, index=False)

    async def scenario(graphics):
        app = HalosiftApp(str(lib), use_cache=False, graphics=graphics)
        async with app.run_test(size=(120, 40)) as pilot:
            for _ in range(100):
                await pilot.pause(0.05)
                if getattr(app, "library", None) is not None:
                    break
            from halosift.tui.detail import DetailScreen

            for _ in range(100):  # the table fills once the first evaluation lands
                await pilot.press("enter")
                await pilot.pause(0.05)
                if isinstance(app.screen, DetailScreen):
                    break
            for _ in range(200):  # the drawing arrives with the worked-out detail
                await pilot.pause(0.05)
                if not app.screen.working:
                    break
            box = app.screen.query_one("#detail-structure")
            return [type(w).__name__ for w in box.children]

    assert asyncio.run(scenario(None)) == ["TextStructure"]
    assert asyncio.run(scenario("unicode")) == ["UnicodeImage"]


def test_detail_head_wraps_a_long_smiles_at_sensible_points(tmp_path) -> None:
    import pandas as pd
    from halosift.tui.app import HalosiftApp
    from halosift.tui.detail import DetailScreen
    from tui_helpers import plain, settle

    given = "C(C)(C)CC1CCC(CC1)C(C)(C)Cc1ccc2cc(CC)ccc2c1C(C)C1CCCCC1CCCCCCCC1CCC(CC1)C(CC)CCC1CCC2CCCCC2C1"
    lib = tmp_path / "lib.csv"
    pd.DataFrame({"id": ["WS-4101"], "smiles": [given]}).to_csv(lib, index=False)

    async def scenario():
        app = HalosiftApp(str(lib), use_cache=False)
        async with app.run_test(size=(80, 24)) as pilot:
            await settle(pilot)
            await pilot.press("enter")
            await settle(pilot)
            assert isinstance(app.screen, DetailScreen)
            head = app.screen.query_one("#detail-head")
            canonical = str(app.frame["canonical_smiles"].iloc[0])
            return plain(head).splitlines(), head.content_region.width, canonical

    lines, width, canonical = asyncio.run(scenario())
    assert canonical != given
    start = next(i for i, line in enumerate(lines) if line.startswith("SMILES "))
    smiles_rows = [lines[start][len("SMILES "):]]
    for line in lines[start + 1:]:
        if not line.startswith(" " * len("SMILES ")):
            break
        smiles_rows.append(line.strip())
    assert all(len(line) <= width for line in lines[start:start + len(smiles_rows)])  # our own breaks, none by Rich
    assert len(smiles_rows) > 1 and "".join(smiles_rows) == given  # wrapped, nothing lost or cut
    assert not any(row[:1].isdigit() for row in smiles_rows)  # ring-closure digits stay with their atom
    canon_at = next(i for i, line in enumerate(lines) if line.startswith("canonical "))
    assert lines[canon_at][len("canonical "):].strip() and canonical.startswith(lines[canon_at][len("canonical "):])


@pytest.mark.parametrize("width", [74, 100, 200])
def test_products_view_keeps_every_monochloride_whole_and_inside(width: int) -> None:
    import io
    import re

    from halosift.tui.detail import products_view
    from rich.console import Console

    smiles = "CC(C)CC1CCC(CC1)C(C)(C)Cc1ccc2cc(CC)ccc2c1C(C)C1CCCCC1CCCCCCCC"
    products = engine.load_library(__import__("pandas").DataFrame({"smiles": [smiles]}), use_cache=False).products(0)
    console = Console(width=width, file=io.StringIO(), record=True, color_system=None)
    console.print(products_view(products, width))
    text = console.export_text()
    assert all(len(line.rstrip()) <= width for line in text.splitlines())
    squeezed = "".join(text.split())
    for product in products["product"]:
        if width == 200:
            assert product in text  # room enough: one line each, in the table
        assert product in squeezed  # broken into lines at most, never dropped or cut short
    below = re.search(r"^monochloride\s*$", text, flags=re.M) is not None
    assert below == (width == 74)  # too little room beside the other columns: listed below the table
    if width == 100:  # in the table, broken between atoms: no line of the column starts with a ring digit
        column = [line[text.splitlines()[1].index("monochloride"):].strip() for line in text.splitlines()[2:]]
        assert column and not any(c[:1].isdigit() for c in column if c)
