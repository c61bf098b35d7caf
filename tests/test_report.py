"""The HTML report: well-formed page and drawings, counts that agree with screen, filters, cap, one-line errors."""

from __future__ import annotations

import html
import re
import subprocess
import sys
import xml.etree.ElementTree as ET
from collections import Counter
from html.parser import HTMLParser
from pathlib import Path

import pandas as pd
import pytest
from halosift.engine.provenance import MODEL_SOURCES
from halosift.engine.reagents import reagent_name

from halosift import engine
from halosift.cli import main
from halosift.report import render_report
from halosift.report.charts import histogram, nice_ticks

#: An invented supplier's list (IDs made up): every verdict, a repeated structure and several rejections.
ROWS = [
    ("KV-101", "CC"),              # by-symmetry
    ("KV-102", "CCC"),             # selective (Br2)
    ("KV-103", "CC(C)CC"),         # mixture? decided by the engine, not here
    ("KV-104", "Cc1ccccc1"),       # by-symmetry (benzylic)
    ("KV-105", "c1ccccc1"),        # inert
    ("KV-106", "CCCCC"),           # mixture
    ("KV-107", "CCO"),             # rejected: oxygen
    ("KV-108", "C1CC"),            # rejected: unparsable
    ("KV-109", "CCC"),             # repeats KV-102
    ("KV-110", "C[C@H](CC)C=C"),   # stereo-defined, allylic: Cl2/Br2 add to its C=C
    ("KV-111", "[CH3]"),           # rejected: radical
    ("KV-112", "C1CCCCC1"),        # by-symmetry (one kind of CH2)
    ("KV-113", "CC1CC1"),          # ruled-out: the cyclopropylmethyl radical ring-opens
]

VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source", "track", "wbr"}


class TagChecker(HTMLParser):
    """Every non-void element is closed, in order; nothing is left open at the end."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.stack: list[tuple[str, tuple[int, int]]] = []
        self.problems: list[str] = []

    def handle_starttag(self, tag: str, attrs: list) -> None:
        if tag not in VOID:
            self.stack.append((tag, self.getpos()))

    def handle_endtag(self, tag: str) -> None:
        if tag in VOID:
            self.problems.append(f"end tag for void element {tag} at {self.getpos()}")
            return
        if not self.stack:
            self.problems.append(f"stray </{tag}> at {self.getpos()}")
            return
        top, pos = self.stack.pop()
        if top != tag:
            self.problems.append(f"</{tag}> at {self.getpos()} closes <{top}> opened at {pos}")

    def check(self, text: str) -> list[str]:
        self.feed(text)
        self.close()
        return self.problems + [f"<{t}> opened at {p} never closed" for t, p in self.stack]


def write_library(folder: Path) -> Path:
    path = folder / "kv_catalogue.csv"
    pd.DataFrame(ROWS, columns=["id", "smiles"]).to_csv(path, index=False)
    return path


def report(tmp_path: Path, *args: str) -> str:
    source = write_library(tmp_path)
    out = tmp_path / "report.html"
    assert main(["report", str(source), "-o", str(out), "--force", *args]) == 0
    return out.read_text(encoding="utf-8")


def svgs(page: str) -> list[str]:
    return re.findall(r"<svg\b.*?</svg>", page, flags=re.DOTALL)


def section_rows(page: str) -> list[int]:
    return [int(r) for r in re.findall(r'<section class="substrate" data-row="(\d+)"', page)]


def summary_counts(page: str) -> dict[str, int]:
    return {k: int(v.replace(",", "")) for k, v in re.findall(r'data-count="([\w-]+)">([\d,]+)<', page)}


GROUP_ORDER = ("by-symmetry", "selective", "mixture", "ruled-out", "inert")


def expected_order(screened: pd.DataFrame, rows: list[int] | None = None) -> list[int]:
    """1-based rows of the modelled entries in the order the report must give them, worked out here from the
    screen's own columns: verdict group (best first), then the ranking share descending, then input order."""
    keys = []
    for i in range(len(screened)) if rows is None else [r - 1 for r in rows]:
        row = screened.iloc[i]
        if row["status"] != "ok":
            continue
        verdict = row["verdict"]
        share = 0.0
        if verdict in ("by-symmetry", "selective"):
            share = float(row[f"{row['serves']}_major_pct"])
        elif verdict == "mixture":
            share = max(float(row[f"{r}_major_pct"]) for r in ("cl2", "br2", "so2cl2", "nbs")
                        if row[f"{r}_outcome"] != "ruled-out" and not pd.isna(row[f"{r}_major_pct"]))
        keys.append((GROUP_ORDER.index(verdict), -share, i + 1))
    return [k[2] for k in sorted(keys)]


