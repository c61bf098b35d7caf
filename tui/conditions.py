"""The conditions panel: temperatures, the Cl2 phase and solvent, and the clean threshold (one share for every reagent).

A value is applied only when it is complete and the whole set passes the
engine's own ``Conditions.validate``: on Enter, or on leaving the field (Tab,
a click elsewhere in the panel, closing it). Until then the panel shows what
is applied, what is pending and what is wrong, each in words. Fields are only
written when the panel opens, never while the chemist types, so no key of a
fast burst can be overwritten.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any, ClassVar

from halosift.tui.header import cl2_forms
from halosift.tui.inputs import OrderedInput
from halosift.tui.messages import ConditionsProposed
from halosift.tui.toggles import ChoiceButton, ChoiceSet
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical
from textual.reactive import reactive
from textual.screen import ModalScreen
from textual.widgets import Footer, Input, Label, RadioSet, Static


@dataclass(frozen=True)
class Field:
    """One number field of the panel."""

    input_id: str
    """Id of its Input widget."""
    name: str
    """The engine.Conditions field it edits."""
    label: str
    """What the chemist reads beside it."""
    unit: str
    """Unit shown after values in the panel's notes."""


#: The number fields, in focus order.
FIELDS: tuple[Field, ...] = (
    Field("cond-cl2", "cl2_temp_c", "Cl2 temperature", "°C"),
    Field("cond-molar", "cl2_solvent_molar", "Cl2 solvent concentration", "M"),
    Field("cond-br2", "br2_temp_c", "Br2 temperature", "°C"),
    Field("cond-so2cl2", "so2cl2_temp_c", "SO2Cl2 temperature", "°C"),
    Field("cond-nbs", "nbs_temp_c", "NBS temperature", "°C"),
    Field("cond-threshold", "threshold_pct", "clean threshold", "%"),
)
#: Solvents of the Cl2 chlorination offered (engine.solvent.SOLVENTS), with what the chemist reads.
SOLVENT_LABELS: dict[str, str] = {"none": "none", "benzene": "benzene", "cs2": "CS2"}
#: Phases of the Cl2 chlorination offered (engine.conditions.CL2_PHASES), with what the chemist reads.
PHASE_LABELS: dict[str, str] = {"gas": "gas", "liquid": "liquid", "solution": "solution"}
#: How the choice fields are named in the panel's notes.
CHOICE_LABELS: dict[str, str] = {"cl2_phase": "Cl2 phase", "cl2_solvent": "Cl2 solvent"}


@dataclass(frozen=True)
class Proposal:
    """What the panel's fields say, read against the applied conditions."""

    conditions: Any | None
    """The engine.Conditions the fields describe, or None while any field is incomplete or invalid."""
    errors: dict[str, str]
    """Field name → one-line reason it cannot be applied (empty when every field is valid)."""
    pending: tuple[str, ...]
    """Field names whose text differs from the applied value."""


def _text(value: float) -> str:
    return f"{value:g}"


def short_description(conditions: Any) -> str:
    """The conditions the panel edits, in one short line."""
    return (f"{cl2_forms(conditions).long} · Br2 {_text(conditions.br2_temp_c)} °C · "
            f"SO2Cl2 {_text(conditions.so2cl2_temp_c)} °C · NBS {_text(conditions.nbs_temp_c)} °C · "
            f"threshold {_text(conditions.threshold_pct)} %")


