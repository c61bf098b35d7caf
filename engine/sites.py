"""Find every C–H site, its class, and its exact symmetry group."""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass

from rdkit import Chem

from engine.special_sites import special_site_class

_SINGLE = Chem.BondType.SINGLE
_DOUBLE = Chem.BondType.DOUBLE
_TRIPLE = Chem.BondType.TRIPLE
_DEGREE_NAMES = {1: "primary", 2: "secondary", 3: "tertiary"}


def classify_carbon(atom: Chem.Atom) -> str:
    """Site class of an H-bearing carbon (see :mod:`engine.site_classes`)."""
    if atom.GetIsAromatic():
        return "aryl"
    bonds = [b.GetBondType() for b in atom.GetBonds()]
    if _TRIPLE in bonds:
        return "alkynyl"
    if _DOUBLE in bonds:
        return "vinyl"
    degree = atom.GetDegree()
    if degree == 0:
        return "methane"
    if atom.IsInRingSize(3):
        # A cyclopropyl radical is a σ radical: neighbouring π systems barely help it.
        return "cyclopropyl"
    if (special := special_site_class(atom)) is not None:
        return special
    kinds: set[str] = set()
    for nbr in atom.GetNeighbors():
        if nbr.GetIsAromatic():
            kinds.add("benzylic")
            continue
        for bond in nbr.GetBonds():
            other = bond.GetOtherAtom(nbr)
            if other.GetIdx() == atom.GetIdx():
                continue
            if bond.GetBondType() == _DOUBLE:
                kinds.add("allylic")
            elif bond.GetBondType() == _TRIPLE:
                kinds.add("propargylic")
    name = _DEGREE_NAMES[degree]
    # Where several π systems are adjacent, the weakest C–H wins the label:
    # allyl (88.8) < benzyl (89.7) < propargyl (≈90) kcal/mol.
    for kind in ("allylic", "benzylic", "propargylic"):
        if kind in kinds:
            return f"{kind}-{name}"
    return name


@dataclass(frozen=True)
class SiteGroup:
    """Symmetry-equivalent H-bearing carbons: one constitutional monohalide."""

    atoms: tuple[int, ...]
    """Indices of the equivalent carbons (in the parsed molecule)."""
    site: str
    """Site class of these carbons."""
    h_count: int
    """Hydrogens on all of them together."""
    product: Chem.Mol
    """The monochloride from the first atom (stereo of the input kept, the new centre unset)."""
    product_smiles: str
    """Canonical isomeric SMILES of that monochloride."""
    stabiliser: tuple[tuple[int, ...], ...] | None
    """The substrate's automorphisms that fix the substituted carbon — exactly the
    product's automorphisms (None when there were too many to list)."""


def substitute(mol: Chem.Mol, idx: int, halogen: int = 17) -> Chem.RWMol:
    """Replace one H on atom ``idx`` by a halogen.

    The carbon's own configuration, if any, is cleared: abstraction makes a
    planar radical there, so that centre cannot keep its configuration.
    """
    rw = Chem.RWMol(mol)
    atom = rw.GetAtomWithIdx(idx)
    if atom.GetNumExplicitHs():
        atom.SetNumExplicitHs(atom.GetNumExplicitHs() - 1)
    atom.SetChiralTag(Chem.ChiralType.CHI_UNSPECIFIED)
    new = rw.AddAtom(Chem.Atom(halogen))
    rw.AddBond(idx, new, _SINGLE)
    rw.UpdatePropertyCache(strict=False)
    return rw


def has_specified_stereo(canonical_smiles: str) -> bool:
    """True when a canonical SMILES fixes any tetrahedral centre or double-bond geometry.

    RDKit writes stereo marks in canonical SMILES only for specified elements.
    """
    return "@" in canonical_smiles or "/" in canonical_smiles or "\\" in canonical_smiles


def _smiles(prod: Chem.Mol, isomeric: bool) -> str:
    return Chem.MolToSmiles(prod, isomericSmiles=isomeric)


#: Automorphisms enumerated per molecule; a molecule with more (many
#: tert-butyl groups, say) falls back to comparing product SMILES.
MAX_AUTOMORPHISMS = 512


def automorphisms(mol: Chem.Mol) -> list[tuple[int, ...]] | None:
    """Every permutation of atoms that maps the graph onto itself (None when there are too many)."""
    perms = mol.GetSubstructMatches(mol, uniquify=False, useChirality=False, maxMatches=MAX_AUTOMORPHISMS)
    return None if len(perms) >= MAX_AUTOMORPHISMS else list(perms)


def site_groups(mol: Chem.Mol, has_stereo: bool) -> list[SiteGroup]:
    """Group H-bearing carbons into constitutional monohalides, exactly.

    Canonical ranks without tie-breaking are a colour refinement: they never
    split equivalent atoms but can merge inequivalent ones in graphs with
    rings (two cyclopropyls on a chain is the classic case). Colour refinement
    is exact on trees, so acyclic molecules take the ranks as they are. In
    ring systems each merged class is split by the orbits of the full
    automorphism group (the very definition of equivalent positions), or,
    when there are too many automorphisms to list, by the canonical SMILES of
    each member's monochloride, a complete invariant.
    """
    ranks = list(Chem.CanonicalRankAtoms(mol, breakTies=False, includeChirality=False))
    by_rank: dict[int, list[int]] = defaultdict(list)
    for atom in mol.GetAtoms():
        if atom.GetTotalNumHs() > 0:
            by_rank[ranks[atom.GetIdx()]].append(atom.GetIdx())
    perms = automorphisms(mol)
    cyclic = mol.GetRingInfo().NumRings() > 0
    groups: list[SiteGroup] = []
    for rank in sorted(by_rank):
        members = by_rank[rank]
        if cyclic and len(members) > 1 and perms is not None:
            parts = []
            left = list(members)
            while left:
                orbit = {p[left[0]] for p in perms}
                idxs = [i for i in left if i in orbit]
                left = [i for i in left if i not in orbit]
                prod = substitute(mol, idxs[0])
                parts.append((_smiles(prod, has_stereo), idxs, prod))
        elif cyclic and len(members) > 1:
            split: dict[str, list[int]] = {}
            products: dict[str, Chem.Mol] = {}
            for idx in members:
                prod = substitute(mol, idx)
                # Constitution only: with input stereo, equivalent carbons can
                # give enantiomeric or diastereomeric products of one constitution.
                key = Chem.MolToSmiles(prod, isomericSmiles=False)
                split.setdefault(key, []).append(idx)
                products.setdefault(key, prod)
            parts = [(_smiles(products[k], has_stereo), idxs, products[k]) for k, idxs in split.items()]
        else:
            prod = substitute(mol, members[0])
            parts = [(_smiles(prod, has_stereo), members, prod)]
        for smi, idxs, prod in parts:
            first = mol.GetAtomWithIdx(idxs[0])
            groups.append(
                SiteGroup(
                    atoms=tuple(idxs),
                    site=classify_carbon(first),
                    h_count=sum(mol.GetAtomWithIdx(i).GetTotalNumHs() for i in idxs),
                    product=prod,
                    product_smiles=smi,
                    stabiliser=None if perms is None else tuple(p for p in perms if p[idxs[0]] == idxs[0]),
                )
            )
    return groups
