"""Sessions: each library file's marks, sort, filters, view and conditions, restored on opening it again.

The file is read in the screening worker (:meth:`SessionsMixin._read_session`) and
written a moment after the last change, off the interface thread and atomically
(:mod:`halosift.tui.session` has the format); N drops it and starts fresh.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from halosift.tui.search import SearchBar
from halosift.tui.table import LibraryTable
from halosift.tui.wording import counted
from textual import work

from .app_base import AppMixin, one_line

if TYPE_CHECKING:
    from halosift.tui.session import Opened, Session

#: Seconds after the last change before the session file is written (a burst of changes is one write).
SESSION_SAVE_DELAY = 0.5


class SessionsMixin(AppMixin):
    """Read, restore and save this library's session, and start fresh."""

    def _read_session(self, n_rows: int) -> Opened:
        """The session saved for this library, if any is to be restored (file reads, so called in the worker)."""
        from halosift.tui import session as sessions

        if not self.sessions or self.state.session_restored:
            return sessions.Opened(None, self.session_key)
        try:
            key = sessions.library_key(self.source)
        except OSError as exc:
            return sessions.Opened(None, None, f"Sessions are off for this library: {one_line(exc)}")
        if self.fresh:
            try:
                sessions.forget(key)
            except OSError as exc:
                return sessions.Opened(None, key, f"The saved session could not be removed: {one_line(exc)}")
            return sessions.Opened(None, key)
        loaded = sessions.load(key)
        saved, note = loaded.session, loaded.note
        if saved is not None and saved.n_rows != n_rows:
            return sessions.Opened(None, key, (f"The saved session is for {counted(saved.n_rows, 'row')}, not "
                                               f"{n_rows:,}, and is ignored; this one starts fresh."))
        return sessions.Opened(saved, key, note)

    def _restore_session(self, saved: Any) -> None:
        """Take marks, sort, filters, view and column choices from a saved session (conditions came with the frame)."""
        self.state.restore(saved)
        self.query_one(SearchBar).value = saved.filters.text
        self.notify(
            f"Restored this library's last session: {self.state.n_marked:,} marked, view {saved.view}, "
            f"{saved.filters.describe()}. N starts fresh.",
            title="Session", timeout=6,
        )

    def current_session(self) -> Session:
        """The state to save for this library (tui.session.Session)."""
        return self.state.to_session()

    def _session_changed(self) -> None:
        """Save the session shortly (changes in a burst are written once)."""
        if self.session_key is None or self.library is None or self.conditions is None:
            return
        self._session_dirty = True
        if self._session_timer is not None:
            self._session_timer.stop()
        self._session_timer = self.set_timer(SESSION_SAVE_DELAY, self._save_session_soon)

    def _save_session_soon(self) -> None:
        self._session_timer = None
        if self._session_dirty and self.session_key is not None:
            self._session_dirty = False
            self._session_seq += 1
            self._save_session(self.session_key, self.current_session(), self._session_seq)

    @work(thread=True, group="session", exit_on_error=False, description="save the session")
    def _save_session(self, key: str, saved: Any, seq: int) -> None:
        """Write the session file (atomically) off the interface thread; an older state never replaces a newer one."""
        from halosift.tui.session import save

        try:
            with self._session_lock:
                if seq <= self._session_written:
                    return
                save(key, saved)
                self._session_written = seq
        except OSError as exc:
            self.call_from_thread(self.notify, f"Could not save the session: {one_line(exc)}", title="Session",
                                  severity="warning")

    def save_session_now(self) -> None:
        """Write any unsaved change at once (on quitting)."""
        if self._session_timer is not None:
            self._session_timer.stop()
            self._session_timer = None
        if not (self._session_dirty and self.session_key is not None and self.library is not None):
            return
        from halosift.tui.session import save

        self._session_dirty = False
        self._session_seq += 1
        try:
            with self._session_lock:
                save(self.session_key, self.current_session())
                self._session_written = self._session_seq
        except OSError:
            pass  # quitting: nowhere left to say it; the previous session file is intact (atomic writes)

    def action_start_fresh(self) -> None:
        """Drop this library's session: no marks (z brings them back), input order, no filters, default conditions."""
        from halosift.engine import Conditions

        before = self.conditions
        if self.state.start_fresh(Conditions(), f"start fresh (cleared {counted(self.state.n_marked, 'mark')})"):
            self.query_one(LibraryTable).set_marked(self.marked)
        self.query_one(SearchBar).value = ""
        self._to_top = True
        if self.conditions != before:
            self._conditions_changed()  # re-weighs and requests the view
        else:
            self._request_view()
        self.notify("Started fresh: default conditions, input order, no filters, no marks (z brings the marks back)",
                    title="Session", timeout=8)
