"""The table view: which rows show and in what order, the table's columns, and the two header lines.

Every change to the view, the filters, the sort, the conditions or the marks asks
for the rows again (:meth:`ViewMixin._request_view`); a worker evaluates, filters
and sorts, and only the newest request's answer is shown.
"""

from __future__ import annotations

from collections.abc import Hashable
from typing import TYPE_CHECKING

import numpy as np
from halosift.tui.filters import FilterSpec, SortSpec, TextColumns
from halosift.tui.messages import ViewComputed, ViewFailed
from halosift.tui.state import RowCounts
from halosift.tui.table import OUTCOME_COLUMNS, REASON_COLUMNS, ROW_KEY, SERVES_COLUMN, Column, LibraryTable
from halosift.tui.wording import counted
from textual import work
from textual.widgets import Static
from textual.worker import get_current_worker

from .app_base import MORE_COLUMNS, AppMixin, OneLine, _count, one_line

if TYPE_CHECKING:
    import pandas as pd
    from halosift.engine import Conditions, Library

#: Header lines the condition warnings may take before they are summed up in one.
WARNING_LINES = 3


class ViewMixin(AppMixin):
    """Ask for, build and show the table's rows; its columns; the counts and settings lines."""

    def _text_columns(self) -> TextColumns:
        """The columns the find text looks in."""
        lib = self.library
        if lib is None:
            return TextColumns()
        names = lib.result_names()  # an input "canonical_smiles" is input_canonical_smiles in the frame
        ids = (names[lib.id_column],) if lib.id_column is not None else ()
        return TextColumns(ids, (names[lib.smiles_column], "canonical_smiles"))

    def _request_view(self) -> None:
        """Recompute (in a worker) the rows to show; the newest request wins."""
        if self.library is None or self.conditions is None:
            return
        self._generation += 1
        self._session_changed()
        self._update_status()
        self._refresh_bindings_on_change()
        frame = self.frame if self.state.frame_is_current else None
        self._build_view(
            self._generation, self.library, self.conditions, frame, self.filters, self.sort, self.view,
            self.marked.copy(), self._text_columns(),
        )

    # Every worker is given a description: without one Textual writes one from repr() of each argument,
    # on the interface thread, and the repr of a frame of 20,000 rows takes ~100 ms.
    @work(thread=True, exclusive=True, group="view", exit_on_error=False, description="build the view")
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
        text_columns: TextColumns,
    ) -> None:
        """Evaluate when the conditions changed, then filter and sort (pandas/numpy only)."""
        from halosift.engine.library import PENDING
        from halosift.tui.filters import ordered_rows, view_mask

        worker = get_current_worker()
        try:
            if frame is None:
                frame = library.evaluate(conditions)
            if worker.is_cancelled:
                return
            mask = view_mask(frame, view, spec, marked, text_columns.ids, text_columns.smiles)
            status = frame["status"].to_numpy()
            pending = status == PENDING
            mask = mask & ~pending  # not perceived yet: in no view until it is (the header counts it)
            rows = ordered_rows(mask, self._sort_order(library, conditions, frame, sort))
            screened = int((status == "ok").sum())
        except Exception as exc:  # a bug: report it in one line
            self.post_message(ViewFailed(generation, f"{type(exc).__name__}: {one_line(exc)}"))
            return
        if not worker.is_cancelled:
            self.post_message(ViewComputed(generation, conditions, frame, rows, screened, int(pending.sum())))

    def _sort_order(
        self, library: Library, conditions: Conditions, frame: pd.DataFrame, sort: SortSpec
    ) -> np.ndarray | None:
        """Every frame row in ``sort`` order, or None for input order (call off the interface thread)."""
        from halosift.engine import VERDICTS
        from halosift.engine.stereo import OUTCOMES

        if sort.column == ROW_KEY:
            return np.arange(len(frame))[::-1] if sort.descending else None
        if sort.column is None or sort.column not in frame:
            return None
        token = "input" if sort.column in library.result_names().values() else conditions
        categories = {"verdict": VERDICTS, "stereo": OUTCOMES}.get(sort.column)
        ranks = {v: i for i, v in enumerate(categories)} if categories else None
        return self._orders.order(frame, token, sort.column, sort.descending, ranks)

    def on_view_computed(self, message: ViewComputed) -> None:
        if message.generation != self._generation:
            return  # a newer request is on its way
        self._applied_generation = message.generation
        self.state.take_view(message.frame, message.conditions,
                             RowCounts.of(len(message.frame), message.screened, message.pending))
        table = self.query_one(LibraryTable)
        before, place = table.cursor_row, table.cursor - int(table.scroll_offset.y)
        table.show(message.frame, message.rows, self._columns(message.frame),
                   sort=(self.sort.column, self.sort.descending), marked=self.marked, top=self._to_top)
        if message.generation == self._keep_place_generation and not self._to_top and before >= 0 \
                and table.cursor_row == before:
            # Rows arrived above the cursor's: scroll with them, so the row read stays put on screen.
            table.scroll_to(y=max(0, table.cursor - place), animate=False, force=True)
        self._to_top = False
        self._update_status()
        self._refresh_bindings_on_change()
        if self._shown_waiting:
            self.call_after_refresh(self._release_screening)

    @property
    def busy(self) -> bool:
        """True while screening, or while a requested table update has not arrived yet."""
        return self.phase in ("screening", "streaming") or self._applied_generation != self._generation

    def on_view_failed(self, message: ViewFailed) -> None:
        if message.generation == self._generation:
            self._applied_generation = message.generation
            self._update_status()
            self.notify(message.message, title="Could not update the table", severity="error")
        self._release_screening()

    def _columns(self, frame: pd.DataFrame) -> list[Column]:
        """The table's columns for the current view."""
        lib = self.library
        assert lib is not None
        cols: list[Column] = []
        names = lib.result_names()  # the input's own ID and SMILES, even when named like a result column
        if lib.id_column is not None:
            ident = names[lib.id_column]
            cols.append(Column(ident, "ID", self._text_width(frame, ident, "ID", 18)))
        smiles = names[lib.smiles_column]
        cols.append(Column(smiles, "SMILES", 20, grow_to=self._text_width(frame, smiles, "SMILES", 120)))
        if self.view == "rejected":
            # Grows on a wide terminal to the longest reason; cut ones end in "…" and the status line has them whole.
            cols.append(Column("reason", "Reason", 56, grow_to=self._text_width(frame, "reason", "Reason", 160)))
        else:
            cols += [
                Column("verdict", "Verdict", 12, "verdict"),
                SERVES_COLUMN,
                Column("n_products", "Prods", 7, "count"),
                Column("cl2_major", "Cl2 major", 18),
                Column("cl2_major_pct", "Cl2 %", 7, "pct"),
                Column("br2_major", "Br2 major", 18),
                Column("br2_major_pct", "Br2 %", 7, "pct"),
                Column("stereo", "Br2 stereo", 13),
                *OUTCOME_COLUMNS,
            ]
            if self.show_more_columns:
                cols += [Column(key, label, width, kind) for key, label, width, kind in MORE_COLUMNS]
                cols += REASON_COLUMNS
        if self.show_input_columns:
            import pandas as pd  # loaded long before: a frame is being shown

            # By their names in the frame: an input "status" is shown as input_status, not as the result's.
            for name, key in lib.result_names().items():
                if name not in (lib.id_column, lib.smiles_column):
                    values = frame[key]
                    numeric = pd.api.types.is_numeric_dtype(values) and not pd.api.types.is_bool_dtype(values)
                    cols.append(Column(key, str(key), self._text_width(frame, key, str(key), 24),
                                       "number" if numeric else "text"))  # a number is never shown cut
        cols.append(Column(ROW_KEY, "Row", max(5, len(str(len(frame))) + 2), "row"))
        return cols

    def _text_width(self, frame: pd.DataFrame, column: Hashable, label: str, cap: int) -> int:
        """Width for a column from its label and the first thousand values.

        The input's own columns are measured once per library (they are the same
        in every partial library and every evaluation); result columns each time.
        """
        key = (column, label, cap)
        if column != "reason" and key in self._input_widths:
            return self._input_widths[key]
        sample = frame[column].iloc[:1000].astype(str)
        longest = int(sample.str.len().fillna(0).max()) if len(sample) else 0  # missing values show empty
        width = max(len(label) + 2, min(cap, longest))
        if column != "reason":
            self._input_widths[key] = width
        return width

    def _update_status(self) -> None:
        if self.frame is None or self.conditions is None:
            return
        from halosift.tui.header import Phrase, cl2_forms, fit_phrases

        counts = self.state.counts
        ok, rejected, pending = counts.screened, counts.rejected, counts.pending
        shown = len(self.query_one(LibraryTable).rows)
        total = len(self.frame)
        marked = _count(self.state.n_marked)
        if pending or self.phase == "streaming":
            done = f"{_count(total - pending)} of {_count(total)}"
            counts = [Phrase((f"{done} {'row' if total == 1 else 'rows'} perceived ({_count(ok)} screened, {_count(rejected)} rejected)",
                              f"{done} {'row' if total == 1 else 'rows'} perceived", f"{done} perceived"), keep=6)]
            if self.phase == "streaming" and not self._stop_note:
                counts.append(Phrase(("Esc stops, keeps what is done", "Esc stops"), keep=0))  # the footer leaves Esc to this line
            elif self.phase == "streaming":
                counts.append(Phrase((f"{self._stop_note}…",), keep=5))
            elif self.phase == "stopped":
                note = f"{self._stop_note}, done rows kept · r resumes"
                counts.append(Phrase((note, f"{self._stop_note} · r resumes", "r resumes"), keep=5))
        else:
            counts = [Phrase((f"{counted(total, 'row')} ({_count(ok)} screened, {_count(rejected)} rejected)",
                              f"{counted(total, 'row')} ({_count(rejected)} rejected)", counted(total, 'row')), keep=1)]
        counts += [
            Phrase((f"view {self.view}: {_count(shown)} shown", f"{self.view}: {_count(shown)} shown"), keep=3),
            Phrase((f"{marked} marked",), keep=4),
        ]
        if self._applied_generation != self._generation or self.phase == "screening":
            counts.append(Phrase(("updating…",), keep=5))
        width = max(20, self.size.width - 2)  # the lines' padding
        self.query_one("#counts", OneLine).show(fit_phrases(counts, width))
        cond = self.conditions
        cl2 = cl2_forms(cond)
        temps = f"Br2 {cond.br2_temp_c:g} °C · threshold {cond.threshold_pct:g} %"
        sort = self._sort_text()
        settings = [
            Phrase((f"{cl2.long} · {temps}", f"{cl2.short} · {temps}"), keep=4),
            # The sort also shows on its column's title; the filters show nowhere else, so they stay longer.
            Phrase((f"sort {sort}", sort), keep=2),
        ]
        if self.view != "library":
            settings.append(Phrase(("filters off here", ""), keep=1))
        elif self.filters.active:
            n = self.filters.count
            settings.append(Phrase((self.filters.describe(), f"{n} filter{'s' if n > 1 else ''} on", "filtered"),
                                   keep=3))
        else:
            settings.append(Phrase(("no filters", ""), keep=1))
        self.query_one("#settings", OneLine).show(fit_phrases(settings, width))
        warnings = cond.warnings()
        box = self.query_one("#warnings", Static)
        box.display = bool(warnings)
        lines = [f"! {w}" for w in warnings]
        # Wrapped whole, never cut; more than fits in WARNING_LINES becomes a count pointing to the panel.
        if sum(-(-len(line) // width) for line in lines) > WARNING_LINES:
            lines = [f"! {len(warnings)} warnings about these conditions: the split is extrapolated "
                     "(t lists them in full)"]
        box.update("\n".join(lines))

    def on_resize(self) -> None:
        self._update_status()

    def _sort_text(self) -> str:
        """The sort order in words, e.g. 'Br2 % ▼' or 'input order' (titles a chemist reads, never internal names)."""
        from halosift.tui.header import column_title

        if self.sort.column is None:
            return "input order"
        self._titles.update({c.key: c.label for c in self.query_one(LibraryTable).columns})
        if self.sort.column == ROW_KEY:
            self._titles.setdefault(ROW_KEY, "Row")
        return f"{column_title(self.sort.column, self._titles)} {'▼' if self.sort.descending else '▲'}"
