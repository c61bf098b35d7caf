"""Unit tests for tui.filters: the pandas/numpy rules behind the app's views, filters and sorting."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from halosift.tui.app import HalosiftApp
from halosift.tui.filters import (
    DUPLICATE_MODES,
    FilterSpec,
    OrderCache,
    SortSpec,
    filter_mask,
    full_order,
    ordered_rows,
    parse_optional_float,
    parse_optional_int,
    site_choices,
    site_set,
    sort_key,
    text_mask,
    view_mask,
)
from tui_helpers import QX_ROWS, async_test, settle

TEXT = (["code"], ["smiles"])


def frame() -> pd.DataFrame:
    """An evaluated-library-shaped frame with invented IDs (values written by hand, not computed)."""
    return pd.DataFrame(
        {
            "code": ["QX-1", "QX-2", "QX-3", "QX-4", "QX-5", "QX-6", "qx-7"],
            "smiles": ["CC", "CCC", "CCc1ccccc1", "CC1=CCCCC1", "O", "c1ccccc1", "CC(C)C"],
            "status": ["ok", "ok", "ok", "ok", "rejected", "ok", "ok"],
            "reason": ["", "", "", "", "contains oxygen", "", ""],
            "n_products": pd.array([1, 2, 2, 5, None, 0, 2], dtype="Int32"),
            "verdict": ["by-symmetry", "selective", "selective", "mixture", "", "inert", "selective"],
            "br2_major_pct": [100.0, 96.5, 99.99, 49.5, np.nan, np.nan, 99.5],
            "stereo": ["achiral", "achiral", "racemate", "racemate", "", "", "achiral"],
            "site_types": [
                "primary",
                "primary,secondary",
                "benzylic-secondary,primary",
                "allylic-primary,allylic-secondary,secondary",
                "",
                "",
                "primary,tertiary",
            ],
            "flags": ["", "", "bridgehead", "alkene,cyclopropylmethyl", "", "", "alkene"],
            "cl2_outcome": ["clean", "mixture", "mixture", "ruled-out", "", "ruled-out", "clean"],
            "br2_outcome": ["clean", "clean", "clean", "ruled-out", "", "ruled-out", "clean"],
            "so2cl2_outcome": ["clean", "mixture", "mixture", "ruled-out", "", "ruled-out", "mixture"],
            "nbs_outcome": ["ruled-out", "ruled-out", "clean", "mixture", "", "ruled-out", "ruled-out"],
            "confidence": ["measured", "measured", "textbook", "", "", "", "estimate"],
            # As if QX-7 repeated QX-2's structure (hand-written, like the rest).
            "duplicate_of": pd.array([None, None, None, None, None, None, 2], dtype="Int64"),
        }
    )


def rows(mask: np.ndarray) -> list[int]:
    return np.flatnonzero(mask).tolist()


def test_no_filters_keeps_every_screened_row_and_drops_rejected():
    assert rows(filter_mask(frame(), FilterSpec(), *TEXT)) == [0, 1, 2, 3, 5, 6]


def test_verdict_filter():
    assert rows(filter_mask(frame(), FilterSpec(verdicts=frozenset({"by-symmetry"})), *TEXT)) == [0]
    both = FilterSpec(verdicts=frozenset({"by-symmetry", "inert"}))
    assert rows(filter_mask(frame(), both, *TEXT)) == [0, 5]


def test_min_bromination_share_is_inclusive_and_excludes_missing():
    assert rows(filter_mask(frame(), FilterSpec(min_br2_pct=99.5), *TEXT)) == [0, 2, 6]
    assert rows(filter_mask(frame(), FilterSpec(min_br2_pct=0), *TEXT)) == [0, 1, 2, 3, 6]


def test_max_products():
    assert rows(filter_mask(frame(), FilterSpec(max_products=1), *TEXT)) == [0, 5]
    assert rows(filter_mask(frame(), FilterSpec(max_products=0), *TEXT)) == [5]


def test_site_types_any_and_all():
    any_of = FilterSpec(site_types=frozenset({"tertiary", "benzylic-secondary"}))
    assert rows(filter_mask(frame(), any_of, *TEXT)) == [2, 6]
    all_of = FilterSpec(site_types=frozenset({"primary", "secondary"}), site_match="all")
    assert rows(filter_mask(frame(), all_of, *TEXT)) == [1]
    # "secondary" must match the whole class name, not the tail of "allylic-secondary".
    exact = FilterSpec(site_types=frozenset({"allylic-secondary"}))
    assert rows(filter_mask(frame(), exact, *TEXT)) == [3]


def test_no_new_stereocentre_keeps_achiral_major_product_only():
    assert rows(filter_mask(frame(), FilterSpec(no_new_stereo=True), *TEXT)) == [0, 1, 6]


def test_text_match_ignores_case_in_ids_but_not_in_smiles():
    assert rows(filter_mask(frame(), FilterSpec(text="qx-7"), *TEXT)) == [6]
    assert rows(filter_mask(frame(), FilterSpec(text="QX-7"), *TEXT)) == [6]
    assert rows(filter_mask(frame(), FilterSpec(text="c1ccccc1"), *TEXT)) == [2, 5]
    # In SMILES, case is meaning (c aromatic, C aliphatic), so it is kept.
    assert rows(filter_mask(frame(), FilterSpec(text="CC1=C"), *TEXT)) == [3]
    assert rows(filter_mask(frame(), FilterSpec(text="cc1=c"), *TEXT)) == []
    # Regex characters are taken literally.
    assert rows(filter_mask(frame(), FilterSpec(text="(C)"), *TEXT)) == [6]
    assert rows(text_mask(frame(), "O", ["smiles"], ignore_case=False)) == [4]
    assert rows(text_mask(frame(), "o", ["smiles"], ignore_case=False)) == []


def test_flag_filters_has_and_lacks():
    assert rows(filter_mask(frame(), FilterSpec(flags_has=frozenset({"alkene"})), *TEXT)) == [3, 6]
    both = FilterSpec(flags_has=frozenset({"alkene", "cyclopropylmethyl"}))
    assert rows(filter_mask(frame(), both, *TEXT)) == [3]
    assert rows(filter_mask(frame(), FilterSpec(flags_lacks=frozenset({"alkene"})), *TEXT)) == [0, 1, 2, 5]
    lacks_either = FilterSpec(flags_lacks=frozenset({"alkene", "bridgehead"}))
    assert rows(filter_mask(frame(), lacks_either, *TEXT)) == [0, 1, 5]
    mixed = FilterSpec(flags_has=frozenset({"alkene"}), flags_lacks=frozenset({"cyclopropylmethyl"}))
    assert rows(filter_mask(frame(), mixed, *TEXT)) == [6]


def test_outcome_filters_per_reagent():
    clean_br2 = FilterSpec(outcomes=frozenset({("br2", "clean")}))
    assert rows(filter_mask(frame(), clean_br2, *TEXT)) == [0, 1, 2, 6]
    # Two outcomes of one reagent: either; two reagents: both must hold.
    either = FilterSpec(outcomes=frozenset({("cl2", "clean"), ("cl2", "mixture")}))
    assert rows(filter_mask(frame(), either, *TEXT)) == [0, 1, 2, 6]
    two = FilterSpec(outcomes=frozenset({("br2", "clean"), ("nbs", "clean")}))
    assert rows(filter_mask(frame(), two, *TEXT)) == [2]
    ruled = FilterSpec(outcomes=frozenset({("so2cl2", "ruled-out")}))
    assert rows(filter_mask(frame(), ruled, *TEXT)) == [3, 5]
    assert two.outcomes_for("br2") == {"clean"} and two.outcomes_for("cl2") == frozenset()


def test_confidence_filter():
    assert rows(filter_mask(frame(), FilterSpec(confidence=frozenset({"measured"})), *TEXT)) == [0, 1]
    weaker = FilterSpec(confidence=frozenset({"textbook", "estimate"}))
    assert rows(filter_mask(frame(), weaker, *TEXT)) == [2, 6]


def test_duplicate_filter_modes():
    assert rows(filter_mask(frame(), FilterSpec(duplicates="all"), *TEXT)) == [0, 1, 2, 3, 5, 6]
    assert rows(filter_mask(frame(), FilterSpec(duplicates="hide"), *TEXT)) == [0, 1, 2, 3, 5]
    assert rows(filter_mask(frame(), FilterSpec(duplicates="only"), *TEXT)) == [6]
    assert set(DUPLICATE_MODES) == {"all", "hide", "only"}


def test_filters_combine_with_and():
    spec = FilterSpec(verdicts=frozenset({"selective"}), min_br2_pct=99.0, no_new_stereo=True)
    assert rows(filter_mask(frame(), spec, *TEXT)) == [6]


def test_views():
    marked = np.array([False, True, False, False, True, False, False])
    spec = FilterSpec(verdicts=frozenset({"by-symmetry"}))
    assert rows(view_mask(frame(), "library", spec, marked, *TEXT)) == [0]
    # The shortlist and rejected views ignore the filters.
    assert rows(view_mask(frame(), "shortlist", spec, marked, *TEXT)) == [1, 4]
    assert rows(view_mask(frame(), "rejected", spec, marked, *TEXT)) == [4]
    with pytest.raises(ValueError):
        view_mask(frame(), "nowhere", spec, marked, *TEXT)


def test_describe_and_active():
    assert FilterSpec().describe() == "no filters"
    assert not FilterSpec().active
    assert not FilterSpec(site_match="all").active
    spec = FilterSpec(verdicts=frozenset({"by-symmetry"}), min_br2_pct=90, max_products=2, no_new_stereo=True, text="QX")
    assert spec.active
    text = spec.describe()
    for part in ("verdict by-symmetry", "Br2 major ≥ 90 %", "≤ 2 products", "no new stereocentre", "QX"):
        assert part in text
    assert spec.without_text().text == ""
    assert spec.count == 5
    more = FilterSpec(flags_has=frozenset({"alkene"}), flags_lacks=frozenset({"cage"}),
                      outcomes=frozenset({("br2", "clean"), ("br2", "mixture"), ("nbs", "clean")}),
                      confidence=frozenset({"measured"}), duplicates="hide")
    assert more.active and more.count == 6
    text = more.describe()
    for part in ("flags alkene", "no cage", "Br2 clean/mixture", "NBS clean", "confidence measured", "repeats hidden"):
        assert part in text
    assert "repeats only" in FilterSpec(duplicates="only").describe()


def test_site_choices_and_site_set():
    assert site_set("primary,secondary") == {"primary", "secondary"}
    assert site_set("") == frozenset()
    assert site_set(np.nan) == frozenset()
    assert site_choices(frame()) == [
        "allylic-primary", "allylic-secondary", "benzylic-secondary", "primary", "secondary", "tertiary",
    ]
    assert site_choices(frame().drop(columns="site_types")) == []


def test_parsers():
    assert parse_optional_float(" ", lo=0, hi=100, what="x") is None
    assert parse_optional_float("90", lo=0, hi=100, what="x") == 90.0
    with pytest.raises(ValueError, match="not a number"):
        parse_optional_float("ninety", lo=0, hi=100, what="x")
    with pytest.raises(ValueError, match="between 0 and 100"):
        parse_optional_float("101", lo=0, hi=100, what="x")
    with pytest.raises(ValueError, match="between 0 and 100"):
        parse_optional_float("nan", lo=0, hi=100, what="x")
    assert parse_optional_int("3", lo=0, what="n") == 3
    assert parse_optional_int("", lo=0, what="n") is None
    with pytest.raises(ValueError, match="whole number"):
        parse_optional_int("2.5", lo=0, what="n")
    with pytest.raises(ValueError, match="at least 0"):
        parse_optional_int("-1", lo=0, what="n")


def test_numeric_sort_puts_missing_last_both_ways():
    f = frame()
    key, missing = sort_key(f["br2_major_pct"])
    up = full_order(key, missing, descending=False).tolist()
    down = full_order(key, missing, descending=True).tolist()
    assert up == [3, 1, 6, 2, 0, 4, 5]
    assert down == [0, 2, 6, 1, 3, 4, 5]


def test_nullable_integer_sort_is_stable():
    key, missing = sort_key(frame()["n_products"])
    assert full_order(key, missing, False).tolist() == [5, 0, 1, 2, 6, 3, 4]


def test_text_sort_and_category_sort():
    f = frame()
    key, missing = sort_key(f["smiles"])
    assert [f["smiles"][i] for i in full_order(key, missing, False)] == sorted(f["smiles"])
    ranks = {v: i for i, v in enumerate(("by-symmetry", "selective", "mixture", "inert"))}
    key, missing = sort_key(f["verdict"], ranks)
    order = full_order(key, missing, False).tolist()
    assert [f["verdict"][i] for i in order] == [
        "by-symmetry", "selective", "selective", "selective", "mixture", "inert", "",
    ]
    # Descending keeps the rejected (empty) row last, and equal verdicts in input order.
    down = full_order(key, missing, True).tolist()
    assert down == [5, 3, 1, 2, 6, 0, 4]


def test_mixed_type_text_column_sorts_as_text():
    s = pd.Series(["b", 3, "a", None], dtype=object)
    key, missing = sort_key(s)
    assert full_order(key, missing, False).tolist() == [1, 2, 0, 3]


def test_ordered_rows_and_order_cache():
    f = frame()
    cache = OrderCache(max_entries=2)
    order = cache.order(f, "t", "br2_major_pct", True)
    assert cache.order(f, "t", "br2_major_pct", True) is order
    mask = filter_mask(f, FilterSpec(verdicts=frozenset({"selective"})), *TEXT)
    assert ordered_rows(mask, order).tolist() == [2, 6, 1]
    assert ordered_rows(mask, None).tolist() == [1, 2, 6]
    cache.order(f, "t", "smiles", False)
    cache.order(f, "t", "code", False)
    assert len(cache._store) == 2  # oldest entry dropped


def test_sort_spec_defaults():
    assert SortSpec() == SortSpec(None, False)


def test_filters_work_on_a_real_evaluated_library():
    """Column names and dtypes as Library.evaluate returns them (engine output, not hand-written)."""
    from halosift import engine

    source = pd.DataFrame({"code": ["QX-1", "QX-2", "QX-3", "QX-4"], "smiles": ["CC", "CCC", "O", "c1ccccc1"]})
    evaluated = engine.load_library(source, use_cache=False).evaluate(engine.Conditions())
    assert rows(filter_mask(evaluated, FilterSpec(verdicts=frozenset({"by-symmetry"})), *TEXT)) == [0]
    assert rows(view_mask(evaluated, "rejected", FilterSpec(), np.zeros(4, bool), *TEXT)) == [2]
    assert rows(filter_mask(evaluated, FilterSpec(text="c1"), ["code"], ["canonical_smiles"])) == [3]
    assert rows(filter_mask(evaluated, FilterSpec(max_products=0), *TEXT)) == [3]
    key, missing = sort_key(evaluated["br2_major_pct"])
    assert full_order(key, missing, True).tolist()[:2] == [0, 1]


def test_new_filters_on_a_real_evaluated_library():
    """Flags, outcomes, confidence and duplicates read the columns Library.evaluate writes."""
    from halosift import engine

    source = pd.DataFrame({
        "code": ["QX-1", "QX-2", "QX-3", "QX-4", "QX-5"],
        "smiles": ["CC", "C=CCC", "C(C)", "CC1CC1", "CCC"],
    })
    evaluated = engine.load_library(source, use_cache=False).evaluate(engine.Conditions())
    assert rows(filter_mask(evaluated, FilterSpec(duplicates="only"), *TEXT)) == [2]
    assert rows(filter_mask(evaluated, FilterSpec(duplicates="hide"), *TEXT)) == [0, 1, 3, 4]
    assert rows(filter_mask(evaluated, FilterSpec(flags_has=frozenset({"alkene"})), *TEXT)) == [1]
    assert rows(filter_mask(evaluated, FilterSpec(flags_lacks=frozenset({"alkene", "cyclopropane"})), *TEXT)) == [0, 2, 4]
    # Cyclopropane opens under Br2 (engine.special_sites): its Br2 outcome is ruled-out.
    assert 3 in rows(filter_mask(evaluated, FilterSpec(outcomes=frozenset({("br2", "ruled-out")})), *TEXT))
    measured = filter_mask(evaluated, FilterSpec(confidence=frozenset({"measured"})), *TEXT)
    assert (evaluated["confidence"][measured] == "measured").all()


def test_filter_form_sets_the_new_filters_and_the_view_follows(tmp_path, monkeypatch):
    """Pilot: tick an outcome and a confidence, pick flag and duplicate choices by keyboard, apply."""
    import asyncio

    from halosift.tui.app import HalosiftApp
    from halosift.tui.filter_form import FilterForm
    from halosift.tui.table import LibraryTable
    from tui_helpers import settle, write_library

    monkeypatch.setenv("HALOSIFT_SESSION_DIR", str(tmp_path / "sessions"))
    path = write_library(tmp_path)

    async def run() -> None:
        app = HalosiftApp(str(path))
        async with app.run_test(size=(100, 40)) as pilot:
            await settle(pilot, app)
            await pilot.press("f")
            form = app.screen
            assert isinstance(form, FilterForm)
            form.query_one("#outcome-br2-clean").focus()
            await pilot.press("space")
            form.query_one("#confidence-estimate").focus()
            await pilot.press("space")  # on
            await pilot.press("space")  # and off again
            form.query_one("#flag-alkene").focus()  # RadioSet: arrows move, Enter chooses
            await pilot.press("right", "right", "enter")
            form.query_one("#duplicates").focus()
            await pilot.press("right", "enter")
            assert form.query_one("#flag-alkene-lacks").value and form.query_one("#dup-hide").value
            await pilot.press("ctrl+s")
            await settle(pilot, app)
            assert app.filters == FilterSpec(outcomes=frozenset({("br2", "clean")}),
                                             flags_lacks=frozenset({"alkene"}), duplicates="hide")
            view = app.frame.iloc[app.query_one(LibraryTable).rows]
            assert len(view) and set(view["br2_outcome"]) == {"clean"}
            assert not view["flags"].str.contains("alkene").any() and view["duplicate_of"].isna().all()
            expected = filter_mask(app.frame, app.filters)
            assert len(view) == int(expected.sum())
            # Reopening shows what is in force.
            await pilot.press("f")
            form = app.screen
            assert form.query_one("#outcome-br2-clean").value and form.query_one("#flag-alkene-lacks").value
            assert form.query_one("#dup-hide").value and not form.query_one("#confidence-estimate").value

    asyncio.run(run())


@pytest.mark.parametrize("width", [80, 81, 86, 100])
@async_test
async def test_every_filter_form_label_shows_whole(tmp_path, width):
    """Site types and flags are read whole at 80 columns and wider: no label ends in '…'."""
    from halosift.tui.toggles import TickBox
    from textual.widgets import RadioButton

    # Propargylic-tertiary (3-methyl-1-butyne) is the longest site name here: three to a line at some widths.
    path = tmp_path / "sites.csv"
    pd.DataFrame(QX_ROWS + [("QX-0101", "C#CC(C)C")], columns=["id", "smiles"]).to_csv(path, index=False)
    app = HalosiftApp(str(path), sessions=False)
    async with app.run_test(size=(width, 24)) as pilot:
        await settle(pilot, app)
        await pilot.press("f")
        await pilot.pause(0.3)
        form = app.screen
        assert form.query_one("#site-propargylic-tertiary")
        cut = []
        for widget in form.query("TickBox, RadioButton, Label"):
            label = str(widget.label) if isinstance(widget, (TickBox, RadioButton)) else str(widget.render())
            shown = " ".join("".join(s.text for s in widget.render_line(y)).strip()
                             for y in range(widget.size.height))
            words = label.split()
            if "…" in shown or any(word not in shown for word in words):
                cut.append((label, shown))
        assert cut == []