def cli(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "halosift", *args], capture_output=True, text=True, timeout=300)


def test_page_is_well_formed_with_header_and_one_section_per_substrate(tmp_path: Path) -> None:
    page = report(tmp_path)
    assert page.startswith("<!DOCTYPE html>")
    assert TagChecker().check(page) == []
    drawings = svgs(page)
    for svg in drawings:
        ET.fromstring(svg)  # raises on malformed XML
    assert "<?xml" not in page and "<script" not in page.lower()
    screened = engine.screen(tmp_path / "kv_catalogue.csv")
    ok_rows = [i + 1 for i in range(len(screened)) if screened["status"].iloc[i] == "ok"]
    assert sorted(section_rows(page)) == ok_rows
    assert section_rows(page) == expected_order(screened)
    assert page.count('<svg class="structure"') == len(ok_rows)
    assert sum('class="chart"' in s for s in drawings) == 4
    text = html.unescape(page)
    assert engine.Conditions().describe() in text
    assert engine.CAUTION.partition(":")[2].strip() in text
    assert engine.__version__ in text
    for source in MODEL_SOURCES.split(";"):
        assert source.strip() in text
    # Rejected rows are listed with their reasons, so every input row appears somewhere.
    for i in range(len(screened)):
        if screened["status"].iloc[i] != "ok":
            assert screened["reason"].iloc[i] in text
    # Verdicts are written out, never carried by colour alone.
    for row in ok_rows:
        assert f"verdict: {screened['verdict'].iloc[row - 1]}</span>" in page


def test_summary_counts_equal_the_screen(tmp_path: Path) -> None:
    page = report(tmp_path, "--only", "by-symmetry")  # the selection must not change the summary
    screened = engine.screen(tmp_path / "kv_catalogue.csv")
    counts = summary_counts(page)
    ok = screened["status"] == "ok"
    assert counts["rows"] == len(ROWS) == len(screened)
    assert counts["ok"] == int(ok.sum())
    assert counts["rejected"] == int((~ok).sum()) == 3
    for verdict in engine.VERDICTS:
        assert counts[verdict] == int((screened["verdict"] == verdict).sum())
    assert counts["duplicates"] == int(screened["duplicate_of"].notna().sum()) == 1


def test_products_table_and_drawing_marks_agree_with_the_engine(tmp_path: Path) -> None:
    page = report(tmp_path, "--ids", str(_ids(tmp_path, ["KV-110"])))
    library = engine.load_library(tmp_path / "kv_catalogue.csv")
    products = library.products(9)
    products = products[products["site"].isin(engine.ABSTRACTABLE)]
    section = page[page.index('data-row="10"'):]
    section = section[: section.index("</section>")]
    (drawing,) = svgs(section)
    marked = sorted({int(a) for a in re.findall(r"<ellipse[^>]*class='atom-(\d+)'", drawing)})
    assert marked == sorted(products["atom"].tolist())
    main_table = section[section.index('<table class="products">'):]
    main_table = main_table[: main_table.index("</table>")]
    cells = [c.replace("<wbr>", "") for c in re.findall(r'<td class="smiles">(.*?)</td>', main_table)]
    assert cells == products["product"].tolist()
    # KV-110 has a C=C: Cl2 and Br2 add to it at 25/125 °C, so their columns show no shares (ruled out).
    assert "% Cl2 (ruled out)" in main_table and "% Br2 (ruled out)" in main_table
    for p in products.itertuples():
        assert f">{p.cl2_pct:.1f}<" not in main_table
    # The drawing carries one letter per site, at that site's atom, in table order; the shares are in the table.
    labels = re.findall(r'<text class="site-label" data-atom="(\d+)"[^>]*>(P\d+)</text>', drawing)
    assert labels == [(str(a), f"P{i}") for i, a in enumerate(products["atom"], start=1)]
    assert [c for c in re.findall(r"<tr><td>(P\d+)</td>", main_table)] == [b for _, b in labels]
    assert "%" not in "".join(re.findall(r"<text[^>]*>(.*?)</text>", drawing))
    desc = re.search(r"<desc>(.*?)</desc>", drawing).group(1)
    assert desc.count("Cl ") == len(products) and "P1: Cl" in desc
    # The NBS split of this allylic substrate: its own table, one row per NBS monobromide.
    nbs = library.nbs_products(9)
    nbs_table = section[section.index('<table class="products nbs">'):]
    nbs_table = nbs_table[: nbs_table.index("</table>")]
    cells = [c.replace("<wbr>", "") for c in re.findall(r'<td class="smiles">(.*?)</td>', nbs_table)]
    assert cells == nbs["product"].tolist() and len(cells) >= 2


