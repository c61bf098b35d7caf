"""Exactness of symmetry classes where RDKit's tie-free ranks are too coarse."""

from __future__ import annotations

import pytest
from rdkit import Chem

from halosift import engine


def _rank_classes(smiles: str) -> int:
    mol = Chem.MolFromSmiles(smiles)
    ranks = list(Chem.CanonicalRankAtoms(mol, breakTies=False))
    return len({ranks[a.GetIdx()] for a in mol.GetAtoms() if a.GetTotalNumHs()})


def _brute_force_products(smiles: str) -> set[str]:
    """Monochlorides by substituting every H-bearing carbon and canonicalising (independent of the engine)."""
    mol = Chem.MolFromSmiles(smiles)
    out = set()
    for atom in mol.GetAtoms():
        if atom.GetTotalNumHs():
            rw = Chem.RWMol(mol)
            cl = rw.AddAtom(Chem.Atom(17))
            rw.AddBond(atom.GetIdx(), cl, Chem.BondType.SINGLE)
            Chem.SanitizeMol(rw)
            out.add(Chem.MolToSmiles(rw, isomericSmiles=False))
    return out


# Measured with RDKit 2026.09.1: the tie-free ranks merge inequivalent carbons here.
TRAPS = [("C1CC1CCC1CC1", 3, 2), ("C1CCC(CCCCCC2CCCCC2)CC1", 7, 4)]


@pytest.mark.parametrize(("smiles", "true_count", "rank_count"), TRAPS)
def test_rank_trap_is_real_and_engine_is_exact(smiles: str, true_count: int, rank_count: int) -> None:
    assert len(_brute_force_products(smiles)) == true_count
    # Documents the trap; if a future RDKit fixes it this line tells us.
    assert _rank_classes(smiles) <= rank_count
    e = engine.explain(smiles)
    assert len(e.products) == true_count
    assert {Chem.CanonSmiles(p.smiles, useChiral=0) for p in e.products} == _brute_force_products(smiles)


@pytest.mark.parametrize(
    "smiles",
    ["C12C3C4C1C5C2C3C45", "C1CC2CCC1C2", "C1C2CC3CC1CC(C2)C3", "CC1CCC(C)CC1", "c1ccc2ccccc2c1",
     "C1CCC2(CC1)CCCC2", "CC(C)C1CCC(C)CC1", "C1CC2CC1C1CCCC21"],
)
def test_groups_equal_brute_force_on_ring_systems(smiles: str) -> None:
    e = engine.explain(smiles)
    assert {Chem.CanonSmiles(p.smiles, useChiral=0) for p in e.products} == _brute_force_products(smiles)