def read_fields(texts: dict[str, str], solvent: str, applied: Any, phase: str | None = None) -> Proposal:
    """Parse the fields (field name → text) and check them with the engine, field by field and as a set.

    ``phase`` is the Cl2 phase chosen (the applied one when None).
    """
    phase = applied.cl2_phase if phase is None else phase
    errors: dict[str, str] = {}
    values: dict[str, Any] = {"cl2_solvent": solvent, "cl2_phase": phase}
    labels = {f.name: f.label for f in FIELDS}
    for name, text in texts.items():
        text = text.strip()
        if not text:
            errors[name] = f"{labels[name]} is empty"
            continue
        try:
            values[name] = float(text)
        except ValueError:
            errors[name] = f"{labels[name]}: “{text}” is not a number"
    if solvent == "none":  # no solvent: the concentration field is disabled and means 0
        errors.pop("cl2_solvent_molar", None)
        values["cl2_solvent_molar"] = 0.0
    # Each parsed field alone against the applied set, so a reason lands on the field that causes it.
    for name, value in values.items():
        if name in errors or name == "cl2_solvent":
            continue
        one = {name: value}
        if name in ("cl2_solvent_molar", "cl2_phase", "cl2_temp_c"):  # judged with the solvent and phase chosen
            one.update(cl2_solvent=solvent, cl2_phase=phase)
            if "cl2_solvent_molar" in values and "cl2_solvent_molar" not in errors:  # a solution needs > 0 M
                one["cl2_solvent_molar"] = values["cl2_solvent_molar"]
        try:
            replace(applied, **one)  # a Conditions checks itself when made
        except ValueError as exc:
            errors[name] = str(exc)
    pending = tuple(
        name for name, value in values.items()
        if name not in errors and getattr(applied, name) != value
    )
    if errors:
        return Proposal(None, errors, pending)
    try:
        conditions = replace(applied, **values)
    except ValueError as exc:  # only the combination is wrong (e.g. solvent and concentration)
        return Proposal(None, {"cl2_solvent": str(exc)}, pending)
    return Proposal(conditions, {}, pending)


class ConditionsPanel(Vertical):
    """The fields and the notes (the view; ConditionsScreen holds the logic)."""

    def compose(self) -> ComposeResult:
        with Horizontal(classes="cond-row"):
            yield Label("Cl2 °C", classes="cond-label")
            yield OrderedInput(id="cond-cl2", type="number", compact=True, classes="cond-input")
            yield Label("phase", classes="cond-label")
            with ChoiceSet(id="cond-phase", classes="cond-choice", compact=True):
                for key, label in PHASE_LABELS.items():
                    yield ChoiceButton(label, id=f"cond-phase-{key}", compact=True)
        with Horizontal(classes="cond-row"):
            yield Label("Cl2 solvent", classes="cond-label")
            with ChoiceSet(id="cond-solvent", classes="cond-choice", compact=True):
                for key, label in SOLVENT_LABELS.items():
                    yield ChoiceButton(label, id=f"cond-solvent-{key}", compact=True)
            yield Label("mol/L", classes="cond-label")
            yield OrderedInput(id="cond-molar", type="number", compact=True, classes="cond-input")
        with Horizontal(classes="cond-row"):
            yield Label("Br2 °C", classes="cond-label")
            yield OrderedInput(id="cond-br2", type="number", compact=True, classes="cond-input")
            yield Label("SO2Cl2 °C", classes="cond-label")
            yield OrderedInput(id="cond-so2cl2", type="number", compact=True, classes="cond-input")
            yield Label("NBS °C", classes="cond-label")
            yield OrderedInput(id="cond-nbs", type="number", compact=True, classes="cond-input")
            yield Label("clean at %", classes="cond-label")
            yield OrderedInput(id="cond-threshold", type="number", compact=True, classes="cond-input")
        yield Static("", id="cond-note")


