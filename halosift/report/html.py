"""Page assembly: one self-contained HTML file (inline CSS and SVG, no scripts) for a screened library."""

from __future__ import annotations

import math
from collections import Counter
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from html import escape
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from halosift.engine.outcomes import shown_pct
from halosift.engine.reagents import reagent_name
from halosift.engine.smiles_text import break_quality, smiles_tokens
from halosift.report.charts import bar_chart, hbar_chart, histogram
from halosift.report.drawing import SiteMark, colour_hex, structure_svg
from halosift.report.style import STYLESHEET

if TYPE_CHECKING:
    from halosift.engine import Conditions, Library

#: Default cap on per-substrate sections (a printed report beyond this is rarely read).
DEFAULT_MAX_PAGES = 200
#: Rejected rows listed by name before the rest are only counted.
REJECTED_LISTED = 1000
#: Highest product count with its own bar; larger counts share the last bar.
PRODUCTS_BARS = 10

def verdict_meaning(threshold_pct: float) -> dict[str, str]:
    """What each verdict means, written out (the report never relies on colour); engine.outcomes words them."""
    from halosift.engine.outcomes import verdict_docs

    return verdict_docs(threshold_pct)


@dataclass(frozen=True)
class Report:
    """A rendered report and what it covers."""

    html: str
    """The whole page."""
    n_rows: int
    """Rows in the library (all counted in the summary)."""
    n_selected: int
    """Rows the selection kept (modelled and rejected)."""
    n_sections: int
    """Substrate sections written."""
    n_left_out: int
    """Modelled rows of the selection left out by the page cap."""
    left_out_by_verdict: dict[str, int] = field(default_factory=dict)
    """Rows left out by the page cap, per verdict group (groups with none left out are absent)."""


def _e(value: object) -> str:
    return escape("" if value is None else str(value), quote=True)


#: SMILES tokens: bracket atoms, two-letter elements, one-letter and aromatic atoms, %nn and single ring digits,
#: bonds and branches. A line may break only between tokens, never inside one (Cl, Br, [C@@H]).
def smiles_html(smiles: object) -> str:
    """Escaped SMILES with <wbr> at the break points of :func:`halosift.engine.smiles_text.break_quality`."""
    if smiles is None or (isinstance(smiles, float) and smiles != smiles):
        return ""
    tokens = smiles_tokens(str(smiles))
    out: list[str] = []
    for k, token in enumerate(tokens):
        out.append(_e(token))
        if k + 1 < len(tokens) and break_quality(tokens, k):
            out.append("<wbr>")
    return "".join(out)


def _letters(i: int) -> str:
    """Label of site i (0-based): P1, P2 …, the app's names for the same products (engine.labels)."""
    from halosift.engine.labels import product_label

    return product_label(i + 1)


def _pct(value: float) -> str:
    """Percent with one decimal, rounded as in every file and screen (outcomes are decided on it)."""
    if value != value:
        return "–"
    return f"{float(shown_pct(np.array([value]))[0]):.1f}"


def rejection_kinds(library: Library) -> list[str]:
    """Per input row, the short kind of rejection ('' when modelled): the engine's reason code, or 'unreadable row'."""
    codes = library.perception.structures["reason_code"].to_numpy(dtype=object)
    status = library.perception.structures["status"].to_numpy(dtype=object)
    out = []
    for row, struct in enumerate(library.row_struct):
        if library.read_errors[row]:
            out.append("unreadable row")
        elif struct < 0:
            out.append("not modelled")
        elif status[struct] != "ok":
            out.append(str(codes[struct]) or "rejected")
        else:
            out.append("")
    return out


def _row_ids(library: Library) -> list[str]:
    if library.id_column is None:
        return [f"row {i + 1}" for i in range(len(library))]
    return [
        f"row {i + 1}" if v is None or (isinstance(v, float) and v != v) or str(v).strip() == "" else str(v)
        for i, v in enumerate(library.input[library.id_column].tolist())
    ]


# ---------------------------------------------------------------------------- header and summary


def _caution_body(caution: str) -> str:
    """The caution without its leading 'SAFETY:' (the box has its own heading)."""
    head, sep, rest = caution.partition(":")
    return rest.strip() if sep and head.strip().upper() == "SAFETY" else caution


