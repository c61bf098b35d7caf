"""The find bar: a one-line text match on ID and SMILES, applied as you type."""

from __future__ import annotations

from typing import ClassVar

from halosift.tui.inputs import OrderedInput
from halosift.tui.messages import PanelClosed, SearchChanged
from textual.binding import Binding, BindingType
from textual.timer import Timer
from textual.widgets import Input

#: Seconds of quiet typing before the filter is applied (each keystroke would
#: otherwise start a scan of a possibly million-row table).
SETTLE_SECONDS = 0.25


class SearchBar(OrderedInput):
    """Type to filter the library view by ID or SMILES; Enter or Esc returns to the table."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "close", "Back to table"),
    ]

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(placeholder="find: ID (any case) or SMILES (exact case) · Enter: back to table · Esc: close", id=id, compact=True)
        self._timer: Timer | None = None

    def _send(self) -> None:
        if self._timer is not None:
            self._timer.stop()
            self._timer = None
        self.post_message(SearchChanged(self.value.strip()))

    def on_input_changed(self, event: Input.Changed) -> None:
        event.stop()
        if self._timer is not None:
            self._timer.stop()
        self._timer = self.set_timer(SETTLE_SECONDS, self._send)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self._send()
        self.post_message(PanelClosed("search"))

    def action_close(self) -> None:
        """Apply the text, hide the bar and go back to the table."""
        self._send()
        self.display = False
        self.post_message(PanelClosed("search"))
