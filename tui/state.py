"""The app's session state as plain Python: what is loaded, what the chemist chose, and the shortlist.

No Textual or Rich here (a test checks it), so every transition can be unit-tested
without an app running. The app keeps one :class:`AppState` and only refreshes its
widgets after calling a transition; each transition says whether anything changed.
"""

from __future__ import annotations

from collections.abc import Hashable
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING

import numpy as np
from halosift.tui.filters import VIEWS, FilterSpec, SortSpec

if TYPE_CHECKING:
    import pandas as pd
    from halosift.engine import Conditions, Library
    from halosift.tui.session import Session

#: Bulk mark steps that z can undo (each keeps one bool per row).
UNDO_DEPTH = 20
#: The phases of a screen, in the order they normally come.
PHASES: tuple[str, ...] = ("screening", "streaming", "ready", "stopped")


@dataclass(frozen=True)
class MarksUndo:
    """The shortlist as it was before one bulk mark step."""

    what: str
    """The step, in words ('unmark all 12 shown')."""
    marked: np.ndarray
    """Marks before the step, one per frame row."""


@dataclass(frozen=True)
class RowCounts:
    """How the rows of the evaluated frame stand."""

    screened: int = 0
    """Rows with status ok."""
    rejected: int = 0
    """Rows the engine could not model."""
    pending: int = 0
    """Rows whose structure is not perceived yet."""

    @classmethod
    def of(cls, total: int, screened: int, pending: int) -> RowCounts:
        """The counts of a frame of ``total`` rows, given the screened and pending ones."""
        return cls(screened, total - screened - pending, pending)


