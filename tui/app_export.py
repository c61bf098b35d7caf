"""Export: write the shortlist or the current view to a table file or an HTML report, off the interface thread.

The export form (:mod:`halosift.tui.export`) picks what and where; the rows go out
in the table's order, with the conditions, the selection and the safety caution
as metadata.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np
from halosift.tui.filters import SortSpec
from halosift.tui.messages import ExportFailed, ExportFinished
from halosift.tui.table import LibraryTable
from halosift.tui.wording import counted
from textual import work

from .app_base import AppMixin, one_line

if TYPE_CHECKING:
    import pandas as pd
    from halosift.engine import Conditions
    from halosift.tui.export import ExportChoice


class ExportMixin(AppMixin):
    """The export key, its form's answer, the writing worker and what it reports."""

    def action_export(self) -> None:
        """Export the shortlist or the current view (CSV, TSV, Parquet or SDF, or an HTML report)."""
        from halosift.tui.export import ExportScreen

        table = self.query_one(LibraryTable)
        protected = [Path(self.source)] if isinstance(self.source, (str, os.PathLike)) else []
        self.push_screen(
            ExportScreen(int(self.marked.sum()), len(table.rows), self.view, Path.cwd(), protected, self._sort_text()),
            self._export_chosen,
        )

    def _export_chosen(self, choice: ExportChoice | None) -> None:
        if choice is None or self.frame is None:
            return
        order = self._sort_text()
        if choice.what == "shortlist":
            marked = self.marked.copy()
            rows = None  # put in the table's order by the export worker
            selection = f"shortlist: {counted(int(marked.sum()), 'marked row')}; order: {order}"
        else:
            marked = None
            rows = self.query_one(LibraryTable).rows.copy()
            filters = self.filters.describe() if self.view == "library" else "no filters"
            selection = f"{self.view} view: {counted(len(rows), 'row')}; {filters}; order: {order}"
        self._write_export(self.frame, rows, marked, self.sort, choice.path, choice.force, self.conditions, selection)

    @work(thread=True, exclusive=True, group="export", exit_on_error=False, description="write an export")
    def _write_export(
        self, frame: pd.DataFrame, rows: np.ndarray | None, marked: np.ndarray | None, sort: SortSpec, path: Path,
        force: bool, conditions: Conditions, selection: str,
    ) -> None:
        """Write the chosen rows atomically, in the table's order, with conditions and the safety caution as metadata.

        ``rows`` are the view's rows as shown; for the shortlist they are None and
        the ``marked`` rows are put in ``sort`` order here, off the interface thread.
        """
        from halosift.engine.io import about_path, output_format, write_table
        from halosift.tui.export import ReportProgress, export_frame, export_metadata, write_report_export
        from halosift.tui.filters import ordered_rows

        from halosift import engine
        from halosift.report import is_report_path

        try:
            if rows is None:
                rows = ordered_rows(marked, self._sort_order(self.library, conditions, frame, sort))
            protect = [self.source] if isinstance(self.source, (str, os.PathLike)) else []
            if is_report_path(path):
                progress = ReportProgress(self, path)  # a report draws every entry: seconds on a large library
                try:
                    written = write_report_export(
                        self.library, conditions, rows, path, force=force, selection=selection,
                        source=self._source_text(), protect=protect, progress=progress,
                    )
                finally:
                    progress.close()
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
        self.notify(f"Wrote {counted(message.rows, 'row')} to {where}{extra}", title="Exported", timeout=10)

    def on_export_failed(self, message: ExportFailed) -> None:
        self.notify(message.message, title="Export failed", severity="error", timeout=10)
