"""Find every C–H site, its class, and its exact symmetry group."""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass
from functools import cached_property

import numpy as np
from halosift.engine.special_sites import PROPARGYLIC_SMARTS, small_bridgeheads
from halosift.engine.stereo import canonical
from rdkit import Chem

_SINGLE = Chem.BondType.SINGLE
_DEGREE_NAMES = {1: "primary", 2: "secondary", 3: "tertiary"}


#: Per-molecule pattern sets behind :func:`site_classes`: one C++ match each
#: instead of walking every atom's bonds in Python.
_SITE_SMARTS = {
    "aryl": "[c;!H0]",
    "alkynyl": "[C;!H0]#*",
    "vinyl": "[C;!H0]=*",
    "cyclopropyl": "[CX4;!H0;r3]",
    "allylic": "[CX4;!H0]-[A]=*",  # π partner not aromatic: an aryl neighbour makes it benzylic
    "benzylic": "[CX4;!H0]-a",
    "propargylic": PROPARGYLIC_SMARTS,
}
_SITE_PATTERNS = {name: Chem.MolFromSmarts(smarts) for name, smarts in _SITE_SMARTS.items()}
#: A saturated bicyclo[2.2.1] skeleton; pattern atoms 0, 1, 3, 4 are C2-type positions, 6 is C7
#: (atoms 2 and 5 are the bridgeheads, which engine.special_sites finds on its own).
_NORBORNANE = Chem.MolFromSmarts("[CX4]1[CX4][CX4]2[CX4][CX4][CX4]1[CX4]2")
_NORBORNANE_ROLE = {0: "2", 1: "2", 3: "2", 4: "2", 6: "7"}


def norbornane_positions(mol: Chem.Mol) -> dict[int, str]:
    """Atom index → '2' or '7' for every carbon at a C2-type or C7 position of a saturated norbornane skeleton.

    An atom met in both roles (fused or caged skeletons) counts as '7', the slower site.
    """
    out: dict[int, str] = {}
    if mol.GetRingInfo().NumRings() < 2:
        return out
    for match in mol.GetSubstructMatches(_NORBORNANE, uniquify=False, maxMatches=10_000):
        for pos, role in _NORBORNANE_ROLE.items():
            idx = match[pos]
            if out.get(idx) != "7":
                out[idx] = role
    return out


def _matched(mol: Chem.Mol, name: str) -> set[int]:
    return {m[0] for m in mol.GetSubstructMatches(_SITE_PATTERNS[name], uniquify=False, maxMatches=100_000)}


def site_classes(mol: Chem.Mol, atoms: Iterable[int], bridgeheads: frozenset[int]) -> list[str]:
    """Site class (see :mod:`halosift.engine.site_classes`) of each of ``atoms`` (H-bearing carbons).

    ``bridgeheads``: :func:`halosift.engine.special_sites.small_bridgeheads` of ``mol``.
    First rule that applies: aryl, alkynyl, vinyl (never abstracted); methane;
    cyclopropyl (a σ radical, which neighbouring π systems barely help);
    bridgehead (a small bicycle's bridgehead cannot planarise, so it overrides
    the π classes too); then allylic, benzylic or propargylic by degree —
    where several π systems are adjacent the weakest C–H names it, allyl
    (88.8) < benzyl (89.7) < propargyl (≈90 kcal/mol); then the C7 and C2-type
    positions of a saturated norbornane skeleton (:func:`norbornane_positions`),
    by degree; else the plain degree.
    The tests compare this with a per-atom walk over the same rules.
    """
    sets = {name: _matched(mol, name) for name in _SITE_SMARTS}
    bicyclic = norbornane_positions(mol)
    out = []
    for idx in atoms:
        if idx in sets["aryl"]:
            out.append("aryl")
        elif idx in sets["alkynyl"]:
            out.append("alkynyl")
        elif idx in sets["vinyl"]:
            out.append("vinyl")
        else:
            degree = mol.GetAtomWithIdx(idx).GetDegree()
            if degree == 0:
                out.append("methane")
            elif idx in sets["cyclopropyl"]:
                out.append("cyclopropyl")
            elif idx in bridgeheads:
                out.append("bridgehead")
            else:
                kind = next((k for k in ("allylic", "benzylic", "propargylic") if idx in sets[k]), None)
                name = _DEGREE_NAMES[degree]
                if kind:
                    out.append(f"{kind}-{name}")
                elif idx in bicyclic:
                    out.append(f"norbornyl-{bicyclic[idx]}-{name}")
                else:
                    out.append(name)
    return out