def _ids(folder: Path, ids: list[str]) -> Path:
    path = folder / "picks.txt"
    path.write_text("\n".join(ids) + "\n\n", encoding="utf-8")
    return path


def test_only_filters_by_verdict(tmp_path: Path) -> None:
    page = report(tmp_path, "--only", "by-symmetry", "--only", "inert")
    screened = engine.screen(tmp_path / "kv_catalogue.csv")
    picked = [i + 1 for i, v in enumerate(screened["verdict"]) if v in ("by-symmetry", "inert")]
    expected = expected_order(screened, picked)
    assert expected and section_rows(page) == expected
    assert screened["verdict"].iloc[expected[-1] - 1] == "inert"  # by-symmetry first, inert last
    assert "verdict by-symmetry or inert" in page


def test_ids_filter_and_unknown_ids(tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    write_library(tmp_path)
    ids = _ids(tmp_path, ["  KV-106 ", "KV-101", "KV-999", "KV-107"])
    page = report(tmp_path, "--ids", str(ids))
    assert section_rows(page) == [1, 6]  # by-symmetry before mixture; KV-107 is rejected and listed with its reason
    assert '<section class="rejected">' in page and "KV-107" in page
    assert "KV-999" in page and "1 ID from the list is not in the library: KV-999" in page
    assert "4 IDs from picks.txt" in page
    assert "warning: 1 ID from" in capsys.readouterr().err


def test_max_pages_caps_sections_with_a_note(tmp_path: Path) -> None:
    page = report(tmp_path, "--max-pages", "2")
    screened = engine.screen(tmp_path / "kv_catalogue.csv")
    n_ok = int((screened["status"] == "ok").sum())
    assert len(section_rows(page)) == 2
    note = re.search(r'<p class="note cap-note">(.*?)</p>', page, flags=re.DOTALL).group(1)
    assert f"2 of {n_ok} selected substrates are shown; {n_ok - 2} more were left out" in note
    assert "cap-note" not in report(tmp_path)  # no cap, no note


def test_screen_result_reads_back_as_a_library(tmp_path: Path) -> None:
    source = write_library(tmp_path)
    screened = tmp_path / "screened.csv"
    assert main(["screen", str(source), "-o", str(screened), "--quiet"]) == 0
    out = tmp_path / "again.html"
    assert main(["report", str(screened), "-o", str(out)]) == 0
    page = out.read_text(encoding="utf-8")
    assert section_rows(page) == section_rows(report(tmp_path))
    assert summary_counts(page) == summary_counts(report(tmp_path))


def test_missing_input_is_one_line(tmp_path: Path) -> None:
    proc = cli("report", str(tmp_path / "absent.csv"), "-o", str(tmp_path / "r.html"))
    assert proc.returncode == 2
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("halosift: ") and "absent.csv" in lines[0]
    assert not (tmp_path / "r.html").exists()


def test_existing_output_needs_force(tmp_path: Path) -> None:
    source = write_library(tmp_path)
    out = tmp_path / "r.html"
    out.write_text("keep me", encoding="utf-8")
    proc = cli("report", str(source), "-o", str(out))
    assert proc.returncode == 2
    lines = proc.stderr.strip().splitlines()
    assert lines == [f"halosift: {out} exists; use --force to replace it"]
    assert out.read_text(encoding="utf-8") == "keep me"
    proc = cli("report", str(source), "-o", str(out), "--force")
    assert proc.returncode == 0, proc.stderr
    assert out.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".halosift-tmp")]


