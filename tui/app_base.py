"""What every part of the halosift app shares: small helpers and :class:`AppBase`, the app's attributes.

:class:`halosift.tui.app.HalosiftApp` is put together from one mixin per topic
(screening, sessions, the table view, marks, export; the ``app_*`` modules) on
top of :class:`AppBase`, which holds the attributes they all read and the
:class:`AppState` properties. A mixin is a plain class at run time and an
:class:`AppBase` for the type checker, so each one is checked against the
attributes and the other topics' methods it uses (declared at the end of
:class:`AppBase`). The ``app_*`` modules import one another relatively
(``from .app_base import ...``): mypy cannot follow ``halosift.tui`` to this
folder, and would take an absolutely imported :class:`AppBase` for ``Any``.

Two rules of Textual's that a mixin must keep: a message handler (``on_*``) is
called once for every class in the app's MRO that defines it, so each is defined
in one class only; and ``@on`` handlers are collected only from classes Textual
builds, so they stay in ``HalosiftApp`` itself.
"""

from __future__ import annotations

import gc
import os
import threading
from collections.abc import Hashable, Mapping
from pathlib import Path
from typing import TYPE_CHECKING, Any

from halosift.tui.conditions import ConditionsScreen
from halosift.tui.filters import OrderCache
from halosift.tui.state import AppState
from textual.app import App
from textual.binding import Binding
from textual.timer import Timer
from textual.widgets import Static

if TYPE_CHECKING:
    import numpy as np
    import pandas as pd
    from halosift.engine import Conditions, Library
    from halosift.tui.filters import SortSpec
    from halosift.tui.session import Opened

#: Result columns the "more columns" key adds to the library table (label, width, kind).
MORE_COLUMNS: tuple[tuple[str, str, int, str], ...] = (
    ("confidence", "Confidence", 12, "text"),
    ("flags", "Flags", 20, "text"),
    ("nbs_major", "NBS major", 18, "text"),
    ("nbs_major_pct", "NBS %", 7, "pct"),
    # "% prod": percent of the halogenated product (engine.polyhalogenation.POLY_FIGURE), as in the detail.
    ("cl2_poly_pct", "Cl2 poly % prod", 15, "pct"),
    ("br2_poly_pct", "Br2 poly % prod", 15, "pct"),
)


def one_line(exc: BaseException) -> str:
    """An exception as one line fit for the status bar."""
    text = " ".join(str(exc).split())
    return text or type(exc).__name__


class OneLine(Static):
    """A one-line text widget (height fixed by the app's CSS) that redraws without a layout pass.

    A layout re-arranges and repaints the whole screen (tens of ms with a large table); a
    one-line widget's size never depends on its text, so only the widget itself is redrawn,
    and only when the text changed.
    """

    _shown: str | None = None

    def show(self, text: str) -> None:
        """Show ``text`` (nothing happens when it is already shown)."""
        if text != self._shown:
            self._shown = text
            self.update(text, layout=False)


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


_imports_frozen = threading.Event()


def freeze_imports() -> None:
    """Take every object alive now (after the big imports: modules, classes, functions) out of the collector's scans.

    A full collection scans every container; with textual, pandas, pyarrow and
    RDKit loaded that is ~80,000 objects and 50-250 ms with the GIL held, which
    froze the interface while a library streamed in. Once frozen, a full
    collection scans only what was made after (under 1 ms). Objects frozen are
    still freed by reference counting; only cycles among them are never collected.
    """
    if not _imports_frozen.is_set():
        _imports_frozen.set()
        gc.freeze()


class _FromState:
    """An app attribute that lives in :attr:`AppBase.state` (see :class:`AppState` for each one).

    Reading gives the state's value. Setting calls the state's ``set_<name>``
    transition and, when that reports a change, the app method named ``refresh``
    (which redraws what shows it); without one the attribute is read-only here.
    """

    def __init__(self, refresh: str | None = None) -> None:
        self.refresh = refresh
        self.name = ""

    def __set_name__(self, owner: type, name: str) -> None:
        self.name = name

    def __get__(self, app: Any, owner: type | None = None) -> Any:
        return self if app is None else getattr(app.state, self.name)

    def __set__(self, app: Any, value: Any) -> None:
        if self.refresh is None:
            raise AttributeError(f"{self.name} is changed through the app's state transitions")
        if getattr(app.state, f"set_{self.name}")(value):
            getattr(app, self.refresh)()


