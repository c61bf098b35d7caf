"""The halosift terminal app: screen a library, sift it, explain a row, export a shortlist.

The app owns the state (library, conditions, filters, sort, view, marks) and
hands it down to its widgets; widgets report back with the messages in
:mod:`tui.messages`. RDKit, pyarrow, pandas and the engine are imported in
worker threads or on first use, so the first paint does not wait for them.
"""

from __future__ import annotations

import os
import sys
import threading
import time
from collections.abc import Hashable
from dataclasses import replace
from pathlib import Path
from typing import TYPE_CHECKING, Any, ClassVar

import numpy as np
from textual import on, work
from textual.app import App, ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.reactive import reactive
from textual.widgets import Footer, Input, Label, ProgressBar, Static
from textual.worker import get_current_worker

from tui.conditions import ConditionsPanel
from tui.filters import VIEWS, FilterSpec, OrderCache, SortSpec
from tui.messages import (
    ConditionsProposed,
    CursorMoved,
    DetailRequested,
    ExportFailed,
    ExportFinished,
    MarkRequested,
    PanelClosed,
    ScreeningFinished,
    ScreeningProgress,
    ScreeningStopped,
    SearchChanged,
    SortRequested,
    ViewComputed,
    ViewFailed,
)
from tui.search import SearchBar
from tui.table import ROW_KEY, Column, LibraryTable

if TYPE_CHECKING:
    import pandas as pd

    from engine import Conditions, Library
    from tui.export import ExportChoice

#: Seconds between progress messages from the screening worker (keeps the UI queue short).
PROGRESS_INTERVAL = 0.1


#: The app's own commands that act on the library table (see ``HalosiftApp.check_action``).
TABLE_ACTIONS = frozenset({
    "search", "filters", "conditions", "next_view", "export", "mark_shown", "unmark_shown",
    "clear_filters", "toggle_input_columns", "toggle_more_columns",
})
#: Result columns the "more columns" key adds to the library table (label, width, kind).
MORE_COLUMNS: tuple[tuple[str, str, int, str], ...] = (
    ("confidence", "Confidence", 12, "text"),
    ("flags", "Flags", 20, "text"),
    ("serves", "Serves", 8, "text"),
    ("nbs_major", "NBS major", 18, "text"),
    ("nbs_major_pct", "NBS %", 7, "pct"),
    ("cl2_poly_pct", "Cl2 poly %", 11, "pct"),
    ("br2_poly_pct", "Br2 poly %", 11, "pct"),
)


def one_line(exc: BaseException) -> str:
    """An exception as one line fit for the status bar."""
    text = " ".join(str(exc).split())
    return text or type(exc).__name__


def _count(n: int) -> str:
    return f"{n:,}"


def start_process_helpers() -> None:
    """Start multiprocessing's resource tracker now, while stderr is still a real file.

    The engine perceives big libraries in spawned worker processes, and the first
    process pool starts the tracker, handing it ``sys.stderr.fileno()``. Inside a
    running Textual app ``sys.stderr`` is a capture whose ``fileno()`` is -1, so
    that start fails ("bad value(s) in fds_to_keep"). Started before the app runs,
    the tracker already exists and every pool reuses it.
    """
    from multiprocessing import resource_tracker

    resource_tracker.ensure_running()


