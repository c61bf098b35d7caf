"""Evaluation of a neighbour-dependent structure–activity relationship (SAR) for Cl· + C–H, not adopted.

Aschmann & Atkinson's SAR (Int. J. Chem. Kinet. 1995, 27, 613–622; pages checked, constants from memory, not re-checked:
engine.parameters.CL_SAR_GROUP_K298 and CL_SAR_F_NONMETHYL) writes the rate of a CH3, CH2 or CH group as a
group constant times F(X) for each carbon neighbour X, F(CH3) = 1 and F(CH2) = F(CH) = F(C) = 0.79 at 298 K,
fitted to whole-molecule rate constants — so every product distribution below is independent of its fit.

Two ways of adopting it are weighed against the published gas-phase distributions the model is checked on
(tests/test_published_distributions.py, which names each source):

* ``own``: the SAR with its own group constants;
* ``factors``: the model's per-class rates times the SAR factors, taken relative to the molecule each class
  constant comes from (propane's CH3 has one non-methyl neighbour, propane's CH2 and isobutane's CH none), so
  the model's anchors are kept.

Neither beats the adopted one-rate-per-class model; the README ("Neighbour effects toward Cl·") quotes the
numbers computed here, and a test keeps them in step.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from halosift.engine import parameters as P
from halosift.engine.rates import rate_table
from halosift.engine.site_classes import SITE_CODE
from rdkit import Chem
from test_published_distributions import CHECKS

from halosift import engine

#: Non-methyl carbon neighbours of the class constant's own site (propane CH3; propane CH2; isobutane CH).
_REFERENCE_NEIGHBOURS = {"primary": 1, "secondary": 0, "tertiary": 0}
_GROUP_H = {"primary": 3, "secondary": 2, "tertiary": 1}
#: The gas-phase checks at 25 °C (the SAR's temperature), all independent of the model's fits.
SAR_CHECKS = ("propane-cl2", "n-butane-cl2", "isobutane-cl2", "isobutane-cl2-gas", "propane-cl2-gas")
#: Also shown: the 300 °C vapour-phase distribution, with the SAR's 298 K constants applied unchanged (an
#: assumption: the SAR has no temperature dependence); a fit point of the model, so not in the totals.
EVAL_ROWS = (*SAR_CHECKS, "2-methylbutane-cl2-300")


def non_methyl_neighbours(chloride: str) -> int:
    """Carbon neighbours of the chlorinated carbon that are not CH3 (a neighbour keeps its H count)."""
    mol = Chem.MolFromSmiles(chloride)
    c = next(a.GetNeighbors()[0] for a in mol.GetAtoms() if a.GetSymbol() == "Cl")
    return sum(1 for n in c.GetNeighbors() if n.GetSymbol() == "C" and n.GetTotalNumHs() < 3)


def split(check_id: str, mode: str) -> dict[str, float]:
    """Percent of each product the check names under ``mode``: 'model', 'own' or 'factors'."""
    check = next(c for c in CHECKS if c.id == check_id)
    t = check.conditions.temp_k("cl2")
    k = rate_table("cl", check.conditions.phase("cl2")).per_h(t)
    f = P.CL_SAR_F_NONMETHYL.value
    weights = {}
    for p in engine.explain(check.smiles, check.conditions).products:
        if p.site not in _GROUP_H:
            continue
        n = non_methyl_neighbours(p.smiles)
        if mode == "model":
            w = p.h_count * k[SITE_CODE[p.site]]
        elif mode == "factors":
            w = p.h_count * k[SITE_CODE[p.site]] * f ** (n - _REFERENCE_NEIGHBOURS[p.site])
        else:
            w = p.h_count * P.CL_SAR_GROUP_K298[p.site] / _GROUP_H[p.site] * f**n
        weights[Chem.CanonSmiles(p.smiles)] = w
    total = sum(weights.values())
    return {smi: 100 * weights[Chem.CanonSmiles(smi)] / total for smi in check.published}


def error(check_id: str, mode: str) -> float:
    """Percentage points between the first named product's published and predicted share."""
    check = next(c for c in CHECKS if c.id == check_id)
    first = next(iter(check.published))
    return abs(split(check_id, mode)[first] - check.published[first])


def test_model_mode_is_the_engine() -> None:
    # The evaluation's own weighing of the adopted model reproduces the engine's percentages.
    from test_published_distributions import predicted

    for cid in SAR_CHECKS:
        check = next(c for c in CHECKS if c.id == cid)
        assert split(cid, "model") == pytest.approx(predicted(check), abs=0.05), cid


