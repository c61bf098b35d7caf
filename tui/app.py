"""The halosift terminal app: screen a library, sift it, explain a row, export a shortlist.

The state (library, conditions, filters, sort, view, marks) lives in a plain
:class:`halosift.tui.state.AppState`; the app calls its transitions and refreshes
the widgets. Widgets report back with the messages in :mod:`halosift.tui.messages`. RDKit, pyarrow, pandas and the engine are imported in
worker threads or on first use, so the first paint does not wait for them.

:class:`HalosiftApp` is put together from one mixin per topic: screening
(:mod:`.app_screening`), sessions (:mod:`.app_sessions`), the table view
(:mod:`.app_view`), marks (:mod:`.app_marks`) and export (:mod:`.app_export`), on
:class:`.app_base.AppBase` (the attributes they share). This module keeps the
layout, the keys (which apply when, and why not), the panels they open, and
:func:`run`.
"""

from __future__ import annotations

import sys
from collections.abc import Mapping
from pathlib import Path
from typing import Any, ClassVar

from halosift.tui.conditions import ConditionsScreen
from halosift.tui.filters import FilterSpec
from halosift.tui.messages import (
    ConditionsProposed,
    CursorMoved,
    DetailMoved,
    DetailRequested,
    PanelClosed,
    SearchChanged,
    SortRequested,
)
from halosift.tui.search import SearchBar
from halosift.tui.table import LibraryTable
from halosift.tui.wording import counted
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.widgets import Footer, Input, Label, ProgressBar, Static

from .app_base import AppBase, OneLine, one_line
from .app_export import ExportMixin
from .app_marks import MarksMixin
from .app_screening import ScreeningMixin
from .app_sessions import SessionsMixin
from .app_view import ViewMixin

#: The app's own commands that act on the library table (see ``HalosiftApp.check_action``).
TABLE_ACTIONS = frozenset({
    "search", "filters", "conditions", "next_view", "export", "mark_shown", "unmark_shown", "undo_marks",
    "mark_from_file", "start_fresh",
    "clear_filters", "toggle_input_columns", "toggle_more_columns", "sort_table",
})