def _header(conditions: Conditions, meta: dict[str, str], source: str, selection: str) -> str:
    from halosift.engine.provenance import MODEL_SOURCES

    warnings = conditions.warnings()
    warn = ""
    if warnings:
        warn = '<div class="warnings" role="note"><p><strong>Warning:</strong></p>' + "".join(
            f"<p>{_e(w)}</p>" for w in warnings) + "</div>"
    sources = "".join(f"<li>{_e(s.strip())}</li>" for s in MODEL_SOURCES.split(";") if s.strip())
    return f"""<header>
<h1>Halogenation outlook</h1>
<p class="lede">Predicted monohalides from free-radical chlorination and bromination, by halosift.</p>
<p class="caution" role="note"><strong>Safety</strong>{_e(_caution_body(meta["caution"]))}</p>
{warn}<dl class="facts">
<dt>Conditions</dt><dd data-field="conditions">{_e(meta["conditions"])}</dd>
<dt>Library</dt><dd data-field="library">{_e(source)}</dd>
<dt>Reported rows</dt><dd>{_e(selection)}</dd>
<dt>halosift version</dt><dd data-field="version">{_e(meta["version"])}</dd>
<dt>Created (UTC)</dt><dd data-field="created">{_e(meta["created_utc"])}</dd>
</dl>
<div class="sources"><strong>Model sources</strong><ol>{sources}</ol></div>
</header>"""


def _count_row(label: str, key: str, value: int, meaning: str = "") -> str:
    return (f'<tr><th scope="row">{_e(label)}</th><td class="num" data-count="{_e(key)}">{value:,}</td>'
            f"<td>{_e(meaning)}</td></tr>")


def _summary(result: pd.DataFrame, kinds: list[str], conditions: Conditions) -> str:
    from halosift.engine import VERDICTS

    n = len(result)
    ok = (result["status"] == "ok").to_numpy()
    verdicts = result.loc[ok, "verdict"].value_counts()
    dup = int(result["duplicate_of"].notna().sum())
    rows = [
        _count_row("rows read", "rows", n, "every input row, modelled or not"),
        _count_row("modelled", "ok", int(ok.sum()), "hydrocarbons the model covers"),
        _count_row("rejected", "rejected", int((~ok).sum()), "each with its reason (below)"),
    ]
    meanings = verdict_meaning(conditions.threshold_pct)
    for v in VERDICTS:
        rows.append(_count_row(f"verdict: {v}", v, int(verdicts.get(v, 0)), meanings[v]))
    rows.append(_count_row("repeated structures", "duplicates", dup, "rows whose structure appeared on an earlier row"))
    counts_table = ('<table class="counts"><thead><tr><th>rows</th><th class="num">count</th><th>meaning</th></tr>'
                    "</thead><tbody>" + "".join(rows) + "</tbody></table>")

    verdict_chart = bar_chart(
        [*VERDICTS, "rejected"], [*(int(verdicts.get(v, 0)) for v in VERDICTS), int((~ok).sum())],
        title="Rows by verdict", x_label="verdict",
    )
    has_h = ok & (result["n_products"].fillna(0).to_numpy(dtype=np.int64) > 0)
    # Only rows where Br2 substitutes: a ruled-out row has no split (its share column is empty).
    br2_applies = has_h & (result["br2_outcome"] != "ruled-out").to_numpy() if "br2_outcome" in result else has_h
    selectivity = histogram(
        result.loc[br2_applies, "br2_major_pct"].to_numpy(dtype=float).tolist(),
        title="Bromination selectivity", x_label="share of the major monobromide under Br2, %",
    )
    n_products = result.loc[ok, "n_products"].fillna(0).to_numpy(dtype=np.int64)
    top = min(int(n_products.max()) if len(n_products) else 0, PRODUCTS_BARS)
    labels = [str(i) for i in range(top + 1)]
    if len(n_products) and n_products.max() > PRODUCTS_BARS:
        labels[-1] = f"{PRODUCTS_BARS}+"
    counts = [int((np.minimum(n_products, PRODUCTS_BARS) == i).sum()) for i in range(top + 1)]
    products_chart = bar_chart(labels, counts, title="Monohalides per substrate", x_label="distinct monohalides")
    by_kind = Counter(k for k in kinds if k)
    if by_kind:
        common = by_kind.most_common()
        rejected_chart = hbar_chart([k for k, _ in common], [c for _, c in common], title="Rejected rows by reason")
    else:
        rejected_chart = '<p class="note">No rows were rejected.</p>'
    figures = [
        (verdict_chart, "Modelled rows by verdict, and rejected rows."),
        (selectivity, f"Modelled rows with abstractable C–H where Br2 applies ({int(br2_applies.sum()):,}; "
                      f"{int((has_h & ~br2_applies).sum()):,} with Br2 ruled out are not counted), "
                      "by the share of their major monobromide, in 10-point bins."),
        (products_chart, "Modelled rows by how many distinct monohalides can form."),
        (rejected_chart, "Rejected rows by the kind of problem."),
    ]
    charts = "".join(f"<figure>{svg}<figcaption>{_e(cap)}</figcaption></figure>" for svg, cap in figures)
    return (f'<section class="summary"><h2>Library summary</h2>'
            f"<p>All {n:,} rows of the library are counted here, whatever the report's selection.</p>"
            f'{counts_table}<div class="charts">{charts}</div></section>')


