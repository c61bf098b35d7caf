"""halosift.engine.summarise against a plain per-structure computation of every column (test-local, loops only)."""

from __future__ import annotations

import importlib
import math
import sys
from collections import defaultdict
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from halosift.engine import Conditions, run_layout, text_columns
from halosift.engine.nbs import NBS_SITES, empty_frame, nbs_majors, nbs_percent
from halosift.engine.outcomes import OUTCOME_REAGENTS, PATHWAYS, pathway_applies
from halosift.engine.perception import Perception
from halosift.engine.polyhalogenation import deactivation
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CLASSES
from halosift.engine.weigh import BASES, CONFIDENCE_MIN_PCT, SERVES_ORDER, SUMMARY_COLUMNS, summarise

from halosift import engine

ALKENE_RULE = next(p for p in PATHWAYS if p.feature == "alkene")

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "benchmarks"))
from library_gen import make_library  # noqa: E402

CONDITIONS = [
    Conditions(),
    Conditions(cl2_temp_c=60.0, br2_temp_c=80.0),
    Conditions(cl2_temp_c=250.0, cl2_phase="gas", br2_temp_c=-20.0, threshold_pct=60.0),
    Conditions(cl2_solvent="benzene", cl2_solvent_molar=4.0, br2_temp_c=150.0, nbs_temp_c=100.0, threshold_pct=0.0),
    # SO2Cl2 at Cl2's temperature (its part read off Cl2's); then hot enough that alkenes substitute (engine.outcomes).
    Conditions(cl2_temp_c=70.0, threshold_pct=60.0),
    # Same temperatures but Cl2 in the gas phase: SO2Cl2 (liquid) must not take Cl2's gas-phase split.
    Conditions(cl2_temp_c=70.0, cl2_phase="gas"),
    # (SO2Cl2 and condensed-phase Cl2 stop at 200 °C, so hot Cl2 is the gas phase.)
    Conditions(cl2_temp_c=450.0, cl2_phase="gas", br2_temp_c=420.0, so2cl2_temp_c=200.0, threshold_pct=50.0),
]
#: Text columns take whatever type pandas gives a column of Python strings.
TEXT = pd.DataFrame({"t": np.array([""], dtype=object)})["t"].dtype
TEXT_COLUMNS = ("verdict", "cl2_major", "br2_major", "stereo", "site_types", "confidence", "nbs_major", "serves",
                "so2cl2_major", *(f"{r}_outcome" for r in OUTCOME_REAGENTS), *(f"{r}_reason" for r in OUTCOME_REAGENTS))
#: Written here, not imported: per reagent, the columns read off its substitution split.
RULED_OUT_BLANKS = {
    "cl2": ("cl2_major", "cl2_major_pct", "cl2_poly_pct"),
    "br2": ("br2_major", "br2_major_pct", "stereo", "br2_poly_pct"),
    "so2cl2": ("so2cl2_major", "so2cl2_major_pct"),
    "nbs": ("nbs_major", "nbs_major_pct"),
}


def _poly_pct(h: list[int], pct: list[float], f: float) -> float:
    """Polyhalide percent at 1 : 1 with all halogen used, by bisection over the substrate left (test-local)."""
    terms = [(p / 100.0, f * (1.0 - p / 100.0 / hh)) for hh, p in zip(h, pct) if p > 0]

    def mono(a: float) -> float:
        total = 0.0
        for phi, kappa in terms:
            if abs(1.0 - kappa) < 1e-9:
                total += -phi * a * math.log(a) if a > 0 else 0.0
            else:
                total += phi / (1.0 - kappa) * (a**kappa - a)
        return total

    lo, hi = 0.0, 1.0
    for _ in range(100):
        mid = (lo + hi) / 2
        if 2.0 * (1.0 - mid) - mono(mid) >= 1.0:
            lo = mid
        else:
            hi = mid
    return 100.0 * max(0.0, 1.0 - lo - mono(lo)) / (1.0 - lo)


