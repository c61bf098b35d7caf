"""Exporting the shortlist or the current view: the path form, the replace dialog, and what is written."""

from __future__ import annotations

import os
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any, ClassVar

import numpy as np
from halosift.tui.inputs import OrderedInput
from halosift.tui.toggles import ChoiceButton
from halosift.tui.wording import counted
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Footer, Input, Label, ProgressBar, RadioSet, Static

if TYPE_CHECKING:
    import pandas as pd
    from textual.app import App

#: Default file names per choice (in the folder the app was started from).
DEFAULT_NAMES: dict[str, str] = {"shortlist": "halosift-shortlist.csv", "view": "halosift-view.csv"}
#: Name of the column added to exports: the 1-based input row, so rows can be traced back.
ROW_COLUMN = "input_row"


@dataclass(frozen=True)
class ExportChoice:
    """What the export form settled on."""

    what: str
    """'shortlist' (marked rows) or 'view' (the rows the table shows)."""
    path: Path
    """Absolute path to write."""
    force: bool
    """True when the chemist agreed to replace an existing file."""


@dataclass(frozen=True)
class ExportTarget:
    """Where an export goes, checked."""

    path: Path
    """Absolute, normalised path to write."""
    format: str
    """'csv', 'tsv', 'parquet', 'sdf' (engine.io.output_format) or 'html' (a report)."""


def check_export_path(text: str, folder: Path, protected: Sequence[Path] = ()) -> ExportTarget:
    """The checked target (absolute path and format) for the typed path, or ValueError with a one-line reason.

    Relative paths are taken from ``folder``. The folder must exist and be
    writable; the extension must be one the writer knows; the path must not
    be one of ``protected`` (the library being screened).
    """
    from halosift.engine.io import LibraryError, output_format

    from halosift.report import is_report_path

    text = text.strip()
    if not text:
        raise ValueError("type a file name, e.g. shortlist.csv")
    path = Path(text).expanduser()
    if not path.is_absolute():
        path = folder / path
    path = Path(os.path.normpath(path))
    try:
        fmt = "html" if is_report_path(path) else output_format(path)
    except LibraryError as exc:
        raise ValueError(f"{exc}; or .html for a printable report") from None
    parent = path.parent
    if not parent.is_dir():
        raise ValueError(f"folder {parent} does not exist")
    if not os.access(parent, os.W_OK):
        raise ValueError(f"folder {parent} is not writable")
    if path.is_dir():
        raise ValueError(f"{path} is a folder")
    for guarded in protected:
        if path.exists() and Path(guarded).exists() and os.path.samefile(path, guarded):
            raise ValueError(f"{path} is the library being screened; choose another name")
    return ExportTarget(path, fmt)


def existing_targets(path: Path, fmt: str) -> list[Path]:
    """Files the export would replace (the data file, and the CSV/TSV sidecar)."""
    from halosift.engine.io import about_path

    targets = [path, about_path(path)] if fmt in ("csv", "tsv") else [path]
    return [t for t in targets if t.exists()]


def export_frame(frame: pd.DataFrame, rows: np.ndarray) -> pd.DataFrame:
    """The rows to write, with their 1-based input row number in front."""
    out = frame.iloc[np.asarray(rows, dtype=np.int64)].reset_index(drop=True)
    out.attrs = {}  # in-memory notes (e.g. the Conditions object) are not file metadata
    if ROW_COLUMN not in out.columns:
        out.insert(0, ROW_COLUMN, np.asarray(rows, dtype=np.int64) + 1)
    return out


def export_metadata(conditions: Any, selection: str, source: str) -> dict[str, str]:
    """The engine's provenance record (conditions, sources, safety caution) plus what was selected, from where."""
    from halosift.engine.provenance import export_metadata as provenance

    warnings = conditions.warnings()
    meta = provenance(
        conditions,
        condition_warnings="; ".join(warnings) if warnings else "none",
        selection=selection,
        source=source,
        written_by="halosift app (browse)",
    )
    # The app's exports carry one column more than a screen's: say what it is with the others.
    meta["columns"] = f"{ROW_COLUMN}: 1-based number of the input data row (the header not counted)\n" + meta["columns"]
    return meta


def write_report_export(
    library: Any, conditions: Any, rows: np.ndarray, path: Path, *, force: bool, selection: str, source: str,
    protect: Sequence[Any] = (), progress: Callable[[int, int], None] | None = None,
) -> Path:
    """Write the printable HTML report (halosift.report) for the chosen rows; the summary counts the whole library.

    ``source`` is shown by its file name only. ``progress(done, total)`` is called
    as the entries are drawn (from the calling thread).
    """
    from halosift.report import render_report, write_report

    report = render_report(library, conditions, rows=np.asarray(rows, dtype=np.int64), selection=selection,
                           source=source, progress=progress)
    return write_report(report.html, path, force=force, protect=protect)


#: Seconds between progress updates sent from the export worker (keeps the interface's queue short).
PROGRESS_INTERVAL_S = 0.1


