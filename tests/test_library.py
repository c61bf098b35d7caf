"""Library screening: nothing lost, order kept, same answers however it is computed."""

from __future__ import annotations

import halosift.engine.parallel as parallel
import numpy as np
import pandas as pd
import pytest
from halosift.engine import Conditions
from halosift.engine.library import RESULT_COLUMNS
from halosift.sample_libraries import sample_path

from halosift import engine

MIXED = [
    ("g1", "CCC"),
    ("g2", "CC(C)C"),
    ("dup", "C(C)C"),  # propane again, written differently
    ("bad-parse", "C1CC"),
    ("bad-empty", ""),
    ("bad-hetero", "CCO"),
    ("bad-charge", "[CH3+]"),
    ("bad-radical", "[CH3]"),
    ("bad-frag", "CC.CC"),
    ("bad-iso", "[13CH4]"),
    ("bad-big", "C" * 200),
    ("g3", "C1CCCCC1"),
    ("NA", "CCc1ccccc1"),
]


@pytest.fixture
def mixed_frame() -> pd.DataFrame:
    return pd.DataFrame({"id": [i for i, _ in MIXED], "smiles": [s for _, s in MIXED], "price": np.arange(len(MIXED)) * 1.5})


def test_every_row_out_in_order(mixed_frame: pd.DataFrame) -> None:
    result = engine.screen(mixed_frame)
    assert len(result) == len(mixed_frame)
    assert list(result["id"]) == list(mixed_frame["id"])
    assert list(result.columns) == ["id", "smiles", "price", *RESULT_COLUMNS]
    status = dict(zip(result["id"], result["status"]))
    assert all(status[i] == "rejected" for i in status if i.startswith("bad-"))
    assert all(status[i] == "ok" for i in ("g1", "g2", "dup", "g3", "NA"))
    rejected = result[result["status"] == "rejected"]
    assert (rejected["reason"].str.len() > 0).all()
    assert rejected["verdict"].eq("").all()


def test_duplicates_point_to_first_row(mixed_frame: pd.DataFrame) -> None:
    result = engine.screen(mixed_frame).set_index("id")
    assert result.loc["dup", "duplicate_of"] == 1  # 1-based row of "g1"
    assert pd.isna(result.loc["g1", "duplicate_of"])
    assert result.loc["dup", "canonical_smiles"] == result.loc["g1", "canonical_smiles"] == "CCC"


def test_pass_through_types(mixed_frame: pd.DataFrame) -> None:
    result = engine.screen(mixed_frame)
    assert result["price"].dtype == np.float64
    assert list(result["price"]) == list(mixed_frame["price"])


def test_verdicts_on_known_substrates(mixed_frame: pd.DataFrame) -> None:
    # Common practice: cyclohexane gives one product; propane is selective with Br2 (97 % 2-bromo).
    result = engine.screen(mixed_frame).set_index("id")
    assert result.loc["g3", "verdict"] == "by-symmetry" and result.loc["g3", "serves"] == "cl2"
    assert result.loc["g1", "verdict"] == "selective" and result.loc["g1", "serves"] == "br2"
    assert result.loc["NA", "br2_major"] == "CC(Br)c1ccccc1"


def test_one_and_two_workers_agree(monkeypatch: pytest.MonkeyPatch) -> None:
    smiles = list(pd.read_csv(sample_path("catalogue.csv"), keep_default_na=False)["smiles"])
    frame = pd.DataFrame({"smiles": smiles})
    monkeypatch.setattr(parallel, "MIN_PARALLEL", 0)
    monkeypatch.setattr(parallel, "CHUNK", 60)
    one = engine.screen(frame, workers=1, use_cache=False)
    two = engine.screen(frame, workers=2, use_cache=False)
    pd.testing.assert_frame_equal(one, two)
    # The batch mode: this thread takes the next chunk in line too, alongside one process.
    helped = engine.screen(frame, workers=2, use_cache=False, caller_helps=True)
    pd.testing.assert_frame_equal(one, helped)
    three = engine.screen(frame, workers=3, use_cache=False, caller_helps=True)
    pd.testing.assert_frame_equal(one, three)


@pytest.mark.parametrize(("total", "workers"), [(0, 2), (1, 2), (99, 2), (20_000, 2), (20_000, 1), (1_000_003, 8)])
def test_tasks_cover_every_string_once_and_shrink(total: int, workers: int) -> None:
    bounds = parallel.chunk_bounds(total, workers)
    assert [b[0] for b in bounds] == [0, *[b[1] for b in bounds[:-1]]][: len(bounds)]  # contiguous, in order
    assert (bounds[-1][1] if bounds else 0) == total
    sizes = [stop - start for start, stop in bounds]
    assert all(s <= parallel.CHUNK for s in sizes)
    assert all(s >= parallel.MIN_CHUNK for s in sizes[:-1])
    assert sizes == sorted(sizes, reverse=True)  # the short tasks come last
    if workers > 1 and total > 10 * parallel.CHUNK:
        assert sizes[0] == parallel.CHUNK and sizes[-2] < parallel.CHUNK / 4


