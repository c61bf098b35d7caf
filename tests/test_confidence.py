"""The per-structure ``confidence`` column: weakest rate basis among products with ≥ 5 %."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from halosift import engine
from halosift.engine import Conditions
from halosift.engine.library import RESULT_COLUMNS, RESULT_DOCS
from halosift.engine.site_classes import SITE_CLASSES
from halosift.engine.weigh import BASES, basis_rank, ranks_at_cutoff

SMILES = ["CCC", "CC(C)C", "CCc1ccccc1", "C", "CC1CC1", "c1ccccc1", "CCO", "C=CC", "CC(C)CC"]


def test_columns_documented() -> None:
    assert "confidence" in RESULT_COLUMNS and "flags" in RESULT_COLUMNS
    assert set(RESULT_DOCS) == set(RESULT_COLUMNS)


def test_known_cases() -> None:
    gas = Conditions(cl2_phase="gas")
    result = engine.screen(pd.DataFrame({"smiles": SMILES}), gas, use_cache=False).set_index("smiles")
    # propane: gas-phase Cl· sites measured (Sarzyński & Sztuba 2002; Hass, McBee & Weber), Br· ratios
    # textbook (Morrison & Boyd) → textbook
    assert result.loc["CCC", "confidence"] == "textbook"
    # the neat-liquid default scales the gas-phase selectivities to one measured liquid ratio → estimate
    neat = engine.screen(pd.DataFrame({"smiles": ["CCC"]}), use_cache=False)
    assert neat["confidence"].iloc[0] == "estimate"
    # ethylbenzene: the benzylic constants are BEP estimates → estimate
    assert result.loc["CCc1ccccc1", "confidence"] == "estimate"
    # methane under Br· is a BEP extrapolation → estimate
    assert result.loc["C", "confidence"] == "estimate"
    # benzene: nothing abstractable → empty; ethanol rejected → empty
    assert result.loc["c1ccccc1", "confidence"] == "" and result.loc["CCO", "confidence"] == ""


@pytest.mark.parametrize("conditions", [Conditions(), Conditions(cl2_temp_c=200, br2_temp_c=60)])
def test_screen_agrees_with_explain(conditions: Conditions) -> None:
    result = engine.screen(pd.DataFrame({"smiles": SMILES}), conditions, use_cache=False)
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
    assert _label(code, below, cond) == ["textbook"]
    assert _label(code, above, cond) == ["estimate"]
    # Per reagent: a primary site weighed only under Cl2 (measured) is measured.
    only_cl = {"cl2": np.array([100.0, 0.0])}
    assert _label(code, only_cl, cond) == ["measured"]


def test_solvent_makes_cl2_estimate() -> None:
    result = engine.screen(pd.DataFrame({"smiles": ["CCC"]}), Conditions(cl2_solvent="benzene", cl2_solvent_molar=4),
                           use_cache=False)
    assert result["confidence"].iloc[0] == "estimate"


def test_products_carry_bases() -> None:
    lib = engine.load_library(pd.DataFrame({"smiles": ["CCC"]}), use_cache=False)
    prods = lib.products(0, Conditions(cl2_phase="gas"))
    assert set(prods["cl2_basis"]) == {"measured"} and set(prods["br2_basis"]) == {"textbook"}
