"""Marks: the shortlist the chemist builds row by row, by the shown rows at once, or from a file of IDs.

Every step that marks many rows at once (a, u, an ID list, starting fresh) is one
step that z undoes (:class:`halosift.tui.state.AppState` keeps them).
"""

from __future__ import annotations

from collections.abc import Hashable
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np
from halosift.tui.messages import IdsMatched, MarkRequested
from halosift.tui.table import LibraryTable
from halosift.tui.wording import counted
from textual import work

from .app_base import AppMixin, one_line

if TYPE_CHECKING:
    import pandas as pd


class MarksMixin(AppMixin):
    """Mark and unmark rows (one, all shown, or those listed in a file) and undo the last step."""

    def on_mark_requested(self, message: MarkRequested) -> None:
        self.state.toggle_mark(message.row)
        self._marks_changed()
        from halosift.tui.detail import DetailScreen

        if isinstance(self.screen, DetailScreen):
            self.screen.marked = bool(self.marked[self.screen.row])

    def _marks_changed(self) -> None:
        self._session_changed()
        self.query_one(LibraryTable).set_marked(self.marked)
        if self.view == "shortlist":
            self._request_view()
        else:
            self._update_status()

    def set_marks(self, rows: np.ndarray, value: bool, what: str) -> int:
        """Mark (or unmark) frame rows as one step that z can undo; returns how many marks changed."""
        changed = self.state.set_marks(rows, value, what)
        if changed:
            self._marks_changed()
        return changed

    def action_mark_shown(self) -> None:
        """Mark every row the current view shows."""
        rows = self.query_one(LibraryTable).rows
        changed = self.set_marks(rows, True, f"mark all {len(rows):,} shown")
        self.notify(f"Marked {counted(changed, 'more row')} (all {len(rows):,} shown) · z undoes" if changed
                    else "Every shown row was already marked", title="Marks")

    def action_unmark_shown(self) -> None:
        """Unmark every row the current view shows."""
        rows = self.query_one(LibraryTable).rows
        changed = self.set_marks(rows, False, f"unmark all {len(rows):,} shown")
        self.notify(f"Unmarked {counted(changed, 'row')} · z undoes" if changed else "No shown row was marked", title="Marks")

    def action_undo_marks(self) -> None:
        """Undo the last mark-all, unmark-all or marks-from-file step."""
        step = self.state.undo_marks()
        if step is None:
            self.notify("Nothing to undo (z undoes a, u and marks from a file)", title="Marks")
            return
        self._marks_changed()
        self.notify(f"Undone: {step.what}; {counted(self.state.n_marked, 'row')} marked", title="Marks")

    def action_mark_from_file(self) -> None:
        """Mark the rows whose ID is listed in a file (one ID a line, or a CSV/TSV with an ID column)."""
        from halosift.tui.id_list import IdListScreen

        if self.library is None or self.library.id_column is None:
            self.notify("This library has no ID column, so there are no IDs to match", title="Marks",
                        severity="warning")
            return

        def chosen(path: Path | None) -> None:
            if path is not None:
                self._match_ids(path, self.frame, self.library.id_column)

        self.push_screen(IdListScreen(Path.cwd()), chosen)

    @work(thread=True, exclusive=True, group="ids", exit_on_error=False, description="match an ID list")
    def _match_ids(self, path: Path, frame: pd.DataFrame, id_column: Hashable) -> None:
        """Read an ID list and find its rows (pandas, off the interface thread)."""
        from halosift.tui.id_list import match_ids, read_ids

        try:
            ids = read_ids(path, str(id_column))
            match = match_ids(frame[id_column], ids)
        except (OSError, ValueError) as exc:
            self.post_message(IdsMatched(str(path), None, 0, (), one_line(exc)))
            return
        self.post_message(IdsMatched(str(path), match.rows, match.n_ids, match.missing, ""))

    def on_ids_matched(self, message: IdsMatched) -> None:
        name = Path(message.path).name
        if message.rows is None:
            self.notify(f"Cannot read {name}: {message.error}", title="Marks", severity="error", timeout=10)
            return
        changed = self.set_marks(message.rows, True, f"mark {counted(len(message.rows), 'row')} listed in {name}")
        missing = ""
        if message.missing:
            few = ", ".join(message.missing[:3]) + (" …" if len(message.missing) > 3 else "")
            missing = f"; {len(message.missing):,} not in this library ({few})"
        self.notify(
            f"{counted(message.n_ids, 'ID')} read from {name}: {counted(len(message.rows), 'row')} found, "
            f"{changed:,} newly marked"
            f"{missing}" + (" · z undoes" if changed else ""),
            title="Marks", timeout=10,
        )
