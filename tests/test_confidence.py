"""The per-structure ``confidence`` column: weakest basis among products with ≥ 5 %.

A prediction's basis is that of every value its product shares rest on: each product's rate constant and any
split of that product (exo/endo of a norbornane 2-halide, the two termini of an allyl radical). A published
value quoted from memory (its source in engine.parameters says "from memory") makes it "from memory"; one
resting only on values checked against their publication says "measured".
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from halosift.engine import Conditions
from halosift.engine import parameters as P
from halosift.engine.library import RESULT_COLUMNS, RESULT_DOCS
from halosift.engine.rates import CONFIDENCE_BASES, TABLES, product_basis, rate_table, stated_basis
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CLASSES
from halosift.engine.weigh import BASES, basis_rank, ranks_at_cutoff

from halosift import engine

SMILES = ["CCC", "CC(C)C", "CCc1ccccc1", "C", "CC1CC1", "c1ccccc1", "CCO", "C=CC", "CC(C)CC"]
GAS = Conditions(cl2_phase="gas")


def test_columns_documented() -> None:
    assert "confidence" in RESULT_COLUMNS and "flags" in RESULT_COLUMNS
    assert set(RESULT_DOCS) == set(RESULT_COLUMNS)
    assert BASES == CONFIDENCE_BASES and all(b in RESULT_DOCS["confidence"] for b in BASES)


def test_known_cases() -> None:
    result = engine.screen(pd.DataFrame({"smiles": SMILES}), GAS, use_cache=False).set_index("smiles")
    # propane: the gas-phase Cl· secondary rate passes through Hass, McBee & Weber's 300 °C ratios and the Br·
    # ratios are Morrison & Boyd's, both quoted from memory → from memory
    assert result.loc["CCC", "confidence"] == "from memory"
    # the neat-liquid default scales the gas-phase selectivities to one measured liquid ratio → estimate
    neat = engine.screen(pd.DataFrame({"smiles": ["CCC"]}), use_cache=False)
    assert neat["confidence"].iloc[0] == "estimate"
    # ethylbenzene: the Br· benzylic constants are Evans–Polanyi estimates → estimate
    assert result.loc["CCc1ccccc1", "confidence"] == "estimate"
    # methane under Br· is an extrapolation → estimate
    assert result.loc["C", "confidence"] == "estimate"
    # benzene: nothing abstractable → empty; ethanol rejected → empty
    assert result.loc["c1ccccc1", "confidence"] == "" and result.loc["CCO", "confidence"] == ""


def test_measured_only_prediction_says_measured() -> None:
    # Cl2 alone on neopentane, gas phase: one primary rate, Sarzyński & Sztuba's propane CH3 fit (Int. J. Chem.
    # Kinet. 2002, 34, 651), not marked from memory → measured. The same structure with Br2 counted rests on
    # Morrison & Boyd's ratios (textbook, from memory) → from memory.
    e = engine.explain("CC(C)(C)C", GAS)
    assert e.confidence(("cl2",)) == "measured"
    assert e.confidence(("cl2", "br2")) == "from memory"
    # Ethylbenzene + Cl2 in the neat liquid: α from the measured α/β split and Eα − Eβ (abstract checked),
    # β from the measured primary fit → measured.
    assert engine.explain("CCc1ccccc1").confidence(("cl2",)) == "measured"


def test_extrapolated_temperature_is_an_estimate() -> None:
    # Outside the temperature range of a reagent's rate data (Conditions.warnings names it) every rate is an
    # extrapolation. Gas-phase Cl·: Sarzyński & Sztuba's 295–469 K and the 300 °C vapour-phase data.
    inside = Conditions(cl2_temp_c=250.0, cl2_phase="gas")
    outside = Conditions(cl2_temp_c=450.0, cl2_phase="gas")
    assert not inside.warnings(("cl2",)) and outside.warnings(("cl2",))
    assert engine.explain("CC(C)(C)C", inside).confidence(("cl2",)) == "measured"
    assert engine.explain("CC(C)(C)C", outside).confidence(("cl2",)) == "estimate"
    # 1-butene at 450 °C, where Cl2 substitutes rather than adds: its CH3 product too is an extrapolation.
    e = engine.explain("C=CCC", outside)
    assert {p.rate_basis["cl2"] for p in e.products if p.pct["cl2"] > 0} == {"estimate"}
    # Br·: the 127 °C ratios and the reverse kinetics span 298–536 K.
    assert engine.explain("CC(C)(C)C", Conditions(br2_temp_c=300.0)).confidence(("br2",)) == "estimate"


def test_norbornane_exo_split_counts() -> None:
    # The 2-halide's exo/endo split is part of the prediction: under Br2 it is an estimate (EXO_FRACTION['br']),
    # so norbornane + Br2 is an estimate although the open-chain secondary Br· rate is textbook (from memory);
    # under gas-phase Cl2 the 70 : 30 split is quoted from memory (Kooyman & Vegter 1958).
    e = engine.explain("C1CC2CCC1C2", GAS)
    two = next(p for p in e.products if p.site.startswith("norbornyl-2"))
    assert P.EXO_FRACTION["br"].basis == "estimate" and two.rate_basis["br2"] == "estimate"
    assert e.confidence(("br2",)) == "estimate"
    assert "from memory" in P.EXO_FRACTION["cl"].source and two.rate_basis["cl2"] == "from memory"
    assert stated_basis(P.BR_RATIOS["secondary"].basis, P.BR_RATIOS["secondary"].source) == "from memory"


@pytest.mark.parametrize(("smiles", "conditions", "reagents"), [
    # propene above the temperature at which Cl2 substitutes a C=C (ALKENE_SUBSTITUTION_T_C): the allyl radical's
    # two termini are weighed by NBS_SUBSTITUENT_FACTOR, an estimate
    ("C=CC", Conditions(cl2_temp_c=450.0, cl2_phase="gas"), ("cl2",)),
    ("C=CC", Conditions(br2_temp_c=450.0), ("br2",)),
    # NBS termini: 1-octene (the same factor)
    ("C=CCCCCCC", Conditions(), ("nbs",)),
    # Br· benzylic: toluene's primary benzylic C–H is placed by an Evans–Polanyi slope (BEP_ALPHA_DELOCALISED_BR)
    ("Cc1ccccc1", Conditions(), ("br2",)),
    ("Cc1ccccc1", Conditions(), ("nbs",)),
])
def test_every_path_reports_its_basis(smiles: str, conditions: Conditions, reagents: tuple[str, ...]) -> None:
    e = engine.explain(smiles, conditions)
    assert all(o.outcome != "ruled-out" for o in e.outcomes if o.reagent in reagents), smiles
    assert e.confidence(reagents) == "estimate", (smiles, reagents)


def test_allyl_terminus_split_is_part_of_every_allylic_basis() -> None:
    # Whatever an allylic rate rests on, the terminus weights (an estimate) are part of the product's share.
    assert P.NBS_SUBSTITUENT_FACTOR.basis == "estimate"
    for radical, phase in TABLES:
        table = rate_table(radical, phase)
        for site in ABSTRACTABLE:
            if site.startswith("allylic-") or site == "conjugated":
                assert product_basis(table, site) == "estimate", (radical, phase, site)


def test_nothing_from_memory_reads_measured() -> None:
    # The class of error: a value whose source says "from memory" must never surface as measured or textbook.
    for radical, phase in TABLES:
        table = rate_table(radical, phase)
        for site in ABSTRACTABLE:
            p = table.params[site]
            if "from memory" in p.source and p.basis != "estimate":
                assert product_basis(table, site) in ("from memory", "estimate"), (radical, phase, site)
            if product_basis(table, site) == "measured":
                assert "from memory" not in p.source, (radical, phase, site)
    assert stated_basis("measured", "a paper (from memory)") == "from memory"
    assert stated_basis("estimate", "a guess (from memory)") == "estimate"
    assert stated_basis("measured", "a paper, checked") == "measured"


@pytest.mark.parametrize("conditions", [Conditions(), Conditions(cl2_temp_c=200, br2_temp_c=60), GAS])
def test_screen_agrees_with_explain(conditions: Conditions) -> None:
    smiles = SMILES + ["C1CC2CCC1C2", "C=CCCCCCC", "CC(C)(C)C"]
    result = engine.screen(pd.DataFrame({"smiles": smiles}), conditions, use_cache=False)
    for smi, conf in zip(result["smiles"], result["confidence"]):
        e = engine.explain(smi, conditions)
        assert conf == (e.confidence() if e.status == "ok" else ""), smi
        if e.status == "ok":
            assert e.to_dict()["confidence"] == conf


def _label(code: np.ndarray, pct: dict[str, np.ndarray], cond: Conditions) -> list[str]:
    """One structure's confidence from the screen's own rule (engine.weigh.ranks_at_cutoff)."""
    worst = min(int(ranks_at_cutoff(code, p, basis_rank(cond, r)).min()) for r, p in pct.items())
    return [(*BASES, "")[worst]]


def test_five_percent_cut_off() -> None:
    code = np.array([SITE_CLASSES.index("primary"), SITE_CLASSES.index("benzylic-primary")])
    cond = Conditions()
    below = {"cl2": np.array([96.0, 4.0]), "br2": np.array([97.0, 3.0])}
    above = {"cl2": np.array([94.0, 6.0]), "br2": np.array([97.0, 3.0])}
    # Br· primary: Morrison & Boyd, from memory
    assert _label(code, below, cond) == ["from memory"]
    assert _label(code, above, cond) == ["estimate"]
    # Per reagent: a primary site weighed only under Cl2 (Sarzyński & Sztuba's fit, measured) is measured.
    only_cl = {"cl2": np.array([100.0, 0.0])}
    assert _label(code, only_cl, cond) == ["measured"]


def test_solvent_makes_cl2_estimate() -> None:
    result = engine.screen(pd.DataFrame({"smiles": ["CCC"]}), Conditions(cl2_solvent="benzene", cl2_solvent_molar=4),
                           use_cache=False)
    assert result["confidence"].iloc[0] == "estimate"


def test_products_carry_bases() -> None:
    lib = engine.load_library(pd.DataFrame({"smiles": ["CCC"]}), use_cache=False)
    prods = lib.products(0, GAS).set_index("site")
    assert prods.loc["primary", "cl2_basis"] == "measured" and prods.loc["secondary", "cl2_basis"] == "from memory"
    assert set(prods["br2_basis"]) == {"from memory"}
