"""Pilot tests of the whole app: screen, filter, sort, change conditions, mark, export, read back."""

from __future__ import annotations

import os
import threading
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow.parquet as pq
import pytest
from halosift.tui.app import HalosiftApp, run
from halosift.tui.conditions import ConditionsScreen
from halosift.tui.detail import DetailScreen, bar
from halosift.tui.export import ConfirmScreen, ExportScreen, ExportTarget, check_export_path
from halosift.tui.filter_form import FilterForm
from halosift.tui.help import HelpScreen
from halosift.tui.table import ROW_KEY, LibraryTable
from tui_helpers import QX_ROWS, async_test, plain, settle

from halosift import engine

SIZE = (120, 40)


SMALL = QX_ROWS[:12]


def small_library(folder: Path) -> Path:
    """Write the small library as CSV and return its path."""
    path = folder / "qx_library.csv"
    pd.DataFrame(SMALL, columns=["id", "smiles"]).assign(pack_g=[1, 5, 10, 25, 1, 5, 10, 25, 1, 5, 10, 25]).to_csv(
        path, index=False
    )
    return path


def library_path(folder: Path) -> Path:
    """The bundled sample library when it is there, else the small library."""
    try:
        from halosift.sample_libraries import sample_path

        return Path(sample_path())
    except (ImportError, OSError, ValueError):
        return small_library(folder)


def shown(app: HalosiftApp) -> pd.DataFrame:
    """The rows the table shows, in display order."""
    table = app.query_one(LibraryTable)
    return app.frame.iloc[table.rows]


def table_text(app: HalosiftApp) -> str:
    """The table's visible lines as plain text."""
    table = app.query_one(LibraryTable)
    table._fill_window()
    return "\n".join(table.render_line(y).text for y in range(table.size.height))