def _key(conditions: Conditions) -> str:
    from halosift.engine.outcomes import outcome_docs

    items = "".join(f"<dt>{_e(v)}</dt><dd>{_e(m)}.</dd>" for v, m in verdict_meaning(conditions.threshold_pct).items())
    # The engine's words speak of the screen's columns; an entry gives the reason in brackets after the outcome.
    outcome_items = "".join(
        f"<dt>{_e(v)}</dt><dd>{_e(m.replace('the reason column says why', 'the reason follows in brackets'))}.</dd>"
        for v, m in outcome_docs(conditions.threshold_pct).items()
    )
    return f"""<section class="key"><h2>Reading the substrate entries</h2>
<p>Entries are grouped by verdict, best candidates first: one product by symmetry, then selective with the
reagent named, then mixtures, ruled-out and inert substrates; within a group the highest share of the major
monohalide (of the reagent offered; for a mixture, of the best reagent not ruled out) comes first. A page limit
applies after this grouping, and the page says how many entries of each group it left out.</p>
<p>Each entry draws the substrate and marks every distinct abstractable C–H site (one representative carbon per
set of equivalent carbons) with a tint for its site class and a label (P1, P2 …, as in the app); the label leads the site's row in the
products table, which gives the predicted shares: % Cl2 is the site's share of the monochlorides under Cl2,
% Br2 its share of the monobromides under Br2. Tables name the monochloride; the monobromide is the same SMILES
with Br in place of Cl. The site class is also named in the legend and the table. C–H bonds on sp2 and sp
carbons (aryl, vinyl, alkynyl) are not abstracted and are not listed. Where the substrate has allylic or
benzylic C–H a second table gives the NBS monobromides (Wohl–Ziegler), both ends of an allyl radical included
(Br at the radical carbon or with an allylic shift; the E/Z ratio of a moved C=C is not predicted, so E and Z are
counted as stereoisomers). These shares are of the monohalides only; the further
halogenation of a monohalide is estimated separately, as the polyhalide share of the halogenated product when
substrate and halogen are charged 1 : 1 and all the halogen reacts (competitive consecutive kinetics with an
estimated deactivation by the first halogen). A number after the stereo outcome counts the stereoisomers formed.
Flags name risks the percentages do not show, each with its explanation; every flag but bridgehead rules some
reagents out. SO2Cl2 is weighed as Cl· at its own temperature.</p>
<p>Verdicts, read off the outcomes of Cl2, Br2, SO2Cl2 and NBS (a reagent is offered only when its outcome is
clean):</p>
<dl>{items}</dl>
<p>Outcome of each reagent, given in every entry:</p>
<dl>{outcome_items}</dl></section>"""


# ---------------------------------------------------------------------------- substrate sections