class ExportProgress(Horizontal):
    """A one-line bar below the table while a report is written: what is written, and how far it is."""

    DEFAULT_CSS = """
    ExportProgress { height: 1; padding: 0 1; background: $panel; }
    ExportProgress > Label { width: auto; margin-right: 1; }
    ExportProgress > ProgressBar { width: 1fr; }
    """

    def __init__(self, name: str) -> None:
        super().__init__(id="export-progress")
        self.file_name = name
        """File name of the report being written."""

    def compose(self) -> ComposeResult:
        yield Label(f"Writing report {self.file_name}: drawing entries", id="export-progress-label")
        yield ProgressBar(total=None, show_eta=False, id="export-progress-bar")

    def update_progress(self, done: int, total: int) -> None:
        """Show ``done`` of ``total`` entries drawn."""
        self.query_one("#export-progress-bar", ProgressBar).update(total=total, progress=done)
        self.query_one("#export-progress-label", Label).update(
            f"Writing report {self.file_name}: {min(done, total):,} of {counted(total, 'step')}")


def _show_progress(app: App, name: str) -> Any:
    """Mount the bar on the main screen (whatever dialog is open on top); the awaitable finishes the mount."""
    for old in app.screen_stack[0].query(ExportProgress):
        old.remove()
    return app.screen_stack[0].mount(ExportProgress(name))  # call_from_thread awaits it: mounted before updates


def _update_progress(app: App, done: int, total: int) -> None:
    for bar in app.screen_stack[0].query(ExportProgress):
        bar.update_progress(done, total)


def _hide_progress(app: App) -> Any:
    """Remove the bar; the awaitable finishes the removal."""
    return app.screen_stack[0].query(ExportProgress).remove()


class ReportProgress:
    """Progress of a report export, sent from the worker thread to the bar on the main screen.

    Create it in the worker (it shows the bar), pass it as ``progress`` to
    :func:`write_report_export`, and call :meth:`close` when writing ends (it
    removes the bar, also after a failure). Updates are thinned to one per
    :data:`PROGRESS_INTERVAL_S`, the last one always sent.
    """

    def __init__(self, app: App, path: Path) -> None:
        self.app = app
        """The running app (its main screen shows the bar)."""
        self.last = 0.0
        """Monotonic time of the last update sent."""
        app.call_from_thread(_show_progress, app, Path(path).name)

    def __call__(self, done: int, total: int) -> None:
        """Send ``done`` of ``total`` to the bar (thinned)."""
        now = time.monotonic()
        if done < total and now - self.last < PROGRESS_INTERVAL_S:
            return
        self.last = now
        self.app.call_from_thread(_update_progress, self.app, done, total)

    def close(self) -> None:
        """Remove the bar."""
        self.app.call_from_thread(_hide_progress, self.app)


