"""Special-site flags and the bridgehead site class (sources beside each check)."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pytest
from halosift.engine import parameters as P
from halosift.engine.perception import STRUCTURE_SCHEMA
from halosift.engine.rates import rate_table
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CLASSES, site_bde
from halosift.engine.special_sites import FLAG_NOTES, FLAGS, is_small_bridgehead, small_bridgeheads, structure_flags
from rdkit import Chem

from halosift import engine


def flags(smiles: str) -> tuple[str, ...]:
    return structure_flags(Chem.MolFromSmiles(smiles))


@pytest.mark.parametrize(
    ("smiles", "expected", "why"),
    [
        ("CC1CC1", ("cyclopropylmethyl", "cyclopropane"), "methylcyclopropane: CH3 on a ring carbon"),
        ("CCC1CC1", ("cyclopropylmethyl", "cyclopropane"), "ethylcyclopropane: CH2 on a ring carbon"),
        ("C1CC1", ("cyclopropane",),
         "cyclopropane: its C–H are on the ring itself (cyclopropyl, not cyclopropylmethyl); the ring is flagged"),
        ("C1CC12CC2", ("cyclopropane",), "spiropentane: every C–H is a ring C–H"),
        ("CC(C)(C)C1CC1", ("cyclopropane",), "tert-butylcyclopropane: the carbon next to the ring has no H"),
        ("C1CC2CCC1C2", ("bridgehead",), "norbornane, bicyclo[2.2.1]"),
        ("C1CC2CCC1CC2", ("bridgehead",), "bicyclo[2.2.2]octane"),
        ("C1C2CC1C2", ("bridgehead",), "bicyclo[1.1.1]pentane"),
        ("C1CC2CCC(C1)C2", (), "bicyclo[3.2.1]octane: a 3-atom bridge lets the radical flatten"),
        ("C1C2CC3CC1CC(C2)C3", (), "adamantane: 3-atom bridges; 1-adamantyl halides form readily (common practice)"),
        ("C1CCC2CCCCC2C1", (), "decalin: fused (zero-atom bridge), not bridged"),
        ("C12C3C4C1C5C2C3C45", ("bridgehead", "cage"), "cubane"),
        ("C=CC", ("alkene",), "propene"),
        ("CC#C", ("alkyne", "propargylic"), "propyne: halogens add to C≡C (common practice); its CH3 is propargylic"),
        ("C#Cc1ccccc1", ("alkyne",), "phenylacetylene: no sp3 C–H, so nothing propargylic"),
        ("C#CCc1ccccc1", ("alkyne", "propargylic"), "3-phenylpropyne: the benzylic CH2 is propargylic too"),
        ("C1C23CC12C3", ("cyclopropane", "central_bond"), "[1.1.1]propellane: three triangles share the C1–C3 bond"),
        ("C1C2CC12", ("cyclopropane", "central_bond"), "bicyclo[1.1.0]butane: two triangles share C1–C3"),
        ("C1CC23CCC12CC3", ("central_bond",), "[2.2.2]propellane: three 4-rings share the central bond"),
        ("C1CC2CCC12", (), "bicyclo[2.2.0]hexane: its shared bond lies on two 4-rings only"),
        ("C1=CC2CCC1C2", ("bridgehead", "alkene"), "norbornene"),
        ("Cc1ccccc1", (), "toluene: aromatic rings are not alkenes"),
        ("CCCC", (), "butane"),
    ],
)
def test_structure_flags(smiles: str, expected: tuple[str, ...], why: str) -> None:
    assert flags(smiles) == expected, why


def test_every_flag_has_a_note_with_source() -> None:
    assert set(FLAG_NOTES) == set(FLAGS)
    for note in FLAG_NOTES.values():
        assert note.note and note.source
    # Griller & Ingold, Acc. Chem. Res. 1980, 13, 317 (from memory): k ≈ 1e8 s⁻¹ at 25 °C.
    assert P.K_CYCLOPROPYLMETHYL_OPENING.value == 1e8 and "1e8" in FLAG_NOTES["cyclopropylmethyl"].note
    # Groll & Hearne, Ind. Eng. Chem. 1939, 31, 1530 (cited by Hearne et al., J. Am. Chem. Soc. 1953, 75):
    # allyl chloride from propene + Cl2 at 400 °C and above.
    assert "400" in FLAG_NOTES["alkene"].note and "Groll" in FLAG_NOTES["alkene"].source


def test_bridgehead_atoms_of_norbornane() -> None:
    mol = Chem.MolFromSmiles("C1CC2CCC1C2")  # atoms 2 and 5 are C1/C4, atom 6 is C7
    assert [a.GetIdx() for a in mol.GetAtoms() if is_small_bridgehead(a)] == [2, 5]
    assert small_bridgeheads(mol) == {2, 5}
    # A fully substituted bridgehead has no C–H: not an abstractable bridgehead site.
    camphane = Chem.MolFromSmiles("CC12CCC(CC1)C2(C)C")
    assert 1 not in small_bridgeheads(camphane)


def test_perception_stores_flags() -> None:
    assert "flags" in STRUCTURE_SCHEMA.names
    p = engine.perceive(["CC1CC1", "C=CC", "CCC", "CCO", "C1CC2CCC1C2"])
    assert list(p.structures["flags"]) == ["cyclopropylmethyl,cyclopropane", "alkene", "", "", "bridgehead"]


def test_screen_flags_column_and_cache(tmp_path: Path) -> None:
    frame = pd.DataFrame({"smiles": ["CC1CC1", "CCO", "C=CCC1CC1", "CCC"]})
    cold = engine.load_library(frame, cache_folder=tmp_path).evaluate()
    warm = engine.load_library(frame, cache_folder=tmp_path).evaluate()  # read back from the cache
    for result in (cold, warm):
        assert list(result["flags"]) == ["cyclopropylmethyl,cyclopropane", "", "cyclopropylmethyl,cyclopropane,alkene", ""]


def test_explain_shows_flags(capsys: pytest.CaptureFixture) -> None:
    from halosift.cli import main

    e = engine.explain("C=CC")
    assert [f.flag for f in e.flags] == ["alkene"]
    assert e.to_dict()["flags"][0]["flag"] == "alkene"
    assert main(["explain", "CC1CC1"]) == 0
    assert "flag       cyclopropylmethyl:" in capsys.readouterr().out


# --- bridgehead site class ---------------------------------------------------


def test_bridgehead_class_parameters() -> None:
    assert "bridgehead" in ABSTRACTABLE
    assert site_bde("bridgehead").basis == "estimate"
    assert site_bde("bridgehead").value > P.BDE["tertiary"].value
    # Toward Br· an Evans–Polanyi estimate from tertiary; toward Cl· the norbornane split (engine.parameters).
    assert "BEP" in rate_table("br").params["bridgehead"].source
    for phase in ("gas", "liquid"):
        arr = rate_table("cl", phase).params["bridgehead"]
        assert arr.basis == "estimate" and "norbornane" in arr.source


def test_bridgehead_is_slower_than_tertiary() -> None:
    # The radical cannot planarise (common practice): a bridgehead C–H must react
    # more slowly than an open-chain tertiary one toward both radicals, and more slowly
    # than even a primary C–H.
    i = SITE_CLASSES.index
    for radical, temp_k in (("cl", 298.0), ("br", 400.0)):
        k = rate_table(radical).per_h(temp_k)
        assert k[i("bridgehead")] < k[i("tertiary")]
        assert k[i("bridgehead")] < k[i("primary")]


def test_norbornane_with_bridgehead_class() -> None:
    # Norbornane + Cl2: the 2-chloride almost only, bridgehead C1 minor (engine.parameters.NORBORNANE_CL2).
    e = engine.explain("C1CC2CCC1C2")
    by_site = {}
    for p in e.products:
        by_site.setdefault(p.site, []).append(p)
    assert len(by_site["bridgehead"]) == 1
    bridgehead = by_site["bridgehead"][0]
    c2 = next(p for p in e.products if Chem.CanonSmiles(p.smiles) == Chem.CanonSmiles("ClC1CC2CCC1C2"))
    assert c2.site == "norbornyl-2-secondary" and c2.exo_endo("cl2") == "exo:endo 70:30"
    assert c2.pct["cl2"] == max(p.pct["cl2"] for p in e.products)
    assert c2.pct["cl2"] > 90 and bridgehead.pct["cl2"] < 5
    assert bridgehead.pct["br2"] < 1  # Br· is far more selective
    # Every rate behind the ≥ 5 % products rests on an estimate under the neat-liquid default.
    assert e.confidence() == "estimate"


def test_cache_fingerprint_covers_everything_perception_imports() -> None:
    # Editing any module that perception runs (flags, contenders, rates behind them, ...)
    # must invalidate cached perceptions, so the fingerprint covers perception's whole
    # import closure inside the engine, found here by reading the import statements.
    import ast
    from pathlib import Path

    from halosift.engine import cache

    root = Path(cache.__file__).parent
    seen: set[str] = set()
    todo = ["perception"]
    while todo:
        name = todo.pop()
        if name in seen or not (root / f"{name}.py").exists():
            continue
        seen.add(name)
        for node in ast.walk(ast.parse((root / f"{name}.py").read_text())):
            if isinstance(node, ast.ImportFrom) and node.module and node.module.startswith("halosift.engine"):
                parts = node.module.split(".")[2:]
                todo.extend([parts[0]] if parts else [alias.name for alias in node.names])
    assert {"special_sites", "contenders", "stereo"} <= seen
    assert {f"{m}.py" for m in seen} <= set(cache._FINGERPRINTED)