@async_test
async def test_whole_path(tmp_path):
    source = library_path(tmp_path)
    app = HalosiftApp(str(source))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        assert app.phase == "ready"
        frame = app.frame
        n_ok = int((frame["status"] == "ok").sum())
        assert len(app.query_one(LibraryTable).rows) == n_ok
        counts = plain(app.query_one("#counts"))
        assert f"{len(frame):,} rows" in counts and f"{n_ok:,} shown" in counts

        # --- filter to "by-symmetry" with the filter form, keyboard only
        await pilot.press("f")
        assert isinstance(app.screen, FilterForm)
        assert app.focused.id == "verdict-by-symmetry"
        await pilot.press("tab")  # Tab walks the form
        assert app.focused.id == "verdict-selective"
        await pilot.press("shift+tab", "space", "ctrl+s")
        await settle(pilot, app)
        assert app.filters.verdicts == {"by-symmetry"}
        view = shown(app)
        assert len(view) == int((frame["verdict"] == "by-symmetry").sum()) > 0
        assert set(view["verdict"]) == {"by-symmetry"}
        assert "verdict by-symmetry" in plain(app.query_one("#settings"))

        # --- sort by the SMILES column, both directions
        table = app.query_one(LibraryTable)
        table.focus()
        smiles_col = app.library.smiles_column
        while table.columns[table.picked].key != smiles_col:
            await pilot.press("right")
        await pilot.press("s")
        await settle(pilot, app)
        assert list(shown(app)[smiles_col]) == sorted(view[smiles_col])
        await pilot.press("s")
        await settle(pilot, app)
        assert app.sort.descending
        assert list(shown(app)[smiles_col]) == sorted(view[smiles_col], reverse=True)

        # --- clear filters, change the bromination temperature, see the percentages change
        await pilot.press("x")
        await settle(pilot, app)
        before = app.frame
        mixtures = before.index[(before["verdict"] == "mixture") | (before["verdict"] == "selective")]
        assert len(mixtures)
        first = int(mixtures[0])
        await pilot.press("t")
        panel = app.screen
        assert isinstance(panel, ConditionsScreen)
        br2 = panel.query_one("#cond-br2")
        br2.focus()
        br2.value = ""
        await pilot.press(*"40", "enter")
        await settle(pilot, app)
        assert app.conditions.br2_temp_c == 40.0
        after = app.frame
        assert after is not before
        assert after.attrs["conditions"] == app.conditions
        assert not np.allclose(
            before.loc[mixtures, "br2_major_pct"].to_numpy(float), after.loc[mixtures, "br2_major_pct"].to_numpy(float)
        )
        assert "Br2 40 °C" in plain(app.query_one("#settings"))
        # The table shows the new numbers for that row.
        await pilot.press("escape")
        await pilot.pause()
        table.focus()
        position = int(np.flatnonzero(table.rows == first)[0])
        table.cursor = position
        await pilot.pause()
        assert f"{after.loc[first, 'br2_major_pct']:.1f}" in table_text(app)
        # An impossible temperature is refused, with a one-line reason, and not applied.
        await pilot.press("t")
        panel = app.screen
        br2 = panel.query_one("#cond-br2")
        br2.focus()
        br2.value = "-300"
        await pilot.press("enter")
        await settle(pilot, app)
        assert app.conditions.br2_temp_c == 40.0
        assert "absolute zero" in plain(panel.query_one("#cond-note"))
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, ConditionsScreen)

        # --- mark two rows (Space marks and steps down)
        table.focus()
        await pilot.press("home", "space", "space")
        assert int(app.marked.sum()) == 2
        marked_rows = np.flatnonzero(app.marked).tolist()
        assert marked_rows == sorted(table.rows[:2].tolist())
        assert "2 marked" in plain(app.query_one("#counts"))

        # --- shortlist view shows exactly the marked rows
        await pilot.press("v")
        await settle(pilot, app)
        assert app.view == "shortlist"
        assert sorted(app.query_one(LibraryTable).rows.tolist()) == marked_rows
        await pilot.press("v", "v")
        await settle(pilot, app)
        assert app.view == "library"

        # --- export the shortlist to CSV
        out_csv = tmp_path / "short.csv"
        await pilot.press("e")
        assert isinstance(app.screen, ExportScreen)
        app.screen.query_one("#export-path").value = str(out_csv)
        await pilot.press("enter")
        await settle(pilot, app)
        assert app.last_export == out_csv.resolve()
        written = pd.read_csv(out_csv, keep_default_na=False)
        assert len(written) == 2
        # In the table's order (sorted by SMILES, largest first), as the export form says.
        assert written["input_row"].tolist() == [int(r) + 1 for r in table.rows if app.marked[r]]
        for column in ("verdict", "br2_major", "br2_major_pct", "stereo", app.library.smiles_column):
            assert column in written.columns
        about = Path(str(out_csv) + ".about.txt").read_text(encoding="utf-8")
        assert app.conditions.describe() in about
        assert engine.CAUTION.split(". ")[0] in about
        assert "shortlist" in about

        # --- export the current view to Parquet
        out_pq = tmp_path / "view.parquet"
        await pilot.press("e")
        await pilot.press("shift+tab", "down", "enter")  # keyboard: from the path field to the choice
        assert app.screen.what == "view"
        app.screen.query_one("#export-path").value = str(out_pq)
        app.screen.query_one("#export-path").focus()
        await pilot.press("enter")
        await settle(pilot, app)
        table_pq = pq.read_table(out_pq)
        assert table_pq.num_rows == len(app.query_one(LibraryTable).rows)
        meta = {k.decode(): v.decode() for k, v in table_pq.schema.metadata.items()}
        assert meta["halosift_conditions"] == app.conditions.describe()
        assert meta["halosift_caution"] == engine.CAUTION
        assert "library view" in meta["halosift_selection"]

        # --- never overwrite without asking: "n" keeps the file, "y" replaces it
        stamp = out_csv.read_bytes()
        os.utime(out_csv, (1, 1))
        await pilot.press("e")
        app.screen.query_one("#export-path").value = str(out_csv)
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        await pilot.press("n")
        await settle(pilot, app)
        assert out_csv.stat().st_mtime == 1 and out_csv.read_bytes() == stamp
        assert isinstance(app.screen, ExportScreen)
        await pilot.press("enter")
        await pilot.pause()
        await pilot.press("y")
        await settle(pilot, app)
        assert out_csv.stat().st_mtime > 1

        # --- q quits cleanly
        await pilot.press("q")
        await pilot.pause()
    assert app.return_code == 0