@pytest.mark.parametrize("mode", ["own", "factors"])
def test_sar_does_not_improve_the_gas_phase_checks(mode: str) -> None:
    # Adopting the SAR (either way) would put the model further from the published distributions, summed over
    # the independent gas-phase checks (by 22.6 points with its own constants, 5.1 with its factors, all of the
    # latter n-butane's); 'factors' also takes n-butane out of its ±5 tolerance.
    model = sum(error(c, "model") for c in SAR_CHECKS)
    sar = sum(error(c, mode) for c in SAR_CHECKS)
    assert sar - model > 4, (mode, model, sar)
    assert error("n-butane-cl2", "factors") > next(c for c in CHECKS if c.id == "n-butane-cl2").tolerance


def fitted_factor(check_id: str = "n-butane-cl2") -> float:
    """The SAR-style factor per extra non-methyl neighbour ('factors' mode) that makes ``check_id``'s first product
    the published share: a neighbour factor fitted on one distribution (bisection; a larger F speeds the CH2
    with the extra neighbour, so the first product, n-butane's 1-chloride, falls as F rises)."""
    check = next(c for c in CHECKS if c.id == check_id)
    first = next(iter(check.published))
    lo, hi = 0.5, 1.5
    for _ in range(60):
        mid = (lo + hi) / 2
        if _factors_split(check_id, mid)[first] > check.published[first]:
            lo = mid
        else:
            hi = mid
    return (lo + hi) / 2


def _factors_split(check_id: str, f: float) -> dict[str, float]:
    saved = P.CL_SAR_F_NONMETHYL
    try:
        P.CL_SAR_F_NONMETHYL = P.Value(f, saved.basis, saved.source)
        return split(check_id, "factors")
    finally:
        P.CL_SAR_F_NONMETHYL = saved


def test_a_factor_fitted_on_n_butane_is_no_neighbour_effect() -> None:
    # Fitting the one factor on n-butane's distribution (the only 25 °C check whose sites differ from the class
    # constants' own neighbours: its CH2 has an ethyl neighbour) asks for a CH2 slightly *faster* per extra
    # non-methyl neighbour, not 0.79× slower: the distributions show no neighbour attenuation. Propane and
    # isobutane cannot test it (unchanged by construction), so nothing independent is left to check it on.
    f = fitted_factor()
    assert f == pytest.approx(1.04, abs=0.01)
    assert abs(f - 1.0) < abs(P.CL_SAR_F_NONMETHYL.value - 1.0) / 4


def test_readme_quotes_the_evaluation() -> None:
    # The README's evaluation table (one row per check: published, model, own, factors) shows these numbers.
    text = (Path(__file__).resolve().parent.parent / "README.md").read_text(encoding="utf-8")
    rows = {m.group(1): m.group(2) for m in re.finditer(r"^\| SAR `([^`]+)` \|(.*)$", text, re.M)}
    assert set(rows) == set(EVAL_ROWS)
    for cid in EVAL_ROWS:
        cells = [c.strip() for c in rows[cid].split("|")]
        for cell, mode in zip(cells[1:4], ("model", "own", "factors")):
            shown = [float(x) for x in re.findall(r"[\d.]+", cell)]
            assert shown == pytest.approx([round(v, 1) for v in split(cid, mode).values()], abs=0.05), (cid, mode)
    total = re.search(r"^\| SAR total \|[^|]*\| ([\d.]+) \| ([\d.]+) \| ([\d.]+) \|", text, re.M)
    assert total is not None
    for got, mode in zip(total.groups(), ("model", "own", "factors")):
        assert float(got) == pytest.approx(sum(error(c, mode) for c in SAR_CHECKS), abs=0.15), mode


