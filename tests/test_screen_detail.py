"""A screen perceives only the products that can be major; nothing it reports may differ from a full perception.

The reference here is the full perception itself (every product's SMILES and
stereo worked out), so these checks fail if the pruning ever drops a product
that wins under some conditions, or if the on-demand detail disagrees.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from halosift.engine import Conditions
from halosift.engine.conditions import MAX_TEMP_C
from halosift.engine.contenders import contending_classes
from halosift.engine.parameters import KELVIN, MAX_LIQUID_TEMP_C
from halosift.engine.perception import perceive
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CLASSES
from halosift.sample_libraries import sample_path
from rdkit import Chem

from halosift import engine

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "benchmarks"))
from library_gen import make_library  # noqa: E402

#: Temperatures from cold to hot and both solvents: the major product moves between site classes across these.
CONDITIONS = [
    Conditions(),
    Conditions(cl2_temp_c=-60.0, br2_temp_c=-20.0, nbs_temp_c=0.0),
    Conditions(cl2_temp_c=400.0, cl2_phase="gas", br2_temp_c=300.0, nbs_temp_c=150.0),
    Conditions(cl2_temp_c=25.0, cl2_solvent="cs2"),
    Conditions(cl2_temp_c=25.0, cl2_solvent="benzene", threshold_pct=70.0),
]


@pytest.fixture(scope="module")
def structures() -> list[str]:
    catalogue = pd.read_csv(sample_path("catalogue.csv"), keep_default_na=False)
    return list(catalogue["smiles"]) + make_library(300, seed=11)


@pytest.fixture(scope="module")
def both(structures: list[str]) -> tuple[engine.Perception, engine.Perception]:
    return perceive(structures, detail=True), perceive(structures, detail=False)


def test_screen_mode_prunes_something(both) -> None:
    full, lean = both
    assert len(lean.sites) == len(full.sites)
    assert (lean.sites["product"] == "").sum() > 0.3 * len(lean.sites)


@pytest.mark.parametrize("conditions", CONDITIONS, ids=range(len(CONDITIONS)))
def test_summaries_agree(both, conditions: Conditions) -> None:
    full, lean = both
    pd.testing.assert_frame_equal(engine.summarise(full, conditions), engine.summarise(lean, conditions))


def test_pruned_rows_keep_everything_but_product_detail(both) -> None:
    full, lean = both
    kept = [c for c in full.sites.columns if c not in ("product", "stereo", "n_stereoisomers", "n_diastereomers", "stereo_approx")]
    pd.testing.assert_frame_equal(full.sites[kept], lean.sites[kept])
    pd.testing.assert_frame_equal(full.structures, lean.structures)
    named = lean.sites["product"] != ""
    pd.testing.assert_series_equal(full.sites["product"][named], lean.sites["product"][named])
    stereo = ["stereo", "n_stereoisomers", "n_diastereomers", "stereo_approx"]
    with_stereo = lean.sites["stereo"] != ""
    pd.testing.assert_frame_equal(full.sites[stereo][with_stereo], lean.sites[stereo][with_stereo])


def test_nbs_rows_agree_but_for_stereo(both) -> None:
    # A screen writes the radical-carbon bromide as the chloride's SMILES with Br for Cl;
    # detail mode builds that bromide and asks RDKit for its canonical SMILES.
    full, lean = both
    assert len(full.allylic) > 200
    kept = [c for c in full.allylic.columns if c not in ("stereo", "n_stereoisomers", "n_diastereomers", "stereo_approx", "ez_open")]
    pd.testing.assert_frame_equal(full.allylic[kept], lean.allylic[kept])


def test_detail_on_demand_matches_full(structures: list[str]) -> None:
    frame = pd.DataFrame({"smiles": structures[::7]})
    library = engine.load_library(frame, use_cache=False)
    for row in range(len(frame)):
        if library.evaluate()["status"].iloc[row] != "ok":
            continue
        expected = engine.explain(frame["smiles"].iloc[row])
        products = library.products(row)
        assert (products["product"] != "").all()
        assert sorted(products["product"]) == sorted(p.smiles for p in expected.products)
        assert sorted(products["stereo"]) == sorted(p.stereo for p in expected.products)
        nbs = library.nbs_products(row)
        assert sorted(nbs["product"]) == sorted(p.smiles for p in expected.nbs)
        assert sorted(nbs["stereo"]) == sorted(p.stereo for p in expected.nbs)


def _class_patterns(perception: engine.Perception) -> set[tuple[tuple[int, int], ...]]:
    """Per structure, (site code, largest H count) of each abstractable class present."""
    sites = perception.sites[perception.sites["site_code"] < len(ABSTRACTABLE)]
    best = sites.groupby(["struct", "site_code"])["h_count"].max().reset_index()
    return {tuple(zip(g["site_code"], g["h_count"])) for _, g in best.groupby("struct")}


def test_contenders_cover_every_winner_on_a_condition_grid(both) -> None:
    # Brute force through the weighing's own rate code: at every grid point the largest
    # weight must belong to a class the vertex test named.
    full, _ = both
    patterns = _class_patterns(full)
    temps = np.geomspace(-200.0 + KELVIN, MAX_TEMP_C + KELVIN, 60) - KELVIN
    liquid_top = MAX_LIQUID_TEMP_C.value  # condensed-phase Cl2 is refused above it (Conditions.validate)
    grid = [Conditions(cl2_temp_c=min(t, liquid_top), br2_temp_c=t) for t in temps]
    grid += [Conditions(cl2_temp_c=t, cl2_phase="gas") for t in temps]
    grid += [Conditions(cl2_temp_c=t, cl2_solvent=s, cl2_solvent_molar=m)
             for t in temps[::6] if t <= liquid_top for s, m in (("benzene", 2.0), ("benzene", 11.2), ("cs2", 16.6))]
    rates = {r: np.array([c.per_h(r) for c in grid]) for r in ("cl2", "br2")}
    radical = {"cl2": "cl", "br2": "br"}
    winners_seen = 0
    for pattern in patterns:
        codes = np.array([c for c, _ in pattern])
        h = np.array([n for _, n in pattern], dtype=float)
        for reagent, k in rates.items():
            allowed = contending_classes(pattern, radical[reagent])
            weights = h[None, :] * k[:, codes]
            winners = set(codes[np.argmax(weights, axis=1)].tolist())
            assert winners <= allowed, (pattern, reagent)
            winners_seen += len(winners)
    assert winners_seen > len(patterns) * 2


def test_contenders_prune_where_a_class_can_never_win() -> None:
    # 2-methylbutane's classes: primary (6 H in the larger CH3 group), secondary (2 H), tertiary (1 H).
    # With this program's Br· rates (A per H larger for secondary and tertiary C–H) the tertiary bromide
    # leads up to about 1300 °C and the secondary beyond; the 6 primary H are never ahead of both, so
    # that product needs no SMILES or stereo.
    code = SITE_CLASSES.index
    pattern = tuple(sorted(((code("primary"), 6), (code("secondary"), 2), (code("tertiary"), 1))))
    assert contending_classes(pattern, "br") == {code("secondary"), code("tertiary")}
    hot, cold = Conditions(br2_temp_c=MAX_TEMP_C).per_h("br2"), Conditions(br2_temp_c=25.0).per_h("br2")
    assert 2 * hot[code("secondary")] > max(hot[code("tertiary")], 6 * hot[code("primary")])
    assert cold[code("tertiary")] > max(6 * cold[code("primary")], 2 * cold[code("secondary")])
    assert {code("primary"), code("tertiary")} <= contending_classes(pattern, "cl")


def test_product_smiles_are_rdkit_canonical(both) -> None:
    # Products are built by editing the substrate without a full sanitisation; their SMILES
    # must still be what RDKit writes for the same molecule parsed afresh (canonical, stable).
    full, _ = both
    for smiles in list(full.sites["product"]) + list(full.allylic["product"]):
        assert Chem.MolToSmiles(Chem.MolFromSmiles(smiles)) == smiles


def test_evaluate_refuses_conditions_outside_the_checked_range() -> None:
    # The pruning is proved only up to MAX_TEMP_C; beyond it the library must refuse, not guess.
    library = engine.load_library(pd.DataFrame({"smiles": ["CC(C)CC"]}), use_cache=False)
    with pytest.raises(ValueError, match="beyond any model"):
        library.evaluate(Conditions(br2_temp_c=MAX_TEMP_C + 1))
    assert library.evaluate(Conditions(br2_temp_c=MAX_TEMP_C))["status"].iloc[0] == "ok"
