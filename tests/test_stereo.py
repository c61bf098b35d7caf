"""Stereochemical outcomes of monohalides (textbook stereochemistry, common practice)."""

from __future__ import annotations

import pytest
from rdkit import Chem

from halosift import engine


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
    assert product("CC[C@H](C)CCC", "ClCC[C@H](C)CCC").stereo == "one-enantiomer"


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
    from halosift.engine.stereo import _tag_from_positions
    from rdkit.Chem import rdDistGeom

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


# Cases where the product's symmetry, not its constitution alone, decides; each was
# miscounted when isomers were told apart by canonical SMILES. Stereo counts follow
# from the point groups (Eliel & Wilen, Stereochemistry of Organic Compounds, Wiley
# 1994: ch. 14 for axially chiral spiranes; ch. 11 for adamantane and norbornane symmetry).
SYMMETRY_CASES = [
    # 3,9-disubstituted spiro[5.5]undecane: the two rings lie crossed, so it is axially chiral.
    ("CC1CCC2(CC1)CCCCC2", "CC1CCC2(CC1)CCC(Cl)CC2", "racemate", 2, 1),
    # ... and with a stereocentre in the chain too: 2 × 2 stereoisomers, two pairs.
    ("CCC(C)C1CCC2(CCCCC2)CC1", "CCC(C)C1CCC2(CCC(Cl)CC2)CC1", "diastereomers", 4, 2),
    # 2-substituted adamantanes keep a mirror plane through C2 and C6.
    ("CCCCC1C2CC3CC(C2)CC1C3", "ClCCCCC1C2CC3CC(C2)CC1C3", "achiral", 1, 1),
    ("CCCCC1C2CC3CC(C2)CC1C3", "CC(Cl)CCC1C2CC3CC(C2)CC1C3", "racemate", 2, 1),
    # A 7-substituted norbornane: C7 sits on the mirror plane between the two ethano bridges.
    ("CC1C2CCC1CC2", "ClCC1C2CCC1CC2", "achiral", 1, 1),
    # A 2-substituted bicyclo[1.1.1]pentane: C2 lies on the plane that swaps the bridgeheads.
    ("CCC(C)CC1C2CC1C2", "CCC(C)(Cl)CC1C2CC1C2", "racemate", 2, 1),
]


@pytest.mark.parametrize(("substrate", "chloride", "outcome", "n_iso", "n_dia"), SYMMETRY_CASES)
def test_symmetry_decides_the_count(substrate: str, chloride: str, outcome: str, n_iso: int, n_dia: int) -> None:
    p = product(substrate, chloride)
    assert (p.stereo, p.n_stereoisomers, p.n_diastereomers) == (outcome, n_iso, n_dia)


def _simple_ring_systems(mol: Chem.Mol) -> bool:
    """No spiro atom and no bridged or small fused system: canonical SMILES tell every isomer apart."""
    from halosift.engine.stereo import geometry_atoms

    ring_count = [0] * mol.GetNumAtoms()
    for ring in mol.GetRingInfo().AtomRings():
        for i in ring:
            ring_count[i] += 1
    spiro = any(c > 1 and not any(ring_count[n.GetIdx()] > 1 for n in mol.GetAtomWithIdx(i).GetNeighbors())
                for i, c in enumerate(ring_count))
    return not spiro and not geometry_atoms(mol)


def test_orbit_count_agrees_with_enumeration_where_smiles_are_reliable() -> None:
    # Independent check: build every configuration and let RDKit's canonical SMILES
    # sort them (the enumeration path), against counting orbits of the automorphisms.
    import sys
    from pathlib import Path

    sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "benchmarks"))
    from halosift.engine.molecules import parse_hydrocarbon
    from halosift.engine.site_classes import ABSTRACTABLE
    from halosift.engine.sites import site_groups
    from halosift.engine.stereo import Skeleton, stereo_outcome
    from library_gen import make_library

    compared = with_elements = 0
    for smiles in make_library(1500, seed=23):
        mol = parse_hydrocarbon(smiles).mol
        if mol is None or not _simple_ring_systems(mol):
            continue
        for group in site_groups(mol, False):
            if group.site not in ABSTRACTABLE or group.stabiliser is None:
                continue
            counted = stereo_outcome([group.product], Skeleton(mol, False), group.stabiliser)
            enumerated = stereo_outcome([group.product], Skeleton(mol, False), None)
            assert counted == enumerated, group.product_smiles
            compared += 1
            with_elements += counted.n_stereoisomers > 1
    assert compared > 5000 and with_elements > 1500
