"""2D coordinates of a structure for drawings that are not made by RDKit (the app's text drawing).

Pure computation: RDKit lays the molecule out, this module hands back plain
records (atoms with x/y, bonds with their order, the rings) so a drawing can be
made without RDKit or any user-interface library.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class DepictedAtom:
    """One atom of a 2D layout."""

    index: int
    """Index in the atom order of the SMILES it was laid out from (the canonical SMILES for the engine's records)."""
    symbol: str
    """Element symbol, e.g. C or Cl."""
    x: float
    """Horizontal position, in RDKit's layout units (a bond is about 1.5 long)."""
    y: float
    """Vertical position, upwards, in the same units."""
    aromatic: bool
    """Whether RDKit perceives the atom as aromatic."""


@dataclass(frozen=True)
class DepictedBond:
    """One bond of a 2D layout."""

    begin: int
    """Atom index at one end."""
    end: int
    """Atom index at the other end."""
    order: int
    """1, 2 or 3 in the Kekulé form (aromatic bonds get their alternating single/double order)."""
    aromatic: bool
    """Whether the bond is aromatic."""
    ring: int | None
    """Index into :attr:`Depiction.rings` of the smallest ring holding the bond, None for a chain bond."""


@dataclass(frozen=True)
class Depiction:
    """A molecule laid out in 2D, as plain records."""

    smiles: str
    """The SMILES it was laid out from."""
    atoms: tuple[DepictedAtom, ...]
    """Every heavy atom, in SMILES order."""
    bonds: tuple[DepictedBond, ...]
    """Every bond between heavy atoms."""
    rings: tuple[tuple[int, ...], ...]
    """Atom indices of each smallest ring (RDKit's symmetrised smallest set)."""


def depict(smiles: str) -> Depiction:
    """Lay ``smiles`` out with rdDepictor.Compute2DCoords (canonically oriented, so the same every call); ValueError if it does not parse."""
    from halosift.engine.molecules import quiet_rdkit
    from rdkit import Chem
    from rdkit.Chem import rdDepictor

    with quiet_rdkit():
        mol = Chem.MolFromSmiles(smiles)
        if mol is None:
            raise ValueError(f"cannot lay out {smiles!r}")
        kekule: Chem.Mol | None = Chem.Mol(mol)
        try:
            Chem.Kekulize(kekule, clearAromaticFlags=True)
        except Exception:  # noqa: BLE001 - an unkekulisable ring still draws, with single bonds
            kekule = None
        rdDepictor.Compute2DCoords(mol, canonOrient=True)
        conf = mol.GetConformer()
        rings = tuple(tuple(r) for r in Chem.GetSymmSSSR(mol))
    atoms = tuple(
        DepictedAtom(a.GetIdx(), a.GetSymbol(), float(conf.GetAtomPosition(a.GetIdx()).x),
                     float(conf.GetAtomPosition(a.GetIdx()).y), a.GetIsAromatic())
        for a in mol.GetAtoms()
    )
    bonds = []
    for b in mol.GetBonds():
        i, j = b.GetBeginAtomIdx(), b.GetEndAtomIdx()
        if kekule is not None:
            order = round(kekule.GetBondWithIdx(b.GetIdx()).GetBondTypeAsDouble())
        else:
            order = 1 if b.GetIsAromatic() else round(b.GetBondTypeAsDouble())
        holding = [k for k, r in enumerate(rings) if i in r and j in r and _adjacent_in_ring(r, i, j)]
        ring = min(holding, key=lambda k: len(rings[k])) if holding else None
        bonds.append(DepictedBond(i, j, max(1, min(3, order)), b.GetIsAromatic(), ring))
    return Depiction(smiles, atoms, tuple(bonds), rings)


def _adjacent_in_ring(ring: tuple[int, ...], i: int, j: int) -> bool:
    """Whether i and j follow each other around ``ring`` (so the bond i–j is one of its edges)."""
    a, b = ring.index(i), ring.index(j)
    return abs(a - b) in (1, len(ring) - 1)
