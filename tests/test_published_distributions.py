"""The model against published product distributions (source beside each check).

Every check is one :class:`Check`: substrate, reagent, conditions, the
published percentages, the tolerance (percentage points, stated per check) and
the source. ``fitted`` names the parameter a check was used to set, when it
was: such a check guards the derivation and is not independent evidence; every
other check compares the model with data none of its parameters was fitted
on. The README's "Published checks" table lists the same checks, with the
model's current predictions (a test below keeps the two in step).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

import pytest
from halosift.engine import Conditions
from halosift.engine.parameters import MAX_LIQUID_TEMP_C
from rdkit import Chem

from halosift import engine


@dataclass(frozen=True)
class Check:
    """One published product distribution and how closely the model must meet it."""

    id: str
    """Short name, also the first column of the README table."""
    smiles: str
    """Substrate."""
    reagent: str
    """cl2, br2 or nbs."""
    conditions: Conditions
    """Conditions of the experiment, as the model takes them."""
    published: dict[str, float]
    """Product SMILES (chloride for cl2/br2 site products, bromide for nbs) → published percent."""
    tolerance: float
    """Allowed difference, percentage points."""
    source: str
    """Where the published numbers come from."""
    fitted: str = ""
    """The parameter this distribution set (empty: an independent check)."""
    exo: bool = False
    """Compare the exo share of the 2-halide (percent of it) instead of product shares."""


GAS25 = Conditions(cl2_temp_c=25.0, cl2_phase="gas")
GAS195 = Conditions(cl2_temp_c=195.0 - 273.15, cl2_phase="gas")
#: Laser flash photolysis with IR detection of HCl; branching from normal and selectively deuterated substrates
#: (numbers checked against the paper's indexed abstract, PubMed 16751875).
_CHOI = ("Choi, Pilling, Seakins & Wang, Phys. Chem. Chem. Phys. 2006, 8, 2172–2178, Cl + alkane branching by "
         "HCl yields of normal and deuterated substrates")
LIQ25 = Conditions(cl2_temp_c=25.0)
BR127 = Conditions(br2_temp_c=127.0)

CHECKS = [
    Check("propane-cl2", "CCC", "cl2", GAS25, {"CCCCl": 45, "CC(C)Cl": 55}, 5,
          "propane + Cl2, 25 °C: 45/55 (Morrison & Boyd, textbook, from memory)"),
    Check("n-butane-cl2", "CCCC", "cl2", GAS25, {"CCCCCl": 28, "CCC(C)Cl": 72}, 5,
          "n-butane + Cl2, 25 °C: 28/72 (Morrison & Boyd, textbook, from memory)"),
    Check("isobutane-cl2", "CC(C)C", "cl2", GAS25, {"CC(C)CCl": 64, "CC(C)(C)Cl": 36}, 5,
          "isobutane + Cl2, 25 °C: 64/36 (Morrison & Boyd, textbook, from memory)"),
    Check("isobutane-cl2-gas", "CC(C)C", "cl2", GAS25, {"CC(C)CCl": 62}, 5,
          "isobutane + Cl2, gas, room temperature: 62 % primary (Choi et al., PCCP 2006, 8, 2172)"),
    Check("propane-cl2-gas", "CCC", "cl2", GAS25, {"CCCCl": 48}, 5, _CHOI + ": propane, 298 K, primary (48 ± 3) %"),
    Check("propane-cl2-195K", "CCC", "cl2", GAS195, {"CCCCl": 40}, 5,
          _CHOI + ": propane, 195 K, primary (40 ± 3) %; below the 22 °C start of the rate data, so an extrapolation"),
    Check("2-methylbutane-cl2-300", "CCC(C)C", "cl2", Conditions(cl2_temp_c=300.0, cl2_phase="gas"),
          {"CCC(C)CCl": 30, "CCC(C)(C)Cl": 22, "CC(C)C(C)Cl": 33, "CC(C)CCCl": 15}, 5,
          "2-methylbutane + Cl2, 300 °C vapour: 30/22/33/15 (Hass, McBee & Weber, Ind. Eng. Chem. 1936, 28, 333, "
          "from memory)", fitted="CL_VAPOUR_RATIOS (their per-H rule summarises these data)"),
    Check("ethylbenzene-cl2", "CCc1ccccc1", "cl2", LIQ25, {"CC(Cl)c1ccccc1": 90, "ClCCc1ccccc1": 10}, 1,
          "ethylbenzene + Cl2, liquid: α 90 %/β 10 % (liquid-phase photochlorination of alkylbenzenes, abstract "
          "indexed at scilit.com)", fitted="CL_ETHYLBENZENE_ALPHA_PCT"),
    Check("norbornane-cl2", "C1CC2CCC1C2", "cl2", LIQ25,
          {"ClC1CC2CCC1C2": 96, "ClC1C2CCC1CC2": 3, "ClC12CCC(CC1)C2": 1}, 1,
          "norbornane + Cl2, liquid, ≈ 25 °C: 2-Cl 96/7-Cl 3/1-Cl 1 (Kooyman & Vegter 1958; Russell & Hendry; "
          "split from memory)", fitted="NORBORNANE_CL2"),
    Check("norbornane-cl2-exo", "C1CC2CCC1C2", "cl2", LIQ25, {"ClC1CC2CCC1C2": 70}, 1,
          "norbornane + Cl2: exo : endo 2-chloride ≈ 70 : 30 (Kooyman & Vegter 1958; from memory)",
          fitted="EXO_FRACTION['cl']", exo=True),
    Check("bicyclooctane-cl2", "C1CC2CCC1CC2", "cl2", LIQ25, {"ClC1CC2CCC1CC2": 97}, 3,
          "bicyclo[2.2.2]octane + Cl2: the 2-chloride almost only (from memory, not re-checked: a published "
          "distribution was searched for and not found; the bridgehead factor is norbornane's)"),
    Check("propane-br2", "CCC", "br2", BR127, {"CCCCl": 3, "CC(C)Cl": 97}, 2,
          "propane + Br2, 127 °C: 3/97 (Morrison & Boyd, textbook, from memory)", fitted="BR_RATIOS['secondary']"),
    Check("isobutane-br2", "CC(C)C", "br2", BR127, {"CC(C)(C)Cl": 99.5}, 0.5,
          "isobutane + Br2, 127 °C: > 99 % tert-butyl bromide (Morrison & Boyd, textbook, from memory)",
          fitted="BR_RATIOS['tertiary']"),
    Check("n-butane-br2", "CCCC", "br2", BR127, {"CCC(C)Cl": 98}, 2,
          "n-butane + Br2, 127 °C: ≈ 98 % 2-bromobutane (textbook, from memory)"),
    Check("norbornane-br2", "C1CC2CCC1C2", "br2", BR127, {"ClC1CC2CCC1C2": 99}, 1.5,
          "norbornane + Br2: the 2-bromide almost only (common practice, from memory); the Br· bicyclic rates "
          "are Evans–Polanyi estimates, not fitted on any distribution"),
    Check("1-octene-nbs", "C=CCCCCCC", "nbs", Conditions(), {"C=CC(Br)CCCCC": 17}, 1,
          "1-octene + NBS: ≈ 17 % 3-bromo-1-octene / 83 % 1-bromo-2-octene (from memory)",
          fitted="NBS_OCTENE_SPLIT"),
]

#: Published distributions the model is known to miss by more than the tolerance: each stays listed (README
#: table, kind "known miss") with the size of the miss, and a test fails once the model meets it, so the
#: README is brought up to date.
KNOWN_MISSES = [
    Check("isobutane-cl2-195K", "CC(C)C", "cl2", GAS195, {"CC(C)CCl": 49}, 5,
          _CHOI + ": isobutane, 195 K, primary (49 ± 4) %; the model's tertiary/primary temperature dependence "
          "(Sarzyński & Sztuba's fits, 295–469 K, extrapolated) is far shallower than this point implies"),
]


def predicted(check: Check) -> dict[str, float]:
    """The model's percentages for the products a check names (exo share for an exo check)."""
    e = engine.explain(check.smiles, check.conditions)
    if check.reagent == "nbs":
        got = {Chem.CanonSmiles(p.smiles): p.pct for p in e.nbs}
    elif check.exo:
        got = {Chem.CanonSmiles(p.smiles): 100 * p.exo_fraction[check.reagent] for p in e.products if p.exo_fraction}
    else:
        got = {Chem.CanonSmiles(p.smiles): p.pct[check.reagent] for p in e.products}
    return {smi: got.get(Chem.CanonSmiles(smi), 0.0) for smi in check.published}