def _products_table(products: pd.DataFrame, letters: list[str], ruled: frozenset[str] = frozenset()) -> str:
    """The per-site monohalides; a reagent in ``ruled`` (outcome ruled-out) has no split: its column is blank."""
    if products.empty:
        return "<p>No abstractable C–H: no monohalide forms by radical abstraction.</p>"
    from halosift.engine.stereo import count_text

    body = []
    for letter, p in zip(letters, products.itertuples(index=False)):
        stereo = " ".join(filter(None, [str(p.stereo), count_text(str(p.stereo), int(p.n_stereoisomers))]))
        stereo += _exo_endo(str(p.site))
        body.append(
            f"<tr><td>{_e(letter)}</td><td class=\"smiles\">{smiles_html(p.product)}</td><td>{_e(p.site)}</td>"
            f'<td class="num">{int(p.h_count)}</td><td>{_e(stereo)}</td>'
            + "".join(f'<td class="num">{"–" if r in ruled else _pct(float(getattr(p, f"{r}_pct")))}</td>'
                      for r in ("cl2", "br2"))
            + "</tr>"
        )
    heads = "".join(f'<th class="num">% {name}{" (ruled out)" if r in ruled else ""}</th>'
                    for r, name in (("cl2", "Cl2"), ("br2", "Br2")))
    return ('<table class="products"><thead><tr><th>site</th><th>monochloride</th>'
            f'<th>class</th><th class="num">H</th><th>stereo outcome</th>{heads}'
            "</tr></thead><tbody>" + "".join(body) + "</tbody></table>")


def _major_html(result_row: pd.Series, reagent: str, name: str) -> str:
    """"Major under X: SMILES (share %)", or "X: ruled out (reason)" when the reagent's split does not apply."""
    if result_row.get(f"{reagent}_outcome") == "ruled-out":
        why = result_row.get(f"{reagent}_reason", "")
        return f"{name}: ruled out" + (f" ({_e(why)})" if isinstance(why, str) and why else "")
    stereo = result_row.get("stereo", "") if reagent == "br2" else ""
    tail = f", {_e(stereo)}" if isinstance(stereo, str) and stereo else ""
    return (f'Major under {name}: <span class="smiles">{smiles_html(result_row[f"{reagent}_major"])}</span> '
            f"({_pct(float(result_row[f'{reagent}_major_pct']))} %{tail})")


def _poly_line(result_row: pd.Series) -> str:
    """The polyhalide estimate of one entry (engine.polyhalogenation), '' when the screen gives none."""
    parts = []
    for reagent, name in (("cl2", "Cl2"), ("br2", "Br2")):
        value = result_row.get(f"{reagent}_poly_pct")
        if result_row.get(f"{reagent}_outcome") == "ruled-out":
            parts.append(f"{name} ruled out")
        elif value is not None and not pd.isna(value):
            parts.append(f"{name} {_pct(float(value))} %")
    if all(p.endswith("ruled out") for p in parts):  # nothing weighed: the outcomes line already says why
        return ""
    if not parts:
        return ""
    return (f'<p class="meta poly">Polyhalide at 1 : 1 substrate : halogen, all halogen consumed: '
            f'{" · ".join(parts)} of the halogenated product.</p>')


def _flags_list(flags: object) -> str:
    """Each special-site flag of an entry with its note (engine.special_sites), '' when none."""
    from halosift.engine.special_sites import FLAG_NOTES

    if not isinstance(flags, str) or not flags:
        return ""
    items = []
    for flag in flags.split(","):
        note = FLAG_NOTES.get(flag)
        items.append(f"<li><strong>{_e(flag)}</strong>: {_e(note.note if note else 'see engine.special_sites')}</li>")
    return f'<div class="flags" role="note"><p>Flags:</p><ul>{"".join(items)}</ul></div>'


def _nbs_table(library: Library, row: int, conditions: Conditions) -> str:
    """The NBS monobromides of one entry (Wohl–Ziegler: allylic/benzylic C–H, allylic shift included)."""
    from halosift.engine.stereo import count_text

    nbs = library.nbs_products(row, conditions)
    if nbs.empty:
        return ""
    body = "".join(
        f'<tr><td class="smiles">{smiles_html(p.product)}</td><td>{_e(p.site)}</td><td>{_e(p.terminus)}</td>'
        f'<td>{_e(" ".join(filter(None, [str(p.stereo), count_text(str(p.stereo), int(p.n_stereoisomers))])))}</td>'
        f'<td class="num">{_pct(float(p.nbs_pct))}</td></tr>'
        for p in nbs.itertuples(index=False)
    )
    return (f'<table class="products nbs"><caption>NBS at {conditions.nbs_temp_c:g} °C: monobromides</caption>'
            '<thead><tr><th>monobromide</th><th>radical class</th><th>Br at</th><th>stereo outcome</th>'
            '<th class="num">% NBS</th></tr></thead><tbody>' + body + "</tbody></table>")


