"""Every kind of bad input becomes a reasoned rejection, never an exception."""

from __future__ import annotations

import pytest
from halosift.engine.molecules import parse_hydrocarbon

from halosift import engine

REJECTIONS = [
    ("", "empty"),
    ("   ", "empty"),
    (None, "empty"),
    ("C1CC", "unparsable"),
    ("CC(C", "unparsable"),
    ("not a smiles", "unparsable"),
    ("CCO", "heteroatom"),
    ("C[Si](C)(C)C", "heteroatom"),
    ("CCCl", "heteroatom"),
    ("C[N+](C)(C)C", "heteroatom"),
    ("[CH3-]", "charged"),
    ("C[CH2+]", "charged"),
    ("[CH3]", "radical"),
    ("C[CH2]", "radical"),
    ("CC.CCC", "fragments"),
    ("[13CH4]", "isotope"),
    ("[2H]C", "isotope"),
    ("C" * 151, "too_large"),
]


@pytest.mark.parametrize(("smiles", "code"), REJECTIONS)
def test_rejections(smiles, code: str) -> None:
    parsed = parse_hydrocarbon(smiles)
    assert not parsed.ok
    assert parsed.reason_code == code
    assert parsed.reason and "\n" not in parsed.reason


def test_heteroatoms_are_named() -> None:
    assert "oxygen" in parse_hydrocarbon("CCO").reason
    assert "silicon" in parse_hydrocarbon("C[Si](C)(C)C").reason


def test_size_limit_is_configurable() -> None:
    assert parse_hydrocarbon("C" * 151, max_heavy_atoms=200).ok
    assert parse_hydrocarbon("C" * 20, max_heavy_atoms=10).reason_code == "too_large"


def test_fragments_are_counted_from_the_molecule_not_the_dots() -> None:
    # A dot with ring closures across it can still give one molecule; without a dot there is one.
    assert parse_hydrocarbon("C1CC.C1").ok
    assert parse_hydrocarbon("C1.C1").ok
    assert parse_hydrocarbon("[CH3].[CH3]").reason_code == "fragments"  # tested before the radicals
    assert parse_hydrocarbon("C.C.C").reason == "3 separate fragments; give one molecule per row"


def test_explicit_hydrogens_are_accepted() -> None:
    assert parse_hydrocarbon("[H]C([H])([H])C").ok


@pytest.mark.parametrize(("smiles", "code"), REJECTIONS)
def test_perceive_keeps_every_row(smiles, code: str) -> None:
    p = engine.perceive(["CC", smiles, "CCC"])
    assert list(p.structures["status"]) == ["ok", "rejected", "ok"]
    assert p.structures["reason_code"].iloc[1] == code


@pytest.mark.parametrize(
    ("mapped", "plain"),
    [("[CH3:1]C", "CC"), ("[CH3:1][CH2:2][CH3:3]", "CCC"), ("[CH3:7]C(C)(C)C", "CC(C)(C)C"),
     ("C[C@H:4](Cl)CC".replace("Cl", "C"), "C[C@H](C)CC")],
)
def test_atom_maps_change_no_answer(mapped: str, plain: str) -> None:
    """The class of error: a map number made symmetric atoms differ (ethane with two chlorides). Maps are dropped,
    so every product, share and verdict is the plain structure's (symmetry: ethane has one monochloride)."""
    a, b = engine.explain(mapped), engine.explain(plain)
    assert a.status == b.status == "ok" and a.verdict == b.verdict
    assert [(p.smiles, round(p.pct["cl2"], 9)) for p in a.products] == [(p.smiles, round(p.pct["cl2"], 9))
                                                                        for p in b.products]


@pytest.mark.parametrize("smiles", ["CC[C@H](C)c1ccccc1 |&1:2|", "CC[C@H](C)c1ccccc1 |o1:2|"])
def test_and_or_stereo_groups_are_refused_not_read_as_one_isomer(smiles: str) -> None:
    parsed = parse_hydrocarbon(smiles)
    assert not parsed.ok and parsed.reason_code == "stereo_group" and "\n" not in parsed.reason


def test_absolute_stereo_group_is_plain_stereo() -> None:
    assert parse_hydrocarbon("CC[C@H](C)c1ccccc1 |a:2|").ok


@pytest.mark.parametrize("smiles", ["[H][H]", "[2H][2H]"])
def test_no_carbon_is_not_a_hydrocarbon_to_screen(smiles: str) -> None:
    assert parse_hydrocarbon(smiles).reason_code in ("no_carbon", "isotope")
