"""Site detail of one row: every monohalide, why it forms, and how much under Cl2 and Br2."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, ClassVar

import numpy as np
from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical, VerticalScroll
from textual.reactive import reactive
from textual.screen import Screen
from textual.widgets import Footer, Static

from tui.help import CONFIDENCE_NOTE, STEREO_DOCS, verdict_text
from tui.messages import MarkRequested

if TYPE_CHECKING:
    import pandas as pd

_EIGHTHS = " ▏▎▍▌▋▊▉"


def bar(pct: float, width: int) -> str:
    """A horizontal bar of ``width`` cells for ``pct`` percent: full blocks, an eighth-block tip, light shade after."""
    pct = min(max(float(pct), 0.0), 100.0)
    eighths = round(pct / 100.0 * width * 8)
    full, part = divmod(eighths, 8)
    text = "█" * full + (_EIGHTHS[part] if part else "")
    return text + "░" * (width - len(text))


def products_table(products: pd.DataFrame) -> Table:
    """Every product with site class, H count, C–H BDE, ΔH for Cl·/Br· and stereo outcome."""
    table = Table(box=None, padding=(0, 1), pad_edge=False, header_style="bold underline", expand=False)
    table.add_column("P", justify="right", no_wrap=True)
    table.add_column("site", no_wrap=True)
    table.add_column("H", justify="right", no_wrap=True)
    table.add_column("BDE", justify="right", no_wrap=True)
    table.add_column("ΔH Cl·", justify="right", no_wrap=True)
    table.add_column("ΔH Br·", justify="right", no_wrap=True)
    table.add_column("stereo", no_wrap=True)
    table.add_column("monochloride", overflow="fold", min_width=12)
    for i, p in enumerate(products.itertuples(index=False), start=1):
        stereo = p.stereo or "—"  # empty for C–H that is not abstracted
        if int(p.n_stereoisomers) > 1:
            stereo = f"{stereo} ({int(p.n_stereoisomers)})"
        table.add_row(
            f"P{i}", p.site, str(int(p.h_count)), f"{p.bde:.1f}", f"{p.dh_cl:+.1f}", f"{p.dh_br:+.1f}", stereo,
            p.product,
        )
    return table


def nbs_text(nbs: pd.DataFrame, conditions: Any, width: int) -> Text:
    """NBS monobromides (allylic/benzylic only): one bar per product, with where the Br ends up and stereo."""
    text = Text()
    text.append(f"\nNBS at {conditions.nbs_temp_c:g} °C", style="bold")
    text.append(" — allylic/benzylic C–H only; every other C–H gets no share\n")
    if nbs.empty:
        text.append("No allylic or benzylic C–H: NBS gives no substitution product.\n")
        return text
    bar_width = max(8, min(30, width // 3))
    for i, p in enumerate(nbs.itertuples(index=False), start=1):
        stereo = p.stereo if int(p.n_stereoisomers) == 1 else f"{p.stereo} ({int(p.n_stereoisomers)})"
        if bool(p.ez_open):
            stereo += ", E+Z"
        text.append(f"N{i:<3}")
        text.append(bar(p.nbs_pct, bar_width))
        text.append(f" {p.nbs_pct:5.1f} %  {p.product}  [{p.terminus}; {stereo}]\n")
    text.append("radical carbon: Br where H was taken; allylic shift: Br at the far end of the allyl radical, "
                "C=C moved (more substituted C=C favoured; E/Z ratio not modelled)\n")
    return text


def poly_text(products: pd.DataFrame) -> Text:
    """Polyhalide expected at 1 : 1 substrate : halogen, and what keeps it under the default cap."""
    from engine.polyhalogenation import DEFAULT_MAX_POLY_PCT, DEFAULT_RATIO, plan

    text = Text()
    text.append("\nPolyhalogenation", style="bold")
    text.append(f" (estimate; {DEFAULT_RATIO:g} : 1 substrate : halogen, all halogen used)\n")
    h = products["h_count"].to_numpy()
    for reagent in ("cl2", "br2"):
        p = plan(reagent, h, products[f"{reagent}_pct"].to_numpy(), ratio=DEFAULT_RATIO)
        excess = "no excess suffices" if p.min_ratio == float("inf") else f"≥ {p.min_ratio:.2g} : 1 substrate : halogen"
        text.append(
            f"{reagent}: {p.unreacted_pct:.0f} % left, {p.mono_pct_of_charge:.0f} % mono, "
            f"{p.poly_pct_of_charge:.0f} % poly; ≤ {DEFAULT_MAX_POLY_PCT:g} % poly needs ≤ "
            f"{p.max_conversion_pct:.0f} % conversion ({excess})\n"
        )
    return text


def bars_text(products: pd.DataFrame, conditions: Any, width: int) -> Text:
    """Percent under chlorination and bromination, side by side, one line per product."""
    # Per line: "P1  " + bar + " 100.0 %" + gap + bar + " 100.0 %".
    bar_width = max(8, (width - 4 - 2 * 8 - 2) // 2)
    text = Text()
    cl_head = f"Cl2 at {conditions.cl2_temp_c:g} °C"
    br_head = f"Br2 at {conditions.br2_temp_c:g} °C"
    text.append("    " + cl_head.ljust(bar_width + 8) + "  " + br_head + "\n", style="bold")
    for i, p in enumerate(products.itertuples(index=False), start=1):
        text.append(f"P{i:<3}")
        text.append(bar(p.cl2_pct, bar_width))
        text.append(f" {p.cl2_pct:5.1f} %")
        text.append("  ")
        text.append(bar(p.br2_pct, bar_width))
        text.append(f" {p.br2_pct:5.1f} %\n")
    return text


class DetailScreen(Screen):
    """Full-screen detail of one row of the current view; n/p step through the view."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "close", "Back"),
        Binding("n", "step(1)", "Next row"),
        Binding("p", "step(-1)", "Previous row"),
        Binding("space", "mark", "Mark"),
    ]

    position: reactive[int] = reactive(0)
    """Position of the shown row within the view's rows."""
    marked: reactive[bool] = reactive(False)
    """Whether the shown row is on the shortlist (set by the app)."""

    def __init__(
        self, library: Any, frame: pd.DataFrame, rows: np.ndarray, position: int, conditions: Any, marks: np.ndarray
    ) -> None:
        super().__init__()
        self.library = library
        """The engine.Library (source of Library.products)."""
        self.frame = frame
        """The evaluated frame of the view."""
        self.rows = np.asarray(rows)
        """Frame row positions of the view, in display order."""
        self.conditions = conditions
        """engine.Conditions the frame was evaluated under."""
        self._marks = marks
        self.set_reactive(DetailScreen.position, position)
        self.set_reactive(DetailScreen.marked, bool(marks[self.row]))

    @property
    def row(self) -> int:
        """Frame row position shown."""
        return int(self.rows[self.position])

    def compose(self) -> ComposeResult:
        yield Static("", id="detail-head")
        with VerticalScroll(id="detail-body"):
            yield Static("", id="detail-products")
            yield Vertical(id="detail-structure")
            yield Static("", id="detail-bars")
            yield Static("", id="detail-nbs")
            yield Static("", id="detail-poly")
            yield Static("", id="detail-notes")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self._render_row()
        self.query_one("#detail-body").focus()

    def on_resize(self) -> None:
        self._render_row()

    def watch_position(self) -> None:
        self._render_row()

    def watch_marked(self) -> None:
        self._render_head()

    def _render_head(self) -> None:
        record = self.frame.iloc[self.row]
        lib = self.library
        names = lib.result_names()  # the input's own ID and SMILES, even when named like a result column
        ident = str(record[names[lib.id_column]]) if lib.id_column is not None else f"row {self.row + 1}"
        head = Text()
        head.append(ident, style="bold")
        head.append(f"  · row {self.row + 1} · {self.position + 1} of {len(self.rows):,} in view")
        head.append("  · ✓ on shortlist" if self.marked else "  · not marked")
        head.append(f"\nSMILES {record[names[lib.smiles_column]]}")
        if record["status"] != "ok":
            head.append("\nRejected: ", style="bold")
            head.append(str(record["reason"]))
        else:
            if record["canonical_smiles"] != record[names[lib.smiles_column]]:
                head.append(f"  (canonical {record['canonical_smiles']})")
            verdict = record["verdict"]
            head.append("\nVerdict: ", style="bold")
            head.append(verdict, style="bold")
            head.append(f" — {verdict_text(verdict, self.conditions.threshold_pct)}")
            head.append("\nServes: ", style="bold")
            head.append(str(record.get("serves", "")) or "none reaches the threshold")
            head.append("  Confidence: ", style="bold")
            head.append(str(record.get("confidence", "")) or "—")
            head.append("  Flags: ", style="bold")
            head.append(str(record.get("flags", "")) or "none")
        head.append(f"\n{self.conditions.describe()}")
        for warning in self.conditions.warnings():
            head.append(f"\n! {warning}")
        self.query_one("#detail-head", Static).update(head)

    def _show_structure(self, canonical_smiles: str, products: pd.DataFrame) -> None:
        """The labelled drawing where the terminal shows images, else a one-line note."""
        from tui.structure_view import structure_widget

        box = self.query_one("#detail-structure", Vertical)
        box.remove_children()
        box.mount(structure_widget(getattr(self.app, "graphics", None), canonical_smiles, products))

    def _render_row(self) -> None:
        if not self.is_mounted:
            return
        self._render_head()
        record = self.frame.iloc[self.row]
        products_box = self.query_one("#detail-products", Static)
        bars_box = self.query_one("#detail-bars", Static)
        notes_box = self.query_one("#detail-notes", Static)
        nbs_box = self.query_one("#detail-nbs", Static)
        poly_box = self.query_one("#detail-poly", Static)
        for box in (bars_box, notes_box, nbs_box, poly_box):
            box.update("")
        self.query_one("#detail-structure", Vertical).remove_children()
        if record["status"] != "ok":
            products_box.update("No products: the row was not modelled.")
            return
        products = self.library.products(self.row, self.conditions)
        if products.empty:
            products_box.update("No C–H bonds: no monohalide can form.")
            return
        width = max(40, self.size.width - 6)  # padding and scroll bar of the body
        products_box.update(Group(Text("Products", style="bold"), products_table(products)))
        self._show_structure(str(record["canonical_smiles"]), products)
        bars_box.update(Group(Text("\nShare of the monohalides", style="bold"), bars_text(products, self.conditions, width)))
        nbs_box.update(nbs_text(self.library.nbs_products(self.row, self.conditions), self.conditions, width))
        if (products["cl2_pct"] > 0).any():
            poly_box.update(poly_text(products))
        stereo = sorted(s for s in set(products["stereo"]) if s)
        notes = Text()
        notes.append(
            "Monochloride SMILES shown; the monobromide has Br in place of Cl. BDE and ΔH of H abstraction "
            "in kcal/mol (negative: exothermic). Sites at 0 % (aryl, vinyl, alkynyl C–H) are listed but not abstracted; "
            "(n) after a stereo outcome: stereoisomers formed.\n"
        )
        for s in stereo:
            notes.append(f"{s}: {STEREO_DOCS.get(s, '')}\n")
        from engine.special_sites import flag_notes  # engine is loaded by now: a library is shown

        confidence = str(record.get("confidence", ""))
        if confidence:
            notes.append(f"confidence {confidence}: {CONFIDENCE_NOTE}\n")
        for flag in flag_notes(str(record.get("flags", ""))):
            notes.append(f"flag {flag.flag}: ", style="bold")
            notes.append(f"{flag.note}\n")
        notes_box.update(notes)

    def action_close(self) -> None:
        """Back to the table."""
        self.dismiss()

    def action_step(self, delta: int) -> None:
        """Show the next or previous row of the view."""
        target = self.position + delta
        if 0 <= target < len(self.rows):
            self.position = target
            self.marked = bool(self._marks[self.row])

    def action_mark(self) -> None:
        """Mark or unmark the shown row (the app keeps the shortlist)."""
        self.post_message(MarkRequested(self.row))