class ConfirmScreen(ModalScreen[bool]):
    """Ask before replacing files: y replaces, n or Esc keeps them (Enter presses the focused button, Keep)."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("y", "answer(True)", "Replace"),
        Binding("n,escape", "answer(False)", "Keep"),
    ]

    def __init__(self, targets: list[Path]) -> None:
        super().__init__()
        self.targets = targets
        """Existing files that would be replaced."""

    def compose(self) -> ComposeResult:
        names = "\n".join(f"  {t}" for t in self.targets)
        with Vertical(id="confirm-box"):
            yield Static(f"Replace the existing file{'s' if len(self.targets) > 1 else ''}?\n{names}", id="confirm-text")
            with Horizontal(id="confirm-buttons"):
                yield Button("Replace (y)", id="confirm-yes", variant="warning", compact=True)
                yield Button("Keep (n)", id="confirm-no", compact=True)
        yield Footer(compact=True)  # the dialog's own keys, not the table's behind it

    def on_mount(self) -> None:
        self.query_one("#confirm-no", Button).focus()

    def action_answer(self, replace: bool) -> None:
        """Close with the answer."""
        self.dismiss(replace)

    @on(Button.Pressed, "#confirm-yes")
    def _yes(self) -> None:
        self.dismiss(True)

    @on(Button.Pressed, "#confirm-no")
    def _no(self) -> None:
        self.dismiss(False)


class ExportScreen(ModalScreen[ExportChoice | None]):
    """Choose shortlist or current view, and a path; the path is checked as you type."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Cancel"),
        # From any field (the file field has the focus at first): one line field has no use for ↑/↓.
        Binding("up", "choose('shortlist')", "Shortlist", show=False),
        Binding("down", "choose('view')", "Current view", show=False),
    ]

    def __init__(
        self, n_marked: int, n_view: int, view: str, folder: Path, protected: Sequence[Path] = (),
        order: str = "input order",
    ) -> None:
        super().__init__()
        self.order = order
        """The table's row order in words; both choices are written in it."""
        self.protected = list(protected)
        """Files that must not be written over (the input library)."""
        self.n_marked = n_marked
        """Rows on the shortlist."""
        self.n_view = n_view
        """Rows the table shows now."""
        self.view = view
        """Name of the current view."""
        self.folder = folder
        """Folder relative paths are taken from."""
        self._what = "shortlist" if n_marked else "view"

    def compose(self) -> ComposeResult:
        start = self._what
        with Vertical(id="export-box"):
            yield Static("Export", id="export-title")
            with RadioSet(id="export-what", compact=True):
                yield ChoiceButton(f"shortlist: {counted(self.n_marked, 'marked row')}", start == "shortlist",
                                  id="what-shortlist", compact=True)
                yield ChoiceButton(f"current view ({self.view}): {counted(self.n_view, 'row')}, filtered as shown",
                                  start == "view", id="what-view", compact=True)
            yield Static(f"Rows are written in the table's order: {self.order}.", id="export-order")
            yield Static("File (.csv, .tsv, .parquet or .sdf; .csv/.tsv/.sdf may add .gz; .html: printable report):")
            yield OrderedInput(str(self.folder / DEFAULT_NAMES[start]), id="export-path", compact=True, select_on_focus=False)
            yield Static("", id="export-check")
            yield Static("Conditions, selection and the safety caution are stored with the data.", id="export-note")
            with Horizontal(id="export-buttons"):
                yield Button("Write", id="export-write", variant="primary", compact=True)
                yield Button("Cancel", id="export-cancel", compact=True)
        yield Footer(compact=True)  # the dialog's own keys, not the table's behind it

    def on_mount(self) -> None:
        path = self.query_one("#export-path", Input)
        path.focus()
        path.cursor_position = len(path.value)
        self._check()

    def action_choose(self, what: str) -> None:
        """Choose what to write: 'shortlist' or 'view' (the RadioSet, when focused, moves by itself)."""
        if what != self._what:
            self._what = what  # at once: an Enter right behind this key writes what it chose
            self.query_one(f"#what-{what}", ChoiceButton).value = True  # the set redraws and says Changed
            self._follow_choice()

    @property
    def what(self) -> str:
        """'shortlist' or 'view', as chosen."""
        return self._what

    def _check(self) -> ExportTarget | None:
        box = self.query_one("#export-check", Static)
        try:
            target = check_export_path(self.query_one("#export-path", Input).value, self.folder, self.protected)
        except ValueError as exc:
            box.update(f"✗ {exc}")
            return None
        path, fmt = target.path, target.format
        if self.what == "shortlist" and not self.n_marked:
            box.update("✗ the shortlist is empty: mark rows with Space, or choose the current view")
            return None
        if self.what == "view" and not self.n_view:
            box.update("✗ the current view has no rows")
            return None
        exists = " · the file exists: you will be asked before it is replaced" if existing_targets(path, fmt) else ""
        self._show_order(fmt)
        if fmt == "html":
            box.update(f"✓ HTML report to {path}; conditions, sources and the caution in its header{exists}")
            return target
        where = "in the Parquet schema metadata" if fmt == "parquet" else (
            "as properties of the first SDF record" if fmt == "sdf" else "in a .about.txt file beside it")
        box.update(f"✓ {fmt.upper()} to {path}; metadata {where}{exists}")
        return target

    def _show_order(self, fmt: str) -> None:
        """Say in which order the rows go out: the table's, or a report's grouping (and its cap)."""
        from halosift.report import DEFAULT_MAX_PAGES

        box = self.query_one("#export-order", Static)
        if fmt != "html":
            box.update(f"Rows are written in the table's order: {self.order}.")
            return
        n = self.n_marked if self.what == "shortlist" else self.n_view
        over = (f"; {n - DEFAULT_MAX_PAGES:,} of these {counted(n, 'row')} are counted in it but not drawn"
                if n > DEFAULT_MAX_PAGES else "")
        box.update("A report groups its entries by outcome, best candidates first (not the table's order), and "
                   f"draws at most {DEFAULT_MAX_PAGES}{over}.")

    @on(Input.Changed, "#export-path")
    def _path_changed(self) -> None:
        self._check()

    @on(RadioSet.Changed)
    def _what_changed(self, event: RadioSet.Changed) -> None:
        chosen = (event.pressed.id or "").removeprefix("what-")
        if chosen in DEFAULT_NAMES and chosen != self._what:
            self._what = chosen
            self._follow_choice()

    def _follow_choice(self) -> None:
        box = self.query_one("#export-path", Input)
        current = Path(box.value).name
        if current in DEFAULT_NAMES.values():  # still the suggested name: follow the choice
            box.value = str(Path(box.value).with_name(DEFAULT_NAMES[self.what]))
        self._check()

    def _write(self) -> None:
        checked = self._check()
        if checked is None:
            return
        path = checked.path
        targets = existing_targets(path, checked.format)
        what = self.what
        if not targets:
            self.dismiss(ExportChoice(what, path, False))
            return

        def answered(replace: bool | None) -> None:
            if replace:
                self.dismiss(ExportChoice(what, path, True))

        self.app.push_screen(ConfirmScreen(targets), answered)

    @on(Input.Submitted, "#export-path")
    def _submitted(self) -> None:
        self._write()

    @on(Button.Pressed, "#export-write")
    def _write_pressed(self) -> None:
        self._write()

    @on(Button.Pressed, "#export-cancel")
    def _cancel_pressed(self) -> None:
        self.dismiss(None)

    def action_cancel(self) -> None:
        """Close without writing."""
        self.dismiss(None)
