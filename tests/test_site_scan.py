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
from halosift.engine.sites import site_classes
from halosift.engine.special_sites import (
    CAGE_MAX_RING,
    CAGE_MIN_ATOMS,
    FLAGS,
    is_small_bridgehead,
    small_bridgeheads,
    structure_flags,
)
from halosift.sample_libraries import sample_path
from rdkit import Chem

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "benchmarks"))
from library_gen import make_library  # noqa: E402

#: Hand-picked edge cases: every class and flag, fused and bridged rings, allenes, enynes, aryl-substituted alkenes.
EDGE_CASES = [
    "C", "CC", "C=C", "C#C", "CC#CC", "C=C=CC", "C=CC#C", "Cc1ccccc1", "C=Cc1ccccc1", "CC(=C)c1ccccc1",
    "C1CC1", "CC1CC1", "C1CC1C1CC1", "C1CC2CC1C2", "C12CC(C1)C2", "C1CC2CCC1CC2", "C12C3C4C1C5C2C3C45",
    "C1CC2(C1)CC2", "C1=CC2CC1C=C2", "c1ccc2c(c1)CCC2", "C1CCC2CCCCC2C1", "CC=CC(C)C#CC", "C1CC=CC1",
    "C1CC2CCC1C2", "CC1CC2CCC1C2", "CC1C2CCC1CC2", "CC1(C)C2CCC1(C)CC2", "C1=CC2CCC1C2", "C1CC2C3CCC(C3)C2C1",
    "C1CC2CC1C1CCCC21", "C=C1CC2CCC1C2",
    "C1C23CC12C3", "C1C2CC12", "CC12CC1C2", "C1CC23CCC12CC3", "C1CC2CCC12", "C12C3C1C23",
]


_DEGREE = {1: "primary", 2: "secondary", 3: "tertiary"}


def _sp3_h(atom: Chem.Atom) -> bool:
    return (atom.GetTotalNumHs() > 0 and not atom.GetIsAromatic()
            and all(b.GetBondType() == Chem.BondType.SINGLE for b in atom.GetBonds()))


def _sp3(atom: Chem.Atom) -> bool:
    return atom.GetAtomicNum() == 6 and not atom.GetIsAromatic() and all(
        b.GetBondType() == Chem.BondType.SINGLE for b in atom.GetBonds())


def _two_bridges(mol: Chem.Mol, b1: int, b2: int, avoid: set[int]) -> list[tuple[int, int]]:
    """Two-atom paths b1–p–q–b2 of sp3 carbons, none of them in ``avoid``."""
    out = []
    for p in mol.GetAtomWithIdx(b1).GetNeighbors():
        if p.GetIdx() in avoid or p.GetIdx() == b2 or not _sp3(p):
            continue
        for q in p.GetNeighbors():
            if q.GetIdx() in avoid | {b1, b2} or not _sp3(q):
                continue
            if mol.GetBondBetweenAtoms(q.GetIdx(), b2) is not None:
                out.append((p.GetIdx(), q.GetIdx()))
    return out


def _reference_norbornane_role(atom: Chem.Atom) -> str | None:
    """'7' when the atom is the one-atom bridge of a saturated bicyclo[2.2.1] skeleton, '2' when it lies on a
    two-atom bridge of one, else None (a per-atom walk: bridgeheads, then disjoint bridges)."""
    mol = atom.GetOwningMol()
    me = atom.GetIdx()
    if not _sp3(atom):
        return None
    roles = set()
    # As C7: two sp3 neighbours joined by two disjoint two-atom bridges that avoid this atom.
    nbrs = [n.GetIdx() for n in atom.GetNeighbors() if _sp3(n)]
    for i, b1 in enumerate(nbrs):
        for b2 in nbrs[i + 1:]:
            if not _sp3(mol.GetAtomWithIdx(b1)) or not _sp3(mol.GetAtomWithIdx(b2)):
                continue
            bridges = _two_bridges(mol, b1, b2, {me})
            if any(not set(x) & set(y) for x in bridges for y in bridges):
                roles.add("7")
    # As C2: a neighbour b1 and a path me–q–b2 such that b1, b2 also share a one-atom bridge and a second,
    # disjoint two-atom bridge.
    for b1 in nbrs:
        for q in nbrs:
            if q == b1:
                continue
            for b2 in (n.GetIdx() for n in mol.GetAtomWithIdx(q).GetNeighbors()):
                if b2 in (me, b1) or not _sp3(mol.GetAtomWithIdx(b2)):
                    continue
                for c in mol.GetAtomWithIdx(b1).GetNeighbors():
                    c7 = c.GetIdx()
                    if c7 in (me, q, b2) or not _sp3(c) or mol.GetBondBetweenAtoms(c7, b2) is None:
                        continue
                    if _two_bridges(mol, b1, b2, {me, q, c7}):
                        roles.add("2")
    return "7" if "7" in roles else ("2" if roles else None)


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
    if kind:
        return f"{kind}-{_DEGREE[degree]}"
    role = _reference_norbornane_role(atom)
    return f"norbornyl-{role}-{_DEGREE[degree]}" if role else _DEGREE[degree]


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
        for n in atom.GetNeighbors():  # an sp3 C–H beside a C≡C carbon: propargylic
            if not n.GetIsAromatic() and any(b.GetBondType() == Chem.BondType.TRIPLE for b in n.GetBonds()):
                found.add("propargylic")
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
            "allylic-secondary", "propargylic-secondary", "tertiary", "norbornyl-2-secondary",
            "norbornyl-2-tertiary", "norbornyl-7-secondary", "norbornyl-7-tertiary"} <= seen


def test_flags_match_the_per_atom_walk(molecules: list[Chem.Mol]) -> None:
    seen = set()
    for mol in molecules:
        expected = _reference_flags(mol)
        assert structure_flags(mol) == expected, Chem.MolToSmiles(mol)
        seen.update(expected)
    assert seen == set(FLAGS)