def reference(perception: Perception, conditions: Conditions) -> pd.DataFrame:
    """Every summary column, one structure at a time, from the definitions."""
    structures, sites = perception.structures, perception.sites
    n = len(structures)
    rows_of: dict[int, list[int]] = defaultdict(list)
    for i, s in enumerate(sites["struct"]):
        rows_of[int(s)].append(i)
    code = [int(c) for c in sites["site_code"]]
    h = [int(x) for x in sites["h_count"]]
    product = [str(p) for p in sites["product"]]
    stereo = [str(p) for p in sites["stereo"]]
    site_reagents = ("cl2", "br2", "so2cl2")
    k = {r: conditions.per_h(r) for r in site_reagents}
    rank = {r: [BASES.index(b) if b in BASES else len(BASES) for b in conditions.bases(r)]
            for r in (*site_reagents, "nbs")}
    # NBS majors come from halosift.engine.nbs, which this re-weighing only passes through.
    nbs_major, nbs_pct = nbs_majors(perception.allylic, conditions.per_h("nbs"), n)
    # NBS products per structure, with their summed shares and the bases of the sites giving them.
    allylic = perception.allylic
    nbs_row_pct = nbs_percent(allylic, conditions.per_h("nbs"), n) if len(allylic) else []
    nbs_products: dict[int, dict[int, list]] = defaultdict(dict)
    allylic_rows: dict[tuple[int, int], list[int]] = defaultdict(list)
    for i in range(len(allylic)):
        s_, pid = int(allylic["struct"].iloc[i]), int(allylic["product_id"].iloc[i])
        allylic_rows[(s_, pid)].append(i)
        entry = nbs_products[s_].setdefault(pid, [0.0, len(BASES)])
        entry[0] += float(nbs_row_pct[i])
        entry[1] = min(entry[1], rank["nbs"][int(allylic["site_code"].iloc[i])])
    out: dict[str, list] = {c: [] for c in SUMMARY_COLUMNS}
    for s in range(n):
        rows = rows_of.get(s, [])
        formed = [i for i in rows if code[i] < len(ABSTRACTABLE)]
        ok = structures["status"].iloc[s] == "ok"
        flags = set(str(structures["flags"].iloc[s]).split(","))
        out["n_products"].append(len(formed))
        out["site_types"].append(",".join(sorted({SITE_CLASSES[code[i]] for i in formed})))
        worst = {}
        for r in site_reagents:
            worst[r] = len(BASES)
            w = [h[i] * k[r][code[i]] for i in rows]
            total = math.fsum(w)
            pct = [100.0 * (x / total) if total > 0 else 0.0 for x in w]
            if formed:
                top = max(pct)
                major = next(i for i, p in zip(rows, pct) if p >= top - 1e-9)
                out[f"{r}_major"].append(product[major].replace("Cl", "Br") if r == "br2" else product[major])
                out[f"{r}_major_pct"].append(pct[rows.index(major)])
                if r != "so2cl2":
                    out[f"{r}_poly_pct"].append(_poly_pct([h[i] for i in rows], pct, deactivation(r)))
                if r == "br2":
                    out["stereo"].append(stereo[major])
            else:
                out[f"{r}_major"].append("")
                out[f"{r}_major_pct"].append(math.nan)
                if r != "so2cl2":
                    out[f"{r}_poly_pct"].append(math.nan)
                if r == "br2":
                    out["stereo"].append("")
            for i, p in zip(rows, pct):
                if p >= CONFIDENCE_MIN_PCT:
                    worst[r] = min(worst[r], rank[r][code[i]])
        products_nbs = nbs_products.get(s, {})
        one_site = {r: len(formed) == 1 for r in site_reagents}
        judged: dict[str, float] = {}
        hot = [r for r in site_reagents if not pathway_applies(ALKENE_RULE, r, conditions)]
        if ok and "alkene" in flags and formed and hot:
            # A C=C substrate that substitutes: allylic radicals give both termini (the allylic table's products).
            for r in hot:
                w = {i: h[i] * k[r][code[i]] for i in formed}
                total = math.fsum(w.values())
                cands = [((product[i].replace("Cl", "Br") if r == "br2" else product[i]), 100.0 * w[i] / total)
                         for i in formed if SITE_CLASSES[code[i]] not in NBS_SITES]
                for pid in sorted(products_nbs):
                    rows_p = allylic_rows[(s, pid)]
                    share = math.fsum(float(allylic["h_count"].iloc[i]) * k[r][int(allylic["site_code"].iloc[i])]
                                      * float(allylic["share"].iloc[i]) for i in rows_p)
                    name = str(allylic["product"].iloc[rows_p[0]])
                    cands.append((name if r == "br2" else name.replace("Br", "Cl"), 100.0 * share / total))
                judged[r] = max((p for _, p in cands), default=0.0)  # the outcome's share; columns stay per site
                one_site[r] = len(cands) == 1
        worst["nbs"] = min([b for p, b in products_nbs.values() if p >= CONFIDENCE_MIN_PCT], default=len(BASES))
        out["nbs_major"].append(nbs_major[s])
        out["nbs_major_pct"].append(nbs_pct[s])
        # Outcomes: the first rule that applies rules a reagent out; otherwise the threshold decides.
        features = flags | ({"no_ch"} if not formed else set()) | ({"no_nbs_site"} if not products_nbs else set())
        outcome, one, reasons = {}, {}, {}
        for r in OUTCOME_REAGENTS:
            why = next((p.reason for p in PATHWAYS if p.feature in features and pathway_applies(p, r, conditions)), "")
            share = judged.get(r, out[f"{r}_major_pct"][-1])
            share = 0.0 if math.isnan(share) else share
            # Judged on the share as shown (0.1 point), as every screen and file shows it.
            outcome[r] = "" if not ok else "ruled-out" if why else "clean" if round(share, 1) >= \
                conditions.threshold_pct else "mixture"
            reasons[r] = why
            out[f"{r}_outcome"].append(outcome[r])
            out[f"{r}_reason"].append(why if ok else "")
            one[r] = len(products_nbs) == 1 if r == "nbs" else one_site[r]
        serve = next((r for r in SERVES_ORDER if outcome[r] == "clean"), "")
        out["serves"].append(serve)
        if not ok:
            verdict = ""
        elif not formed and all(w in ("no abstractable C–H", "no allylic or benzylic C–H") for w in reasons.values()):
            verdict = "inert"  # nothing abstracted and nothing else happens (ethene is ruled-out: halogens add)
        elif serve:
            # By symmetry only when the substrate itself has one monohalide; a reagent that takes one kind
            # of C–H among several (NBS on cyclohexene) is selective.
            verdict = "by-symmetry" if one[serve] and len(formed) == 1 else "selective"
        elif any(outcome[r] == "mixture" for r in OUTCOME_REAGENTS):
            verdict = "mixture"
        else:
            verdict = "ruled-out"
        out["verdict"].append(verdict)
        counted = [r for r in ("cl2", "br2", "nbs") if outcome[r] in ("clean", "mixture")]
        counted += ["so2cl2"] if serve == "so2cl2" else []
        out["confidence"].append((*BASES, "")[min([worst[r] for r in counted], default=len(BASES))])
        # A ruled-out reagent's split does not apply: every column read off it is empty.
        for r, columns in RULED_OUT_BLANKS.items():
            if outcome[r] == "ruled-out":
                for c in columns:
                    out[c][-1] = "" if c in TEXT_COLUMNS else math.nan
    return pd.DataFrame(out, index=structures.index)