@dataclass(frozen=True, eq=False)
class SiteGroup:
    """Symmetry-equivalent H-bearing carbons: one constitutional monohalide.

    The product and its symmetry are worked out only when asked for: a
    library screen needs them for the few groups that can be a major product.
    """

    atoms: tuple[int, ...]
    """Indices of the equivalent carbons (in the parsed molecule)."""
    site: str
    """Site class of these carbons."""
    h_count: int
    """Hydrogens on all of them together."""
    substrate: Chem.Mol
    """The parsed molecule the atom indices refer to."""
    has_stereo: bool
    """Whether the substrate specifies any stereo (then product SMILES are isomeric)."""
    substrate_automorphisms: np.ndarray | None
    """Every automorphism of the substrate, one per row (None when there were too many to list)."""
    known_product: tuple[str, Chem.Mol] | None = None
    """(SMILES, molecule) of the product when grouping already had to make it."""

    @cached_property
    def member_products(self) -> tuple[tuple[str, Chem.Mol], ...]:
        """(canonical isomeric SMILES, molecule) of the monochloride from each carbon of the group,
        smallest SMILES first (the order :meth:`product` picks its representative by).

        With input stereo, equivalent carbons can give different stereoisomers of one
        constitution (the two enantiomers from mirror-related carbons of a meso
        substrate); without it every member gives the same product, and only the first is built.
        """
        atoms = self.atoms if self.has_stereo else self.atoms[:1]
        made = [(_smiles(prod, self.has_stereo), prod) for prod in (substitute(self.substrate, i) for i in atoms)]
        return tuple(sorted(made, key=lambda pair: pair[0]))

    @cached_property
    def product(self) -> Chem.Mol:
        """The monochloride standing for the group (stereo of the input kept, the new centre unset).

        With input stereo and several carbons, the one whose canonical SMILES sorts first:
        which of two enantiomers a racemate is written as is a convention, and this one does
        not depend on how the input numbers its atoms, so a screen, an explanation and a
        re-perception from the canonical SMILES all name the same stereoisomer.
        """
        if self._representative_known:
            return self.known_product[1]  # type: ignore[index]  # checked by _representative_known
        return self.member_products[0][1]

    @cached_property
    def product_smiles(self) -> str:
        """Canonical isomeric SMILES of that monochloride."""
        if self._representative_known:
            return self.known_product[0]  # type: ignore[index]  # checked by _representative_known
        return self.member_products[0][0]

    @property
    def _representative_known(self) -> bool:
        """Whether grouping's own product is the representative (one carbon, or no input stereo)."""
        return self.known_product is not None and (not self.has_stereo or len(self.atoms) == 1)

    @cached_property
    def stabiliser(self) -> np.ndarray | None:
        """The substrate's automorphisms that fix the substituted carbon — exactly the
        product's automorphisms, one per row (None when there were too many to list)."""
        perms = self.substrate_automorphisms
        if perms is None:
            return None
        first = self.atoms[0]
        return perms[perms[:, first] == first]


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
    """Canonical SMILES of a product; with input stereo, only the stereo the product really keeps.

    A tag copied from the substrate can stop being a stereocentre (the other
    end of 1,4-dimethylcyclohexane once C1 is open), and written as is it
    would claim a configuration that no longer exists.
    """
    return canonical(prod) if isomeric else Chem.MolToSmiles(prod, isomericSmiles=False)