# --- Whole-molecule rate constants -----------------------------------------------------------------------------
#: Cl + alkane, gas phase, 298 K: (name, SMILES, k cm³ molecule⁻¹ s⁻¹, stated uncertainty). Source: the evaluated
#: compilation of gas-phase rate constants shipped as the ``reactions`` data set of the gt R package
#: (github.com/rstudio/gt, data-raw/reactions.csv, commit 042da4e8b42231b89844de523e1fa457f3be8e13, columns
#: Cl_k298 and Cl_unc; that it reproduces McGillen et al., Earth Syst. Sci. Data 2020, is from memory). None of
#: these numbers set a model parameter (the model's Cl· constants are Sarzyński & Sztuba's site fits). Every saturated
#: hydrocarbon of the file with a Cl rate constant is listed except methane and cyclopropane (classes of their own,
#: engine.parameters.CL_METHANE / CL_CYCLOPROPANE are taken from the same file).
WHOLE_MOLECULE = (
    ("ethane", "CC", 5.80e-11, 0.15),
    ("propane", "CCC", 1.40e-10, 0.15),
    ("cyclobutane", "C1CCC1", 2.20e-10, 0.32),
    ("2-methylpropane", "CC(C)C", 1.40e-10, 0.10),
    ("n-butane", "CCCC", 2.05e-10, 0.15),
    ("cyclopentane", "C1CCCC1", 2.90e-10, 0.21),
    ("2,2-dimethylpropane", "CC(C)(C)C", 1.10e-10, 0.18),
    ("2-methylbutane", "CCC(C)C", 2.10e-10, 0.14),
    ("n-pentane", "CCCCC", 2.70e-10, 0.15),
    ("cyclohexane", "C1CCCCC1", 3.30e-10, 0.15),
    ("2,3-dimethylbutane", "CC(C(C)C)C", 2.20e-10, 0.14),
    ("3-methylpentane", "CCC(CC)C", 2.69e-10, 0.20),
    ("2-methylpentane", "CCCC(C)C", 2.80e-10, 0.14),
    ("n-hexane", "CCCCCC", 3.30e-10, 0.15),
    ("cycloheptane", "C1CCCCCC1", 4.22e-10, 0.10),
    ("methylcyclohexane", "CC1CCCCC1", 3.54e-10, 0.15),
    ("2,2,3-trimethylbutane", "CC(C(C)(C)C)C", 1.93e-10, 0.20),
    ("2,4-dimethylpentane", "CC(CC(C)C)C", 2.77e-10, 0.20),
    ("n-heptane", "CCCCCCC", 3.80e-10, 0.16),
    ("cyclooctane", "C1CCCCCCC1", 4.53e-10, 0.15),
    ("2,2,3,3-tetramethylbutane", "CC(C(C)(C)C)(C)C", 1.69e-10, 0.20),
    ("2,2,4-trimethylpentane", "CC(CC(C)(C)C)C", 2.50e-10, 0.16),
    ("n-octane", "CCCCCCCC", 4.40e-10, 0.16),
    ("n-nonane", "CCCCCCCCC", 4.60e-10, 0.20),
    ("n-decane", "CCCCCCCCCC", 5.27e-10, 0.21),
    ("n-undecane", "CCCCCCCCCCC", 5.47e-10, 0.15),
    ("n-dodecane", "CCCCCCCCCCCC", 5.12e-10, 0.15),
    ("n-tridecane", "CCCCCCCCCCCCC", 5.30e-10, 0.15),
    ("n-tetradecane", "CCCCCCCCCCCCCC", 5.68e-10, 0.15),
    ("n-hexylcyclohexane", "CCCCCCC1CCCCC1", 5.28e-10, 0.20),
    ("2-methylhexane", "CCCCC(C)C", 3.38e-10, 0.20),
    ("cyclodecane", "C1CCCCCCCCC1", 5.13e-10, 0.10),
    ("(Z)-1,4-dimethylcyclohexane", "C[C@@H]1CC[C@@H](CC1)C", 2.89e-10, 0.10),
    ("(E)-1,4-dimethylcyclohexane", "C[C@@H]1CC[C@H](CC1)C", 3.26e-10, 0.16),
    ("1,3,5-trimethylcyclohexane", "CC1CC(C)CC(C1)C", 2.61e-10, 0.16),
    ("ethylcyclohexane", "CCC1CCCCC1", 3.88e-10, 0.11),
    ("n-heptylcyclohexane", "CCCCCCCC1CCCCC1", 5.74e-10, 0.30),
    ("n-octylcyclohexane", "CCCCCCCCC1CCCCC1", 5.92e-10, 0.30),
)
_DEGREE_OF_H = {3: "primary", 2: "secondary", 1: "tertiary"}
#: What the 'pair' variant is fitted on (the one molecule; every other row is a check of it).
PAIR_FIT = "cyclohexane"


def _groups(smiles: str) -> list[tuple[str, int, int]]:
    """Per H-bearing carbon (methane excepted): its class, H count and number of non-methyl carbon neighbours."""
    mol = Chem.MolFromSmiles(smiles)
    return [
        (_DEGREE_OF_H[a.GetTotalNumHs()], a.GetTotalNumHs(),
         sum(1 for n in a.GetNeighbors() if n.GetTotalNumHs() < 3))
        for a in mol.GetAtoms() if 1 <= a.GetTotalNumHs() <= 3
    ]