@pytest.mark.parametrize(
    ("extra", "expected"),
    [
        (["-o", "r.csv"], "should end in .html"),
        (["-o", "r.html", "--max-pages", "-1"], "--max-pages must be 0 or more"),
        (["-o", "r.html", "--ids", "no_such_list.txt"], "no such ID list"),
        (["-o", "r.html", "--only", "wobbly"], "--only takes a verdict"),
    ],
)
def test_bad_options_are_one_line(tmp_path: Path, extra: list[str], expected: str) -> None:
    source = write_library(tmp_path)
    proc = subprocess.run([sys.executable, "-m", "halosift", "report", str(source), *extra],
                          capture_output=True, text=True, timeout=300, cwd=tmp_path)
    assert proc.returncode == 2
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and expected in lines[0] and "Traceback" not in proc.stderr


def test_ids_need_an_id_column(tmp_path: Path) -> None:
    source = tmp_path / "plain.csv"
    source.write_text("smiles,pack_g\nCCC,5\nCC,10\n", encoding="utf-8")
    proc = cli("report", str(source), "-o", str(tmp_path / "r.html"), "--ids", str(_ids(tmp_path, ["x"])))
    assert proc.returncode == 2
    assert proc.stderr.strip().splitlines() == [
        "halosift: the library has no ID column to match the ID list against; name one with --id-column"
    ]


def test_out_of_range_temperature_warns_in_every_section(tmp_path: Path) -> None:
    page = report(tmp_path, "--temp", "br2=400")
    warning = engine.Conditions(br2_temp_c=400).warnings()
    assert warning
    n_sections = len(section_rows(page))
    assert html.unescape(page).count(warning[0]) == n_sections + 1  # header and every entry


def test_report_without_any_ui_library() -> None:
    code = (
        "import sys, engine; from halosift.report import render_report; import pandas as pd; "
        "lib = engine.load_library(pd.DataFrame({'smiles': ['CCC']}), use_cache=False); "
        "render_report(lib, engine.Conditions()); "
        "bad = [m for m in ('textual', 'rich') if m in sys.modules]; print(bad); sys.exit(1 if bad else 0)"
    )
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stdout + proc.stderr


def test_render_report_rejects_bad_rows() -> None:
    lib = engine.load_library(pd.DataFrame({"smiles": ["CCC", "CC"]}), use_cache=False)
    with pytest.raises(ValueError):
        render_report(lib, engine.Conditions(), rows=[5])
    assert render_report(lib, engine.Conditions(), rows=[1]).n_sections == 1


def test_histogram_bins_and_ticks() -> None:
    svg = histogram([0, 5, 9.99, 10, 55, 100, 100, float("nan")], title="t", x_label="x")
    ET.fromstring(svg)
    bars = dict(re.findall(r"<title>([^<:]+): (\d+)</title></rect>", svg))
    assert bars["0–10"] == "3" and bars["10–20"] == "1" and bars["50–60"] == "1" and bars["90–100"] == "2"
    assert sum(int(v) for v in bars.values()) == 7
    assert nice_ticks(393) == [0, 100, 200, 300, 400]
    assert nice_ticks(3) == [0, 1, 2, 3]


def test_entries_carry_confidence_flags_and_serving_reagent(tmp_path: Path) -> None:
    # Every output shows what a prediction rests on (confidence) and its special-site flags.
    page = report(tmp_path)
    result = engine.screen(tmp_path / "kv_catalogue.csv", use_cache=False)
    ok = result[result["status"] == "ok"]
    assert page.count("Confidence: ") == int((ok["confidence"] != "").sum())
    for flag in {f for flags in ok["flags"] for f in flags.split(",") if f}:
        assert flag in page