def test_cold_and_warm_cache_agree(tmp_path, mixed_frame: pd.DataFrame) -> None:
    cold = engine.screen(mixed_frame, cache_folder=tmp_path)
    assert any(tmp_path.rglob("*.structures.parquet"))
    warm = engine.screen(mixed_frame, cache_folder=tmp_path)
    pd.testing.assert_frame_equal(cold, warm)
    # Partly cached: new rows are perceived, old ones come from the cache.
    more = pd.concat([mixed_frame, pd.DataFrame({"id": ["new"], "smiles": ["CC(C)(C)C"], "price": [9.0]})], ignore_index=True)
    partial = engine.screen(more, cache_folder=tmp_path)
    pd.testing.assert_frame_equal(partial.iloc[: len(mixed_frame)], cold)
    assert partial["verdict"].iloc[-1] == "by-symmetry"


def test_damaged_cache_is_ignored(tmp_path, mixed_frame: pd.DataFrame) -> None:
    engine.screen(mixed_frame, cache_folder=tmp_path)
    for shard in tmp_path.rglob("*.parquet"):
        shard.write_bytes(b"not parquet")
    result = engine.screen(mixed_frame, cache_folder=tmp_path)
    assert len(result) == len(mixed_frame)


def test_reweigh_without_reperceiving(mixed_frame: pd.DataFrame, monkeypatch: pytest.MonkeyPatch) -> None:
    library = engine.load_library(mixed_frame, use_cache=False)
    cold = library.evaluate(Conditions(cl2_temp_c=25.0))

    def forbidden(*args, **kwargs):
        raise AssertionError("re-weighing must not touch RDKit")

    import halosift.engine.perception as perceive_module

    monkeypatch.setattr(perceive_module, "_perceive_one", forbidden)
    hot = library.evaluate(Conditions(cl2_temp_c=300.0, cl2_phase="gas"))
    g1 = cold["id"] == "g1"
    assert float(hot.loc[g1, "cl2_major_pct"].iloc[0]) != pytest.approx(float(cold.loc[g1, "cl2_major_pct"].iloc[0]))


def test_products_detail(mixed_frame: pd.DataFrame) -> None:
    library = engine.load_library(mixed_frame, use_cache=False)
    detail = library.products(0)
    assert list(detail["product"]) == ["CC(C)Cl", "CCCCl"]
    assert detail["cl2_pct"].sum() == pytest.approx(100)
    assert (detail["dh_br"] > 0).all() and (detail["dh_cl"] < 0).all()


def test_input_column_named_like_a_result_column() -> None:
    frame = pd.DataFrame({"canonical_smiles": ["CCC", "CC"], "status": ["in stock", "sold out"]})
    result = engine.screen(frame, use_cache=False)
    assert list(result["input_status"]) == ["in stock", "sold out"]
    assert list(result["status"]) == ["ok", "ok"]
    assert list(result["input_canonical_smiles"]) == ["CCC", "CC"]


def test_sample_catalogue_screens_completely() -> None:
    result = engine.screen(sample_path("catalogue.parquet"), use_cache=False)
    source = pd.read_parquet(sample_path("catalogue.parquet"))
    assert len(result) == len(source)
    assert (result["status"] == "ok").all()
    assert set(result["verdict"]) <= set(engine.VERDICTS)
    assert set(engine.VERDICTS) <= set(result["verdict"])


def test_remembered_parts_give_the_same_answers(mixed_frame: pd.DataFrame) -> None:
    # A live session changes one setting at a time; re-using the unchanged reagent's
    # part must give exactly what a fresh weighing gives.
    perception = engine.load_library(mixed_frame, use_cache=False).perception
    memo: dict = {}
    sequence = [
        Conditions(),
        Conditions(br2_temp_c=80.0),
        Conditions(br2_temp_c=80.0, threshold_pct=70.0),
        Conditions(cl2_temp_c=150.0, br2_temp_c=80.0, threshold_pct=70.0),
        Conditions(cl2_temp_c=150.0, br2_temp_c=80.0, threshold_pct=70.0, nbs_temp_c=40.0),
    ]
    for conditions in sequence:
        pd.testing.assert_frame_equal(engine.summarise(perception, conditions, memo), engine.summarise(perception, conditions))
    assert ("br2", 80.0) in memo and ("br2", 125.0) in memo
