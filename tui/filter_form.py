"""The filter form: every filter of the library view in one small dialog."""

from __future__ import annotations

from collections.abc import Iterable
from typing import ClassVar

from halosift.engine.outcomes import OUTCOME_REAGENTS, OUTCOMES, VERDICTS
from halosift.engine.special_sites import FLAGS
from halosift.engine.stereo import ACHIRAL
from halosift.tui.filters import (
    DUPLICATE_MODES,
    FilterSpec,
    confidence_choices,
    flag_label,
    parse_optional_float,
    parse_optional_int,
    reagent_label,
)
from halosift.tui.inputs import OrderedInput
from halosift.tui.toggles import ChoiceButton, ChoiceSet, TickBox
from textual import events, on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Grid, Horizontal, VerticalScroll
from textual.screen import ModalScreen
from textual.widget import Widget
from textual.widgets import Button, Footer, Input, Label, Static

#: Verdict names in display order (the engine's own order).
VERDICT_ORDER = VERDICTS
#: How each reagent is named in the form.
REAGENT_LABELS: dict[str, str] = {r: reagent_label(r) for r in OUTCOME_REAGENTS}
#: Confidence values, strongest basis first.
CONFIDENCE_CHOICES = confidence_choices()
#: Short labels of the duplicate modes (tui.filters.DUPLICATE_MODES says what each does).
DUPLICATE_LABELS: dict[str, str] = {"all": "all rows", "hide": "hide repeats", "only": "only repeats"}


#: Cells a compact tick box or choice button draws besides its label: "[ ]" / "( )" and the blank cell Textual
#: pads the label with on each side (ToggleButton.render); one fewer cuts the longest label to "…".
TOGGLE_CELLS = 5
#: Blank cells between two cells of a :class:`FlowGrid`.
FLOW_GUTTER = 1


def toggle_width(labels: Iterable[str]) -> int:
    """Cells the widest of these tick boxes needs, so that every label shows whole (no "…")."""
    return TOGGLE_CELLS + max((len(label) for label in labels), default=0)