@async_test
async def test_detail_shows_the_inputs_own_columns_whole(tmp_path):
    """A long catalogue name, cut in the table's column, reads in full in the detail."""
    name = "cis-1-tert-butyl-4-methylcyclohexane, 97 % (GC), stabilised, Wrenfield lot 22-0419"
    path = tmp_path / "named.csv"
    pd.DataFrame({"id": ["WS-0001", "WS-0002"], "smiles": ["CC(C)(C)C1CCC(C)CC1", "CCC"],
                  "name": [name, None], "price_eur": [412.5, 9.0]}).to_csv(path, index=False)
    app = HalosiftApp(str(path), sessions=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot, app)
        app.query_one(LibraryTable).cursor = 0
        await pilot.press("enter")
        await settle(pilot, app)
        head = " ".join(plain(app.screen.query_one("#detail-head")).split())
        assert f"Input: name {name} · price_eur 412.5" in head
        await pilot.press("n")  # the next row has no name: only what it has is listed
        await settle(pilot, app)
        head = " ".join(plain(app.screen.query_one("#detail-head")).split())
        assert "Input: price_eur 9.0" in head and "name" not in head.split("Input:")[1].split("Verdict")[0]


@async_test
async def test_detail_shows_every_product_and_steps(tmp_path):
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        table = app.query_one(LibraryTable)
        row = int(np.flatnonzero(app.frame["smiles"].to_numpy() == "CCc1ccccc1")[0])
        table.cursor = int(np.flatnonzero(table.rows == row)[0])
        await pilot.press("enter")
        await settle(pilot, app)  # the products are worked out in a worker
        screen = app.screen
        assert isinstance(screen, DetailScreen) and screen.row == row
        products = app.library.products(row, app.conditions)
        body = plain(screen.query_one("#detail-products"))
        text = plain(screen.query_one("#detail-bars"))
        head = plain(screen.query_one("#detail-head"))
        for p in products.itertuples():
            assert p.product in body and p.site in body
        # Bars: one line per product, both reagents, with the engine's percentages.
        for p in products.itertuples():
            assert f"{p.cl2_pct:5.1f} %" in text and f"{p.br2_pct:5.1f} %" in text
        assert "selective" in head and "Cl2 at 25 °C" in head
        # Space marks the shown row from the detail screen too.
        await pilot.press("space")
        await pilot.pause()
        assert app.marked[row] and screen.marked
        assert "on shortlist" in plain(screen.query_one("#detail-head"))
        start = table.cursor
        await pilot.press("n")
        await pilot.pause()
        assert screen.position == start + 1 == table.cursor  # the table's cursor follows the detail
        await pilot.press("escape")
        assert not isinstance(app.screen, DetailScreen)


@async_test
async def test_shortlist_exports_as_html_report(tmp_path):
    import re

    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        table = app.query_one(LibraryTable)
        table.focus()
        await pilot.press("home", "space", "space", "space")
        marked_rows = np.flatnonzero(app.marked).tolist()
        assert len(marked_rows) == 3
        out = tmp_path / "short.html"
        await pilot.press("e")
        assert isinstance(app.screen, ExportScreen)
        app.screen.query_one("#export-path").value = str(out)
        await pilot.pause()
        assert "HTML report" in plain(app.screen.query_one("#export-check"))
        await pilot.press("enter")
        await settle(pilot, app)
        assert app.last_export == out.resolve()
        page = out.read_text(encoding="utf-8")
        sections = [int(r) for r in re.findall(r'<section class="substrate" data-row="(\d+)"', page)]
        assert sorted(sections) == [r + 1 for r in marked_rows]  # entries are grouped by verdict, best first
        assert page.count('<svg class="structure"') == 3
        assert "shortlist: 3 marked rows" in page
        assert app.conditions.describe() in page
        assert 'data-count="rows">12<' in page  # the summary counts the whole library
        assert not Path(str(out) + ".about.txt").exists()


@async_test
async def test_export_choice_moves_with_the_arrows_from_the_file_field(tmp_path):
    """The form opens in the file field; ↑/↓ still choose shortlist or current view (the help says so),
    and the rows written follow the choice."""
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        app.query_one(LibraryTable).focus()
        await pilot.press("home", "space")
        await pilot.press("e")
        screen = app.screen
        assert isinstance(screen, ExportScreen) and app.focused is screen.query_one("#export-path")
        assert screen.what == "shortlist"
        await pilot.press("down")
        assert screen.what == "view" and "halosift-view" in screen.query_one("#export-path").value
        await pilot.press("up")
        assert screen.what == "shortlist"
        await pilot.press("down")
        out = tmp_path / "view.csv"
        screen.query_one("#export-path").value = str(out)
        await pilot.press("enter")
        await settle(pilot, app)
        assert len(pd.read_csv(out)) == len(app.query_one(LibraryTable).rows) > 1  # the view, not the marked row