class HalosiftApp(ScreeningMixin, SessionsMixin, ViewMixin, MarksMixin, ExportMixin, AppBase):
    """Screen a hydrocarbon library and sift it by predicted halogenation outcome."""

    TITLE = "halosift"
    CSS_PATH = Path(__file__).with_name("halosift.tcss")
    ENABLE_COMMAND_PALETTE = False

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("q", "leave", "Quit"),
        Binding("question_mark,f1", "help", "Help", key_display="?"),
        # Esc and r are off the footer: the screening box ("Esc cancels") and the header ("Esc stops",
        # "r resumes", "Press r to screen again") name them where they apply, which leaves the footer room
        # for the table's keys at 80 columns in every phase.
        Binding("escape", "cancel_screening", "Cancel screening (the rows done stay)", show=False),
        Binding("r", "rescreen", "Screen again (resumes a stopped screen)", show=False),
        Binding("slash", "search", "Find", key_display="/", show=False),
        Binding("f", "filters", "Filter"),
        Binding("t", "conditions", "Conditions"),
        Binding("v", "next_view", "View"),
        Binding("e", "export", "Export"),
        Binding("a", "mark_shown", "Mark all shown", show=False),
        Binding("u", "unmark_shown", "Unmark all shown", show=False),
        Binding("z", "undo_marks", "Undo mark all, unmark all or marks from a file", show=False),
        Binding("m", "mark_from_file", "Mark IDs listed in a file", show=False),
        Binding("N", "start_fresh", "Start fresh (drop the saved session)", show=False, key_display="N"),
        Binding("x", "clear_filters", "Clear filters", show=False),
        Binding("c", "toggle_input_columns", "Input columns", show=False),
        Binding("o", "toggle_more_columns", "More columns (confidence, flags, NBS, poly)", show=False),
        # The table's own s (it wins when the table has the focus): before the first rows, say why nothing sorts.
        Binding("s", "sort_table", "Sort", show=False),
    ]

    # ------------------------------------------------------------------ layout

    def compose(self) -> ComposeResult:
        yield Static(f"halosift │ {self.source_name}", id="title")
        yield OneLine("", id="counts")
        yield OneLine("", id="settings")
        yield Static("", id="warnings")
        with Vertical(id="screening"):
            yield Label(f"Screening {self.source_name}…", id="screening-label")
            yield ProgressBar(total=None, show_eta=False, id="screening-progress")
            yield Label("Esc cancels", id="screening-hint")
        yield LibraryTable(id="table")
        yield OneLine("", id="rowinfo")
        yield SearchBar(id="search")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one("#search").display = False
        self.query_one("#warnings").display = False
        self._show_phase()
        self._start_screening()

    # ------------------------------------------------------------------ phases and keys

    @property
    def rows_shown(self) -> bool:
        """True while the table lists rows: the whole library, or the part perceived so far."""
        return self.state.rows_shown

    def _show_phase(self) -> None:
        """Show the widgets of the phase entered."""
        phase = self.phase
        shown = self.rows_shown
        self.query_one("#screening").display = phase == "screening"
        self.query_one("#table").display = shown
        self.query_one("#rowinfo").display = shown
        if shown:
            if self.focused is None and len(self.screen_stack) == 1:  # never taken from a field being typed in
                self.query_one(LibraryTable).focus()
        else:
            self.set_focus(None)  # nothing to type into or move through until a library is loaded
        if phase == "screening":
            self.query_one("#counts", OneLine).show("")
            self.query_one("#settings", OneLine).show("")
        self.refresh_bindings()
        self._bindings_shown = self._bindings_state()

    def _bindings_state(self) -> tuple[bool | None, ...]:
        """What :meth:`check_action` says of each of the app's keys now."""
        return tuple(self.check_action(action, ()) for action in self._binding_actions)

    def _refresh_bindings_on_change(self) -> None:
        """Redraw the footer's keys only when one of them was enabled or disabled.

        Each refresh rebuilds the footer (tens of ms); rows streaming in change
        the view twice a second without changing which keys apply.
        """
        state = self._bindings_state()
        if state != self._bindings_shown:
            self._bindings_shown = state
            self.refresh_bindings()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "quit":  # ctrl+q (Textual's own binding) quits from anywhere
            return True
        if action not in self._binding_actions:
            return True  # Textual's own actions (focus next/previous, ...) are never restricted
        # While a text field has focus its keys are typing, not commands: hide them.
        if isinstance(self.focused, Input) and action != "cancel_screening":
            return False
        if self.why_disabled(action) is None:
            return True
        if action == "export" and self._on_table():
            return None  # shown greyed: the table is about to change, or not every row is perceived yet
        return False

    def _on_table(self) -> bool:
        """True when the library table is on screen with nothing over it."""
        return self.rows_shown and len(self.screen_stack) == 1

    def why_disabled(self, action: str) -> str | None:
        """Why the app's key for ``action`` does nothing now, in one line; None when it acts.

        :meth:`check_action` hides or greys exactly the keys this gives a reason
        for, and :meth:`run_action` says that reason when such a key is pressed.
        """
        phase = self.phase
        if action in ("leave", "help"):
            return None
        if action == "cancel_screening":
            if phase in ("screening", "streaming"):
                return None
            return ("Screening is stopped: r resumes it" if phase == "stopped"
                    else "Nothing to cancel: the whole library is screened")
        if action == "rescreen":
            if phase == "stopped":
                return None
            return ("Screening is under way (Esc stops it; r then resumes)" if phase in ("screening", "streaming")
                    else "The whole library is screened: r screens again only after a stop")
        if action not in TABLE_ACTIONS:
            return None
        if not self.rows_shown:
            return (f"Wait for the first rows: {self.source_name} is being perceived" if phase == "screening"
                    else "No library is loaded: r tries again")
        if len(self.screen_stack) > 1:
            return "That key acts on the library table: Esc goes back to it"
        if action == "export":
            if self.library is not None and self.library.partial:
                total = len(self.frame) if self.frame is not None else 0
                done = total - self.state.counts.pending
                more = " (r resumes)" if phase == "stopped" else ""
                return f"Export waits for the whole library: {done:,} of {counted(total, 'row')} perceived{more}"
            if self.busy:
                return "Export waits for the table to finish updating"
        return None

    async def run_action(
        self, action: str | Any, default_namespace: Any = None, namespaces: Mapping[str, Any] | None = None,
    ) -> bool:
        """Run an action; one of the app's own keys pressed while it does nothing says why instead."""
        if (isinstance(action, str) and action in self._binding_actions and default_namespace in (None, self)
                and not self.check_action(action, ())):
            reason = None if isinstance(self.focused, Input) else self.why_disabled(action)
            if reason is not None:
                self.notify(reason, title="Not now", severity="warning")
                return True
        return await super().run_action(action, default_namespace, namespaces)

    def action_sort_table(self) -> None:
        """Sort by the table's picked column, the table taking the focus (as its own s does)."""
        table = self.query_one(LibraryTable)
        table.focus()
        table.action_sort()

    async def action_quit(self) -> None:
        """Quit, stopping any screening first and saving the session."""
        self._cancel.set()
        self.save_session_now()
        self.exit(0)

    async def action_leave(self) -> None:
        """Quit (the q key; a letter, so not while typing in a field)."""
        await self.action_quit()

    # ------------------------------------------------------------------ table messages

    def on_cursor_moved(self, message: CursorMoved) -> None:
        from textual.css.query import NoMatches

        try:
            info = self.query_one("#rowinfo", OneLine)
        except NoMatches:  # the app is closing (rows may arrive up to the last moment)
            return
        if message.row < 0 or self.frame is None:
            info.show("no rows in this view" if self.frame is not None else "")
            return
        record = self.frame.iloc[message.row]
        if record["status"] != "ok":
            info.show(f"row {message.row + 1} rejected: {record['reason']}")
            return
        parts = [f"row {message.row + 1}"]
        if "site_types" in record.index:
            sites = record["site_types"]
            parts.append(f"sites: {sites.replace(',', ', ') if sites else 'none abstractable'}")
        import pandas as pd

        dup = record["duplicate_of"]
        if not pd.isna(dup) and str(dup) != "":
            parts.append(f"same structure as row {dup}")
        info.show(" · ".join(parts))

    def on_sort_requested(self, message: SortRequested) -> None:
        if self.state.sort_by(message.column, message.descending):
            self._sort_changed()

    def on_detail_moved(self, message: DetailMoved) -> None:
        self.query_one(LibraryTable).go_to_row(message.row)

    def on_detail_requested(self, message: DetailRequested) -> None:
        from halosift.tui.detail import DetailScreen

        table = self.query_one(LibraryTable)
        self.push_screen(
            DetailScreen(self.library, self.frame, table.rows, table.cursor, self.conditions, self.marked)
        )

    # ------------------------------------------------------------------ actions

    def action_help(self) -> None:
        """Show every key, the verdicts, the model's sources and the safety caution."""
        from halosift.tui.help import HelpScreen

        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen())

    def action_next_view(self) -> None:
        """Cycle library → shortlist → rejected."""
        self.state.next_view()
        self._request_view()

    def action_clear_filters(self) -> None:
        """Drop every filter."""
        self.filters = FilterSpec()
        self.query_one(SearchBar).value = ""

    def action_toggle_input_columns(self) -> None:
        """Show or hide the input file's own columns."""
        self.show_input_columns = not self.show_input_columns

    def action_toggle_more_columns(self) -> None:
        """Show or hide confidence, flags, NBS, polyhalide and ruled-out reason columns."""
        self.show_more_columns = not self.show_more_columns

    def action_filters(self) -> None:
        """Open the filter form."""
        from halosift.tui.filter_form import FilterForm
        from halosift.tui.filters import site_choices

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
        """Open the conditions panel (temperatures, Cl2 solvent, threshold; applied on Enter or leaving a field)."""
        self.push_screen(ConditionsScreen(self.conditions))

    @on(SearchChanged)
    def _search_changed(self, message: SearchChanged) -> None:
        changed = self.state.set_search_text(message.text)
        if message.text:
            changed = self.state.set_view("library") or changed
        if changed:
            self._request_view()

    @on(ConditionsProposed)
    def _conditions_proposed(self, message: ConditionsProposed) -> None:
        if message.conditions != self.conditions:
            self.conditions = message.conditions

    @on(PanelClosed)
    def _panel_closed(self, message: PanelClosed) -> None:
        self.query_one(LibraryTable).focus()