@pytest.mark.parametrize("check", CHECKS, ids=[c.id for c in CHECKS])
def test_published_distribution(check: Check) -> None:
    got = predicted(check)
    for product, expected in check.published.items():
        assert got[product] == pytest.approx(expected, abs=check.tolerance), (check.source, product, got)


@pytest.mark.parametrize("check", KNOWN_MISSES, ids=[c.id for c in KNOWN_MISSES])
def test_known_miss_is_still_missed(check: Check) -> None:
    # A known shortcoming, stated with its size (README "Published checks"): once the model meets it, the check
    # moves to CHECKS and the README row loses its "known miss".
    got = predicted(check)
    first = next(iter(check.published))
    assert abs(got[first] - check.published[first]) > check.tolerance, (check.source, got)


def test_every_check_is_in_the_readme_with_its_current_prediction() -> None:
    # The README's table must list each check and show what the model predicts now (to 0.5 points).
    text = (Path(__file__).resolve().parent.parent / "README.md").read_text(encoding="utf-8")
    rows = {m.group(1): m.group(2) for m in re.finditer(r"^\| `([^`]+)` \|(.*)$", text, re.M)}
    for check in KNOWN_MISSES:
        assert check.id in rows and "known miss" in rows[check.id], check.id
    for check in CHECKS + KNOWN_MISSES:
        assert check.id in rows, check.id
        cells = [c.strip() for c in rows[check.id].split("|")]
        shown = [float(x) for x in re.findall(r"[-\d.]+", cells[3])]
        assert shown == pytest.approx([round(v, 1) for v in predicted(check).values()], abs=0.5), check.id