def assert_matches(got: pd.DataFrame, want: pd.DataFrame) -> None:
    """Same columns in order, the summary's types, text equal, shares to 1e-9 relative, polyhalide to 1e-6 points."""
    assert list(got.columns) == list(SUMMARY_COLUMNS)
    assert got.index.equals(want.index)
    assert got["n_products"].dtype == np.int32
    for col in SUMMARY_COLUMNS:
        if col in TEXT_COLUMNS:
            assert got[col].dtype == TEXT, col
            assert list(got[col]) == list(want[col]), col
        elif col != "n_products":
            assert got[col].dtype == np.float64, col
            a, b = got[col].to_numpy(), want[col].to_numpy(dtype=np.float64)
            assert np.array_equal(np.isnan(a), np.isnan(b)), col
            tol = {"abs": 1e-6} if col.endswith("poly_pct") else {"rel": 1e-9}
            assert a[~np.isnan(a)] == pytest.approx(b[~np.isnan(b)], **tol), col
    assert list(got["n_products"]) == list(want["n_products"])


@pytest.fixture(scope="module")
def perceived() -> Perception:
    """A few hundred generated structures with the awkward cases added (C=C, aromatic only, rejects, one H)."""
    extra = ["C", "CC", "C=CC", "CC=CCC", "c1ccccc1", "Cc1ccccc1", "CCO", "C1CC1", "C12CC(C1)C2", "CC(C)(C)C",
             "C[C@H](Cl)C", "not smiles", "CC#CC", "C1=CCCCC1", "CC(C)c1ccccc1"]
    return engine.perceive([*make_library(250, seed=11), *extra])


