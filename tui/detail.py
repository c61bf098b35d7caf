"""Site detail of one row: every monohalide, why it forms, and how much under Cl2 and Br2."""

from __future__ import annotations

import threading
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, ClassVar

import numpy as np
from halosift.engine.outcomes import OUTCOME_REAGENTS
from halosift.engine.reagents import REAGENT_NAMES, REAGENTS, reagent_name
from halosift.tui.filters import reagent_label
from halosift.tui.help import CONFIDENCE_NOTE, STEREO_DOCS, verdict_text
from halosift.tui.messages import DetailFailed, DetailMoved, DetailReady, MarkRequested
from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical, VerticalScroll
from textual.reactive import reactive
from textual.screen import Screen
from textual.widgets import Footer, Static
from textual.worker import get_current_worker

if TYPE_CHECKING:
    import pandas as pd

def _missing(value: Any) -> bool:
    """True for an empty result cell (None, NaN or pandas' NA)."""
    import pandas

    missing = pandas.isna(value)
    return missing if isinstance(missing, bool) else False  # a list or array cell (Parquet) is a value


_EIGHTHS = " ▏▎▍▌▋▊▉"


def bar(pct: float, width: int) -> str:
    """A horizontal bar of ``width`` cells for ``pct`` percent: full blocks, an eighth-block tip, light shade after."""
    pct = min(max(float(pct), 0.0), 100.0)
    eighths = round(pct / 100.0 * width * 8)
    full, part = divmod(eighths, 8)
    text = "█" * full + (_EIGHTHS[part] if part else "")
    return text + "░" * (width - len(text))


def products_table(products: pd.DataFrame, smiles_width: int | None = None) -> Table:
    """Every product with site class, H count, C–H BDE, ΔH for Cl·/Br· and stereo outcome.

    ``smiles_width``: the monochloride SMILES are broken at sensible points
    (:func:`halosift.tui.text_structure.smiles_lines`) to that many cells;
    0 leaves the column out (:func:`products_view` lists them below instead).
    """
    from halosift.tui.structure_view import product_label
    from halosift.tui.text_structure import smiles_lines

    table = Table(box=None, padding=(0, 1), pad_edge=False, header_style="bold underline", expand=False)
    table.add_column("P", justify="right", no_wrap=True)
    table.add_column("site", no_wrap=True)
    table.add_column("H", justify="right", no_wrap=True)
    table.add_column("BDE", justify="right", no_wrap=True)
    table.add_column("ΔH Cl·", justify="right", no_wrap=True)
    table.add_column("ΔH Br·", justify="right", no_wrap=True)
    table.add_column("stereo", no_wrap=True)
    if smiles_width != 0:
        table.add_column("monochloride", overflow="fold", min_width=12)
    for i, p in enumerate(products.itertuples(index=False), start=1):
        stereo = p.stereo or "—"  # empty for C–H that is not abstracted
        if int(p.n_stereoisomers) > 1:
            stereo = f"{stereo} ({int(p.n_stereoisomers)})"
        cells = [product_label(i), p.site, str(int(p.h_count)), f"{p.bde:.1f}", f"{p.dh_cl:+.1f}", f"{p.dh_br:+.1f}", stereo]
        if smiles_width:
            cells.append("\n".join(smiles_lines(str(p.product), smiles_width)))
        elif smiles_width is None:
            cells.append(p.product)
        table.add_row(*cells)
    return table


#: Narrowest the monochloride column may be before the SMILES go below the table instead.
MIN_SMILES_COLUMN = 16


def products_view(products: pd.DataFrame, width: int) -> Group:
    """The products table fitted to ``width`` cells: long SMILES wrap at ring closures and branches, never mid-atom.

    When the other columns leave too little room, the monochlorides are listed
    below the table, one P-numbered block each.
    """
    from halosift.tui.structure_view import product_label
    from halosift.tui.text_structure import smiles_block

    # Cells of the columns before the SMILES: their longest text, plus two cells between columns.
    texts = [
        [product_label(len(products)), "P"], [*products["site"].astype(str), "site"], [*products["h_count"].astype(int).astype(str)],
        ["000.0", "BDE"], ["+00.0", "ΔH Cl·"], ["+00.0", "ΔH Br·"],
        [*(f"{s or '—'} ({int(n)})" if int(n) > 1 else (s or "—")
           for s, n in zip(products["stereo"], products["n_stereoisomers"])), "stereo"],
    ]
    used = sum(max(len(t) for t in column) for column in texts) + 2 * len(texts)
    room = width - used
    longest = int(products["product"].astype(str).str.len().max())
    if room >= min(MIN_SMILES_COLUMN, longest):
        return Group(Text("Products", style="bold"), products_table(products, smiles_width=room))
    below = Text("\n".join(
        smiles_block(f"{product_label(i):<4}", str(p.product), width) for i, p in enumerate(products.itertuples(index=False), start=1)
    ))
    return Group(Text("Products", style="bold"), products_table(products, smiles_width=0),
                 Text("\nmonochloride", style="bold underline"), below)


