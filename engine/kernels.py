"""Batch kernels of perception: one set of flat arrays for a whole batch of molecules, classified at once.

Per molecule only RDKit's own outputs are read (bond orders from the adjacency matrix, hydrogen
counts, the ring list); the site-class rules of :func:`halosift.engine.sites.site_classes` and the
pattern flags of :func:`halosift.engine.special_sites.structure_flags` are then evaluated for every
atom of the batch in a few numpy passes instead of seven substructure searches per molecule.
The rules are the SMARTS of those modules spelled out over the arrays (see the comments beside
each); ``tests/test_kernels.py`` compares both on thousands of generated structures.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from halosift.engine.site_classes import SITE_CLASSES, SITE_CODE
from rdkit import Chem

#: Bond orders as :func:`rdkit.Chem.GetAdjacencyMatrix` writes them with ``useBO=True``.
SINGLE, AROMATIC, DOUBLE, TRIPLE = 1.0, 1.5, 2.0, 3.0

#: Kernel categories of an H-bearing atom, before the per-molecule overrides (bridgehead, norbornyl).
NO_H, ARYL, ALKYNYL, VINYL, METHANE, CYCLOPROPYL, OTHER = range(7)
#: Names of the fixed categories (OTHER is resolved from degree and π neighbour).
_FIXED = {ARYL: "aryl", ALKYNYL: "alkynyl", VINYL: "vinyl", METHANE: "methane", CYCLOPROPYL: "cyclopropyl"}
_KINDS = ("", "allylic", "benzylic", "propargylic")
_DEGREE_NAMES = ("", "primary", "secondary", "tertiary")
#: Site code of (kind, degree) for an OTHER atom with no bridgehead or norbornane override; -1 where impossible.
_OTHER_CODE = np.array(
    [[SITE_CODE[f"{k}-{d}" if k else d] if d else -1 for d in _DEGREE_NAMES] for k in _KINDS], dtype=np.int16
)


@dataclass(frozen=True)
class MolArrays:
    """What the kernels read of one parsed molecule."""

    h_counts: list[int]
    """Total hydrogens per atom (RDKit's GetTotalNumHs)."""
    src: np.ndarray
    """Bonds seen from both ends: the atom each directed bond starts at (int64)."""
    dst: np.ndarray
    """The atom each directed bond ends at (int64)."""
    order: np.ndarray
    """Bond order per directed bond: 1, 1.5 (aromatic), 2 or 3 (float64)."""
    rings: tuple[tuple[int, ...], ...]
    """RDKit's ring list (the rings SMARTS ring queries count)."""


def mol_arrays(mol: Chem.Mol) -> MolArrays:
    """The arrays of one molecule: a handful of RDKit calls, no per-bond Python."""
    n = mol.GetNumAtoms()
    h_counts = [mol.GetAtomWithIdx(i).GetTotalNumHs() for i in range(n)]  # indexing beats GetAtoms()
    adjacency = Chem.GetAdjacencyMatrix(mol, useBO=True)
    src, dst = np.nonzero(adjacency)
    return MolArrays(h_counts, src, dst, adjacency[src, dst], mol.GetRingInfo().AtomRings())


@dataclass(frozen=True)
class BatchSites:
    """Kernel results for a batch, per atom (flat, molecule by molecule) and per molecule."""

    atom_start: np.ndarray
    """Offset of each molecule's first atom in the flat arrays; one extra entry at the end."""
    category: np.ndarray
    """Per atom: one of NO_H, ARYL, ALKYNYL, VINYL, METHANE, CYCLOPROPYL, OTHER."""
    code: np.ndarray
    """Per atom: the site code when no override applies (OTHER: π kind and degree; else its category's)."""
    junction: np.ndarray
    """Per atom: an abstractable sp3 C–H on two or more rings ('[CX4;!H0;!R0;!R1]'), a bridgehead candidate."""
    alkene: np.ndarray
    """Per molecule: some double bond ('*=*')."""
    alkyne: np.ndarray
    """Per molecule: some triple bond ('*#*')."""
    propargylic: np.ndarray
    """Per molecule: an abstractable sp3 C–H single-bonded to an aliphatic C≡C atom ('[CX4;!H0]-[A]#*')."""
    cyclopropane: np.ndarray
    """Per molecule: some three-membered ring."""
    cyclopropylmethyl: np.ndarray
    """Per molecule: an sp3 C–H outside any triangle single-bonded to a triangle atom ('[CX4;!H0;!r3]-[r3]')."""
    small_ring: np.ndarray
    """Per molecule: some ring of at most ``small_ring_size`` atoms (gates the cage and central-bond walks)."""
    kind: np.ndarray
    """Per atom: 1 allylic, 2 benzylic, 3 propargylic for an abstractable sp3 C–H with that π neighbour, else 0."""
    src: np.ndarray
    """Directed bonds of the whole batch: start atom, a flat index (row-major per molecule, so sorted)."""
    dst: np.ndarray
    """Directed bonds: end atom, a flat index."""
    bond_order: np.ndarray
    """Directed bonds: order 1, 1.5, 2 or 3."""
    degree: np.ndarray
    """Per atom: heavy-atom neighbours."""
    aromatic: np.ndarray
    """Per atom: carries an aromatic bond (for hydrocarbons, exactly the aromatic atoms)."""


def classify(parts: Sequence[MolArrays], n_atoms: Sequence[int], small_ring_size: int) -> BatchSites:
    """Site categories and codes of every atom of a batch and the pattern flags of every molecule.

    ``n_atoms``: atoms per molecule (the length of its ``h_counts``).
    """
    n_mol = len(parts)
    counts = np.asarray(n_atoms, dtype=np.int64)
    atom_start = np.zeros(n_mol + 1, dtype=np.int64)
    np.cumsum(counts, out=atom_start[1:])
    total = int(atom_start[-1])
    mol_of_atom = np.repeat(np.arange(n_mol), counts)
    h = np.fromiter((x for p in parts for x in p.h_counts), dtype=np.int64, count=total)
    n_bonds = np.array([len(p.order) for p in parts], dtype=np.int64)
    offset = np.repeat(atom_start[:-1], n_bonds)
    if n_bonds.sum():
        src = np.concatenate([p.src for p in parts]).astype(np.int64) + offset
        dst = np.concatenate([p.dst for p in parts]).astype(np.int64) + offset
        o = np.concatenate([p.order for p in parts])
    else:
        src = dst = np.zeros(0, dtype=np.int64)
        o = np.zeros(0)
    mol_of_bond = np.repeat(np.arange(n_mol), n_bonds)
    degree = np.bincount(src, minlength=total)
    # Hydrocarbon atoms are aromatic exactly when they carry an aromatic bond.
    aromatic = np.bincount(src[o == AROMATIC], minlength=total) > 0
    has_double = np.bincount(src[o == DOUBLE], minlength=total) > 0
    has_triple = np.bincount(src[o == TRIPLE], minlength=total) > 0
    ring_atoms = [i for p in parts for ring in p.rings for i in ring]
    ring_sizes = [len(ring) for p in parts for ring in p.rings for _ in ring]
    ring_mol = [m for m, p in enumerate(parts) for ring in p.rings for _ in ring]
    ring_atoms_flat = np.asarray(ring_atoms, dtype=np.int64) + atom_start[np.asarray(ring_mol, dtype=np.int64)] \
        if ring_atoms else np.zeros(0, dtype=np.int64)
    sizes = np.asarray(ring_sizes, dtype=np.int64)
    min_ring = np.zeros(total, dtype=np.int64)  # 0: in no ring (SMARTS r<n> is the smallest ring's size)
    if len(sizes):
        big = np.full(total, np.iinfo(np.int64).max)
        np.minimum.at(big, ring_atoms_flat, sizes)
        min_ring = np.where(big == np.iinfo(np.int64).max, 0, big)
    n_rings = np.bincount(ring_atoms_flat, minlength=total)

    has_h = h > 0
    aliphatic = ~aromatic
    sp3 = aliphatic & (degree + h == 4)  # 'CX4': four connections counting hydrogens
    abstractable = sp3 & has_h
    single = o == SINGLE
    # '[CX4;!H0]-[A]=*', '-a', '-[A]#*': a single bond to such a neighbour.
    allylic = np.bincount(src[single & aliphatic[dst] & has_double[dst]], minlength=total) > 0
    benzylic = np.bincount(src[single & aromatic[dst]], minlength=total) > 0
    propargylic = np.bincount(src[single & aliphatic[dst] & has_triple[dst]], minlength=total) > 0
    kind = np.where(abstractable & allylic, 1, np.where(abstractable & benzylic, 2,
                    np.where(abstractable & propargylic, 3, 0)))

    category = np.full(total, OTHER, dtype=np.int8)
    # First rule that applies wins: fill from the last rule back to the first.
    category[abstractable & (min_ring == 3)] = CYCLOPROPYL  # '[CX4;!H0;r3]'
    category[degree == 0] = METHANE
    category[aliphatic & has_double] = VINYL  # '[C;!H0]=*'
    category[aliphatic & has_triple] = ALKYNYL  # '[C;!H0]#*'
    category[aromatic] = ARYL  # '[c;!H0]'
    category[~has_h] = NO_H
    code = np.full(total, -1, dtype=np.int16)
    for cat, name in _FIXED.items():
        code[category == cat] = SITE_CODE[name]
    other = category == OTHER
    code[other] = _OTHER_CODE[kind[other], np.minimum(degree[other], 3)]

    def per_mol(atom_mask: np.ndarray) -> np.ndarray:
        return np.bincount(mol_of_atom[atom_mask], minlength=n_mol) > 0

    triangle = min_ring == 3
    cpm_bond = single & abstractable[src] & ~triangle[src] & triangle[dst]
    ring_mol_arr = np.asarray(ring_mol, dtype=np.int64)
    return BatchSites(
        atom_start=atom_start,
        category=category,
        code=code,
        junction=abstractable & (n_rings >= 2),
        alkene=np.bincount(mol_of_bond[o == DOUBLE], minlength=n_mol) > 0,
        alkyne=np.bincount(mol_of_bond[o == TRIPLE], minlength=n_mol) > 0,
        propargylic=per_mol(abstractable & propargylic),
        cyclopropane=np.bincount(ring_mol_arr[sizes == 3], minlength=n_mol) > 0,
        cyclopropylmethyl=per_mol(np.bincount(src[cpm_bond], minlength=total) > 0),
        small_ring=np.bincount(ring_mol_arr[sizes <= small_ring_size], minlength=n_mol) > 0,
        kind=kind,
        src=src,
        dst=dst,
        bond_order=o,
        degree=degree,
        aromatic=aromatic,
    )


def site_names(batch: BatchSites, mol: int, atoms: Sequence[int], bridgeheads: frozenset[int],
               bicyclic: dict[int, str]) -> list[str]:
    """Site class of each of ``atoms`` of molecule ``mol``, with the per-molecule overrides applied.

    An OTHER atom is a bridgehead when in ``bridgeheads``; else, without a π neighbour, a
    norbornane position when in ``bicyclic`` (:func:`halosift.engine.sites.norbornane_positions`).
    """
    lo, hi = int(batch.atom_start[mol]), int(batch.atom_start[mol + 1])
    codes = batch.code[lo:hi].tolist()
    names = [SITE_CLASSES[codes[idx]] for idx in atoms]
    if bridgeheads or bicyclic:
        category = batch.category[lo:hi].tolist()
        for pos, idx in enumerate(atoms):
            if category[idx] != OTHER:
                continue
            if idx in bridgeheads:
                names[pos] = "bridgehead"
            elif idx in bicyclic and "-" not in names[pos]:
                names[pos] = f"norbornyl-{bicyclic[idx]}-{names[pos]}"
    return names