def run(
    path: str | None, *, smiles_column: str | None = None, id_column: str | None = None, images: bool = True,
    fresh: bool = False, conditions: Mapping[str, Any] | None = None,
) -> int:
    """Open a library (the bundled sample when ``path`` is None) in the app; return an exit code.

    ``conditions``: engine.Conditions fields to start with (they win over the saved session's).
    """
    if path is None:
        try:
            from halosift.sample_libraries import sample_path

            path = str(sample_path())
        except (ImportError, OSError, ValueError) as exc:
            print(f"halosift: the bundled sample library is not available: {one_line(exc)}", file=sys.stderr)
            return 2
    if not Path(path).exists():
        print(f"halosift: no such file: {path}", file=sys.stderr)
        return 2
    # Whole-file problems (type, emptiness, missing SMILES column) are cheap to
    # find from the header; say them in one line before taking over the terminal.
    from halosift.engine.io import LibraryError, open_library

    try:
        open_library(path, smiles_column=smiles_column, id_column=id_column)
    except LibraryError as exc:
        print(f"halosift: {exc}", file=sys.stderr)
        return 2
    from halosift.tui.structure_view import detect_graphics

    # Ask the terminal about inline images now: once Textual runs, it can no longer be asked.
    graphics = detect_graphics(enabled=images)
    app = HalosiftApp(path, smiles_column=smiles_column, id_column=id_column, graphics=graphics, fresh=fresh,
                      conditions=conditions)
    result = app.run()
    return int(result or app.return_code or 0)
