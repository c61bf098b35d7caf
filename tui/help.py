"""The help screen, and the wording for verdicts, views and stereo outcomes used across the app."""

from __future__ import annotations

from typing import ClassVar

from halosift.engine.outcomes import OUTCOME_DOCS, OUTCOME_REAGENTS
from halosift.engine.outcomes import VERDICT_DOCS as _ENGINE_VERDICT_DOCS
from halosift.engine.stereo import ACHIRAL, STEREO_DOCS
from halosift.tui.filters import VIEW_DOCS, confidence_choices
from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.app import App, ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.screen import Screen
from textual.widgets import Footer, Static

#: What each verdict means ({threshold} is filled in with the current threshold); the engine words them.
VERDICT_DOCS: dict[str, str] = {
    **_ENGINE_VERDICT_DOCS,
    "rejected": "the engine could not model the row; the reason is given",
}

#: What the confidence column means (also quoted by the detail screen).
CONFIDENCE_NOTE = (
    f"the weakest basis ({' > '.join(confidence_choices())}) of the values behind the products that "
    "carry ≥ 5 % under Cl2, Br2 or NBS (rate constants, exo/endo and allyl-terminus splits); 'from memory': a "
    "published value quoted without re-checking its source"
)


def sources() -> list[tuple[str, str]]:
    """The model's sources, in brief; the numbers quoted are read from halosift.engine.parameters."""
    from halosift.engine.parameters import ALKENE_SUBSTITUTION_T_C, BR_RATIOS, BR_REFERENCE_T_K, CL_RANGE_K, KELVIN

    ratios = " : ".join(f"{BR_RATIOS[k].value:g}" for k in ("primary", "secondary", "tertiary"))
    lo, hi = (t - KELVIN for t in CL_RANGE_K)
    return [
        ("Cl· kinetics", f"Sarzyński & Sztuba 2002 (Int. J. Chem. Kinet.): site-specific Arrhenius fits "
         f"for Cl atoms with alkane C–H, gas phase, {lo:.0f}–{hi:.0f} °C"),
        ("Br· ratios", f"Morrison & Boyd, Organic Chemistry (textbook): per-H primary : secondary : tertiary "
         f"{ratios} at {BR_REFERENCE_T_K - KELVIN:.0f} °C"),
        ("C–H bond enthalpies", "Blanksby & Ellison 2003 (Acc. Chem. Res.)"),
        ("Sites without data", "Bell–Evans–Polanyi estimates from the bond enthalpies (benzylic, allylic, "
         "propargylic, methane and cyclopropyl C–H toward Br·; Cl· + methane, cyclopropane and ethylbenzene are "
         "compiled gas-phase rate constants, the gt R package's data set)"),
        ("Other pathways", f"C=C adds Cl2/Br2 below {ALKENE_SUBSTITUTION_T_C.value:.0f} °C (propene + Cl2 gives allyl "
         "chloride only hotter: Groll & Hearne 1939); Br· opens cyclopropane rings; halogens add across the central "
         "bond of propellanes and bicyclo[1.1.0]butanes; cyclopropylmethyl radicals ring-open (engine/outcomes.py)"),
    ]


def verdict_text(verdict: str, threshold_pct: float) -> str:
    """One-line meaning of a verdict under the current threshold."""
    return VERDICT_DOCS.get(verdict or "rejected", "").format(threshold=f"{threshold_pct:g}")


