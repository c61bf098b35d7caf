"""NBS radical formation weighed by the allyl radical formed, and conjugation credited (engine.nbs).

Sources: the rules are common practice of radical chemistry (an allyl radical's stability is set by the
substituents on its termini; further conjugation with an arene or C=C stabilises it more); the numbers
behind them are in engine.parameters (BR_BENZYLIC_RATIOS, BDE['conjugated'], NBS_CONJUGATION_SUBSTITUENTS),
all marked there.
"""

from __future__ import annotations

import pytest
from halosift.engine.nbs import radical_class
from halosift.engine.perception import perceive
from halosift.engine.site_classes import SITE_CODE
from rdkit import Chem

from halosift import engine


def nbs_split(smiles: str) -> dict[str, float]:
    return {p.smiles: p.pct for p in engine.explain(smiles).nbs}


@pytest.mark.parametrize(
    ("smiles", "atom", "expected"),
    [
        ("C=CCC", 2, "allylic-secondary"),      # 1-butene C3 → 1-methylallyl
        ("CC=CC", 0, "allylic-secondary"),      # 2-butene CH3 → the same 1-methylallyl radical
        ("C=CC", 2, "allylic-primary"),         # propene → allyl
        ("CC=C(C)C", 0, "allylic-tertiary"),    # 2-methyl-2-butene C1 → 1,1-dimethylallyl
        ("C1=CCCCC1", 2, "allylic-tertiary"),   # cyclohexene C3: a ring carbon on each terminus
        ("C=CCc1ccccc1", 2, "conjugated"),      # allylbenzene CH2 → 1-phenylallyl
        ("C=CCC=C", 2, "conjugated"),           # 1,4-pentadiene C3 → pentadienyl
        ("CC=CC=C", 0, "conjugated"),           # 1,3-pentadiene CH3 → pentadienyl (conjugated far terminus)
        ("c1ccc(Cc2ccccc2)cc1", 6, "conjugated"),  # diphenylmethane → diphenylmethyl
        ("CCc1ccccc1", 1, "benzylic-secondary"),
    ],
)
def test_radical_class(smiles: str, atom: int, expected: str) -> None:
    mol = Chem.MolFromSmiles(smiles)
    site = next(g.site for g in engine.sites.site_groups(mol, False) if atom in g.atoms)
    assert radical_class(mol, atom, site) == expected


def test_same_radical_same_rate() -> None:
    # 1-butene's C3–H and 2-butene's CH3 both give the 1-methylallyl radical: one rate per H.
    p = perceive(["C=CCC", "CC=CC"])
    codes = p.allylic.groupby("struct")["radical_code"].unique()
    assert list(codes[0]) == list(codes[1]) == [SITE_CODE["allylic-secondary"]]


def test_doubly_allylic_site_wins() -> None:
    # 1,4-hexadiene: the doubly allylic CH2 (pentadienyl radical) is brominated, not the allylic CH3.
    p = perceive(["C=CCC=CC"])
    rows = p.allylic
    per_h = engine.Conditions().per_h("nbs")
    rate = rows["h_count"] * per_h[rows["radical_code"]] * rows["share"]
    conj = rows["radical_code"] == SITE_CODE["conjugated"]
    assert rate[conj].sum() > 10 * rate[~conj].sum()


def test_allylbenzene_gives_cinnamyl_bromide() -> None:
    # Allylbenzene + NBS gives mainly cinnamyl bromide, the Br at the end away from the ring so that
    # the new C=C is conjugated with it (common practice, from memory).
    split = nbs_split("C=CCc1ccccc1")
    assert max(split, key=split.get) == "BrCC=Cc1ccccc1" and split["BrCC=Cc1ccccc1"] > 90


def test_terminus_weights_credit_conjugation() -> None:
    # 1,4-pentadiene: Br at the terminus that leaves a conjugated diene beats Br at the central carbon.
    split = nbs_split("C=CCC=C")
    assert split["C=CC=CCBr"] > split["C=CC(Br)C=C"]