def test_smiles_break_only_between_tokens() -> None:
    from halosift.report.html import smiles_html

    smiles = "ClC[C@@H](Br)C1CC[C@H](CCl)CC1C%10CC%10"
    marked = smiles_html(smiles)
    assert marked.replace("<wbr>", "") == smiles
    pieces = marked.split("<wbr>")
    assert len(pieces) > 8
    for piece in pieces:
        # No break inside a two-letter element or a bracket atom: every piece has whole brackets, and no piece
        # ends with the C of Cl/Br or starts with its l/r.
        assert piece.count("[") == piece.count("]"), piece
        assert not piece.startswith(("l", "r")), piece
        assert not piece.startswith(")"), piece  # a branch closes on the line it is on
    for i, piece in enumerate(pieces[:-1]):
        assert piece[-1] in ")0123456789]CcHBrl", piece  # after ')', a ring digit or an atom only
        assert not (piece.endswith("B") or (piece.endswith("C") and pieces[i + 1].startswith("l")))
    assert "%1<wbr>0" not in marked and "(<wbr>" not in marked


def test_page_smiles_carry_break_points_and_no_break_all(tmp_path: Path) -> None:
    page = report(tmp_path)
    from halosift.report.style import STYLESHEET

    assert "break-all" not in STYLESHEET
    cells = re.findall(r'class="smiles">(.*?)</(?:td|span)>', page)
    assert cells and any("<wbr>" in c for c in cells)
    for cell in cells:
        for piece in cell.split("<wbr>"):
            assert piece.count("[") == piece.count("]") and not piece.startswith(("l", "r")), cell


def test_entries_name_reagents_as_chemists_write_them(tmp_path: Path) -> None:
    page = report(tmp_path)
    lines = re.findall(r'<p class="meta">Outcomes: (.*?)</p>', page)
    assert lines and all(line.startswith("Cl2: ") and "; Br2: " in line and "; NBS: " in line for line in lines)
    assert "radical carbon,allylic" not in page  # the NBS termini read as words
    # Nowhere in the text a reader sees (serves included) is a reagent its lowercase option token.
    text = html.unescape(re.sub(r"<[^>]+>", " ", re.sub(r"<style.*?</style>", "", page, flags=re.S)))
    assert "Serves: " in text and not re.findall(r"\b(?:cl2|br2|so2cl2|nbs)\b", text)


def test_header_and_title_name_the_file_only(tmp_path: Path) -> None:
    folder = tmp_path / "private" / "projects"
    folder.mkdir(parents=True)
    page = report(folder)
    title = re.search(r"<title>(.*?)</title>", page).group(1)
    assert title == "halosift report: kv_catalogue.csv"
    assert '<dd data-field="library">kv_catalogue.csv</dd>' in page
    assert str(folder) not in page and "private" not in page
    # The in-process API, given an absolute path, does the same.
    library = engine.load_library(folder / "kv_catalogue.csv")
    made = render_report(library, engine.Conditions(), source=str(folder / "kv_catalogue.csv"))
    assert str(folder) not in made.html and "kv_catalogue.csv" in made.html
    from halosift.report.html import source_name

    assert source_name("C:\\Users\\chemist\\lib.csv") == "lib.csv" and source_name("-") == "standard input"


def test_entries_grouped_best_first_and_cap_applies_after_grouping(tmp_path: Path) -> None:
    page = report(tmp_path)
    screened = engine.screen(tmp_path / "kv_catalogue.csv")
    order = section_rows(page)
    verdicts = [screened["verdict"].iloc[r - 1] for r in order]
    assert [GROUP_ORDER.index(v) for v in verdicts] == sorted(GROUP_ORDER.index(v) for v in verdicts)
    headings = re.findall(r'<h2 class="group" id="group-([\w-]+)"', page)
    assert headings == list(dict.fromkeys(verdicts))
    # Within the selective group the reagent offered's major share falls.
    selective = [r for r, v in zip(order, verdicts) if v == "selective"]
    shares = [float(screened[f"{screened['serves'].iloc[r - 1]}_major_pct"].iloc[r - 1]) for r in selective]
    assert len(shares) >= 2 and shares == sorted(shares, reverse=True)

    n_ok = len(order)
    capped = report(tmp_path, "--max-pages", "3")
    assert section_rows(capped) == order[:3]  # the cap keeps the best, not the first rows of the file
    missed = Counter(verdicts[3:])
    note = re.search(r'<p class="note cap-note">(.*?)</p>', capped, flags=re.DOTALL).group(1)
    assert f"3 of {n_ok} selected substrates are shown; {n_ok - 3} more were left out" in note
    for verdict, n in missed.items():
        assert f"{n} {verdict}" in note
    for verdict in missed:
        assert re.search(rf'<p class="note group-cap">{missed[verdict]} more {verdict} entr', capped)
    library = engine.load_library(tmp_path / "kv_catalogue.csv")
    made = render_report(library, engine.Conditions(), max_pages=3)
    assert made.left_out_by_verdict == dict(missed) and made.n_left_out == n_ok - 3