@async_test
async def test_export_form_says_a_report_is_grouped_not_in_table_order(tmp_path):
    app = HalosiftApp(str(small_library(tmp_path)), sessions=False)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("e")
        screen = app.screen
        path = screen.query_one("#export-path")
        path.value = str(tmp_path / "out.html")
        await pilot.pause()
        order = plain(screen.query_one("#export-order"))
        assert "groups its entries by outcome" in order and "not the table's order" in order
        path.value = str(tmp_path / "out.csv")
        await pilot.pause()
        assert "in the table's order: input order" in plain(screen.query_one("#export-order"))


@async_test
async def test_html_export_shows_progress_until_written(tmp_path, monkeypatch):
    from halosift.tui import export as export_module

    from halosift import engine

    seen: list[tuple[int, int, bool]] = []
    original = export_module.ExportProgress.update_progress

    def record(self, done: int, total: int) -> None:
        seen.append((done, total, self.is_mounted))
        original(self, done, total)

    monkeypatch.setattr(export_module.ExportProgress, "update_progress", record)
    monkeypatch.setattr(export_module, "PROGRESS_INTERVAL_S", 0.0)  # every step reaches the bar
    source = tmp_path / "many.csv"
    chains = [(f"MN-{i:03d}", "C" * (3 + i % 12) + "C(C)C" * (i % 3)) for i in range(30)]
    pd.DataFrame(chains, columns=["id", "smiles"]).to_csv(source, index=False)
    app = HalosiftApp(str(source))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        out = tmp_path / "many.html"
        await pilot.press("e")
        assert isinstance(app.screen, ExportScreen)
        app.screen.query_one("#export-path").value = str(out)  # nothing marked: the current view is chosen
        await pilot.pause()
        await pilot.press("enter")
        await settle(pilot, app)
        assert app.last_export == out.resolve(), [n.message for n in app._notifications]
        # The bar showed every step, from 0 to all drawn, while mounted, and is gone once the file is written.
        assert seen and seen[0][0] == 0 and seen[-1][0] == seen[-1][1] == 31  # 30 entries and the page
        assert [d for d, _, _ in seen] == sorted(d for d, _, _ in seen)
        assert all(mounted for _, _, mounted in seen)
        assert not app.query(export_module.ExportProgress)
        page = out.read_text(encoding="utf-8")
        assert engine.CAUTION.partition(":")[2].strip() in page  # the export keeps the safety caution
        assert str(tmp_path) not in page  # and names the library by its file name only


@async_test
async def test_rejected_view_lists_reasons(tmp_path):
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("v", "v")
        await settle(pilot, app)
        assert app.view == "rejected"
        view = shown(app)
        assert view["id"].tolist() == ["QX-0009", "QX-0012"]
        assert [c.key for c in app.query_one(LibraryTable).columns][:3] == ["id", "smiles", "reason"]
        text = table_text(app)
        assert "QX-0009" in text and view["reason"].iloc[0][:20] in text


@async_test
async def test_search_bar_filters_by_id_and_smiles(tmp_path):
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("slash", *"c1ccccc1", "enter")
        await settle(pilot, app)
        assert shown(app)["id"].tolist() == ["QX-0004", "QX-0005", "QX-0008"]
        # While typing, letters are text, not commands: "q" did not quit, "f" did not open the form.
        await pilot.press("slash")
        app.query_one("#search").value = ""
        await pilot.press(*"qx-0001", "enter")
        await settle(pilot, app)
        assert app.is_running and not isinstance(app.screen, FilterForm)
        assert shown(app)["id"].tolist() == ["QX-0001"]
        # ctrl+q quits even from inside a text field.
        await pilot.press("slash", "ctrl+q")
        await pilot.pause()
    assert app.return_code == 0


@async_test
async def test_mark_all_shown_and_input_columns(tmp_path):
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        app.filters = app.filters.__class__(verdicts=frozenset({"by-symmetry"}))
        await settle(pilot, app)
        await pilot.press("a")
        assert int(app.marked.sum()) == len(shown(app)) == int((app.frame["verdict"] == "by-symmetry").sum())
        await pilot.press("u")
        assert int(app.marked.sum()) == 0
        keys = [c.key for c in app.query_one(LibraryTable).columns]
        assert "pack_g" not in keys
        await pilot.press("c")
        await settle(pilot, app)
        keys = [c.key for c in app.query_one(LibraryTable).columns]
        assert "pack_g" in keys and keys[-1] == ROW_KEY