@pytest.mark.parametrize("conditions", CONDITIONS)
def test_library_matches_reference(perceived: Perception, conditions: Conditions) -> None:
    assert_matches(summarise(perceived, conditions), reference(perceived, conditions))


def _synthetic(seed: int, object_text: bool) -> Perception:
    """Site tables no molecule gives: runs of equal class and H, exact ties, odd strings, rejects, empty rows.

    Products carry 'Cl' at every position a SMILES can, neighbours' first and last
    characters are chosen to spell 'Cl' across two strings, and some text is not ASCII.
    """
    rng = np.random.default_rng(seed)
    n = 300
    rows = []
    status, flags = [], []
    for s in range(n):
        rejected = rng.random() < 0.05
        status.append("rejected" if rejected else "ok")
        flags.append("" if rejected else str(rng.choice(
            ["", "alkene", "bridgehead,alkene", "cage", "alkenes", "cyclopropane", "cyclopropylmethyl,cyclopropane",
             "central_bond", "alkyne", "cyclopropane,alkene"])))
        if rejected:
            continue
        classes = rng.choice(len(SITE_CLASSES), size=rng.integers(1, 5))
        for _ in range(rng.integers(0, 14)):
            c = int(rng.choice(classes))
            hh = int(rng.integers(1, 4))
            text = str(rng.choice(["CCl", "ClC", "C(Cl)C", "CC", "éCl→C", "lCl", "Cllc"])) + str(len(rows)) + "C"
            rows.append((s, c, hh, text, str(rng.choice(["achiral", "racemate", "one-enantiomer", "", "diastereomers"]))))
    sites = pd.DataFrame(rows, columns=["struct", "site_code", "h_count", "product", "stereo"])
    sites = sites.astype({"struct": "int32", "site_code": "int8", "h_count": "int32"})
    if object_text:
        sites = sites.astype({"product": object, "stereo": object})
    else:
        sites = sites.astype({"product": TEXT, "stereo": TEXT})
    structures = pd.DataFrame({"status": status, "flags": flags})
    return Perception(structures, sites, empty_frame())


@pytest.mark.parametrize("threaded", [False, True])
@pytest.mark.parametrize("object_text", [False, True])
@pytest.mark.parametrize("conditions", [*CONDITIONS[:3], *CONDITIONS[4:]])
def test_synthetic_sites_match_reference(
    monkeypatch: pytest.MonkeyPatch, threaded: bool, object_text: bool, conditions: Conditions
) -> None:
    weigh = importlib.import_module("halosift.engine.weigh")
    # Large site tables are weighed on several threads; any table is when the floor is 0.
    monkeypatch.setattr(weigh, "_THREADED_MIN_ROWS", 0 if threaded else 10**12)
    p = _synthetic(3, object_text)
    assert_matches(summarise(p, conditions), reference(p, conditions))
    memo: dict = {}
    summarise(p, CONDITIONS[3], memo)  # parts of other settings in the memo, then these
    assert_matches(summarise(p, conditions, memo), reference(p, conditions))