def _exo_endo(site: str) -> str:
    """'; exo:endo 70:30 Cl2, 95:5 Br2' for a norbornane 2-halide (engine.rates.exo_fraction), '' otherwise."""
    from halosift.engine.rates import exo_fraction

    splits = []
    for radical, name in (("cl", "Cl2"), ("br", "Br2")):
        f = exo_fraction(site, radical)
        if f is not None:
            splits.append(f"{100 * f:.0f}:{100 * (1 - f):.0f} {name}")
    return "; exo:endo " + ", ".join(splits) if splits else ""


def _legend(sites: Sequence[str]) -> str:
    items = "".join(
        f'<li><span class="swatch" style="background:{colour_hex(s)}"></span>{_e(s)}</li>'
        for s in dict.fromkeys(sites)
    )
    return f'<ul class="legend" aria-label="site classes">{items}</ul>' if items else ""


def _section(library: Library, row: int, row_id: str, result_row: pd.Series, conditions: Conditions,
             warnings: list[str]) -> str:
    from halosift.engine import ABSTRACTABLE

    products = library.products(row, conditions)
    products = products[products["site"].isin(ABSTRACTABLE)].reset_index(drop=True)
    letters = [_letters(i) for i in range(len(products))]
    # A reagent ruled out has no split: its shares are left out of the table and the drawing's description.
    ruled = frozenset(r for r in ("cl2", "br2") if result_row.get(f"{r}_outcome") == "ruled-out")
    marks = [
        SiteMark(int(p.atom), letter, str(p.site), *(math.nan if r in ruled else float(getattr(p, f"{r}_pct"))
                                                     for r in ("cl2", "br2")))
        for letter, p in zip(letters, products.itertuples(index=False))
    ]
    canonical = str(result_row["canonical_smiles"])
    try:
        drawing = structure_svg(canonical, marks, title=f"{row_id}: {canonical}")
    except ValueError as exc:
        drawing = f'<p class="note">No drawing: {_e(exc)}</p>'
    verdict = str(result_row["verdict"])
    raw_smiles = library.input[library.smiles_column].iloc[row]
    lines = [f'<p class="meta">Input row {row + 1} · input SMILES <span class="smiles">{smiles_html(raw_smiles)}</span>'
             f' · canonical <span class="smiles">{smiles_html(canonical)}</span></p>']
    dup = result_row["duplicate_of"]
    if not pd.isna(dup):
        lines.append(f'<p class="meta">Same structure as input row {int(dup)}.</p>')
    if len(products):
        majors = [_major_html(result_row, "cl2", "Cl2"), _major_html(result_row, "br2", "Br2")]
        lines.append(f'<p class="meta">{" · ".join(majors)}</p>')
    outcomes = []
    from halosift.engine.outcomes import OUTCOME_REAGENTS
    from halosift.engine.reagents import REAGENT_NAMES

    for r in OUTCOME_REAGENTS:
        outcome = result_row.get(f"{r}_outcome", "")
        if isinstance(outcome, str) and outcome:
            why = result_row.get(f"{r}_reason", "")
            outcomes.append(f"{REAGENT_NAMES[r]}: {outcome}" + (f" ({why})" if isinstance(why, str) and why else ""))
    if outcomes:
        lines.append(f'<p class="meta">Outcomes: {_e("; ".join(outcomes))}</p>')
    extras = []
    for column, label in (("serves", "Serves"), ("confidence", "Confidence")):
        value = result_row.get(column, "")
        if isinstance(value, str) and value:
            extras.append(f"{label}: {_e(reagent_name(value) if column == 'serves' else value)}")
    nbs_major = result_row.get("nbs_major", "")
    if isinstance(nbs_major, str) and nbs_major:
        extras.append(_major_html(result_row, "nbs", "NBS"))
    if extras:
        lines.append(f'<p class="meta">{" · ".join(extras)}</p>')
    poly = _poly_line(result_row)
    if poly:
        lines.append(poly)
    flags = _flags_list(result_row.get("flags", ""))
    warn = ""
    if warnings:
        warn = '<div class="warnings" role="note">' + "".join(f"<p>Warning: {_e(w)}</p>" for w in warnings) + "</div>"
    return (
        f'<section class="substrate" data-row="{row + 1}" id="row-{row + 1}">'
        f'<h3>{_e(row_id)} <span class="verdict verdict-{_e(verdict)}">verdict: {_e(verdict)}</span></h3>'
        + "".join(lines)
        + f'<div class="substrate-body"><figure>{drawing}{_legend([m.site for m in marks])}</figure>'
        f"<div>{_products_table(products, letters, ruled)}{_nbs_table(library, row, conditions)}</div></div>"
        f"{flags}{warn}</section>"
    )