class ConditionsScreen(ModalScreen[None]):
    """The conditions panel, docked at the bottom over the table; focus stays in it until it closes.

    It is a modal screen so that Tab cycles through its own fields only and no
    key reaches the table while it is open; the table, the header and the
    counts stay visible above it and update as values are applied.
    """

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "close", "Back (applies valid values)"),
    ]

    applied: reactive[Any] = reactive(None, init=False)
    """The engine.Conditions the table uses now (set by the app when they change)."""

    def __init__(self, applied: Any) -> None:
        super().__init__()
        self.set_reactive(ConditionsScreen.applied, applied)
        self.proposal: Proposal = Proposal(applied, {}, ())
        """The fields as last read."""
        self._sent: Any = applied

    def compose(self) -> ComposeResult:
        yield ConditionsPanel(id="conditions")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.load(self.applied)
        self.query_one("#cond-cl2", Input).focus()

    # ------------------------------------------------------------------ fields

    def load(self, conditions: Any) -> None:
        """Write ``conditions`` into the fields (only on opening: never while the chemist types)."""
        with self.prevent(Input.Changed, RadioSet.Changed):
            for f in FIELDS:
                self.query_one(f"#{f.input_id}", Input).value = _text(getattr(conditions, f.name))
            self.query_one(f"#cond-solvent-{conditions.cl2_solvent}", ChoiceButton).value = True
            self.query_one(f"#cond-phase-{conditions.cl2_phase}", ChoiceButton).value = True
        self._read()

    def _choice(self, name: str) -> str:
        """The button chosen in RadioSet ``cond-<name>`` (the applied value when none is)."""
        pressed = self.query_one(f"#cond-{name}", RadioSet).pressed_button
        if pressed is None or pressed.id is None:
            return getattr(self.applied, f"cl2_{name}")
        return pressed.id.removeprefix(f"cond-{name}-")

    def _solvent(self) -> str:
        return self._choice("solvent")

    def _read(self) -> Proposal:
        """Read the fields, mark each as pending or invalid, and redraw the note."""
        texts = {f.name: self.query_one(f"#{f.input_id}", Input).value for f in FIELDS}
        solvent = self._solvent()
        self.proposal = read_fields(texts, solvent, self.applied, self._choice("phase"))
        molar = self.query_one("#cond-molar", Input)
        molar.disabled = solvent == "none"
        for f in FIELDS:
            box = self.query_one(f"#{f.input_id}", Input)
            box.set_class(f.name in self.proposal.errors, "-refused")
            box.set_class(f.name in self.proposal.pending, "-pending")
        for name in ("phase", "solvent"):
            choice = self.query_one(f"#cond-{name}", RadioSet)
            choice.set_class(f"cl2_{name}" in self.proposal.errors, "-refused")
            choice.set_class(f"cl2_{name}" in self.proposal.pending, "-pending")
        self._show()
        return self.proposal

    def _apply(self) -> None:
        """Apply the fields if the whole set is complete and valid; otherwise leave the applied set alone."""
        proposal = self._read()
        if proposal.conditions is not None and proposal.conditions != self.applied and proposal.conditions != self._sent:
            self._sent = proposal.conditions
            self.post_message(ConditionsProposed(proposal.conditions))

    def _show(self) -> None:
        applied, proposal = self.applied, self.proposal
        labels = {f.name: f for f in FIELDS}
        lines = [f"Applied: {short_description(applied)}"]
        if proposal.errors:
            reasons = "; ".join(dict.fromkeys(proposal.errors.values()))  # one combination can fault two fields
            lines.append(f"✗ Not applied: {reasons}; the table keeps the applied values")
        elif proposal.pending:
            parts = []
            for name in proposal.pending:
                value = getattr(proposal.conditions, name)
                parts.append(f"{labels[name].label} {_text(value)} {labels[name].unit}"
                             if name in labels else f"{CHOICE_LABELS.get(name, name)} {value}")
            lines.append("… Pending: " + ", ".join(parts) + " (Enter or leaving the field applies it)")
        if proposal.conditions is not None:
            warnings = proposal.conditions.warnings()
            lines += [f"! {w}" for w in warnings] or ["✓ within the range of the rate data"]
        lines.append("Tab/Shift+Tab: next/previous field · Enter: apply · Esc: apply if valid, close")
        self.query_one("#cond-note", Static).update("\n".join(lines))

    # ------------------------------------------------------------------ events

    def watch_applied(self) -> None:
        self._read()

    @on(Input.Changed)
    def _changed(self, event: Input.Changed) -> None:
        event.stop()
        self._read()  # shows pending/invalid at once; nothing is applied while typing

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self._apply()

    @on(Input.Blurred)
    def _left(self, event: Input.Blurred) -> None:
        self._apply()

    @on(RadioSet.Changed)
    def _choice_changed(self, event: RadioSet.Changed) -> None:
        event.stop()
        self._apply()

    def action_close(self) -> None:
        """Apply what is complete and valid, then close; invalid entries are dropped (the note said so)."""
        self._apply()
        self.dismiss()  # the table gets its focus back