def whole_k(smiles: str, mode: str, pair: float = 1.0) -> float:
    """k(298 K) of the whole molecule: 'model' (one rate per class), 'own' (the SAR), or 'pair' (a CH2 between
    two non-methyl carbons × ``pair``, every other site as the model)."""
    k = rate_table("cl", "gas").per_h(298.0)
    f = P.CL_SAR_F_NONMETHYL.value
    total = 0.0
    for degree, h, n in _groups(smiles):
        if mode == "own":
            total += P.CL_SAR_GROUP_K298[degree] * f**n
        else:
            factor = pair if (mode == "pair" and degree == "secondary" and n == 2) else 1.0
            total += h * k[SITE_CODE[degree]] * factor
    return total


def pair_factor() -> float:
    """The 'pair' factor that makes cyclohexane's k(298 K) the measured one."""
    _, smiles, k, _ = next(row for row in WHOLE_MOLECULE if row[0] == PAIR_FIT)
    return k / whole_k(smiles, "model")


def ratios(name: str) -> tuple[float, float, float]:
    """Predicted / measured k(298 K) for the model, the SAR and the pair variant."""
    _, smiles, k, _ = next(row for row in WHOLE_MOLECULE if row[0] == name)
    return (whole_k(smiles, "model") / k, whole_k(smiles, "own") / k, whole_k(smiles, "pair", pair_factor()) / k)


def _kind(smiles: str) -> str:
    """'chain' (acyclic), 'ring' (one ring, no substituent), 'substituted ring'."""
    mol = Chem.MolFromSmiles(smiles)
    if not mol.GetRingInfo().NumRings():
        return "chain"
    return "ring" if all(a.IsInRing() for a in mol.GetAtoms()) else "substituted ring"


def _carbons(smiles: str) -> int:
    return Chem.MolFromSmiles(smiles).GetNumAtoms()


def test_whole_molecule_open_chains_up_to_c8_within_uncertainty() -> None:
    # Independent: the one-rate-per-class model sums to the compiled k(298 K) of every open-chain alkane up to
    # C8 (branched ones included) within the compilation's stated uncertainty.
    checked = 0
    for name, smiles, _, unc in WHOLE_MOLECULE:
        if _kind(smiles) == "chain" and _carbons(smiles) <= 8:
            assert ratios(name)[0] == pytest.approx(1.0, abs=unc), name
            checked += 1
    assert checked == 18  # the file's open-chain alkanes C2–C8


def test_whole_molecule_rings_and_long_chains_are_overestimated() -> None:
    # The model's known shortcoming (README, "Neighbour effects toward Cl·"): every ring and every chain from C9 on
    # comes out more than 15 % too fast (20–73 %). Fixing it must update the README.
    for name, smiles, *_ in WHOLE_MOLECULE:
        if _kind(smiles) != "chain" or _carbons(smiles) >= 9:
            assert ratios(name)[0] > 1.15, name
    assert pair_factor() == pytest.approx(0.76, abs=0.01)
    # The pair variant, fitted on cyclohexane alone, brings every open chain up to C11 and every unsubstituted
    # ring within 10 %, but not the alkylcyclohexanes' ring CH (nor C12 and longer chains, which level off
    # towards 5–6e-10, as no sum over sites does).
    for name, smiles, *_ in WHOLE_MOLECULE:
        model, _, pair = ratios(name)
        if (_kind(smiles) == "chain" and _carbons(smiles) <= 11) or _kind(smiles) == "ring":
            assert pair == pytest.approx(1.0, abs=0.10), name
        elif _kind(smiles) == "chain":
            assert pair > 1.2, name


def test_readme_quotes_the_whole_molecule_evaluation() -> None:
    text = (Path(__file__).resolve().parent.parent / "README.md").read_text(encoding="utf-8")
    rows = {m.group(1): m.group(2) for m in re.finditer(r"^\| k298 ([^|]+?) \|(.*)$", text, re.M)}
    assert set(rows) == {row[0] for row in WHOLE_MOLECULE}
    for name, got in rows.items():
        cells = [c.strip() for c in got.split("|")]
        shown = [float(c) for c in cells[1:4]]
        assert shown == pytest.approx([round(r, 2) for r in ratios(name)], abs=0.006), name