def _rejected_table(library: Library, rows: np.ndarray, ids: list[str], result: pd.DataFrame) -> str:
    if not len(rows):
        return ""
    shown = rows[:REJECTED_LISTED]
    raw = library.input[library.smiles_column]
    body = "".join(
        f'<tr><td class="num">{r + 1}</td><td>{_e(ids[r])}</td><td class="smiles">{smiles_html(raw.iloc[r])}</td>'
        f"<td>{_e(result['reason'].iloc[r])}</td></tr>"
        for r in shown
    )
    more = ""
    if len(rows) > len(shown):
        more = (f'<p class="note cap-note">{len(rows) - len(shown):,} more rejected rows are listed in the '
                f'<a href="#appendix">appendix</a>.</p>')
    return (f'<section class="rejected"><h2>Rejected rows in this report ({len(rows):,})</h2>'
            '<table><thead><tr><th class="num">row</th><th>ID</th><th>input SMILES</th><th>reason</th></tr></thead>'
            f"<tbody>{body}</tbody></table>{more}</section>")


def _appendix(library: Library, left: Sequence[tuple[str, np.ndarray]], rejected: np.ndarray, ids: list[str],
              result: pd.DataFrame) -> str:
    """Every selected row without an entry, one compact line each, so the report leaves no row out.

    ``left`` holds the modelled rows the page cap left out, per verdict group in
    :data:`GROUPS` order and in the entries' order (best first); ``rejected`` the
    rejected rows the rejected table does not list. Each line gives the input row
    (1-based), ID, input SMILES, verdict and the reagent offered, or for a
    rejected row its status and reason.
    """
    n_left = sum(len(rows) for _, rows in left)
    if not n_left and not len(rejected):
        return ""
    raw = library.input[library.smiles_column]
    verdicts = result["verdict"].to_numpy(dtype=object)
    serves = result["serves"].to_numpy(dtype=object)
    status = result["status"].to_numpy(dtype=object)
    reasons = result["reason"].to_numpy(dtype=object)
    headings = dict(GROUPS)
    head = ('<table class="appendix"><thead><tr><th class="num">row</th><th>ID</th><th>input SMILES</th>'
            "<th>{}</th><th>{}</th></tr></thead><tbody>")
    parts = [f'<section class="appendix" id="appendix"><h2>Appendix: rows without an entry '
             f"({n_left + len(rejected):,})</h2>"
             '<p class="note">One line per selected row that has no entry above, grouped and ordered as the '
             "entries are; the summary counts them all.</p>"]
    def line(r: int, first: str, second: str) -> str:
        """One appendix line: input row, ID, SMILES and two words (verdict and serves, or status and reason)."""
        return (f'<tr data-row="{r + 1}"><td class="num">{r + 1}</td><td>{_e(ids[r])}</td>'
                f'<td class="smiles">{smiles_html(raw.iloc[r])}</td><td>{_e(first)}</td><td>{_e(second)}</td></tr>')

    for verdict, rows in left:
        if not len(rows):
            continue
        lines = "".join(line(r, verdicts[r], reagent_name(serves[r]) or "none") for r in rows)
        parts.append(f'<h3 data-verdict="{_e(verdict)}">{_e(headings[verdict])} ({len(rows):,})</h3>'
                     + head.format("verdict", "serves") + lines + "</tbody></table>")
    if len(rejected):
        lines = "".join(line(r, status[r], reasons[r]) for r in rejected)
        parts.append(f'<h3 data-verdict="rejected">Rejected rows beyond the table above ({len(rejected):,})</h3>'
                     + head.format("status", "reason") + lines + "</tbody></table>")
    parts.append("</section>")
    return "".join(parts)