def _bindings_table(app) -> Group:
    """Every key the app answers to, read from the classes' own binding lists."""
    from halosift.tui.app import HalosiftApp
    from halosift.tui.conditions import ConditionsScreen
    from halosift.tui.detail import DetailScreen
    from halosift.tui.export import ConfirmScreen, ExportScreen
    from halosift.tui.filter_form import FilterForm
    from halosift.tui.id_list import IdListScreen
    from halosift.tui.search import SearchBar
    from halosift.tui.table import LibraryTable

    groups = (
        ("Anywhere (not while typing in a field)", [b for b in HalosiftApp.BINDINGS if b.action in ("leave", "help")]),
        ("Anywhere, also while typing", [b for b in App.BINDINGS if b.action == "quit"]),
        ("While screening", [b for b in HalosiftApp.BINDINGS if b.action == "cancel_screening"]),
        ("After a cancelled or failed screening", [b for b in HalosiftApp.BINDINGS if b.action == "rescreen"]),
        ("Library table", list(LibraryTable.BINDINGS)
         + [b for b in HalosiftApp.BINDINGS if b.action not in ("leave", "help", "cancel_screening", "rescreen")]),
        ("Site detail", list(DetailScreen.BINDINGS)),
        ("Find bar", list(SearchBar.BINDINGS)),
        ("Conditions panel", list(ConditionsScreen.BINDINGS)),
        ("Filter form", list(FilterForm.BINDINGS)),
        ("Export form", list(ExportScreen.BINDINGS)),
        ("Replace? dialog", list(ConfirmScreen.BINDINGS)),
        ("Mark from a file", list(IdListScreen.BINDINGS)),
        ("Help", list(HelpScreen.BINDINGS)),
    )
    # What Enter and Tab do in text fields (handled by the fields, so in no binding list).
    field_keys = {
        "Find bar": [("⏎", "back to the table, keeping the text")],
        "Conditions panel": [("⏎", "apply (only a complete, valid set is applied)"),
                             ("tab / shift+tab", "next / previous field; leaving a field applies it too"),
                             ("← / →, ⏎", "choose the Cl2 phase or solvent (in those fields)"),
                             ("clean at %", "the threshold: the share of the major monohalide at which a reagent's "
                                            "outcome is clean rather than mixture, for every reagent")],
        "Filter form": [("⏎", "apply (in a text field)"), ("space", "tick / untick"), ("tab", "next field"),
                        ("← / →, ⏎", "choose in a row of ( ) choices: site match, a flag's either / has it / "
                                     "lacks it, duplicates all / hide repeats / only repeats")],
        "Export form": [("⏎", "write (in the file field)"), ("↑ / ↓, ⏎", "choose shortlist or current view"),
                        ("tab", "next field")],
        "Replace? dialog": [("⏎", "press the focused button (Keep)")],
        "Mark from a file": [("⏎", "read the file and mark its rows (one ID a line, or a CSV/TSV with the ID column)")],
    }
    parts: list = []
    for title, bindings in groups:
        table = Table(box=None, show_header=False, padding=(0, 1), pad_edge=True)
        table.add_column("key", style="bold", no_wrap=True, min_width=14)
        table.add_column("does")
        for b in bindings:
            keys = " / ".join(app.get_key_display(Binding(k.strip(), b.action)) for k in b.key.split(","))
            table.add_row(keys, b.description)
        for keys, does in field_keys.get(title, []):
            table.add_row(keys, does)
        parts += [Text(title, style="bold underline"), table]
    return Group(*parts)