def test_ethylbenzene_ring_is_never_chlorinated() -> None:
    ring = [p for p in engine.explain("CCc1ccccc1", LIQ25).products if p.site == "aryl"]
    assert len(ring) == 3 and all(p.pct["cl2"] == 0 for p in ring)


@pytest.mark.parametrize(
    ("smiles", "source"),
    [("C1CCCC1", "cyclopentane"), ("C1CCCCC1", "cyclohexane"), ("CC(C)(C)C", "neopentane"), ("CC", "ethane")],
)
def test_one_product_substrates(smiles: str, source: str) -> None:
    # Common practice: these give a single monochloride (all hydrogens equivalent).
    e = engine.explain(smiles)
    assert e.verdict == "by-symmetry" and e.serves == "cl2", source
    assert [p.pct["cl2"] for p in e.products] == [pytest.approx(100)]


def test_propane_rules_of_thumb() -> None:
    # Common practice: propane chlorination is near 1:1, bromination near 1:99,
    # and with no selectivity at all the split would be the 3:1 H statistics.
    e = engine.explain("CCC", Conditions())
    by_site = {p.site: p for p in e.products}
    assert by_site["primary"].h_count / by_site["secondary"].h_count == 3
    ratio_cl = by_site["primary"].pct["cl2"] / by_site["secondary"].pct["cl2"]
    assert 0.6 < ratio_cl < 1.2
    assert by_site["primary"].pct["br2"] < 5


@pytest.mark.parametrize("phase", ["gas", "liquid"])
def test_chlorine_becomes_less_selective_when_hot(phase: str) -> None:
    # Common practice: selectivity falls with temperature, towards the statistical split.
    # Hot is 450 °C in the gas phase and the 200 °C bound of a neat liquid (conditions that validate).
    hot_c = 450.0 if phase == "gas" else MAX_LIQUID_TEMP_C.value
    cold_conditions, hot_conditions = (Conditions(cl2_temp_c=t, cl2_phase=phase) for t in (25.0, hot_c))
    hot_conditions.validate()
    cold = predicted(Check("", "CCC", "cl2", cold_conditions, {"CCCCl": 0}, 0, ""))
    hot = predicted(Check("", "CCC", "cl2", hot_conditions, {"CCCCl": 0}, 0, ""))
    assert hot["CCCCl"] > cold["CCCCl"]


def test_neat_liquid_is_the_default_phase() -> None:
    # The preparative default (engine.conditions): a chlorination is run on the neat liquid.
    assert Conditions().cl2_phase == "liquid"
    assert "neat liquid" in Conditions().describe()