def test_live_memo_gives_the_fresh_summary_and_shares_nothing() -> None:
    p = _synthetic(4, False)
    memo: dict = {}
    first = summarise(p, CONDITIONS[1], memo)
    first.loc[:, "cl2_major_pct"] = -1.0  # a caller writing into one summary must not reach the next
    first.loc[:, "n_products"] = -1
    hotter = Conditions(cl2_temp_c=60.0, br2_temp_c=95.0)
    for c in (hotter, Conditions(cl2_temp_c=60.0, br2_temp_c=95.0, threshold_pct=80.0)):
        pd.testing.assert_frame_equal(summarise(p, c, memo), summarise(p, c))


def test_empty_perception() -> None:
    p = Perception(pd.DataFrame({"status": pd.Series([], dtype=TEXT), "flags": pd.Series([], dtype=TEXT)}),
                   _synthetic(0, False).sites.iloc[:0], empty_frame())
    out = summarise(p, Conditions())
    assert list(out.columns) == list(SUMMARY_COLUMNS) and len(out) == 0


@pytest.mark.parametrize("chunk", [1, 2, 3, 7, 1 << 20])
def test_cl_to_br_rewrite_equals_str_replace(monkeypatch: pytest.MonkeyPatch, chunk: int) -> None:
    monkeypatch.setattr(text_columns, "_SWAP_CHUNK", chunk)  # pieces of every size, so matches straddle their edges
    rng = np.random.default_rng(chunk)
    parts = ["C", "l", "Cl", "lC", "é", "→", "(", ")", "Br", "c"]
    strings = ["".join(rng.choice(parts, size=rng.integers(0, 6))) for _ in range(400)]
    column = pd.Series(strings, dtype=TEXT)
    rows = rng.integers(-1, len(strings), size=600)
    got = text_columns.gather_text(column, rows, ("Cl", "Br"))
    assert list(got) == ["" if r < 0 else strings[r].replace("Cl", "Br") for r in rows]
    assert list(text_columns.gather_text(column.astype(object), rows, ("Cl", "Br"))) == list(got)


def test_long_runs_of_many_hydrogens() -> None:
    # One structure whose run of equal products holds more H than int16 can count (3 H × 12,000 products).
    primary, tertiary = SITE_CLASSES.index("primary"), SITE_CLASSES.index("tertiary")
    rows = [(0, primary, 3, f"C{i}Cl", "achiral") for i in range(12_000)] + [(0, tertiary, 1, "CC(C)(C)Cl", "achiral")]
    sites = pd.DataFrame(rows, columns=["struct", "site_code", "h_count", "product", "stereo"])
    sites = sites.astype({"struct": "int32", "site_code": "int8", "h_count": "int32", "product": TEXT, "stereo": TEXT})
    p = Perception(pd.DataFrame({"status": ["ok"], "flags": [""]}), sites, empty_frame())
    for conditions in CONDITIONS[:2]:
        assert_matches(summarise(p, conditions), reference(p, conditions))


@pytest.mark.parametrize(("chunk_rows", "slice_runs"), [(1, 1), (5, 3), (64, 1000)])
def test_pass_sizes_change_nothing(monkeypatch: pytest.MonkeyPatch, chunk_rows: int, slice_runs: int) -> None:
    weigh = importlib.import_module("halosift.engine.weigh")
    monkeypatch.setattr(weigh, "_CHUNK_ROWS", chunk_rows)  # run finder cut into many passes between structures
    monkeypatch.setattr(run_layout, "_SLICE_RUNS", slice_runs)  # blocks weighed in many column slices
    p = _synthetic(6, False)
    assert_matches(summarise(p, CONDITIONS[1]), reference(p, CONDITIONS[1]))