class AppBase(App[int]):
    """The app's attributes and its state's properties, shared by every topic's mixin."""

    def __init__(
        self,
        source: str | os.PathLike[str] | pd.DataFrame,
        *,
        smiles_column: str | None = None,
        id_column: str | None = None,
        use_cache: bool = True,
        graphics: str | None = None,
        fresh: bool = False,
        sessions: bool = True,
        conditions: Mapping[str, Any] | None = None,
    ) -> None:
        super().__init__()
        start_process_helpers()
        self.explicit_conditions: dict[str, Any] = dict(conditions or {})
        """engine.Conditions fields given on the command line; they win over the saved session's."""
        self.fresh = fresh
        """Ignore (and replace) the session saved for this library."""
        self.sessions = sessions and isinstance(source, (str, os.PathLike))
        """Save and restore marks, sort, filters, view and conditions per library file."""
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
        self.state = AppState()
        """The library, the chemist's choices and the shortlist: the app only shows them."""
        self.last_export: Path | None = None
        """The file most recently written."""
        self._cancel = threading.Event()
        self._generation = 0
        self._applied_generation = 0
        self._site_choices: tuple[Any, list[str]] = (None, [])
        self._orders = OrderCache()
        self._to_top = False
        self._titles: dict[Hashable, str] = {key: label for key, label, _, _ in MORE_COLUMNS}
        self._session_timer: Timer | None = None
        self._session_dirty = False
        self._session_lock = threading.Lock()
        self._session_seq = 0
        self._session_written = 0
        self._run_taken = False  # the current screen has delivered rows
        self._shown_waiting: list[threading.Event] = []  # partial deliveries not drawn yet
        self._stop_note = ""  # why a screen stopped with part of the library shown
        self._keep_place_generation = -1  # the view request made for newly perceived rows
        self._binding_actions = [b.action for b in self.BINDINGS if isinstance(b, Binding)]
        self._input_widths: dict[tuple[Hashable, str, int], int] = {}  # (column, label, cap) -> width, per library
        self._bindings_shown: tuple[bool | None, ...] = ()  # check_action's answers when the footer was last redrawn

    # ------------------------------------------------------------------ the state, as the widgets see it

    phase = _FromState("_show_phase")
    view = _FromState("_request_view")
    filters = _FromState("_request_view")
    sort = _FromState("_sort_changed")
    conditions = _FromState("_conditions_changed")
    show_input_columns = _FromState("_request_view")
    show_more_columns = _FromState("_request_view")
    library = _FromState()
    frame = _FromState()
    marked = _FromState()
    session_key = _FromState()

    def _sort_changed(self) -> None:
        self._to_top = True  # a new order starts at its first row
        self._request_view()

    def _conditions_changed(self) -> None:
        for screen in self.screen_stack:
            if isinstance(screen, ConditionsScreen):
                screen.applied = self.conditions  # the panel shows what the table now uses
        self._request_view()

    @property
    def source_name(self) -> str:
        """The library's file name (no folder: snapshots and screenshots stay path-free)."""
        if isinstance(self.source, (str, os.PathLike)):
            return Path(self.source).name
        return "in-memory table"

    if TYPE_CHECKING:
        # Defined by one topic's mixin (or HalosiftApp) and called by another; for the type checker only, which
        # checks each definition against these. At run time the one definition is the mixin's.

        def _request_view(self) -> None: ...

        def _update_status(self) -> None: ...

        def _sort_text(self) -> str: ...

        def _sort_order(
            self, library: Library, conditions: Conditions, frame: pd.DataFrame, sort: SortSpec
        ) -> np.ndarray | None: ...

        def _session_changed(self) -> None: ...

        def _read_session(self, n_rows: int) -> Opened: ...

        def _restore_session(self, saved: Any) -> None: ...

        def _release_screening(self) -> None: ...

        def _refresh_bindings_on_change(self) -> None: ...


if TYPE_CHECKING:
    AppMixin = AppBase
else:
    AppMixin = object
"""The base of each topic's mixin: :class:`AppBase` to the type checker, a plain class at run time."""
