"""Screening: perceive the library in a worker, show its rows as they come in, stop and resume.

The worker hands each partial library to the interface thread and waits until it
is drawn (at most :data:`SHOWN_WAIT_S`), so the interface thread has the
interpreter lock to itself while it draws; the rows perceived before a stop stay
usable, and r perceives only the rest.
"""

from __future__ import annotations

import threading
import time
from typing import TYPE_CHECKING

from halosift.tui.filters import OrderCache
from halosift.tui.messages import ScreeningFinished, ScreeningPartial, ScreeningProgress, ScreeningStopped
from halosift.tui.state import RowCounts
from textual import work
from textual.widgets import Label, ProgressBar

from .app_base import AppMixin, OneLine, _count, freeze_imports, one_line

if TYPE_CHECKING:
    from halosift.engine import Library

#: Seconds between progress messages from the screening worker (keeps the UI queue short).
PROGRESS_INTERVAL = 0.1
#: Longest the screening thread waits for a partial delivery to be drawn before it goes on anyway.
SHOWN_WAIT_S = 1.0


class ScreeningMixin(AppMixin):
    """The screening worker and its messages: progress, partial and whole libraries, stops; Esc and r."""

    def _start_screening(self) -> None:
        self._cancel = threading.Event()
        self._run_taken = False
        self._stop_note = ""
        # Resuming a stopped screen: the rows perceived before stay on screen (and come back from the cache).
        self.phase = "streaming" if self.library is not None and self.library.partial else "screening"
        bar = self.query_one("#screening-progress", ProgressBar)
        bar.update(total=None, progress=0)
        self.query_one("#screening-label", Label).update(f"Screening {self.source_name}…")
        self._screen(self._cancel)

    @work(thread=True, exclusive=True, group="screen", exit_on_error=False, description="screen the library")
    def _screen(self, cancel: threading.Event) -> None:
        """Read and perceive the library, then evaluate it under default conditions.

        The rows perceived so far go up as they come (ScreeningPartial, evaluated
        here, off the interface thread), the whole library last (ScreeningFinished).
        """
        from halosift.engine.library import PENDING
        from halosift.tui.session import ScreenStart

        from halosift import engine

        freeze_imports()
        last = [0.0]
        start: list[ScreenStart] = []  # once known

        def progress(done: int, total: int | None) -> None:
            now = time.monotonic()
            if now - last[0] >= PROGRESS_INTERVAL or (total is not None and done >= total):
                last[0] = now
                self.post_message(ScreeningProgress(done, total))

        def begin(n_rows: int) -> ScreenStart:
            """The session and conditions to start from (read once the row count is known)."""
            if not start:
                opened = self._read_session(n_rows)
                conditions, note = self.conditions, opened.note
                if conditions is None:
                    from halosift.tui.session import initial_conditions

                    # Saved conditions, with the command line's explicit options winning field by field.
                    saved = opened.session.conditions if opened.session is not None else None
                    opening = initial_conditions(saved, self.explicit_conditions)
                    conditions = opening.conditions
                    note = " ".join(n for n in (note, opening.note) if n)
                start.append(ScreenStart(opened, conditions, note))
            return start[0]

        def partial(library: Library) -> None:
            if cancel.is_set():
                return
            first = begin(len(library.input))
            conditions = self.conditions or first.conditions  # the chemist may have changed them meanwhile
            frame = library.evaluate(conditions)
            status = frame["status"].to_numpy()
            shown = threading.Event()
            self.post_message(ScreeningPartial(library, frame, conditions, first.opened.session, first.opened.key,
                                               first.note,
                                               int((status == "ok").sum()), int((status == PENDING).sum()), shown))
            # The workers go on perceiving meanwhile; only this thread's next step waits.
            deadline = time.monotonic() + SHOWN_WAIT_S
            while not shown.wait(0.02) and not cancel.is_set() and time.monotonic() < deadline:
                pass

        try:
            library = engine.load_library(
                self.source,
                smiles_column=self.smiles_column,
                id_column=self.id_column,
                use_cache=self.use_cache,
                progress=progress,
                cancel=cancel,
                partial=partial,
                background=True,  # the workers yield the CPU to the interface
            )
            first = begin(len(library.input))
            conditions = self.conditions or first.conditions
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
        self.post_message(ScreeningFinished(library, frame, conditions, first.opened.session, first.opened.key,
                                            first.note))

    def on_screening_progress(self, message: ScreeningProgress) -> None:
        if self.phase != "screening":
            return
        bar = self.query_one("#screening-progress", ProgressBar)
        bar.update(total=message.total, progress=message.done)
        total = f" of {_count(message.total)}" if message.total is not None else ""
        self.query_one("#screening-label", Label).update(
            f"Screening {self.source_name}: {_count(message.done)}{total} structures perceived"
        )

    def on_screening_partial(self, message: ScreeningPartial) -> None:
        if message.shown is not None:
            self._shown_waiting.append(message.shown)
        self._take_library(message, RowCounts.of(len(message.frame), message.screened, message.pending),
                           complete=False)
        if self.phase != "streaming":
            self._release_screening()

    def _release_screening(self) -> None:
        """Let the screening thread go on: the rows it handed over are drawn (or will not be)."""
        waiting, self._shown_waiting = self._shown_waiting, []
        for event in waiting:
            event.set()

    def on_screening_finished(self, message: ScreeningFinished) -> None:
        self._take_library(message, self.state.counts, complete=True)  # counted when its view arrives

    def _take_library(self, message: ScreeningPartial | ScreeningFinished, counts: RowCounts, complete: bool) -> None:
        """Show a (partial or whole) library; the first of a screen also sets marks, conditions and the session."""
        if self.phase not in ("screening", "streaming"):
            return  # the screen stopped meanwhile
        first = not self._run_taken
        self._run_taken = True
        state = self.state
        state.take_library(message.library, message.frame, message.conditions, counts, first=first)
        self._orders = OrderCache()  # sort orders of other rows do not apply
        if first:
            self._input_widths = {}
            if message.session_key is not None:
                state.session_key = message.session_key
            if message.session is not None and not state.session_restored:
                self._restore_session(message.session)
            state.session_restored = True
            if message.session_note:
                self.notify(message.session_note, title="Session", severity="warning", timeout=10)
        self.phase = "ready" if complete else "streaming"
        self._request_view()
        if not first:
            self._keep_place_generation = self._generation  # new rows: the cursor's row stays where it is on screen

    def on_screening_stopped(self, message: ScreeningStopped) -> None:
        self.phase = "stopped"
        self._release_screening()
        if self.library is not None and self.library.partial:
            # The rows perceived so far stay usable (and are cached); r perceives only the rest.
            self._stop_note = "stopped" if message.cancelled else message.message
            self._update_status()
            return
        hint = "Press r to screen again, q to quit." if message.cancelled else "Press r to try again, q to quit."
        self.query_one("#counts", OneLine).show(message.message)
        self.query_one("#settings", OneLine).show(hint)

    def action_cancel_screening(self) -> None:
        """Stop the screening worker (it stops at the next batch)."""
        self._cancel.set()
        self.query_one("#screening-label", Label).update("Cancelling…")
        if self.phase == "streaming":
            self._stop_note = "stopping"
            self._update_status()

    def action_rescreen(self) -> None:
        """Start screening again after a cancel or a failure."""
        self._start_screening()