#: Automorphisms enumerated per molecule; a molecule with more (many
#: tert-butyl groups, say) falls back to comparing product SMILES.
MAX_AUTOMORPHISMS = 512


def automorphisms(mol: Chem.Mol) -> np.ndarray | None:
    """Every permutation of atoms that maps the graph onto itself, one per row: row[i] is the image
    of atom i (None when there are too many)."""
    perms = mol.GetSubstructMatches(mol, uniquify=False, useChirality=False, maxMatches=MAX_AUTOMORPHISMS)
    if len(perms) >= MAX_AUTOMORPHISMS:
        return None
    return np.array(perms, dtype=np.int64).reshape(len(perms), mol.GetNumAtoms())


def site_groups(
    mol: Chem.Mol,
    has_stereo: bool,
    bridgeheads: frozenset[int] | None = None,
    h_counts: Sequence[int] | None = None,
    classes_of: Callable[[list[int]], list[str]] | None = None,
) -> list[SiteGroup]:
    """Group H-bearing carbons into constitutional monohalides, exactly.

    Canonical ranks without tie-breaking are a colour refinement: they never
    split equivalent atoms but can merge inequivalent ones in graphs with
    rings (two cyclopropyls on a chain is the classic case). Colour refinement
    is exact on trees, so acyclic molecules take the ranks as they are. In
    ring systems each merged class is split by the orbits of the full
    automorphism group (the very definition of equivalent positions), or,
    when there are too many automorphisms to list, by the canonical SMILES of
    each member's monochloride, a complete invariant.
    ``bridgeheads``: :func:`halosift.engine.special_sites.small_bridgeheads` of ``mol``
    when the caller has it already; ``h_counts`` (hydrogens per atom) likewise, and
    ``classes_of`` the site classes of a list of atoms (default :func:`site_classes`; the batch
    kernels pass their own).
    """
    ranks = list(Chem.CanonicalRankAtoms(mol, breakTies=False, includeChirality=False))
    by_rank: dict[int, list[int]] = defaultdict(list)
    if h_counts is None:
        h_counts = [mol.GetAtomWithIdx(i).GetTotalNumHs() for i in range(mol.GetNumAtoms())]  # indexing beats GetAtoms()
    for idx, h in enumerate(h_counts):
        if h:
            by_rank[ranks[idx]].append(idx)
    perms = automorphisms(mol)
    cyclic = mol.GetRingInfo().NumRings() > 0
    groups: list[SiteGroup] = []
    # An atom's orbit is the set of its images; its lowest image names it (computed for every atom at once).
    orbit_of = None if perms is None or not cyclic else perms.min(axis=0).tolist()
    pending: list[tuple[list[int], tuple[str, Chem.Mol] | None]] = []
    for rank in sorted(by_rank):
        members = by_rank[rank]
        parts: list[tuple[list[int], tuple[str, Chem.Mol] | None]]
        if cyclic and len(members) > 1 and orbit_of is not None:
            orbits: dict[int, list[int]] = {}
            for i in members:
                orbits.setdefault(orbit_of[i], []).append(i)
            parts = [(orbit, None) for orbit in orbits.values()]
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
            parts = [(idxs, (_smiles(products[k], has_stereo), products[k])) for k, idxs in split.items()]
        else:
            parts = [(members, None)]
        pending.extend(parts)
    if classes_of is None:
        if bridgeheads is None:
            bridgeheads = small_bridgeheads(mol)
        classes = site_classes(mol, [idxs[0] for idxs, _ in pending], bridgeheads)
    else:
        classes = classes_of([idxs[0] for idxs, _ in pending])
    for (idxs, known), site in zip(pending, classes):
        groups.append(
            SiteGroup(
                atoms=tuple(idxs),
                site=site,
                h_count=sum(h_counts[i] for i in idxs),
                substrate=mol,
                has_stereo=has_stereo,
                substrate_automorphisms=perms,
                known_product=known,
            )
        )
    return groups