class FlowGrid(Grid):
    """A grid that flows its cells onto as many lines as the width needs: no label is ever cut.

    Textual's grid has a fixed column count; this one sets it on each resize
    from the widest cell (``cell_width``), so at 80 columns three long site
    names share a line only when all three fit whole.
    """

    def __init__(self, *children: Widget, cell_width: int, id: str | None = None, classes: str | None = None) -> None:
        super().__init__(*children, id=id, classes=classes)
        self.cell_width = cell_width
        """Cells the widest child needs."""

    def columns_for(self, width: int) -> int:
        """How many cells fit whole side by side in ``width`` cells."""
        return max(1, (width + FLOW_GUTTER) // (self.cell_width + FLOW_GUTTER))

    def on_resize(self, event: events.Resize) -> None:
        columns = self.columns_for(event.size.width)
        if self.styles.grid_size_columns != columns:
            self.styles.grid_size_columns = columns


def _confidence_id(level: str) -> str:
    """A widget id for a confidence level (ids take no spaces: 'from memory')."""
    return "confidence-" + level.replace(" ", "-")


class FilterForm(ModalScreen[FilterSpec | None]):
    """Edit the filters; Apply returns the new FilterSpec, Esc returns None."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Cancel"),
        Binding("ctrl+s", "apply", "Apply"),
    ]

    def __init__(self, spec: FilterSpec, sites: list[str], no_sites_reason: str = "") -> None:
        super().__init__()
        self.no_sites_reason = no_sites_reason or "Site types: none abstractable in this library"
        """Shown instead of the site-type list when there is nothing to choose."""
        self.spec = spec
        """The filters in force when the form opened."""
        self.sites = sorted(set(sites) | set(spec.site_types))
        """Site classes offered (those present in the library)."""

    def compose(self) -> ComposeResult:
        spec = self.spec
        with VerticalScroll(id="filter-box"):
            yield Static("Filters for the library view (all must hold)", id="filter-title")
            yield Label("Verdict (none ticked: any verdict)")
            with FlowGrid(cell_width=toggle_width(VERDICT_ORDER), classes="flow-grid"):
                for verdict in VERDICT_ORDER:
                    yield TickBox(verdict, verdict in spec.verdicts, id=f"verdict-{verdict}", compact=True)
            with Horizontal(classes="filter-row"):
                yield Label("Br2 major product at least", classes="filter-label")
                yield OrderedInput(_text(spec.min_br2_pct), id="min-br2", type="number", compact=True, placeholder="any")
                yield Label("%", classes="filter-label")
            with Horizontal(classes="filter-row"):
                yield Label("At most", classes="filter-label")
                yield OrderedInput(_text(spec.max_products), id="max-products", type="integer", compact=True, placeholder="any")
                yield Label("products (constitutional monohalides)", classes="filter-label")
            yield TickBox(
                f"No new stereocentre (Br2 major product {ACHIRAL})",
                spec.no_new_stereo,
                id="no-new-stereo",
                compact=True,
            )
            if self.sites:
                with Horizontal(classes="filter-row"):
                    yield Label("Site types present:", classes="filter-label")
                    with ChoiceSet(id="site-match", compact=True):
                        yield ChoiceButton("any of", spec.site_match == "any", id="match-any", compact=True)
                        yield ChoiceButton("all of", spec.site_match == "all", id="match-all", compact=True)
                with FlowGrid(cell_width=toggle_width(self.sites), id="site-grid", classes="flow-grid"):
                    for site in self.sites:
                        yield TickBox(site, site in spec.site_types, id=f"site-{site}", classes="site-box", compact=True)
            else:
                yield Label(self.no_sites_reason, id="no-sites", classes="filter-row")
            yield Label("Outcome per reagent (none ticked: any outcome)")
            reagent_width = _name_width(REAGENT_LABELS[r] for r in OUTCOME_REAGENTS)
            for reagent in OUTCOME_REAGENTS:
                kept = spec.outcomes_for(reagent)
                with Horizontal(classes="filter-row name-row"):
                    yield _row_name(REAGENT_LABELS[reagent], reagent_width)
                    for outcome in OUTCOMES:
                        yield TickBox(outcome, outcome in kept, id=f"outcome-{reagent}-{outcome}", compact=True)
            yield Label("Special-site flags")
            flag_width = _name_width([flag_label(f) for f in FLAGS])
            for flag in FLAGS:
                state = "has" if flag in spec.flags_has else "lacks" if flag in spec.flags_lacks else "any"
                with Horizontal(classes="filter-row name-row"):
                    yield _row_name(flag_label(flag), flag_width)
                    with ChoiceSet(id=f"flag-{flag}", classes="choice-row", compact=True):
                        for choice, label in (("any", "either"), ("has", "has it"), ("lacks", "lacks it")):
                            yield ChoiceButton(label, state == choice, id=f"flag-{flag}-{choice}", compact=True)
            # Group names on their own line, choices flowing below: at 80 columns nothing is cut.
            yield Label("Confidence of the rates (none ticked: any)")
            with FlowGrid(cell_width=toggle_width(CONFIDENCE_CHOICES), classes="flow-grid"):
                for level in CONFIDENCE_CHOICES:
                    yield TickBox(level, level in spec.confidence, id=_confidence_id(level), compact=True)
            yield Label("Duplicate structures")
            with Horizontal(classes="filter-row"):
                with ChoiceSet(id="duplicates", classes="choice-row", compact=True):
                    for mode in DUPLICATE_MODES:
                        yield ChoiceButton(DUPLICATE_LABELS[mode], spec.duplicates == mode, id=f"dup-{mode}",
                                           compact=True)
            with Horizontal(classes="filter-row"):
                yield Label("Text in ID or SMILES", classes="filter-label")
                yield OrderedInput(spec.text, id="filter-text", compact=True, placeholder="any")
            yield Static("", id="filter-error")
            with Horizontal(id="filter-buttons"):
                yield Button("Apply", id="filter-apply", variant="primary", compact=True)
                yield Button("Clear all", id="filter-clear", compact=True)
                yield Button("Cancel", id="filter-cancel", compact=True)
        yield Footer(compact=True)  # the form's own keys, not the table's behind it

    def on_mount(self) -> None:
        self.query_one(f"#verdict-{VERDICT_ORDER[0]}", TickBox).focus()

    def collect(self) -> FilterSpec:
        """The FilterSpec the form now describes; ValueError (one line) when a field is invalid."""
        verdicts = frozenset(v for v in VERDICT_ORDER if self.query_one(f"#verdict-{v}", TickBox).value)
        min_br2 = parse_optional_float(
            self.query_one("#min-br2", Input).value, lo=0, hi=100, what="Br2 major minimum"
        )
        max_products = parse_optional_int(
            self.query_one("#max-products", Input).value, lo=0, what="maximum products"
        )
        if self.sites:
            sites = frozenset(site for site in self.sites if self.query_one(f"#site-{site}", TickBox).value)
            match = "all" if self.query_one("#match-all", ChoiceButton).value else "any"
        else:
            sites, match = frozenset(), "any"
        return FilterSpec(
            verdicts=verdicts,
            min_br2_pct=min_br2,
            max_products=max_products,
            site_types=sites,
            site_match=match,
            no_new_stereo=self.query_one("#no-new-stereo", TickBox).value,
            text=self.query_one("#filter-text", Input).value.strip(),
            flags_has=frozenset(f for f in FLAGS if self.query_one(f"#flag-{f}-has", ChoiceButton).value),
            flags_lacks=frozenset(f for f in FLAGS if self.query_one(f"#flag-{f}-lacks", ChoiceButton).value),
            outcomes=frozenset(
                (r, o) for r in OUTCOME_REAGENTS for o in OUTCOMES
                if self.query_one(f"#outcome-{r}-{o}", TickBox).value
            ),
            confidence=frozenset(c for c in CONFIDENCE_CHOICES if self.query_one("#" + _confidence_id(c), TickBox).value),
            duplicates=next((m for m in DUPLICATE_MODES if self.query_one(f"#dup-{m}", ChoiceButton).value), "all"),
        )

    def action_apply(self) -> None:
        """Close and apply, unless a field is invalid."""
        try:
            spec = self.collect()
        except ValueError as exc:
            self.query_one("#filter-error", Static).update(f"✗ {exc}")
            return
        self.dismiss(spec)

    def action_cancel(self) -> None:
        """Close without changing anything."""
        self.dismiss(None)

    @on(Input.Submitted)
    def _submitted(self) -> None:
        self.action_apply()

    @on(Button.Pressed, "#filter-apply")
    def _apply(self) -> None:
        self.action_apply()

    @on(Button.Pressed, "#filter-cancel")
    def _cancel(self) -> None:
        self.action_cancel()

    @on(Button.Pressed, "#filter-clear")
    def _clear(self) -> None:
        self.dismiss(FilterSpec())


#: Widest a row name may be before it wraps onto a second line (between words, never cut).
ROW_NAME_MAX = 30


def _name_width(names: Iterable[str]) -> int:
    """Width of a column of row names: the longest name and a blank cell, at most :data:`ROW_NAME_MAX`."""
    return min(ROW_NAME_MAX, max((len(n) for n in names), default=0) + 1)


def _row_name(text: str, width: int) -> Label:
    """A row's name in a column ``width`` cells wide; a longer name wraps between words."""
    label = Label(text, classes="filter-label row-name")
    label.styles.width = width
    return label


def _text(value: float | int | None) -> str:
    return "" if value is None else f"{value:g}"