def test_flags_come_with_their_text_and_polyhalide_estimate(tmp_path: Path) -> None:
    from halosift.engine.special_sites import FLAG_NOTES

    page = html.unescape(report(tmp_path))
    screened = engine.screen(tmp_path / "kv_catalogue.csv")
    flagged = screened[(screened["status"] == "ok") & (screened["flags"] != "")]
    assert len(flagged) >= 2
    for row in flagged.index:
        section = page[page.index(f'data-row="{row + 1}"'):]
        section = section[: section.index("</section>")]
        for flag in screened["flags"].iloc[row].split(","):
            assert f"{flag}: {FLAG_NOTES[flag].note}" in re.sub(r"</?strong>", "", section)
        poly = re.search(r'<p class="meta poly">(.*?)</p>', section)
        outcomes = {r: screened[f"{r}_outcome"].iloc[row] for r in ("cl2", "br2")}
        if set(outcomes.values()) == {"ruled-out"}:  # no split applies: no polyhalide line, the outcomes say why
            assert poly is None and "Cl2: ruled out (" in section
        elif outcomes["cl2"] == "ruled-out":
            assert "Cl2 ruled out" in poly.group(1)
        else:
            assert f"Cl2 {screened['cl2_poly_pct'].iloc[row]:.1f} %" in poly.group(1)


def test_reading_guide_agrees_with_the_model(tmp_path: Path) -> None:
    page = html.unescape(report(tmp_path))
    guide = page[page.index('<section class="key">'):]
    guide = guide[: guide.index("</section>")]
    # Contradictions fixed once must not come back: the report gives polyhalide estimates and NBS splits.
    assert "not modelled" not in guide.replace(", is not modelled (strained cage)", "")
    assert "polyhalide" in guide and "NBS monobromides" in guide
    assert "P1: Cl 45" not in guide  # the drawing carries labels only; the shares are in the table
    assert "column" not in guide  # a report has entries, not the screen's columns
    for meaning in engine.outcomes.verdict_docs(engine.Conditions().threshold_pct).values():
        assert meaning in guide


def test_every_report_carries_the_caution(tmp_path: Path) -> None:
    lib = engine.load_library(pd.DataFrame({"smiles": ["CCC", "CCO"]}), use_cache=False)
    for kwargs in ({}, {"max_pages": 0}, {"rows": [1]}):
        made = render_report(lib, engine.Conditions(), **kwargs)
        text = html.unescape(made.html)
        assert engine.CAUTION in text  # whole, in the footer
        assert engine.CAUTION.partition(":")[2].strip() in text  # and in the header's box


def test_norbornane_entry_gives_the_exo_endo_split_its_flag_promises(tmp_path: Path) -> None:
    # The bridgehead flag's text says the 2-halide's exo/endo split is shown beside its stereo: the report does so.
    from halosift.engine import parameters as P

    source = tmp_path / "nb.csv"
    source.write_text("id,smiles\nNB-1,C1CC2CCC1C2\n", encoding="utf-8")
    out = tmp_path / "nb.html"
    assert main(["report", str(source), "-o", str(out)]) == 0
    page = html.unescape(out.read_text(encoding="utf-8"))
    cl, br = P.EXO_FRACTION["cl"].value, P.EXO_FRACTION["br"].value
    expected = f"exo:endo {100 * cl:.0f}:{100 * (1 - cl):.0f} Cl2, {100 * br:.0f}:{100 * (1 - br):.0f} Br2"
    assert page.count(expected) == 1 and "bridgehead</strong>: a bridgehead C–H" in page