@async_test
async def test_cancel_screening_then_screen_again(tmp_path, monkeypatch):
    real = engine.load_library
    started = threading.Event()

    def slow(source, *, cancel, progress, **kwargs):
        """Stands in for a long screening: reports progress, then waits for the cancel key."""
        progress(0, 10)
        started.set()
        if cancel.wait(10):
            raise engine.Cancelled()
        raise AssertionError("cancel never arrived")

    monkeypatch.setattr(engine, "load_library", slow)
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        for _ in range(200):
            await pilot.pause(0.02)
            if started.is_set():
                break
        assert app.phase == "screening"
        assert app.query_one("#screening").display
        await pilot.press("escape")
        await settle(pilot, app)
        assert app.phase == "stopped"
        assert "cancelled" in plain(app.query_one("#counts")).lower()
        monkeypatch.setattr(engine, "load_library", real)
        await pilot.press("r")
        await settle(pilot, app)
        assert app.phase == "ready" and len(app.frame) == len(SMALL)


@async_test
async def test_unreadable_file_is_one_line_in_the_app(tmp_path):
    bad = tmp_path / "library.xyz"
    bad.write_text("nothing\n")
    app = HalosiftApp(str(bad))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        assert app.phase == "stopped"
        message = plain(app.query_one("#counts"))
        assert message.startswith("Cannot open library.xyz") and "\n" not in message


@async_test
async def test_help_lists_bindings_verdicts_sources_and_caution(tmp_path):
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("question_mark")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)
        keys = plain(app.screen.query_one("#help-keys"))
        for description in ("Sort", "Mark", "Detail", "Filter", "Conditions", "Export", "Mark all shown", "Next row"):
            assert description in keys
        verdicts = plain(app.screen.query_one("#help-verdicts"))
        for verdict in engine.VERDICTS:
            assert verdict in verdicts
        sources = plain(app.screen.query_one("#help-sources"))
        for name in ("Sarzyński", "Morrison", "Blanksby", "Bell–Evans–Polanyi"):
            assert name in sources
        assert plain(app.screen.query_one("#help-caution")).split()[:3] == engine.CAUTION.split()[:3]
        await pilot.press("escape")
        await pilot.press("f1")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)


def test_export_path_checks(tmp_path):
    target = check_export_path("out.parquet", tmp_path)
    path, fmt = target.path, target.format
    assert path == tmp_path / "out.parquet" and fmt == "parquet"
    assert check_export_path("x.sdf.gz", tmp_path).format == "sdf"
    assert check_export_path("Report.HTML", tmp_path) == ExportTarget(tmp_path / "Report.HTML", "html")
    with pytest.raises(ValueError, match="unknown file type"):
        check_export_path("out.xlsx", tmp_path)
    with pytest.raises(ValueError, match="does not exist"):
        check_export_path("missing/out.csv", tmp_path)
    with pytest.raises(ValueError, match="type a file name"):
        check_export_path("  ", tmp_path)
    source = small_library(tmp_path)
    with pytest.raises(ValueError, match="library being screened"):
        check_export_path(source.name, tmp_path, [source])
    assert check_export_path("other.csv", tmp_path, [source]).path == tmp_path / "other.csv"


def test_bar_glyphs():
    assert bar(0, 10) == "░" * 10
    assert bar(100, 10) == "█" * 10
    assert bar(55, 10) == "█" * 5 + "▌" + "░" * 4
    assert all(len(bar(p, 17)) == 17 for p in np.linspace(0, 100, 41))


def test_run_reports_a_missing_file(tmp_path, capsys):
    assert run(str(tmp_path / "nope.csv")) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "no such file" in err


@async_test
async def test_out_of_range_temperature_shows_the_engine_warning(tmp_path):
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        assert not app.query_one("#warnings").display
        await pilot.press("t")
        cl2 = app.screen.query_one("#cond-cl2")
        cl2.value = "150"  # accepted for a neat liquid (≤ 200 °C), outside its rate data (22–98 °C)
        await pilot.press("enter")
        await settle(pilot, app)
        expected = engine.Conditions(cl2_temp_c=150).warnings()
        assert expected and app.conditions.warnings() == expected
        assert app.query_one("#warnings").display
        assert plain(app.query_one("#warnings")) == "\n".join(f"! {w}" for w in expected)
        assert expected[0] in plain(app.screen.query_one("#cond-note"))