# ---------------------------------------------------------------------------- the page


#: Section groups, best candidates first: (verdict, heading).
GROUPS: tuple[tuple[str, str], ...] = (
    ("by-symmetry", "One product by symmetry"),
    ("selective", "Selective with the reagent named"),
    ("mixture", "Mixtures"),
    ("ruled-out", "Ruled out: another pathway"),
    ("inert", "Inert: no abstractable C–H"),
)

ProgressFn = Callable[[int, int], None]


def source_name(source: str) -> str:
    """What the page calls its input: the file name only, never the folder it sits in (a report is forwarded)."""
    from pathlib import PurePath

    text = str(source).strip()
    if not text:
        return ""
    if text == "-":
        return "standard input"
    name = PurePath(text.replace("\\", "/")).name
    return name or text


def _best_share(result: pd.DataFrame, rows: np.ndarray) -> np.ndarray:
    """Per row, the share of the major monohalide that ranks it in its group (higher first).

    By-symmetry and selective rows: the reagent offered (``serves``). Mixtures:
    the highest major share among reagents not ruled out. Others: 0 (input order).
    """
    from halosift.engine.outcomes import OUTCOME_REAGENTS

    sub = result.iloc[rows]
    share = {r: sub[f"{r}_major_pct"].to_numpy(dtype=float) for r in OUTCOME_REAGENTS}
    weighed = {r: (sub[f"{r}_outcome"] != "ruled-out").to_numpy() for r in OUTCOME_REAGENTS}
    serves = sub["serves"].to_numpy(dtype=object)
    out = np.zeros(len(rows))
    for r in OUTCOME_REAGENTS:
        offered = serves == r
        out[offered] = share[r][offered]
    mixture = (sub["verdict"] == "mixture").to_numpy()
    best = np.zeros(len(rows))
    for r in OUTCOME_REAGENTS:
        best = np.fmax(best, np.where(weighed[r], share[r], np.nan))
    out[mixture] = best[mixture]
    return np.nan_to_num(out, nan=0.0)


def group_rows(result: pd.DataFrame, rows: np.ndarray) -> list[tuple[str, np.ndarray]]:
    """Modelled ``rows`` per verdict group in :data:`GROUPS` order, each best first (ties in input order)."""
    verdicts = result["verdict"].to_numpy(dtype=object)[rows]
    share = _best_share(result, rows)
    groups = []
    for verdict, _ in GROUPS:
        mine = np.flatnonzero(verdicts == verdict)
        order = np.lexsort((rows[mine], -share[mine]))  # last key first: share descending, then input row
        groups.append((verdict, rows[mine][order]))
    return groups