def nbs_text(nbs: pd.DataFrame, conditions: Any, width: int, ruled_reason: str | None = None) -> Text:
    """NBS monobromides (allylic/benzylic only): one bar per product, with where the Br ends up and stereo.

    ``ruled_reason`` (not None when NBS's outcome is ruled-out): a "ruled out" line replaces the bars.
    """
    text = Text()
    text.append(f"\nNBS at {conditions.nbs_temp_c:g} °C", style="bold")
    text.append(" — allylic/benzylic C–H only; every other C–H gets no share\n")
    if ruled_reason is not None and not nbs.empty:
        text.append(ruled_out_line("nbs", ruled_reason))
        return text
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


#: The reagents with an outcome, and how the detail names them (the order of engine.outcomes.OUTCOME_REAGENTS).
OUTCOME_LABELS: dict[str, str] = {r: reagent_label(r) for r in OUTCOME_REAGENTS}
#: The reagents weighed from the site table, with per-product percent columns (cl2_pct, br2_pct).
SITE_REAGENTS: tuple[str, ...] = tuple(REAGENTS)


def outcomes_text(record: Any, conditions: Any) -> Text:
    """Per reagent: clean / mixture / ruled-out, the major of its split and why it is ruled out (as explain)."""
    text = Text()
    text.append("Outcome per reagent", style="bold")
    text.append(f" (clean: one monohalide at ≥ {conditions.threshold_pct:g} %; ruled-out: the substitution "
                "split does not apply)\n")
    for reagent, label in OUTCOME_LABELS.items():
        outcome = str(record.get(f"{reagent}_outcome", "") or "")
        if not outcome:
            continue
        major = str(record.get(f"{reagent}_major", "") or "")
        pct = record.get(f"{reagent}_major_pct", float("nan"))
        text.append(f"{label:<7}{conditions.temp_c(reagent):>5g} °C  ")
        text.append(f"{outcome:<9}", style="bold")
        if major:
            share = "" if pct != pct else f" {pct:.1f} %"
            text.append(f"  major {major}{share}")
        reason = str(record.get(f"{reagent}_reason", "") or "")
        if reason:
            text.append(f"  — {reason}")
        text.append("\n")
    return text


def ruled_out(record: Any) -> dict[str, str]:
    """Reagents whose outcome is ruled-out in a screen row, each with its reason (their split does not apply)."""
    return {
        r: str(record.get(f"{r}_reason", "") or "")
        for r in OUTCOME_LABELS if record.get(f"{r}_outcome", "") == "ruled-out"
    }


def ruled_out_line(reagent: str, reason: str) -> str:
    """'Br2 ruled out: reason' — what the detail shows instead of a ruled-out reagent's shares."""
    return f"{OUTCOME_LABELS[reagent]} ruled out" + (f": {reason}" if reason else "") + "\n"


def poly_text(products: pd.DataFrame, ruled: dict[str, str] | None = None) -> Text:
    """Polyhalide expected at 1 : 1 substrate : halogen, and what keeps it under the default cap.

    A reagent in ``ruled`` (outcome ruled-out) does not substitute: it gets a ruled-out line, no figures.
    """
    from halosift.engine.polyhalogenation import DEFAULT_MAX_POLY_PCT, DEFAULT_RATIO, POLY_UNIT, plan

    ruled = ruled or {}
    text = Text()
    text.append("\nPolyhalogenation", style="bold")
    text.append(f" (estimate; {DEFAULT_RATIO:g} : 1 substrate : halogen, all halogen used)\n")
    h = products["h_count"].to_numpy()
    for reagent in SITE_REAGENTS:
        if reagent in ruled:
            text.append(ruled_out_line(reagent, ruled[reagent]))
            continue
        p = plan(reagent, h, products[f"{reagent}_pct"].to_numpy(), ratio=DEFAULT_RATIO)
        excess = "no excess suffices" if p.min_ratio == float("inf") else f"≥ {p.min_ratio:.2g} : 1 substrate : halogen"
        # The table's "poly % prod" column: the same figure, the same unit.
        text.append(
            f"{REAGENT_NAMES[reagent]}: {p.poly_pct_at_ratio:.1f} {POLY_UNIT} is polyhalide; "
            f"≤ {DEFAULT_MAX_POLY_PCT:g} % needs ≤ {p.max_conversion_pct:.1f} % conversion ({excess})\n"
        )
    return text