@dataclass
class AppState:
    """Everything the app shows for one library, and every choice the chemist made about it."""

    phase: str = "screening"
    """One of :data:`PHASES`: screening (worker running, no rows yet), streaming (worker running, the
    rows perceived so far shown), ready (the whole library is loaded) or stopped (cancelled or failed;
    rows perceived before stay shown)."""
    view: str = "library"
    """Which rows the table lists: one of :data:`halosift.tui.filters.VIEWS`."""
    filters: FilterSpec = field(default_factory=FilterSpec)
    """The library view's filters."""
    sort: SortSpec = field(default_factory=SortSpec)
    """Row order of every view."""
    conditions: Conditions | None = None
    """engine.Conditions the table is evaluated under (None until the engine is loaded)."""
    show_input_columns: bool = False
    """Also show the input file's own columns (beyond ID and SMILES)."""
    show_more_columns: bool = False
    """Also show confidence, flags, the NBS major product, the polyhalide columns and why reagents are ruled out."""
    library: Library | None = None
    """The loaded engine.Library (``partial`` set while it is still being perceived)."""
    frame: pd.DataFrame | None = None
    """The evaluated frame the table shows (``library.evaluate(frame_conditions)``)."""
    frame_conditions: Conditions | None = None
    """Conditions ``frame`` was evaluated under."""
    counts: RowCounts = field(default_factory=RowCounts)
    """How the rows of ``frame`` stand (screened, rejected, pending)."""
    marked: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=bool))
    """Shortlist marks, one per input row (changed in place, so views of it see every change)."""
    n_marked: int = 0
    """How many rows are marked (kept with every change, so no count walks the marks)."""
    undo: list[MarksUndo] = field(default_factory=list)
    """Bulk mark steps z can undo, oldest first (at most :data:`UNDO_DEPTH`)."""
    session_key: str | None = None
    """The library's key in the session folder, once screening has read it (None: sessions are off)."""
    session_restored: bool = False
    """A saved session was already looked at for this library (a resumed screen does not restore it again)."""

    # ------------------------------------------------------------------ choices

    def set_phase(self, phase: str) -> bool:
        """Enter ``phase``; True if it is a change."""
        if phase not in PHASES:
            raise ValueError(f"unknown phase {phase!r}")
        changed = phase != self.phase
        self.phase = phase
        return changed

    @property
    def rows_shown(self) -> bool:
        """True while the table lists rows: the whole library, or the part perceived so far."""
        return self.phase == "ready" or (self.phase in ("streaming", "stopped") and self.library is not None)

    def set_view(self, view: str) -> bool:
        """Show another list of rows; True if it is a change."""
        if view not in VIEWS:
            raise ValueError(f"unknown view {view!r}")
        changed = view != self.view
        self.view = view
        return changed

    def next_view(self) -> str:
        """Cycle library → shortlist → rejected; returns the new view."""
        self.view = VIEWS[(VIEWS.index(self.view) + 1) % len(VIEWS)]
        return self.view

    def set_filters(self, filters: FilterSpec) -> bool:
        """Replace the library view's filters; True if they differ."""
        changed = filters != self.filters
        self.filters = filters
        return changed

    def set_search_text(self, text: str) -> bool:
        """Set the find text (one of the filters); True if it differs."""
        return self.set_filters(replace(self.filters, text=text)) if text != self.filters.text else False

    def set_sort(self, sort: SortSpec) -> bool:
        """Order the rows another way; True if it differs."""
        changed = sort != self.sort
        self.sort = sort
        return changed

    def sort_by(self, column: Hashable | None, descending: bool) -> bool:
        """Order the rows by ``column``; True if that is a change."""
        return self.set_sort(SortSpec(column, descending))

    def set_conditions(self, conditions: Conditions) -> bool:
        """Evaluate under other conditions; True if they differ."""
        changed = conditions != self.conditions
        self.conditions = conditions
        return changed

    def set_show_input_columns(self, show: bool) -> bool:
        """Show or hide the input's own columns; True if that is a change."""
        changed = show != self.show_input_columns
        self.show_input_columns = show
        return changed

    def set_show_more_columns(self, show: bool) -> bool:
        """Show or hide the extra result columns; True if that is a change."""
        changed = show != self.show_more_columns
        self.show_more_columns = show
        return changed

    # ------------------------------------------------------------------ marks

    def toggle_mark(self, row: int) -> bool:
        """Mark or unmark one frame row (not a step z undoes); returns its new mark."""
        now = not self.marked[row]
        self.marked[row] = now
        self.n_marked += 1 if now else -1
        return now

    def set_marks(self, rows: np.ndarray, value: bool, what: str) -> int:
        """Mark (or unmark) frame rows as one step that z can undo; returns how many marks changed."""
        rows = np.unique(np.asarray(rows, dtype=np.int64))  # a row listed twice changes once
        changed = int((self.marked[rows] != value).sum())
        if changed:
            self._push_undo(what)
            self.marked[rows] = value
            self.n_marked += changed if value else -changed
        return changed

    def undo_marks(self) -> MarksUndo | None:
        """Put the marks back as they were before the last bulk step; that step, or None when there is none."""
        if not self.undo:
            return None
        step = self.undo.pop()
        self.marked[:] = step.marked
        self.n_marked = int(self.marked.sum())
        return step

    def clear_marks(self, what: str) -> int:
        """Unmark every row as one step z can undo; returns how many were marked."""
        cleared = self.n_marked
        if cleared:
            self._push_undo(what)
            self.marked[:] = False
            self.n_marked = 0
        return cleared

    def _push_undo(self, what: str) -> None:
        self.undo.append(MarksUndo(what, self.marked.copy()))
        del self.undo[:-UNDO_DEPTH]

    # ------------------------------------------------------------------ library

    def take_library(self, library: Library, frame: pd.DataFrame, conditions: Conditions, counts: RowCounts,
                     *, first: bool) -> None:
        """Take a (partial or whole) library and its evaluation.

        ``first``: the first of a screen. Then the marks are reset when their
        count does not fit (a resumed screen keeps the marks made meanwhile)
        and the conditions become those the frame was evaluated under.
        """
        self.library = library
        self.frame = frame
        self.frame_conditions = conditions
        self.counts = counts
        if first:
            if len(self.marked) != len(frame):
                self.marked = np.zeros(len(frame), dtype=bool)
                self.n_marked = 0
                self.undo = []
            self.conditions = conditions

    def take_view(self, frame: pd.DataFrame, conditions: Conditions, counts: RowCounts) -> None:
        """Take a frame evaluated (and counted) for a view."""
        self.frame = frame
        self.frame_conditions = conditions
        self.counts = counts

    @property
    def frame_is_current(self) -> bool:
        """True when ``frame`` was evaluated under the conditions now chosen."""
        return self.frame is not None and self.frame_conditions == self.conditions

    # ------------------------------------------------------------------ sessions

    def to_session(self) -> Session:
        """The state to save for this library (tui.session.Session)."""
        from halosift.tui.session import Session, conditions_record

        return Session(
            n_rows=len(self.marked), marked=self.marked.copy(), sort=self.sort, filters=self.filters, view=self.view,
            conditions=conditions_record(self.conditions), show_input_columns=self.show_input_columns,
            show_more_columns=self.show_more_columns,
        )

    def restore(self, saved: Session) -> None:
        """Take marks, sort, filters, view and column choices from a saved session.

        The conditions are not taken here: the library's first frame was already
        evaluated under the saved ones (see tui.session.initial_conditions).
        """
        self.marked = saved.marked.copy()
        self.n_marked = int(self.marked.sum())
        self.undo = []
        self.sort = saved.sort
        self.filters = saved.filters
        self.view = saved.view if saved.view in VIEWS else "library"
        self.show_input_columns = saved.show_input_columns
        self.show_more_columns = saved.show_more_columns

    def start_fresh(self, conditions: Conditions, what: str) -> int:
        """Drop every choice: no marks (one step z undoes, named ``what``), input order, no filters,
        the library view, no extra columns and ``conditions``. Returns how many marks were cleared."""
        cleared = self.clear_marks(what)
        self.sort = SortSpec()
        self.filters = FilterSpec()
        self.view = "library"
        self.show_input_columns = False
        self.show_more_columns = False
        self.conditions = conditions
        return cleared