def render_report(
    library: Library,
    conditions: Conditions,
    *,
    rows: Sequence[int] | np.ndarray | None = None,
    selection: str = "all rows",
    source: str = "",
    max_pages: int = DEFAULT_MAX_PAGES,
    missing_ids: Sequence[str] = (),
    progress: ProgressFn | None = None,
) -> Report:
    """The report page for ``library`` under ``conditions``.

    The summary counts every row of the library; one section is written per
    modelled row of ``rows`` (0-based input rows; None: all), grouped by verdict
    (:data:`GROUPS`, best candidates first; within a group the highest major
    share first), and the first ``max_pages`` of that order are written, with a
    note saying how many of each group were left out. Rejected rows of the
    selection are listed with their reasons. ``source`` is shown by its file name
    only. ``progress(done, total)`` is called as the entries are drawn.
    """
    from halosift.engine.provenance import export_metadata

    if max_pages < 0:
        raise ValueError("the page cap must be 0 or more")
    result = library.evaluate(conditions)
    chosen = np.arange(len(library), dtype=np.int64) if rows is None else np.unique(np.asarray(rows, dtype=np.int64))
    if len(chosen) and (chosen[0] < 0 or chosen[-1] >= len(library)):
        raise ValueError("report rows must be input rows of the library")
    name = source_name(source)
    meta = export_metadata(conditions, source=name)
    ids = _row_ids(library)
    kinds = rejection_kinds(library)
    ok = (result["status"] == "ok").to_numpy()
    modelled = chosen[ok[chosen]]
    rejected = chosen[~ok[chosen]]
    groups = group_rows(result, modelled)
    room = max_pages
    kept: list[tuple[str, np.ndarray, int]] = []  # verdict, rows shown, rows of the group left out
    for verdict, members in groups:
        take = members[:room]
        room -= len(take)
        kept.append((verdict, take, len(members) - len(take)))
    shown = [int(r) for _, take, _ in kept for r in take]
    left_out = len(modelled) - len(shown)
    warnings = conditions.warnings()
    total = len(shown) + 1
    if progress is not None:
        progress(0, total)

    notes = []
    if missing_ids:
        listed = ", ".join(missing_ids[:20]) + (f" and {len(missing_ids) - 20:,} more" if len(missing_ids) > 20 else "")
        some = "1 ID from the list is" if len(missing_ids) == 1 else f"{len(missing_ids):,} IDs from the list are"
        notes.append(f'<p class="note missing-ids">{some} not in the library: {_e(listed)}.</p>')
    if not len(modelled):
        notes.append('<p class="note">No modelled substrate matches this report\'s selection.</p>')
    cap = ""
    if left_out:
        per_group = "; ".join(f"{n:,} {v}" for v, _, n in kept if n)
        cap = (f'<p class="note cap-note">{len(shown):,} of {len(modelled):,} selected substrates are shown; '
               f"{left_out:,} more were left out by the limit of {max_pages:,} substrate entries ({per_group}). "
               "Entries are grouped by verdict, best candidates first, and the limit applies after grouping; "
               'every row left out has one line in the <a href="#appendix">appendix</a>.</p>')
    headings = dict(GROUPS)
    parts: list[str] = []
    done = 0
    for verdict, take, missed in kept:
        n_group = len(take) + missed
        if not n_group:
            continue
        count = f"{len(take):,} of {n_group:,}" if missed else f"{n_group:,}"
        parts.append(f'<h2 class="group" id="group-{verdict}" data-verdict="{verdict}">'
                     f"{_e(headings[verdict])} ({count})</h2>")
        for r in take:
            parts.append(_section(library, int(r), ids[r], result.iloc[r], conditions, warnings))
            done += 1
            if progress is not None:
                progress(done, total)
        if missed:
            parts.append(f'<p class="note group-cap">{missed:,} more {_e(verdict)} '
                         f'{"entry was" if missed == 1 else "entries were"} left out by the page limit '
                         '(listed in the <a href="#appendix">appendix</a>).</p>')
    sections = "\n".join(parts)
    title = f"halosift report: {name}" if name else "halosift report"
    html = f"""<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="halosift {_e(meta["version"])}">
<title>{_e(title)}</title>
<style>{STYLESHEET}</style>
</head>
<body>
{_header(conditions, meta, name or "in-memory table", selection)}
<main>
{_summary(result, kinds, conditions)}
{_key(conditions)}
<h2>Substrates ({len(shown):,} of {len(modelled):,} selected)</h2>
{"".join(notes)}{cap}
{sections}
{cap}
{_rejected_table(library, rejected, ids, result)}
{_appendix(library, [(v, members[len(take):]) for (v, members), (_, take, _) in zip(groups, kept)],
           rejected[REJECTED_LISTED:], ids, result)}
</main>
<footer><p>{_e(meta["caution"])}</p><p>Written by halosift {_e(meta["version"])} on
{_e(meta["created_utc"])}; {_e(meta["conditions"])}.</p></footer>
</body>
</html>
"""
    if progress is not None:
        progress(total, total)
    return Report(html=html, n_rows=len(library), n_selected=len(chosen), n_sections=len(shown), n_left_out=left_out,
                  left_out_by_verdict={v: n for v, _, n in kept if n})