class HelpScreen(Screen):
    """Keys, verdicts, views, sources and the safety caution."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "close", "Back"),
    ]

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="help-body"):
            yield Static("halosift help", id="help-title")
            yield Static(_bindings_table(self.app), id="help-keys")
            yield Static(self._verdicts(), id="help-verdicts")
            yield Static(self._views(), id="help-views")
            yield Static(self._columns(), id="help-columns")
            yield Static(self._sources(), id="help-sources")
            yield Static(self._caution(), id="help-caution")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one("#help-body").focus()

    @staticmethod
    def _section(title: str, rows: list[tuple[str, str]]) -> Table:
        table = Table(box=None, show_header=False, padding=(0, 1), title=title, title_justify="left",
                      title_style="bold underline")
        table.add_column("name", style="bold", no_wrap=True)
        table.add_column("meaning")
        for name, text in rows:
            table.add_row(name, text)
        return table

    def _verdicts(self) -> Table:
        threshold = getattr(self.app.conditions, "threshold_pct", None)
        shown = "the threshold" if threshold is None else f"{threshold:g}"
        rows = [(v, VERDICT_DOCS[v].format(threshold=shown)) for v in VERDICT_DOCS]
        rows.append(("Serves", f"the reagent offered: first of {', '.join(OUTCOME_REAGENTS)} whose outcome is clean; a "
                     "mixture or ruled-out reagent is never offered"))
        rows.append(("outcomes", "Cl2, Br2, SO2Cl2 and NBS columns: what each reagent does; the verdict and "
                     "Serves are read off them only, and a reagent is offered only when it is clean; a ruled-out "
                     "reagent's major, % and polyhalide cells are blank (they sort last)"))
        rows += [(f"  {k}", v.format(threshold=shown)) for k, v in OUTCOME_DOCS.items()]
        rows.append(("Br2 stereo", f"stereo outcome of bromination's major product; "
                     f"“no new stereocentre” filter keeps {ACHIRAL} only"))
        rows += [(f"  {k}", v) for k, v in STEREO_DOCS.items()]
        return self._section("Verdicts (per row, under the current conditions)", rows)

    def _views(self) -> Table:
        rows = [(k, v) for k, v in VIEW_DOCS.items()]
        rows.append(("counts", "the top line always shows all rows, screened, rejected, shown and marked"))
        rows.append(("marks", "a / u mark or unmark every shown row, m marks the rows an ID-list file names; "
                     "z undoes the last of these (up to 20 steps)"))
        rows.append(("sessions", "marks, sort, filters, view, columns and conditions are saved per library file "
                     "(in the user's data folder; HALOSIFT_SESSION_DIR overrides it) and restored when the same, "
                     "unchanged file is opened again; N or halosift browse --fresh starts fresh"))
        rows.append(("exports", "rows are written in the table's order (its sort, and for the view its filters); "
                     "the export form and the file's metadata say which"))
        rows.append(("site detail", "the products are worked out in the background (the header says working…); "
                     "Esc goes back at once, n / p move the table's cursor too"))
        rows.append(("conditions", "t opens the panel; a value applies on Enter or on leaving its field, and only "
                     "when every field is complete and valid; refused and pending values are named"))
        mode = getattr(self.app, "graphics", None)
        rows.append(("drawings", "the site detail draws the structure, sites labelled P1 … as in the products "
                     "table, as an image where the terminal shows inline images (Sixel or Kitty graphics; now: "
                     + (mode or "off") + "); elsewhere, and with halosift browse --no-images or "
                     "HALOSIFT_IMAGES=off, in text (braille dots)"))
        return self._section("Views (v cycles them), marks and sessions", rows)

    def _columns(self) -> Table:
        from halosift.engine.special_sites import FLAG_NOTES

        rows = [
            ("confidence", CONFIDENCE_NOTE + "; shown in the site detail and with o"),
            ("flags", "special-site warnings (shown in the site detail and with o): "
             + "; ".join(f"{k} — {v.note.split(':')[0]}" for k, v in FLAG_NOTES.items())),
            ("why", "per reagent, why its outcome is ruled-out: addition to C=C below the temperature where "
             "allylic substitution wins, addition to C≡C, cyclopropane ring opening (Br2, NBS), addition across "
             "a strained central bond, strained cage (not modelled), cyclopropylmethyl ring opening, no abstractable "
             "(or, for NBS, allylic/benzylic) C–H"),
            ("SO2Cl2 major / %", "major monochloride under SO2Cl2, weighed as Cl· at its own temperature"),
            ("NBS major / %", "major allylic/benzylic bromide under NBS (both allyl termini weighed)"),
            ("Cl2/Br2 poly % prod", "polyhalide, percent of the halogenated product, at 1 : 1 substrate : halogen "
                                    "with all halogen consumed (estimate; the detail shows the same figure)"),
        ]
        return self._section("More columns (o shows them)", rows)

    def _sources(self) -> Table:
        rows = sources()
        rows.append(("Percentages", "H count × rate per H at each temperature, normalised per substrate; "
                     "estimates, not yields"))
        return self._section("The model's sources, in brief", rows)

    @staticmethod
    def _caution() -> Text:
        from halosift.engine import CAUTION

        return Text(CAUTION, style="bold")

    def action_close(self) -> None:
        """Back to where help was opened."""
        self.dismiss()
