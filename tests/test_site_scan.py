"""The pattern-based site classes and flags agree with plain per-atom walks over the same rules.

``site_classes`` and ``structure_flags`` use substructure patterns for speed;
the per-atom walks below are written out here, bond by bond, so the two are
independent.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pandas as pd
import pytest
from rdkit import Chem

from engine.sites import site_classes
from engine.special_sites import (
    CAGE_MAX_RING, CAGE_MIN_ATOMS, FLAGS, is_small_bridgehead, small_bridgeheads, structure_flags,
)
from sample_libraries import sample_path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "benchmarks"))
from library_gen import make_library  # noqa: E402

#: Hand-picked edge cases: every class and flag, fused and bridged rings, allenes, enynes, aryl-substituted alkenes.
EDGE_CASES = [
    "C", "CC", "C=C", "C#C", "CC#CC", "C=C=CC", "C=CC#C", "Cc1ccccc1", "C=Cc1ccccc1", "CC(=C)c1ccccc1",
    "C1CC1", "CC1CC1", "C1CC1C1CC1", "C1CC2CC1C2", "C12CC(C1)C2", "C1CC2CCC1CC2", "C12C3C4C1C5C2C3C45",
    "C1CC2(C1)CC2", "C1=CC2CC1C=C2", "c1ccc2c(c1)CCC2", "C1CCC2CCCCC2C1", "CC=CC(C)C#CC", "C1CC=CC1",
    "C1C23CC12C3", "C1C2CC12", "CC12CC1C2", "C1CC23CCC12CC3", "C1CC2CCC12", "C12C3C1C23",
]


_DEGREE = {1: "primary", 2: "secondary", 3: "tertiary"}


def _sp3_h(atom: Chem.Atom) -> bool:
    return (atom.GetTotalNumHs() > 0 and not atom.GetIsAromatic()
            and all(b.GetBondType() == Chem.BondType.SINGLE for b in atom.GetBonds()))


def _reference_class(atom: Chem.Atom) -> str:
    """Site class of one H-bearing carbon, walking its bonds (the rules of engine.sites.site_classes)."""
    if atom.GetIsAromatic():
        return "aryl"
    bonds = [b.GetBondType() for b in atom.GetBonds()]
    if Chem.BondType.TRIPLE in bonds:
        return "alkynyl"
    if Chem.BondType.DOUBLE in bonds:
        return "vinyl"
    degree = atom.GetDegree()
    if degree == 0:
        return "methane"
    if atom.IsInRingSize(3):
        return "cyclopropyl"
    if _sp3_h(atom) and is_small_bridgehead(atom):
        return "bridgehead"
    kinds: set[str] = set()
    for nbr in atom.GetNeighbors():
        if nbr.GetIsAromatic():
            kinds.add("benzylic")
            continue
        for bond in nbr.GetBonds():
            if bond.GetOtherAtomIdx(nbr.GetIdx()) == atom.GetIdx():
                continue
            if bond.GetBondType() == Chem.BondType.DOUBLE:
                kinds.add("allylic")
            elif bond.GetBondType() == Chem.BondType.TRIPLE:
                kinds.add("propargylic")
    kind = next((k for k in ("allylic", "benzylic", "propargylic") if k in kinds), None)
    return f"{kind}-{_DEGREE[degree]}" if kind else _DEGREE[degree]


def _small_cycles_through(mol: Chem.Mol, a: int, b: int, longest: int = 4) -> int:
    """Simple cycles of at most ``longest`` atoms that use bond a–b, by walking every path from b back to a."""
    found = 0

    def walk(path: list[int]) -> None:
        nonlocal found
        for n in mol.GetAtomWithIdx(path[-1]).GetNeighbors():
            i = n.GetIdx()
            if i == a and len(path) >= 3:
                found += 1
            elif i not in path and i != a and len(path) < longest:
                walk(path + [i])

    walk([a, b])
    return found


def _reference_flags(mol: Chem.Mol) -> tuple[str, ...]:
    found = set()
    if any(atom.IsInRingSize(3) for atom in mol.GetAtoms()):
        found.add("cyclopropane")
    for bond in mol.GetBonds():
        a, b = bond.GetBeginAtomIdx(), bond.GetEndAtomIdx()
        if _small_cycles_through(mol, a, b, 3) >= 2 or _small_cycles_through(mol, a, b, 4) >= 3:
            found.add("central_bond")  # bicyclo[1.1.0]butane's C1–C3, a small propellane's central bond
    if any(b.GetBondType() == Chem.BondType.TRIPLE for b in mol.GetBonds()):
        found.add("alkyne")
    for atom in mol.GetAtoms():
        if not _sp3_h(atom):
            continue
        if not atom.IsInRingSize(3) and any(n.IsInRingSize(3) for n in atom.GetNeighbors()):
            found.add("cyclopropylmethyl")
        if is_small_bridgehead(atom):
            found.add("bridgehead")
    counts = [0] * mol.GetNumAtoms()
    for ring in Chem.GetSymmSSSR(mol):
        if len(ring) <= CAGE_MAX_RING:
            for i in ring:
                counts[i] += 1
    if sum(c >= 3 for c in counts) >= CAGE_MIN_ATOMS:
        found.add("cage")
    if any(b.GetBondType() == Chem.BondType.DOUBLE and not b.GetIsAromatic() for b in mol.GetBonds()):
        found.add("alkene")
    return tuple(f for f in FLAGS if f in found)


@pytest.fixture(scope="module")
def molecules() -> list[Chem.Mol]:
    catalogue = pd.read_csv(sample_path("catalogue.csv"), keep_default_na=False)
    smiles = EDGE_CASES + list(catalogue["smiles"]) + make_library(1500, seed=5)
    mols = [Chem.MolFromSmiles(s) for s in smiles]
    return [m for m in mols if m is not None and all(a.GetAtomicNum() == 6 for a in m.GetAtoms())]


def test_site_classes_match_the_per_atom_walk(molecules: list[Chem.Mol]) -> None:
    seen = set()
    for mol in molecules:
        atoms = [a.GetIdx() for a in mol.GetAtoms() if a.GetTotalNumHs() > 0]
        expected = [_reference_class(mol.GetAtomWithIdx(i)) for i in atoms]
        assert site_classes(mol, atoms, small_bridgeheads(mol)) == expected, Chem.MolToSmiles(mol)
        seen.update(expected)
    # The sample must exercise the classes it claims to check.
    assert {"methane", "aryl", "vinyl", "alkynyl", "cyclopropyl", "bridgehead", "benzylic-secondary",
            "allylic-secondary", "propargylic-secondary", "tertiary"} <= seen


def test_flags_match_the_per_atom_walk(molecules: list[Chem.Mol]) -> None:
    seen = set()
    for mol in molecules:
        expected = _reference_flags(mol)
        assert structure_flags(mol) == expected, Chem.MolToSmiles(mol)
        seen.update(expected)
    assert seen == set(FLAGS)
