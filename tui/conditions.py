"""The conditions panel: reagent temperatures and the selectivity threshold, applied live."""

from __future__ import annotations

from typing import Any, ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical
from textual.timer import Timer
from textual.widgets import Input, Label, Static

from tui.messages import ConditionsProposed, PanelClosed

#: Seconds of quiet typing before a valid value is applied.
SETTLE_SECONDS = 0.3
#: Input id → engine.Conditions field.
FIELDS: dict[str, str] = {
    "cond-cl2": "cl2_temp_c", "cond-br2": "br2_temp_c", "cond-nbs": "nbs_temp_c", "cond-threshold": "threshold_pct",
}


def conditions_from_text(values: dict[str, str]) -> tuple[Any | None, str]:
    """(engine.Conditions, '') from the panel's texts, or (None, one-line error)."""
    from engine import Conditions

    kwargs: dict[str, float] = {}
    labels = {
        "cl2_temp_c": "Cl2 temperature", "br2_temp_c": "Br2 temperature", "nbs_temp_c": "NBS temperature",
        "threshold_pct": "threshold",
    }
    for field, text in values.items():
        text = text.strip()
        if not text:
            return None, f"{labels[field]} is empty"
        try:
            kwargs[field] = float(text)
        except ValueError:
            return None, f"{labels[field]}: “{text}” is not a number"
    conditions = Conditions(**kwargs)
    try:
        conditions.validate()
    except ValueError as exc:
        return None, str(exc)
    return conditions, ""


class ConditionsPanel(Vertical):
    """Docked under the table; every valid change re-weighs the library (no re-perception)."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "close", "Back to table"),
    ]

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._timer: Timer | None = None
        self._applied: Any = None

    def compose(self) -> ComposeResult:
        with Horizontal(id="cond-fields"):
            yield Label("Cl2 °C", classes="cond-label")
            yield Input(id="cond-cl2", type="number", compact=True, classes="cond-input")
            yield Label("Br2 °C", classes="cond-label")
            yield Input(id="cond-br2", type="number", compact=True, classes="cond-input")
            yield Label("NBS °C", classes="cond-label")
            yield Input(id="cond-nbs", type="number", compact=True, classes="cond-input")
            yield Label("threshold %", classes="cond-label")
            yield Input(id="cond-threshold", type="number", compact=True, classes="cond-input")
        yield Static("", id="cond-note")

    def load(self, conditions: Any) -> None:
        """Show ``conditions`` (an engine.Conditions) in the fields."""
        if conditions is None:
            return
        self._applied = conditions
        with self.prevent(Input.Changed):
            for input_id, field in FIELDS.items():
                self.query_one(f"#{input_id}", Input).value = f"{getattr(conditions, field):g}"
        self._show(conditions, "")

    def focus_first(self) -> None:
        """Put the cursor in the first field."""
        self.query_one("#cond-cl2", Input).focus()

    def _values(self) -> dict[str, str]:
        return {field: self.query_one(f"#{input_id}", Input).value for input_id, field in FIELDS.items()}

    def _show(self, conditions: Any | None, error: str) -> None:
        note = self.query_one("#cond-note", Static)
        if error:
            note.update(f"✗ {error} (not applied)")
            return
        warnings = conditions.warnings()
        lines = [f"! {w}" for w in warnings] or ["✓ within the range of the rate data"]
        note.update("\n".join(lines) + "\nTab: next field · Enter: apply now · Esc: back to table")

    def _propose(self) -> None:
        if self._timer is not None:
            self._timer.stop()
            self._timer = None
        conditions, error = conditions_from_text(self._values())
        self._show(conditions, error)
        if conditions is not None and conditions != self._applied:
            self._applied = conditions
            self.post_message(ConditionsProposed(conditions))

    def on_input_changed(self, event: Input.Changed) -> None:
        event.stop()
        conditions, error = conditions_from_text(self._values())
        self._show(conditions, error)
        if self._timer is not None:
            self._timer.stop()
        if conditions is not None:
            self._timer = self.set_timer(SETTLE_SECONDS, self._propose)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self._propose()

    def action_close(self) -> None:
        """Apply what is valid, hide the panel and go back to the table."""
        self._propose()
        self.display = False
        self.post_message(PanelClosed("conditions"))