def bars_text(products: pd.DataFrame, conditions: Any, width: int, ruled: dict[str, str] | None = None) -> Text:
    """Percent under chlorination and bromination, side by side, one line per product.

    A reagent in ``ruled`` (outcome ruled-out) has no split: a "ruled out: reason" line replaces its bars.
    """
    from halosift.tui.structure_view import product_label

    ruled = ruled or {}
    shown = [r for r in SITE_REAGENTS if r not in ruled]
    text = Text()
    for r in SITE_REAGENTS:
        if r in ruled:
            text.append(f"{OUTCOME_LABELS[r]} at {conditions.temp_c(r):g} °C  ", style="bold")
            text.append("ruled out" + (f": {ruled[r]}" if ruled[r] else "") + "\n")
    if not shown:
        return text
    # Per line: "P1  " + bar + " 100.0 %", per reagent shown, two cells between.
    bar_width = max(8, (width - 4 - len(shown) * 8 - 2 * (len(shown) - 1)) // len(shown))
    heads = [f"{OUTCOME_LABELS[r]} at {conditions.temp_c(r):g} °C" for r in shown]
    text.append("    " + "  ".join(h.ljust(bar_width + 8) for h in heads).rstrip() + "\n", style="bold")
    for i, p in enumerate(products.itertuples(index=False), start=1):
        text.append(f"{product_label(i):<4}")
        for j, r in enumerate(shown):
            pct = float(getattr(p, f"{r}_pct"))
            text.append("  " if j else "")
            text.append(bar(pct, bar_width))
            text.append(f" {pct:5.1f} %")
        text.append("\n")
    return text


@dataclass(frozen=True)
class DetailResult:
    """Everything the site detail shows below its header, worked out for one row under one set of conditions."""

    row: int
    """Frame row position it belongs to."""
    conditions: Any
    """engine.Conditions it was worked out under."""
    products: pd.DataFrame
    """Library.products(row, conditions)."""
    nbs: pd.DataFrame
    """Library.nbs_products(row, conditions)."""
    picture: object | str
    """The structure drawing (a PIL image), the text drawing's layout, or a note (tui.structure_view.structure_picture)."""


def work_out_detail(library: Any, row: int, canonical_smiles: str, conditions: Any, graphics: str | None) -> DetailResult:
    """The products, NBS products and drawing of one row (slow: may perceive the structure again with RDKit)."""
    from halosift.tui.structure_view import structure_picture

    products = library.products(row, conditions)
    nbs = library.nbs_products(row, conditions)
    picture = structure_picture(graphics, canonical_smiles, products) if not products.empty else ""
    return DetailResult(row, conditions, products, nbs, picture)


#: Seconds between checks of whether the chemist has left the row being worked out.
POLL_SECONDS = 0.05
#: What the body says while a row's detail is being worked out.
WORKING_NOTE = "Working out every product of this row… (Esc: back to the table · n/p: other rows)"


class DetailScreen(Screen):
    """Full-screen detail of one row of the current view; n/p step through the view.

    The products are worked out in a worker (Library.products can perceive the
    structure again with RDKit, which takes long for large ring systems); the
    header shows at once, the body says it is working, and an answer for a row
    the chemist has already left is dropped.
    """

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
    working: reactive[bool] = reactive(False, init=False)
    """True while the shown row's products are being worked out."""

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
        self.result: DetailResult | None = None
        """The shown row's worked-out detail, once it has arrived."""
        self._marks = marks
        self._request = 0
        self.set_reactive(DetailScreen.position, position)
        self.set_reactive(DetailScreen.marked, bool(marks[self.row]))

    @property
    def row(self) -> int:
        """Frame row position shown."""
        return int(self.rows[self.position])

    def compose(self) -> ComposeResult:
        yield Static("", id="detail-head")
        with VerticalScroll(id="detail-body"):
            yield Static("", id="detail-outcomes")
            yield Static("", id="detail-products")
            yield Vertical(id="detail-structure")
            yield Static("", id="detail-bars")
            yield Static("", id="detail-nbs")
            yield Static("", id="detail-poly")
            yield Static("", id="detail-notes")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self._show_row()
        self.query_one("#detail-body").focus()

    def on_resize(self) -> None:
        self._render_head()
        if self.result is not None:
            self._render_body(self.result, draw=False)

    def watch_position(self) -> None:
        self._show_row()

    def watch_marked(self) -> None:
        self._render_head()

    def watch_working(self) -> None:
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
        if self.working:
            head.append("  · working…", style="bold")
        from halosift.tui.text_structure import smiles_block

        line_width = max(20, (self.size.width or self.app.size.width) - 2)  # the head's padding
        given = str(record[names[lib.smiles_column]])
        head.append("\n" + smiles_block("SMILES ", given, line_width))
        # The input's own columns (a name, a price…), whole: the table cuts long ones to its column width.
        own = [(str(name), record[key]) for name, key in names.items()
               if name not in (lib.id_column, lib.smiles_column) and not _missing(record[key])
               and str(record[key]).strip()]
        if own:
            head.append("\nInput: ", style="bold")
            head.append(" · ".join(f"{name} {value}" for name, value in own))
        if record["status"] != "ok":
            head.append("\nRejected: ", style="bold")
            head.append(str(record["reason"]))
        else:
            canonical = str(record["canonical_smiles"])
            if canonical != given:
                # Long ones wrap at ring closures and branches, never inside an atom symbol.
                if len("SMILES ") + len(given) + len(canonical) + 13 <= line_width:
                    head.append(f"  (canonical {canonical})")
                else:
                    head.append("\n" + smiles_block("canonical ", canonical, line_width))
            verdict = record["verdict"]
            head.append("\nVerdict: ", style="bold")
            head.append(verdict, style="bold")
            head.append(f" — {verdict_text(verdict, self.conditions.threshold_pct)}")
            head.append("\nServes: ", style="bold")
            head.append(reagent_name(record.get("serves", "")) or "none (no reagent's outcome is clean)")
            head.append("  Confidence: ", style="bold")
            head.append(str(record.get("confidence", "")) or "—")
            head.append("  Flags: ", style="bold")
            head.append(str(record.get("flags", "")) or "none")
            first = record.get("duplicate_of")
            if first is not None and not _missing(first):  # as the report says: a repeat is no new candidate
                head.append("\nRepeat: ", style="bold")
                head.append(f"same structure as input row {int(first)}")
        head.append(f"\n{self.conditions.describe()}")
        for warning in self.conditions.warnings():
            head.append(f"\n! {warning}")
        self.query_one("#detail-head", Static).update(head)

    def _clear_body(self, message: str) -> None:
        for box_id in ("#detail-bars", "#detail-notes", "#detail-nbs", "#detail-poly"):
            self.query_one(box_id, Static).update("")
        self.query_one("#detail-structure", Vertical).remove_children()
        self.query_one("#detail-products", Static).update(message)

    def _show_row(self) -> None:
        """Show the header now and start working out the body; any earlier request is dropped."""
        self._request += 1
        self.result = None
        record = self.frame.iloc[self.row]
        # Read off the evaluated frame (nothing to work out), so it shows at once.
        self.query_one("#detail-outcomes", Static).update(
            outcomes_text(record, self.conditions) if record["status"] == "ok" else ""
        )
        if record["status"] != "ok":
            self.workers.cancel_group(self, "detail")
            self.working = False
            self._render_head()
            self._clear_body("No products: the row was not modelled.")
            self.query_one("#detail-body", VerticalScroll).scroll_home(animate=False)
            return
        self.working = True
        self._render_head()
        self._clear_body(WORKING_NOTE)
        self.query_one("#detail-body", VerticalScroll).scroll_home(animate=False)  # a new row starts at its top
        self._work_out(self._request, self.row, str(record["canonical_smiles"]))

    @work(thread=True, exclusive=True, group="detail", exit_on_error=False, description="work out a detail")
    def _work_out(self, request: int, row: int, canonical_smiles: str) -> None:
        """Work out one row's detail in a daemon thread and post it, unless the chemist has moved on.

        The computation itself runs in a daemon thread this worker waits on, so
        cancelling the worker (Esc, n/p, quitting) returns at once: RDKit cannot
        be interrupted, and an abandoned computation must not hold up leaving
        the screen or the app.
        """
        worker = get_current_worker()
        outcome: dict[str, Any] = {}
        done = threading.Event()
        graphics = getattr(self.app, "graphics", None)

        def compute() -> None:
            try:
                outcome["result"] = work_out_detail(self.library, row, canonical_smiles, self.conditions, graphics)
            except Exception as exc:  # an engine bug: reported in one line on the screen
                outcome["error"] = f"{type(exc).__name__}: {' '.join(str(exc).split())}"
            finally:
                done.set()

        threading.Thread(target=compute, name="halosift-detail", daemon=True).start()
        while not done.wait(POLL_SECONDS):
            if worker.is_cancelled:
                return
        if worker.is_cancelled:
            return
        if "error" in outcome:
            self.post_message(DetailFailed(request, outcome["error"]))
        else:
            self.post_message(DetailReady(request, outcome["result"]))

    def on_detail_ready(self, message: DetailReady) -> None:
        if message.request != self._request or message.result.row != self.row:
            return  # the chemist has moved to another row since
        self.result = message.result
        self.working = False
        self._render_body(message.result, draw=True)

    def on_detail_failed(self, message: DetailFailed) -> None:
        if message.request != self._request:
            return
        self.working = False
        self._clear_body(f"Could not work out this row's products: {message.message}")

    def _render_body(self, result: DetailResult, *, draw: bool) -> None:
        """Fill the body from a worked-out detail (pure formatting; ``draw`` remounts the drawing)."""
        record = self.frame.iloc[result.row]
        products = result.products
        products_box = self.query_one("#detail-products", Static)
        if products.empty:
            self._clear_body("No C–H bonds: no monohalide can form.")
            return
        width = max(40, self.size.width - 6)  # padding and scroll bar of the body
        products_box.update(products_view(products, width))
        if draw:
            from halosift.tui.structure_view import picture_widget

            box = self.query_one("#detail-structure", Vertical)
            box.remove_children()
            box.mount(picture_widget(getattr(self.app, "graphics", None), result.picture))
        # Reagents ruled out in the screen row: their shares do not apply, so lines say so instead of bars.
        ruled = ruled_out(record)
        self.query_one("#detail-bars", Static).update(
            Group(Text("\nShare of the monohalides", style="bold"), bars_text(products, self.conditions, width, ruled))
        )
        self.query_one("#detail-nbs", Static).update(nbs_text(result.nbs, self.conditions, width, ruled.get("nbs")))
        poly_box = self.query_one("#detail-poly", Static)
        weighed = (products["cl2_pct"] > 0).any() and not set(SITE_REAGENTS) <= set(ruled)
        poly_box.update(poly_text(products, ruled) if weighed else "")
        stereo = sorted(s for s in set(products["stereo"]) if s)
        notes = Text()
        notes.append(
            "Monochloride SMILES shown; the monobromide has Br in place of Cl. BDE and ΔH of H abstraction "
            "in kcal/mol (negative: exothermic). Sites at 0 % (aryl, vinyl, alkynyl C–H) are listed but not abstracted; "
            "(n) after a stereo outcome: stereoisomers formed.\n"
        )
        for s in stereo:
            notes.append(f"{s}: {STEREO_DOCS.get(s, '')}\n")
        from halosift.engine.special_sites import flag_notes  # engine is loaded by now: a library is shown

        confidence = str(record.get("confidence", ""))
        if confidence:
            notes.append(f"confidence {confidence}: {CONFIDENCE_NOTE}\n")
        for flag in flag_notes(str(record.get("flags", ""))):
            notes.append(f"flag {flag.flag}: ", style="bold")
            notes.append(f"{flag.note}\n")
        self.query_one("#detail-notes", Static).update(notes)

    def action_close(self) -> None:
        """Back to the table (a detail still being worked out is abandoned)."""
        self.workers.cancel_group(self, "detail")
        self.dismiss()

    def action_step(self, delta: int) -> None:
        """Show the next or previous row of the view."""
        target = self.position + delta
        if 0 <= target < len(self.rows):
            self.position = target
            self.marked = bool(self._marks[self.row])
            self.post_message(DetailMoved(self.row))  # so Esc returns to the row last shown

    def action_mark(self) -> None:
        """Mark or unmark the shown row (the app keeps the shortlist)."""
        self.post_message(MarkRequested(self.row))