@async_test
async def test_mouse_picks_rows_and_columns(tmp_path):
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        table = app.query_one(LibraryTable)
        await pilot.click(LibraryTable, offset=(12, 4))  # fourth data row, SMILES cell
        await pilot.pause()
        assert table.cursor == 3
        x = 2 + table.columns[0].width + 1 + 2  # inside the Verdict header (pinned beside the ID)
        await pilot.click(LibraryTable, offset=(x, 0))
        await pilot.pause()
        assert table.columns[table.picked].key == "verdict"
        await pilot.click(LibraryTable, offset=(12, 2), times=2)
        await pilot.pause()
        assert isinstance(app.screen, DetailScreen) and app.screen.row == int(table.rows[1])


@async_test
async def test_screening_in_worker_processes_works_inside_the_app(tmp_path, monkeypatch):
    """Inside a running Textual app sys.stderr has no file descriptor; spawning the engine's
    process pool must still work (the app starts multiprocessing's helper before it runs)."""
    from multiprocessing import resource_tracker

    from halosift import engine

    resource_tracker._resource_tracker._stop()  # as in a fresh process: no helper running yet
    monkeypatch.setattr(engine.parallel, "MIN_PARALLEL", 4)
    monkeypatch.setattr(engine.parallel, "CHUNK", 4)
    app = HalosiftApp(str(small_library(tmp_path)), use_cache=False)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        assert app.phase == "ready", plain(app.query_one("#counts"))
        assert len(app.frame) == len(SMALL)
        assert int((app.frame["status"] == "ok").sum()) == len(SMALL) - 2


@async_test
async def test_detail_shows_confidence_flags_nbs_and_polyhalide(tmp_path):
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        table = app.query_one(LibraryTable)
        row = int(np.flatnonzero(app.frame["smiles"].to_numpy() == "CC1=CCCCC1")[0])
        table.cursor = int(np.flatnonzero(table.rows == row)[0])
        await pilot.press("enter")
        await settle(pilot, app)
        screen = app.screen
        record = app.frame.iloc[row]
        head = plain(screen.query_one("#detail-head"))
        assert f"Confidence: {record['confidence']}" in head and "Flags: alkene" in head
        notes = plain(screen.query_one("#detail-notes"))
        assert "add to the double bond at ordinary temperatures" in notes
        assert "NBS" in notes and "serves allylic substitution" in notes
        nbs = plain(screen.query_one("#detail-nbs"))
        for p in app.library.nbs_products(row, app.conditions).itertuples():
            assert p.product in nbs and f"{p.nbs_pct:5.1f} %" in nbs
        assert "allylic shift" in nbs and "no share" in nbs
        # Cl2 and Br2 add to its C=C at 25/125 °C: no polyhalide figures, the bars say ruled out instead.
        assert plain(screen.query_one("#detail-poly")).strip() == ""
        bars = plain(screen.query_one("#detail-bars"))
        assert "Cl2 at 25 °C  ruled out: adds to C=C" in bars and "Br2 at 125 °C  ruled out" in bars
        # A substrate without allylic/benzylic C–H says so.
        await pilot.press("escape")
        row = int(np.flatnonzero(app.frame["smiles"].to_numpy() == "C1CCCCC1")[0])
        table.cursor = int(np.flatnonzero(table.rows == row)[0])
        await pilot.press("enter")
        await settle(pilot, app)
        assert "No allylic or benzylic C–H" in plain(app.screen.query_one("#detail-nbs"))
        # Cyclohexane substitutes under both: polyhalide figures for each.
        poly = plain(app.screen.query_one("#detail-poly"))
        assert "Cl2:" in poly and "Br2:" in poly and "1 : 1" in poly and "ruled out" not in poly


@async_test
async def test_more_columns_key_and_help(tmp_path):
    app = HalosiftApp(str(small_library(tmp_path)))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        keys = [c.key for c in app.query_one(LibraryTable).columns]
        assert "confidence" not in keys and "flags" not in keys
        await pilot.press("o")
        await settle(pilot, app)
        keys = [c.key for c in app.query_one(LibraryTable).columns]
        for key in ("confidence", "flags", "serves", "nbs_major", "nbs_major_pct", "cl2_poly_pct"):
            assert key in keys
        assert keys[-1] == ROW_KEY
        await pilot.press("question_mark")
        await pilot.pause()
        columns = plain(app.screen.query_one("#help-columns"))
        assert "confidence" in columns and "flags" in columns and "alkene" in columns
        assert "More columns" in plain(app.screen.query_one("#help-keys"))
