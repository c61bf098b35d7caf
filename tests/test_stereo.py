"""Stereochemical outcomes of monohalides (textbook stereochemistry, common practice)."""

from __future__ import annotations

import pytest
from rdkit import Chem

import engine


def product(substrate: str, chloride: str):
    e = engine.explain(substrate)
    want = Chem.CanonSmiles(chloride, useChiral=0)
    for p in e.products:
        if Chem.CanonSmiles(p.smiles, useChiral=0) == want:
            return p
    raise AssertionError(f"{chloride} not among products of {substrate}: {[p.smiles for p in e.products]}")


CASES = [
    # substrate, chloride, outcome, stereoisomers, diastereomers
    ("C1CC2CCC1C2", "ClC1CC2CCC1C2", "diastereomers", 4, 2),  # 2-chloronorbornane: exo/endo, each racemic
    ("C1CC2CCC1C2", "ClC12CCC(CC1)C2", "achiral", 1, 1),  # 1-chloronorbornane
    ("C1CC2CCC1C2", "ClC1C2CCC1CC2", "achiral", 1, 1),  # 7-chloronorbornane
    ("C1CCCCC1", "ClC1CCCCC1", "achiral", 1, 1),  # chlorocyclohexane
    ("CC1CCCCC1", "CC1CCC(Cl)CC1", "diastereomers", 2, 2),  # cis/trans-1-chloro-4-methylcyclohexane
    ("CC1CCCCC1", "CC1CCCCC1Cl", "diastereomers", 4, 2),  # cis/trans, each racemic
    ("CCCC", "CCC(C)Cl", "racemate", 2, 1),  # 2-chlorobutane
    ("CCC(C)C", "CCC(C)CCl", "racemate", 2, 1),  # remote desymmetrisation makes C2 a centre
    ("CCC(C)CC", "CCC(Cl)(C)CC", "achiral", 1, 1),
]


@pytest.mark.parametrize(("substrate", "chloride", "outcome", "n_iso", "n_dia"), CASES)
def test_stereo_outcome(substrate: str, chloride: str, outcome: str, n_iso: int, n_dia: int) -> None:
    p = product(substrate, chloride)
    assert (p.stereo, p.n_stereoisomers, p.n_diastereomers) == (outcome, n_iso, n_dia)


def test_specified_input_stereo_is_counted_relative() -> None:
    # (S)-3-methylhexane: chlorination at C2 gives two diastereomers (C3 kept);
    # at the stereocentre itself the planar radical loses the configuration.
    assert product("CC[C@H](C)CCC", "CC(Cl)[C@@H](C)CCC").stereo == "diastereomers"
    assert product("CC[C@H](C)CCC", "CC(Cl)[C@@H](C)CCC").n_stereoisomers == 2
    assert product("CC[C@H](C)CCC", "CCC(C)(Cl)CCC").stereo == "racemate"
    # A remote, non-stereogenic position keeps the one configuration.
    assert product("CC[C@H](C)CCC", "ClCC[C@H](C)CCC").stereo == "single"


def test_specified_meso_ring_gives_both_enantiomer_sets() -> None:
    # cis-1,2-dimethylcyclohexane (meso): C3 and C6 are mirror-related, so the
    # 3-chloro product forms as two racemic diastereomers (4 stereoisomers).
    p = product("C[C@H]1CCCC[C@H]1C", "CC1CCCC(Cl)C1C")
    assert (p.n_stereoisomers, p.n_diastereomers) == (4, 2)


def test_specified_c2_symmetric_ring_gives_one_set() -> None:
    # (S,S)-trans-1,2-dimethylcyclohexane: C3 and C6 are related by the C2 axis,
    # so both give the same two diastereomers, each a single enantiomer.
    p = product("C[C@H]1CCCC[C@@H]1C", "CC1CCCC(Cl)C1C")
    assert (p.stereo, p.n_stereoisomers, p.n_diastereomers) == ("diastereomers", 2, 2)


def test_input_stereo_is_kept_in_products() -> None:
    e = engine.explain("C[C@H](CC)CCC")
    assert any("@" in p.smiles for p in e.products)


@pytest.mark.parametrize(
    "smiles", ["C[C@H](CC)CCC", "CC[C@@](C)(CCC)CCCC", "C[C@H]1CCCC[C@@H]1CC", "C[C@@H]1C[C@H]2CC[C@@H]1C2"]
)
def test_tags_from_positions_follow_rdkit_convention(smiles: str) -> None:
    # Our geometry-to-tag rule against RDKit's own 3D perception on the same coordinates.
    from rdkit.Chem import rdDistGeom

    from engine.stereo import _tag_from_positions

    mol = Chem.MolFromSmiles(smiles)
    mol_h = Chem.AddHs(mol)
    assert rdDistGeom.EmbedMolecule(mol_h, randomSeed=11) == 0
    conf = mol_h.GetConformer()
    heavy = Chem.Mol(mol)
    position = {i: tuple(conf.GetAtomPosition(i)) for i in range(mol.GetNumAtoms())}
    checked = 0
    for atom in mol.GetAtoms():
        if atom.GetChiralTag() != Chem.ChiralType.CHI_UNSPECIFIED:
            assert _tag_from_positions(heavy, atom.GetIdx(), position) == atom.GetChiralTag()
            checked += 1
    assert checked
