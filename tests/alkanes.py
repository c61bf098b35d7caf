"""Enumerate every constitutional alkane isomer CnH2n+2 by growing carbon trees."""

from __future__ import annotations

from functools import cache

from rdkit import Chem


@cache
def alkanes(n: int) -> frozenset[str]:
    """Canonical SMILES of all alkane constitutional isomers with ``n`` carbons."""
    if n == 1:
        return frozenset({"C"})
    out: set[str] = set()
    for smi in alkanes(n - 1):
        mol = Chem.MolFromSmiles(smi)
        for atom in mol.GetAtoms():
            if atom.GetDegree() < 4:
                rw = Chem.RWMol(mol)
                new = rw.AddAtom(Chem.Atom(6))
                rw.AddBond(atom.GetIdx(), new, Chem.BondType.SINGLE)
                Chem.SanitizeMol(rw)
                out.add(Chem.MolToSmiles(rw))
    return frozenset(out)