class HalosiftApp(App[int]):
    """Screen a hydrocarbon library and sift it by predicted halogenation outcome."""

    TITLE = "halosift"
    CSS_PATH = Path(__file__).with_name("halosift.tcss")
    ENABLE_COMMAND_PALETTE = False

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("q", "leave", "Quit"),
        Binding("question_mark,f1", "help", "Help", key_display="?"),
        Binding("escape", "cancel_screening", "Cancel screening"),
        Binding("r", "rescreen", "Screen again"),
        Binding("slash", "search", "Find", key_display="/", show=False),
        Binding("f", "filters", "Filter"),
        Binding("t", "conditions", "Conditions"),
        Binding("v", "next_view", "View"),
        Binding("e", "export", "Export"),
        Binding("a", "mark_shown", "Mark all shown", show=False),
        Binding("u", "unmark_shown", "Unmark all shown", show=False),
        Binding("x", "clear_filters", "Clear filters", show=False),
        Binding("c", "toggle_input_columns", "Input columns", show=False),
        Binding("o", "toggle_more_columns", "More columns (confidence, flags, NBS, poly)", show=False),
    ]

    phase: reactive[str] = reactive("screening")
    """screening (worker running), ready (a library is loaded) or stopped (cancelled or failed)."""
    view: reactive[str] = reactive("library", init=False)
    """Which rows the table lists: one of :data:`tui.filters.VIEWS`."""
    filters: reactive[FilterSpec] = reactive(FilterSpec, init=False)
    """The library view's filters."""
    sort: reactive[SortSpec] = reactive(SortSpec, init=False)
    """Row order of every view."""
    conditions: reactive[Any] = reactive(None, init=False)
    """engine.Conditions the table is evaluated under (None until the engine is loaded)."""
    show_input_columns: reactive[bool] = reactive(False, init=False)
    """Also show the input file's own columns (beyond ID and SMILES)."""
    show_more_columns: reactive[bool] = reactive(False, init=False)
    """Also show confidence, flags, serves, the NBS major product and the polyhalide columns."""

    def __init__(
        self,
        source: str | os.PathLike[str] | pd.DataFrame,
        *,
        smiles_column: str | None = None,
        id_column: str | None = None,
        use_cache: bool = True,
        graphics: str | None = None,
    ) -> None:
        super().__init__()
        start_process_helpers()
        self.graphics = graphics
        """Inline-image mode for structure drawings ('sixel', 'tgp', 'unicode'), or None for text only."""
        self.source = source
        """The library file (or DataFrame) to screen."""
        self.smiles_column = smiles_column
        """SMILES column to use (None: the engine finds it)."""
        self.id_column = id_column
        """ID column to use (None: the engine finds it, if any)."""
        self.use_cache = use_cache
        """Let the engine reuse its on-disk perception cache."""
        self.library: Library | None = None
        """The loaded engine.Library, once screening has finished."""
        self.frame: pd.DataFrame | None = None
        """The evaluated frame the table shows (Library.evaluate(frame_conditions))."""
        self.frame_conditions: Conditions | None = None
        """Conditions ``frame`` was evaluated under."""
        self.marked: np.ndarray = np.zeros(0, dtype=bool)
        """Shortlist marks, one per input row."""
        self.last_export: Path | None = None
        """The file most recently written."""
        self._cancel = threading.Event()
        self._generation = 0
        self._applied_generation = 0
        self._site_choices: tuple[Any, list[str]] = (None, [])
        self._orders = OrderCache()
        self._counts = (0, 0)

    # ------------------------------------------------------------------ layout

    @property
    def source_name(self) -> str:
        """The library's file name (no folder: snapshots and screenshots stay path-free)."""
        if isinstance(self.source, (str, os.PathLike)):
            return Path(self.source).name
        return "in-memory table"

    def compose(self) -> ComposeResult:
        yield Static(f"halosift │ {self.source_name}", id="title")
        yield Static("", id="counts")
        yield Static("", id="settings")
        yield Static("", id="warnings")
        with Vertical(id="screening"):
            yield Label(f"Screening {self.source_name}…", id="screening-label")
            yield ProgressBar(total=None, show_eta=False, id="screening-progress")
            yield Label("Esc cancels", id="screening-hint")
        yield LibraryTable(id="table")
        yield Static("", id="rowinfo")
        yield SearchBar(id="search")
        yield ConditionsPanel(id="conditions")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one("#search").display = False
        self.query_one("#conditions").display = False
        self.query_one("#warnings").display = False
        self._start_screening()

    # ------------------------------------------------------------------ screening

    def _start_screening(self) -> None:
        self._cancel = threading.Event()
        self.phase = "screening"
        bar = self.query_one("#screening-progress", ProgressBar)
        bar.update(total=None, progress=0)
        self.query_one("#screening-label", Label).update(f"Screening {self.source_name}…")
        self._screen(self._cancel)

    @work(thread=True, exclusive=True, group="screen", exit_on_error=False)
    def _screen(self, cancel: threading.Event) -> None:
        """Read and perceive the library, then evaluate it under default conditions."""
        import engine

        last = [0.0]

        def progress(done: int, total: int | None) -> None:
            now = time.monotonic()
            if now - last[0] >= PROGRESS_INTERVAL or (total is not None and done >= total):
                last[0] = now
                self.post_message(ScreeningProgress(done, total))

        try:
            library = engine.load_library(
                self.source,
                smiles_column=self.smiles_column,
                id_column=self.id_column,
                use_cache=self.use_cache,
                progress=progress,
                cancel=cancel,
            )
            conditions = self.conditions or engine.Conditions()
            frame = library.evaluate(conditions)
        except engine.Cancelled:
            self.post_message(ScreeningStopped(True, "Screening cancelled."))
            return
        except engine.LibraryError as exc:
            self.post_message(ScreeningStopped(False, f"Cannot open {self.source_name}: {one_line(exc)}"))
            return
        except Exception as exc:  # an engine bug: say so in one line, never a traceback on screen
            self.post_message(ScreeningStopped(False, f"Screening failed: {type(exc).__name__}: {one_line(exc)}"))
            return
        if cancel.is_set():
            self.post_message(ScreeningStopped(True, "Screening cancelled."))
            return
        self.post_message(ScreeningFinished(library, frame, conditions))

    def on_screening_progress(self, message: ScreeningProgress) -> None:
        if self.phase != "screening":
            return
        bar = self.query_one("#screening-progress", ProgressBar)
        bar.update(total=message.total, progress=message.done)
        total = f" of {_count(message.total)}" if message.total is not None else ""
        self.query_one("#screening-label", Label).update(
            f"Screening {self.source_name}: {_count(message.done)}{total} structures perceived"
        )

    def on_screening_finished(self, message: ScreeningFinished) -> None:
        self.library = message.library
        self.frame = message.frame
        self.frame_conditions = message.conditions
        self.marked = np.zeros(len(message.frame), dtype=bool)
        self._orders = OrderCache()  # sort orders of an earlier load do not apply
        self.set_reactive(HalosiftApp.conditions, message.conditions)
        self.query_one(ConditionsPanel).load(message.conditions)
        self.phase = "ready"
        self._request_view()

    def on_screening_stopped(self, message: ScreeningStopped) -> None:
        self.phase = "stopped"
        hint = "Press r to screen again, q to quit." if message.cancelled else "Press r to try again, q to quit."
        self.query_one("#counts", Static).update(message.message)
        self.query_one("#settings", Static).update(hint)

    def watch_phase(self, phase: str) -> None:
        self.query_one("#screening").display = phase == "screening"
        self.query_one("#table").display = phase == "ready"
        self.query_one("#rowinfo").display = phase == "ready"
        if phase == "ready":
            self.query_one(LibraryTable).focus()
        else:
            self.set_focus(None)  # nothing to type into or move through until a library is loaded
        if phase == "screening":
            self.query_one("#counts", Static).update("")
            self.query_one("#settings", Static).update("")
        self.refresh_bindings()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        # While a text field has focus its keys are typing, not commands: hide them.
        typing = isinstance(self.focused, Input)
        if action == "quit":  # ctrl+q (Textual's own binding) quits from anywhere
            return True
        if action in ("leave", "help"):
            return not typing
        if action == "cancel_screening":
            return self.phase == "screening"
        if action == "rescreen":
            return self.phase == "stopped"
        if action not in TABLE_ACTIONS:
            return True  # Textual's own actions (focus next/previous, ...) are never restricted
        # Table commands act on the main screen only (not under detail, help or a dialog).
        if not (self.phase == "ready" and len(self.screen_stack) == 1 and not typing):
            return False
        if action == "export" and self.busy:
            return None  # shown greyed: the table is about to change, export what it will show
        return True

    def action_cancel_screening(self) -> None:
        """Stop the screening worker (it stops at the next batch)."""
        self._cancel.set()
        self.query_one("#screening-label", Label).update("Cancelling…")

    def action_rescreen(self) -> None:
        """Start screening again after a cancel or a failure."""
        self._start_screening()

    async def action_quit(self) -> None:
        """Quit, stopping any screening first."""
        self._cancel.set()
        self.exit(0)

    async def action_leave(self) -> None:
        """Quit (the q key; a letter, so not while typing in a field)."""
        await self.action_quit()

    # ------------------------------------------------------------------ the view

    def _text_columns(self) -> tuple[list[Hashable], list[Hashable]]:
        """(ID columns, SMILES columns) the find text looks in."""
        lib = self.library
        if lib is None:
            return [], []
        names = lib.result_names()  # an input "canonical_smiles" is input_canonical_smiles in the frame
        ids = [names[lib.id_column]] if lib.id_column is not None else []
        return ids, [names[lib.smiles_column], "canonical_smiles"]

    def _request_view(self) -> None:
        """Recompute (in a worker) the rows to show; the newest request wins."""
        if self.library is None or self.conditions is None:
            return
        self._generation += 1
        self._update_status()
        self.refresh_bindings()
        frame = self.frame if self.frame_conditions == self.conditions else None
        self._build_view(
            self._generation, self.library, self.conditions, frame, self.filters, self.sort, self.view,
            self.marked.copy(), self._text_columns(),
        )

    @work(thread=True, exclusive=True, group="view", exit_on_error=False)
    def _build_view(
        self,
        generation: int,
        library: Library,
        conditions: Conditions,
        frame: pd.DataFrame | None,
        spec: FilterSpec,
        sort: SortSpec,
        view: str,
        marked: np.ndarray,
        text_columns: tuple[list[Hashable], list[Hashable]],
    ) -> None:
        """Evaluate when the conditions changed, then filter and sort (pandas/numpy only)."""
        from engine import VERDICTS
        from engine.stereo import OUTCOMES

        from tui.filters import ordered_rows, view_mask

        worker = get_current_worker()
        try:
            if frame is None:
                frame = library.evaluate(conditions)
            if worker.is_cancelled:
                return
            mask = view_mask(frame, view, spec, marked, *text_columns)
            order = None
            if sort.column == ROW_KEY:
                order = np.arange(len(frame))[::-1] if sort.descending else None
            elif sort.column is not None and sort.column in frame:
                token = "input" if sort.column in library.result_names().values() else conditions
                categories = {"verdict": VERDICTS, "stereo": OUTCOMES}.get(sort.column)
                ranks = {v: i for i, v in enumerate(categories)} if categories else None
                order = self._orders.order(frame, token, sort.column, sort.descending, ranks)
            rows = ordered_rows(mask, order)
            screened = int((frame["status"] == "ok").sum())
        except Exception as exc:  # a bug: report it in one line
            self.post_message(ViewFailed(generation, f"{type(exc).__name__}: {one_line(exc)}"))
            return
        if not worker.is_cancelled:
            self.post_message(ViewComputed(generation, conditions, frame, rows, screened))

    def on_view_computed(self, message: ViewComputed) -> None:
        if message.generation != self._generation:
            return  # a newer request is on its way
        self._applied_generation = message.generation
        self.frame = message.frame
        self.frame_conditions = message.conditions
        self._counts = (message.screened, len(message.frame) - message.screened)
        table = self.query_one(LibraryTable)
        table.show(message.frame, message.rows, self._columns(message.frame),
                   sort=(self.sort.column, self.sort.descending), marked=self.marked)
        self._update_status()
        self.refresh_bindings()

    @property
    def busy(self) -> bool:
        """True while screening, or while a requested table update has not arrived yet."""
        return self.phase == "screening" or self._applied_generation != self._generation

    def on_view_failed(self, message: ViewFailed) -> None:
        if message.generation == self._generation:
            self._applied_generation = message.generation
            self._update_status()
            self.notify(message.message, title="Could not update the table", severity="error")

    def _columns(self, frame: pd.DataFrame) -> list[Column]:
        """The table's columns for the current view."""
        lib = self.library
        assert lib is not None
        cols: list[Column] = []
        names = lib.result_names()  # the input's own ID and SMILES, even when named like a result column
        if lib.id_column is not None:
            ident = names[lib.id_column]
            cols.append(Column(ident, "ID", self._text_width(frame, ident, "ID", 18)))
        cols.append(Column(names[lib.smiles_column], "SMILES", 20))
        if self.view == "rejected":
            cols.append(Column("reason", "Reason", 56))
        else:
            cols += [
                Column("verdict", "Verdict", 12, "verdict"),
                Column("n_products", "Prods", 7, "count"),
                Column("cl2_major", "Cl2 major", 18),
                Column("cl2_major_pct", "Cl2 %", 7, "pct"),
                Column("br2_major", "Br2 major", 18),
                Column("br2_major_pct", "Br2 %", 7, "pct"),
                Column("stereo", "Br2 stereo", 13),
            ]
            if self.show_more_columns:
                cols += [Column(key, label, width, kind) for key, label, width, kind in MORE_COLUMNS]
        if self.show_input_columns:
            # By their names in the frame: an input "status" is shown as input_status, not as the result's.
            for name, key in lib.result_names().items():
                if name not in (lib.id_column, lib.smiles_column):
                    cols.append(Column(key, str(key), self._text_width(frame, key, str(key), 24)))
        cols.append(Column(ROW_KEY, "Row", max(5, len(str(len(frame))) + 2), "row"))
        return cols

    @staticmethod
    def _text_width(frame: pd.DataFrame, column: Hashable, label: str, cap: int) -> int:
        """Width for a column from its label and the first thousand values."""
        sample = frame[column].iloc[:1000].astype(str)
        longest = int(sample.str.len().max()) if len(sample) else 0
        return max(len(label) + 2, min(cap, longest))

    def _update_status(self) -> None:
        if self.frame is None or self.conditions is None:
            return
        ok, rejected = self._counts
        shown = len(self.query_one(LibraryTable).rows)
        total = len(self.frame)
        updating = " │ updating…" if self.busy else ""
        self.query_one("#counts", Static).update(
            f"{_count(total)} rows ({_count(ok)} screened, {_count(rejected)} rejected) │ "
            f"view {self.view}: {_count(shown)} shown │ {_count(int(self.marked.sum()))} marked{updating}"
        )
        cond = self.conditions
        sort = self._sort_text()
        filters = self.filters.describe() if self.view == "library" else "filters off here"
        self.query_one("#settings", Static).update(
            f"Cl2 {cond.cl2_temp_c:g} °C · Br2 {cond.br2_temp_c:g} °C · threshold {cond.threshold_pct:g} % │ "
            f"sort {sort} │ {filters}"
        )
        warnings = cond.warnings()
        box = self.query_one("#warnings", Static)
        box.display = bool(warnings)
        box.update("\n".join(f"! {w}" for w in warnings))

    def _sort_text(self) -> str:
        """The sort order in words, e.g. 'Br2 % ▼' or 'input order'."""
        if self.sort.column is None:
            return "input order"
        labels = {c.key: c.label for c in self.query_one(LibraryTable).columns}
        label = labels.get(self.sort.column, str(self.sort.column))
        return f"{label} {'▼' if self.sort.descending else '▲'}"

    def watch_view(self) -> None:
        self._request_view()

    def watch_filters(self) -> None:
        self._request_view()

    def watch_sort(self) -> None:
        self._request_view()

    def watch_conditions(self) -> None:
        self._request_view()

    def watch_show_input_columns(self) -> None:
        self._request_view()

    def watch_show_more_columns(self) -> None:
        self._request_view()

    # ------------------------------------------------------------------ table messages

    def on_cursor_moved(self, message: CursorMoved) -> None:
        info = self.query_one("#rowinfo", Static)
        if message.row < 0 or self.frame is None:
            info.update("no rows in this view" if self.frame is not None else "")
            return
        record = self.frame.iloc[message.row]
        if record["status"] != "ok":
            info.update(f"row {message.row + 1} rejected: {record['reason']}")
            return
        parts = [f"row {message.row + 1}"]
        if "site_types" in record.index:
            sites = record["site_types"]
            parts.append(f"sites: {sites.replace(',', ', ') if sites else 'none abstractable'}")
        import pandas as pd

        dup = record["duplicate_of"]
        if not pd.isna(dup) and str(dup) != "":
            parts.append(f"same structure as row {dup}")
        info.update(" · ".join(parts))

    def on_mark_requested(self, message: MarkRequested) -> None:
        self.marked[message.row] = not self.marked[message.row]
        self._marks_changed()
        from tui.detail import DetailScreen

        if isinstance(self.screen, DetailScreen):
            self.screen.marked = bool(self.marked[self.screen.row])

    def _marks_changed(self) -> None:
        self.query_one(LibraryTable).set_marked(self.marked)
        if self.view == "shortlist":
            self._request_view()
        else:
            self._update_status()

    def on_sort_requested(self, message: SortRequested) -> None:
        self.sort = SortSpec(message.column, message.descending)

    def on_detail_requested(self, message: DetailRequested) -> None:
        from tui.detail import DetailScreen

        table = self.query_one(LibraryTable)
        self.push_screen(
            DetailScreen(self.library, self.frame, table.rows, table.cursor, self.conditions, self.marked)
        )

    # ------------------------------------------------------------------ actions

    def action_help(self) -> None:
        """Show every key, the verdicts, the model's sources and the safety caution."""
        from tui.help import HelpScreen

        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen())

    def action_next_view(self) -> None:
        """Cycle library → shortlist → rejected."""
        self.view = VIEWS[(VIEWS.index(self.view) + 1) % len(VIEWS)]

    def action_mark_shown(self) -> None:
        """Mark every row the current view shows."""
        self.marked[self.query_one(LibraryTable).rows] = True
        self._marks_changed()

    def action_unmark_shown(self) -> None:
        """Unmark every row the current view shows."""
        self.marked[self.query_one(LibraryTable).rows] = False
        self._marks_changed()

    def action_clear_filters(self) -> None:
        """Drop every filter."""
        self.filters = FilterSpec()
        self.query_one(SearchBar).value = ""

    def action_toggle_input_columns(self) -> None:
        """Show or hide the input file's own columns."""
        self.show_input_columns = not self.show_input_columns

    def action_toggle_more_columns(self) -> None:
        """Show or hide confidence, flags, serves, NBS and polyhalide columns."""
        self.show_more_columns = not self.show_more_columns

    def action_filters(self) -> None:
        """Open the filter form."""
        from tui.filters import site_choices
        from tui.filter_form import FilterForm

        def done(spec: FilterSpec | None) -> None:
            if spec is not None:
                self.filters = spec
                self.query_one(SearchBar).value = spec.text
                if self.view != "library":
                    self.view = "library"

        reason = "" if "site_types" in self.frame else "Site types: not available (the engine returned no site_types column)"
        if self._site_choices[0] is not self.frame:
            self._site_choices = (self.frame, site_choices(self.frame))
        self.push_screen(FilterForm(self.filters, self._site_choices[1], reason), done)

    def action_search(self) -> None:
        """Open the find bar (text match on ID and SMILES)."""
        bar = self.query_one(SearchBar)
        bar.display = True
        bar.focus()

    def action_conditions(self) -> None:
        """Open the conditions panel (temperatures and threshold, applied live)."""
        panel = self.query_one(ConditionsPanel)
        panel.load(self.conditions)
        panel.display = True
        panel.focus_first()

    @on(SearchChanged)
    def _search_changed(self, message: SearchChanged) -> None:
        if message.text != self.filters.text:
            self.filters = replace(self.filters, text=message.text)
        if self.view != "library" and message.text:
            self.view = "library"

    @on(ConditionsProposed)
    def _conditions_proposed(self, message: ConditionsProposed) -> None:
        if message.conditions != self.conditions:
            self.conditions = message.conditions

    @on(PanelClosed)
    def _panel_closed(self, message: PanelClosed) -> None:
        self.query_one(LibraryTable).focus()

    # ------------------------------------------------------------------ export

    def action_export(self) -> None:
        """Export the shortlist or the current view (CSV, TSV, Parquet or SDF, or an HTML report)."""
        from tui.export import ExportScreen

        table = self.query_one(LibraryTable)
        protected = [Path(self.source)] if isinstance(self.source, (str, os.PathLike)) else []
        self.push_screen(
            ExportScreen(int(self.marked.sum()), len(table.rows), self.view, Path.cwd(), protected),
            self._export_chosen,
        )

    def _export_chosen(self, choice: ExportChoice | None) -> None:
        if choice is None or self.frame is None:
            return
        if choice.what == "shortlist":
            rows = np.flatnonzero(self.marked)
            selection = f"shortlist: {len(rows):,} marked rows, input order"
        else:
            rows = self.query_one(LibraryTable).rows.copy()
            filters = self.filters.describe() if self.view == "library" else "no filters"
            selection = f"{self.view} view: {len(rows):,} rows; {filters}; order: {self._sort_text()}"
        self._write_export(self.frame, rows, choice.path, choice.force, self.conditions, selection)

    @work(thread=True, exclusive=True, group="export", exit_on_error=False)
    def _write_export(
        self, frame: pd.DataFrame, rows: np.ndarray, path: Path, force: bool, conditions: Conditions, selection: str
    ) -> None:
        """Write the chosen rows atomically, with conditions and the safety caution as metadata."""
        from tui.export import export_frame, export_metadata, write_report_export

        import engine
        from engine.io import about_path, output_format, write_table
        from halosift.report import is_report_path

        try:
            protect = [self.source] if isinstance(self.source, (str, os.PathLike)) else []
            if is_report_path(path):
                written = write_report_export(
                    self.library, conditions, rows, path, force=force, selection=selection,
                    source=self._source_text(), protect=protect,
                )
                n_rows, sidecar = len(rows), ""
            else:
                out = export_frame(frame, rows)
                meta = export_metadata(conditions, selection, self._source_text())
                written = write_table(out, path, metadata=meta, force=force, protect=protect)
                n_rows = len(out)
                sidecar = str(about_path(written).resolve()) if output_format(written) in ("csv", "tsv") else ""
        except engine.LibraryError as exc:
            self.post_message(ExportFailed(one_line(exc)))
            return
        except Exception as exc:
            self.post_message(ExportFailed(f"{type(exc).__name__}: {one_line(exc)}"))
            return
        self.post_message(ExportFinished(str(Path(written).resolve()), n_rows, sidecar))

    def _source_text(self) -> str:
        if isinstance(self.source, (str, os.PathLike)):
            return str(Path(self.source).resolve())
        return "in-memory table"

    def on_export_finished(self, message: ExportFinished) -> None:
        self.last_export = Path(message.path)
        where = f"{message.path}"
        extra = f"; conditions and caution in {message.sidecar}" if message.sidecar else "; conditions and caution inside"
        self.notify(f"Wrote {message.rows:,} rows to {where}{extra}", title="Exported", timeout=10)

    def on_export_failed(self, message: ExportFailed) -> None:
        self.notify(message.message, title="Export failed", severity="error", timeout=10)


def run(
    path: str | None, *, smiles_column: str | None = None, id_column: str | None = None, images: bool = True
) -> int:
    """Open a library (the bundled sample when ``path`` is None) in the app; return an exit code."""
    if path is None:
        try:
            from sample_libraries import sample_path

            path = str(sample_path())
        except (ImportError, OSError, ValueError) as exc:
            print(f"halosift: the bundled sample library is not available: {one_line(exc)}", file=sys.stderr)
            return 2
    if not Path(path).exists():
        print(f"halosift: no such file: {path}", file=sys.stderr)
        return 2
    # Whole-file problems (type, emptiness, missing SMILES column) are cheap to
    # find from the header; say them in one line before taking over the terminal.
    from engine.io import LibraryError, open_library

    try:
        open_library(path, smiles_column=smiles_column, id_column=id_column)
    except LibraryError as exc:
        print(f"halosift: {exc}", file=sys.stderr)
        return 2
    from tui.structure_view import detect_graphics

    # Ask the terminal about inline images now: once Textual runs, it can no longer be asked.
    graphics = detect_graphics(enabled=images)
    app = HalosiftApp(path, smiles_column=smiles_column, id_column=id_column, graphics=graphics)
    result = app.run()
    return int(result or app.return_code or 0)