def test_site_letters_placed_clear_at_one_size_without_a_browser() -> None:
    # The same molecules as the browser test (5 to 20 carbons): every letter finds a clear spot, the drawn bond
    # length stays the fixed one (the canvas grows instead), and the letter size never changes.
    from test_report_browser import LABEL_ROWS

    from halosift.report import drawing
    from halosift.report.html import _letters

    spots_seen: list[list[drawing.LabelSpot]] = []
    original = drawing.place_labels

    def spy(*args, **kwargs):
        spots = original(*args, **kwargs)
        spots_seen.append(spots)
        return spots

    lib = engine.load_library(pd.DataFrame(LABEL_ROWS, columns=["id", "smiles"]), use_cache=False)
    result = lib.evaluate()
    sizes = set()
    try:
        drawing.place_labels = spy
        for row in range(len(LABEL_ROWS)):
            products = lib.products(row)
            products = products[products["site"].isin(engine.ABSTRACTABLE)].reset_index(drop=True)
            marks = [drawing.SiteMark(int(p.atom), _letters(i), p.site, p.cl2_pct, p.br2_pct)
                     for i, p in enumerate(products.itertuples())]
            svg = drawing.structure_svg(result["canonical_smiles"].iloc[row], marks)
            sizes |= set(re.findall(r'<text class="site-label"[^>]*font-size="([\d.]+)"', svg))
            per_bond: dict[str, float] = {}  # a hashed wedge is many short strokes: the longest stands for the bond
            for bond, *xy in re.findall(
                    r"<path class='bond-(\d+) atom-\d+ atom-\d+' d='M ([\d.]+),([\d.]+) L ([\d.]+),([\d.]+)'", svg):
                x0, y0, x1, y1 = map(float, xy)
                per_bond[bond] = max(per_bond.get(bond, 0.0), ((x1 - x0) ** 2 + (y1 - y0) ** 2) ** 0.5)
            lengths = sorted(per_bond.values())
            typical = lengths[len(lengths) // 2]  # a 2D cage (adamantane) has a few long bonds
            assert abs(typical - drawing.BOND_PX) <= 1.5, (LABEL_ROWS[row], typical)
            assert int(re.search(r"width='(\d+)px'", svg).group(1)) <= 680  # fits an A4 column unshrunk
    finally:
        drawing.place_labels = original
    assert len(spots_seen) == len(LABEL_ROWS)
    assert all(spot.clear for spots in spots_seen for spot in spots)
    assert sizes == {f"{drawing.LABEL_FONT_PX:g}"}
    for spots in spots_seen:
        for i, a in enumerate(spots):
            assert not any(a.box.overlaps(b.box) for b in spots[i + 1:])


@pytest.mark.parametrize(
    ("p", "q", "a", "b", "crosses"),
    [((0, 0), (10, 0), (5, -5), (5, 5), True),    # an X
     ((0, 0), (10, 0), (0, 0), (0, 10), False),   # sharing an end point (a leader starts at its atom)
     ((0, 0), (10, 0), (12, -5), (12, 5), False),  # beyond the end
     ((0, 0), (10, 0), (0, 2), (10, 2), False)],  # parallel
)
def test_segments_cross(p, q, a, b, crosses: bool) -> None:
    from halosift.report import drawing

    assert drawing.segments_cross(p, q, a, b) is crosses


def test_leader_goes_round_a_bond_when_it_can() -> None:
    # Synthetic layout: a ring of bare points blocks every near spot of atom 0, and a bond (C–D) stands
    # between atom 0 and its first far spots; a leader drawn through that bond reads as labelling the bond.
    import math

    from halosift.report import drawing

    cx = cy = 200.0
    atoms = [(cx, cy), (cx + 40, cy), (cx - 50, cy - 30), (cx - 50, cy + 30)]
    atoms += [(cx + r * math.cos(k * math.pi / 12), cy + r * math.sin(k * math.pi / 12))
              for r in (20, 30, 40, 48) for k in range(24)]
    (spot,) = drawing.place_labels(atoms, [(0, 1), (2, 3)], [(0, "P1")], (400, 400), 40.0)
    assert spot.clear and spot.leader
    assert not drawing.segments_cross(atoms[0], (spot.x, spot.y), atoms[2], atoms[3])


def test_ruled_out_reagents_show_no_numbers_and_charts_count_only_where_they_apply(tmp_path: Path) -> None:
    from halosift.sample_libraries import sample_path

    ids = tmp_path / "ids.txt"
    ids.write_text("WRS-35108\n", encoding="utf-8")  # 1-hexene: Cl2, Br2 and SO2Cl2 add to its C=C at 25–125 °C
    out = tmp_path / "report.html"
    assert main(["report", str(sample_path()), "-o", str(out), "--force", "--ids", str(ids)]) == 0
    page = out.read_text(encoding="utf-8")
    section = page[page.index('<section class="substrate"'):]
    section = section[: section.index("</section>")]
    assert "Cl2: ruled out (" in section and "Br2: ruled out (" in section
    assert "Major under Br2" not in section and "99.2" not in section and "Polyhalide" not in section
    assert "% Br2 (ruled out)" in section and "Major under NBS" in section  # NBS substitutes: its share stays
    # The selectivity chart counts only rows where Br2 applies, and its caption says how many were left out.
    screened = engine.screen(sample_path())
    has_h = (screened["status"] == "ok") & (screened["n_products"] > 0)
    applies = has_h & (screened["br2_outcome"] != "ruled-out")
    left_out = int((has_h & ~applies).sum())
    assert left_out > 0
    assert (f"where Br2 applies ({int(applies.sum()):,}; {left_out:,} with Br2 ruled out are not counted)"
            in html.unescape(page))
    chart = next(s for s in svgs(page) if "Bromination selectivity" in s)
    bars = [int(v.replace(",", "")) for v in re.findall(r"<title>[^<]*–[^<]*: ([\d,]+)</title>", chart)]
    assert len(bars) == 10 and sum(bars) == int(applies.sum())


def _rows_in(page: str, section: str) -> list[int]:
    """1-based input rows listed in the <section class="{section}"> of the page (one per table row)."""
    found = re.search(rf'<section class="{section}"[^>]*>(.*?)</section>', page, flags=re.DOTALL)
    if found is None:
        return []
    return [int(r) for r in re.findall(r'<tr[^>]*>\s*<td class="num">(\d+)</td>', found.group(1))]


@pytest.mark.parametrize("cap", [0, 2, 5])
def test_every_input_row_appears_beyond_the_entry_cap(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                                      cap: int) -> None:
    # A library larger than the cap, and a rejected table shorter than its rejections: nothing may drop out.
    import halosift.report.html as report_html

    monkeypatch.setattr(report_html, "REJECTED_LISTED", 1)
    page = report(tmp_path, "--max-pages", str(cap))
    entries, appendix, rejected = section_rows(page), _rows_in(page, "appendix"), _rows_in(page, "rejected")
    assert len(entries) == cap
    listed = entries + appendix + rejected
    assert sorted(listed) == list(range(1, len(ROWS) + 1))  # every row once, none twice
    screened = engine.screen(tmp_path / "kv_catalogue.csv")
    section = re.search(r'<section class="appendix".*?</section>', page, flags=re.DOTALL).group(0)
    for r in appendix:  # each line: ID, verdict and serves, or status and reason
        row = screened.iloc[r - 1]
        line = re.search(rf'<tr data-row="{r}">(.*?)</tr>', section).group(1)
        assert f"<td>{html.escape(ROWS[r - 1][0])}</td>" in line
        if row["status"] == "ok":
            assert f"<td>{row['verdict']}</td><td>{reagent_name(row['serves']) or 'none'}</td>" in line
        else:
            assert f"<td>rejected</td><td>{html.escape(row['reason'])}</td>" in line
    # Grouped as the entries are: the appendix's modelled rows follow the verdict groups in order.
    groups = re.findall(r'<h3 data-verdict="([\w-]+)">', section)
    assert groups == sorted(groups, key=lambda v: (GROUP_ORDER + ("rejected",)).index(v))


def test_report_names_the_appendix_on_the_command_line(tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    report(tmp_path, "--max-pages", "2")
    err = capsys.readouterr().err
    assert "one line each in the appendix" in err and "left out" not in err


def test_report_labels_products_as_the_app_does() -> None:
    # One naming scheme for a product in the report and in the app's detail: P1, P2 … by products-table row.
    from halosift.tui.structure_view import product_label as app_label

    from halosift.report.html import _letters

    assert [_letters(i) for i in range(30)] == [app_label(i) for i in range(1, 31)]
