"""Every message the app's parts send upwards (attributes go down, messages come up).

Small dataclasses; Textual's Message calls ``__post_init__`` for them. Worker
threads post them too (``post_message`` is thread-safe).
"""

from __future__ import annotations

import threading
from dataclasses import dataclass
from typing import Any

from textual.message import Message


@dataclass
class ScreeningProgress(Message):
    """The screening worker has perceived some structures."""

    done: int
    """Structures perceived so far."""
    total: int | None
    """Structures to perceive, when known."""


@dataclass
class _LibraryEvaluated(Message):
    """A library (whole or in part) and its evaluation; the two messages below share these fields."""

    library: Any
    """The engine.Library that was loaded (``partial`` set while perceiving)."""
    frame: Any
    """Library.evaluate(conditions), a pandas DataFrame with every input row."""
    conditions: Any
    """The engine.Conditions ``frame`` was evaluated under."""
    session: Any = None
    """The tui.session.Session saved for this library, to restore (None: start fresh)."""
    session_key: str | None = None
    """The library's session key (None: sessions are off, e.g. for an in-memory table)."""
    session_note: str = ""
    """One line about a saved session that could not be used ('' when there is none to say)."""


@dataclass
class ScreeningFinished(_LibraryEvaluated):
    """The library was read and perceived; ``frame`` is its first evaluation."""


@dataclass
class ScreeningPartial(_LibraryEvaluated):
    """Part of the library is perceived; rows of ``frame`` not perceived yet have status pending."""

    screened: int = 0
    """Rows of ``frame`` with status ok."""
    pending: int = 0
    """Rows of ``frame`` not perceived yet."""
    shown: threading.Event | None = None
    """Set by the app once these rows are on screen. The screening thread waits for it before its
    next step, so the interface thread draws them without sharing the interpreter lock."""


@dataclass
class ScreeningStopped(Message):
    """Screening ended without a library: cancelled by the chemist, or failed."""

    cancelled: bool
    """True when the chemist cancelled it."""
    message: str
    """One line to show."""


@dataclass
class ViewComputed(Message):
    """A worker finished evaluating and/or filtering and sorting."""

    generation: int
    """Which request this answers; older answers are dropped."""
    conditions: Any
    """Conditions ``frame`` was evaluated under."""
    frame: Any
    """The evaluated frame (pandas DataFrame)."""
    rows: Any
    """numpy array of row positions to show, in display order."""
    screened: int
    """Rows of ``frame`` with status ok."""
    pending: int = 0
    """Rows of ``frame`` whose structure is not perceived yet (status pending)."""


@dataclass
class ViewFailed(Message):
    """Evaluating or filtering failed (a bug, reported in one line)."""

    generation: int
    """Which request failed."""
    message: str
    """One line to show."""


@dataclass
class CursorMoved(Message):
    """The library table's cursor is on a new row."""

    row: int
    """Row position in the evaluated frame, or -1 when the view is empty."""


@dataclass
class MarkRequested(Message):
    """Toggle the shortlist mark of a row."""

    row: int
    """Row position in the evaluated frame."""


@dataclass
class SortRequested(Message):
    """The chemist asked to sort by a column."""

    column: Any
    """Column key (a frame column name, or the row-number key)."""
    descending: bool
    """Largest or last first."""


@dataclass
class DetailRequested(Message):
    """Open the site detail of a row."""

    row: int
    """Row position in the evaluated frame."""


@dataclass
class ConditionsProposed(Message):
    """The conditions panel holds a valid new set of conditions."""

    conditions: Any
    """An engine.Conditions that passed validate()."""


@dataclass
class SearchChanged(Message):
    """The text in the search bar changed."""

    text: str
    """Case-insensitive text to look for in ID and SMILES."""


@dataclass
class ExportFinished(Message):
    """A file was written."""

    path: str
    """Absolute path of the file written."""
    rows: int
    """Data rows written."""
    sidecar: str
    """Path of the CSV/TSV metadata sidecar, or '' when metadata is inside the file."""


@dataclass
class ExportFailed(Message):
    """Writing a file failed."""

    message: str
    """One line to show."""


@dataclass
class PanelClosed(Message):
    """A docked panel (find bar, conditions) was closed; focus goes back to the table."""

    name: str
    """Which panel: 'search' or 'conditions'."""


@dataclass
class DetailReady(Message):
    """The site detail of one row was worked out (in a worker)."""

    request: int
    """Which request of the detail screen this answers; older answers are dropped."""
    result: Any
    """A :class:`halosift.tui.detail.DetailResult`."""


@dataclass
class DetailFailed(Message):
    """Working out the site detail of one row failed (a bug, reported in one line)."""

    request: int
    """Which request failed."""
    message: str
    """One line to show."""


@dataclass
class DetailMoved(Message):
    """The site detail now shows another row of the view (n/p); the table's cursor follows."""

    row: int
    """Row position in the evaluated frame now shown."""


@dataclass
class IdsMatched(Message):
    """An ID-list file was read and matched against the library (in a worker)."""

    path: str
    """The file read."""
    rows: Any
    """numpy array of frame rows whose ID is listed, or None when the file could not be read."""
    n_ids: int
    """Distinct IDs the file lists."""
    missing: tuple[str, ...]
    """Listed IDs not found in the library, in file order."""
    error: str
    """One line saying why the file could not be read ('' when it was)."""
