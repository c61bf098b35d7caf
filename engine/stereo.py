"""Stereochemical outcome of a monohalide: achiral, racemate or diastereomers."""

from __future__ import annotations

import itertools
import math
import operator
from collections import Counter
from collections.abc import Iterable
from dataclasses import dataclass
from functools import lru_cache
from typing import Any, Literal

import numpy as np
from halosift.engine.orbit_counts import (
    OrbitCount,
    OrbitJob,
    bond_neighbours,
    count_orbits,
    cumulated,
    element_parts,
    orbit_job,
)
from rdkit import Chem
from rdkit.Chem import rdDistGeom

#: Stereo work allowed per structure, in atom-isomers: building, canonicalising and
#: mirroring one stereoisomer of an n-atom product costs n (or 2n when its mirror image
#: needs its own canonical SMILES). About 5 µs each here (RDKit 2026.09, one core),
#: so the default keeps any structure's enumeration near half a second, under a second
#: on a busy machine (benchmarks/bench_stereo_budget.py).
#: Perception shares it equally among a structure's products (:func:`work_share`), the
#: same share in a screen, in ``explain``, the report and the app's detail, so every mode
#: gives a product the same answer. A product whose enumeration would cost more is
#: :data:`NOT_COUNTED`; counting by orbits (most stereo-free inputs) builds no isomer and is not limited.
STEREO_WORK_BUDGET = 100_000
#: Largest ring of a closed polyhedral cage whose every atom the skeleton pins (common practice:
#: faces of three to six atoms cannot flip one corner through the cage).
MAX_CAGE_RING = 6
#: Embedding attempts when reading a ring skeleton's geometry (bounded: a cage
#: that will not embed quickly is reported as approximate instead).
EMBED_ATTEMPTS = 5
_CW = Chem.ChiralType.CHI_TETRAHEDRAL_CW
_CCW = Chem.ChiralType.CHI_TETRAHEDRAL_CCW
_TETRAHEDRAL = Chem.StereoType.Atom_Tetrahedral
_DOUBLE_BOND = Chem.StereoType.Bond_Double
_UNSPECIFIED = Chem.StereoSpecified.Unspecified
_CIS = Chem.BondStereo.STEREOCIS
_TRANS = Chem.BondStereo.STEREOTRANS

#: Outcome of a product whose stereoisomers were not enumerated within its share of
#: :data:`STEREO_WORK_BUDGET` (too many open stereo elements); its counts are an upper bound.
NOT_COUNTED = "not counted"
#: Outcome of a product with no stereocentre or stereogenic double bond.
ACHIRAL = "achiral"
OUTCOMES = (ACHIRAL, "one-enantiomer", "racemate", "diastereomers", NOT_COUNTED)
#: What each stereo outcome of a product means (words of their own: none is a verdict word).
STEREO_DOCS: dict[str, str] = {
    ACHIRAL: "no new stereocentre",
    "one-enantiomer": "one chiral stereoisomer (existing stereo carried through)",
    "racemate": "a new stereocentre, formed as both enantiomers",
    # Not only "beside existing ones": 2-chloronorbornane from achiral norbornane forms exo and endo, each a
    # racemate, so new stereocentres alone can give diastereomers.
    "diastereomers": ("stereoisomers that are not all mirror images form: a new stereocentre beside existing ones, "
                      "or new stereocentres that are diastereomeric among themselves (exo/endo 2-chloronorbornane)"),
    NOT_COUNTED: "too many open stereo elements to count within the per-structure budget; the number is an upper bound",
}

#: Largest stereoisomer count stored as such: 2**53, exact alike in int64 columns, float64
#: and JSON numbers. A larger count (53 or more stereo elements) is stored as this cap with
#: ``approximate`` set: read it as "at least this many", never as a wrapped number.
COUNT_CAP = 2**53

#: Automorphisms of a product, one per row: an int array (or, for the reference, tuples).
Symmetries = np.ndarray | tuple[tuple[int, ...], ...]


@dataclass(frozen=True)
class StereoOutcome:
    """What a product looks like stereochemically."""

    outcome: str
    """'achiral' (one stereoisomer, superimposable on its mirror image);
    'one-enantiomer' (one chiral stereoisomer, its configuration fixed by the input);
    'racemate' (a pair of enantiomers formed 1:1);
    'diastereomers' (two or more stereoisomers that are not mirror images);
    :data:`NOT_COUNTED` (too many open stereo elements to enumerate within the budget)."""
    n_stereoisomers: int
    """Number of stereoisomers formed (enantiomers counted separately); at most :data:`COUNT_CAP`.
    For :data:`NOT_COUNTED`, an upper bound: 2^(open elements), summed over the products."""
    n_diastereomers: int
    """Number of stereoisomers up to mirror image (1 for a racemate); at most :data:`COUNT_CAP`.
    For :data:`NOT_COUNTED`, the same upper bound as ``n_stereoisomers``."""
    approximate: bool = False
    """True when the counts are not exact: :data:`NOT_COUNTED` (an upper bound), a
    bridged ring system that could not be embedded in 3D (every combination counted,
    so an upper bound), or a count above :data:`COUNT_CAP` (stored as the cap)."""


def potential_stereo(mol: Chem.Mol) -> list:
    """RDKit's potential stereo elements of ``mol`` as a plain list.

    Indexing the returned vector is cheap; iterating it directly costs
    microseconds per element in the binding, which adds up over a library.
    """
    found = Chem.FindPotentialStereo(mol)
    return [found[i] for i in range(len(found))]


def _controlling(element: Chem.StereoInfo) -> tuple[int, ...]:
    """A double bond's four controlling atoms (empty for other elements, which do not need them)."""
    if element.type != _DOUBLE_BOND:
        return ()
    atoms = element.controllingAtoms
    return tuple(atoms[i] for i in range(len(atoms)))


def canonical(mol: Chem.Mol) -> str:
    """Canonical isomeric SMILES after fresh stereo perception.

    Re-perceiving drops tags on atoms that are not real stereocentres (for
    example the bridgeheads of 1-chlorobicyclo[2.2.2]octane), so equal strings
    mean the same stereoisomer.
    """
    m = Chem.Mol(mol)
    m.ClearComputedProps()
    Chem.AssignStereochemistry(m, cleanIt=True, force=True)
    return Chem.MolToSmiles(m)


def mirror(mol: Chem.Mol) -> Chem.Mol:
    """The mirror image (tetrahedral tags inverted; double-bond geometry is unchanged by reflection)."""
    m = Chem.Mol(mol)
    for i in range(m.GetNumAtoms()):
        atom = m.GetAtomWithIdx(i)
        tag = atom.GetChiralTag()
        if tag == _CW:
            atom.SetChiralTag(_CCW)
        elif tag == _CCW:
            atom.SetChiralTag(_CW)
    return m


def _invert(tag: Chem.ChiralType) -> Chem.ChiralType:
    return _CCW if tag == _CW else _CW if tag == _CCW else tag


def geometry_atoms(mol: Chem.Mol) -> frozenset[int]:
    """Atoms whose configuration a small or bridged ring system may forbid.

    Bridged rings (two rings sharing three or more atoms: norbornane,
    bicyclo[2.2.2]octane, adamantane) couple their bridgehead configurations;
    fusion to a three- or four-membered ring forbids most trans fusions.
    Ordinary fused rings (decalin, hydrindane) exist both cis and trans.
    A closed polyhedral cage (every atom of the ring system in three ring
    bonds, no ring larger than :data:`MAX_CAGE_RING`: cubane, prismane,
    dodecahedrane) is rigid as a whole, though its small faces only share
    edges: every one of its atoms is pinned.
    """
    ring_info = mol.GetRingInfo()
    rings = [set(r) for r in ring_info.AtomRings()]
    out: set[int] = set()
    for i, a in enumerate(rings):
        for b in rings[i + 1 :]:
            shared = a & b
            if len(shared) >= 3 or (len(shared) == 2 and min(len(a), len(b)) <= 4):
                out |= shared
    for system in _ring_systems(mol) if len(rings) >= 3 else ():  # a cage has three rings at least (tetrahedrane)
        members = [r for r in rings if r <= system]
        # Three ring bonds at every atom need at least |system|/2 + 1 rings: most systems stop here.
        if 2 * (len(members) - 1) < len(system) or max(len(r) for r in members) > MAX_CAGE_RING:
            continue
        ring_bonds = [
            sum(ring_info.NumBondRings(b.GetIdx()) > 0 and b.GetOtherAtomIdx(i) in system for b in mol.GetAtomWithIdx(i).GetBonds())
            for i in system
        ]
        if min(ring_bonds) >= 3:
            out |= system
    return frozenset(out)


def _ring_systems(mol: Chem.Mol) -> list[set[int]]:
    """Atom sets of the fused/bridged ring systems (rings that share atoms, merged)."""
    systems: list[set[int]] = []
    for ring in mol.GetRingInfo().AtomRings():
        merged = set(ring)
        rest = []
        for system in systems:
            if system & merged:
                merged |= system
            else:
                rest.append(system)
        systems = [*rest, merged]
    return systems


@lru_cache(maxsize=4096)
def _ring_coordinates(fragment_smiles: str) -> tuple[tuple[float, float, float], ...] | None:
    """3D heavy-atom coordinates of a ring-system fragment, in its SMILES order (None: cannot embed).

    Cached: a library holds many substrates on few ring skeletons.
    """
    mol = Chem.MolFromSmiles(fragment_smiles)
    if mol is None:
        return None
    mol_h = Chem.AddHs(mol)
    # Random starting coordinates are far more reliable for cubanes; eigenvector
    # starts for dodecahedranes, which random starts do not embed within a few tries.
    for random_start, attempts in ((True, EMBED_ATTEMPTS), (False, 4 * EMBED_ATTEMPTS)):
        params = rdDistGeom.ETKDGv3()
        # RDKit's stubs type these attributes as EmbedParameters; they are an int, an int and a bool.
        params.randomSeed = 0xC0FFEE  # type: ignore[assignment]
        params.maxIterations = attempts  # type: ignore[assignment]
        params.useRandomCoords = random_start  # type: ignore[assignment]
        if rdDistGeom.EmbedMolecule(mol_h, params) >= 0:
            break
    else:
        return None
    conf = mol_h.GetConformer()
    return tuple(tuple(conf.GetAtomPosition(i)) for i in range(mol.GetNumAtoms()))


Vec = tuple[float, float, float]


def _sub(p: Vec, q: Vec) -> Vec:
    return (p[0] - q[0], p[1] - q[1], p[2] - q[2])


def _triple(u: Vec, v: Vec, w: Vec) -> float:
    """u·(v×w)."""
    return u[0] * (v[1] * w[2] - v[2] * w[1]) + u[1] * (v[2] * w[0] - v[0] * w[2]) + u[2] * (v[0] * w[1] - v[1] * w[0])


def _tag_from_positions(mol: Chem.Mol, idx: int, position: dict[int, Vec]) -> Chem.ChiralType | None:
    """RDKit tag of atom ``idx`` from 3D positions of (at least three of) its neighbours.

    RDKit's convention, checked against its own 3D perception in the tests:
    with neighbours in bond order and an implicit H last, the tag is CW when
    (p1−p0)·((p2−p0)×(p3−p0)) > 0. A neighbour without a position (substituent
    or H) is placed opposite the mean direction of the others. Plain floats:
    numpy on 3-vectors costs more in call overhead than the arithmetic.
    """
    nbrs = bond_neighbours(mol, idx)
    slots = nbrs + [None] * mol.GetAtomWithIdx(idx).GetTotalNumHs()
    if len(slots) != 4 or idx not in position:
        return None
    known = [position[n] for n in nbrs if n in position]
    if len(known) < 3:
        return None
    centre = position[idx]
    sx = sy = sz = 0.0
    for p in known:
        d = _sub(p, centre)
        norm = math.sqrt(d[0] ** 2 + d[1] ** 2 + d[2] ** 2) or 1.0
        sx, sy, sz = sx + d[0] / norm, sy + d[1] / norm, sz + d[2] / norm
    opposite = (centre[0] - sx, centre[1] - sy, centre[2] - sz)
    pts = [position.get(n, opposite) if n is not None else opposite for n in slots]
    vol = _triple(_sub(pts[1], pts[0]), _sub(pts[2], pts[0]), _sub(pts[3], pts[0]))
    if abs(vol) < 1e-6:
        return None
    return _CW if vol > 0 else _CCW


class Skeleton:
    """A feasible 3D geometry of the substrate's bridged ring systems, found once if a product needs it.

    The ring skeleton fixes how bridgeheads sit relative to each other, so one
    embedding yields a feasible configuration for every product's bridgeheads
    (its inverse is the other). Products are the substrate plus one appended
    halogen, so atom indices carry over, and a tag copied onto the substituted
    carbon means retention, which is what a bridgehead radical in a small cage
    undergoes. Without input stereo only the ring system is embedded (keyed by
    its canonical SMILES, so substrates sharing a skeleton share the work);
    with input stereo the whole substrate is, so the given configuration holds.
    """

    def __init__(self, substrate: Chem.Mol, specified: bool, work_limit: int = STEREO_WORK_BUDGET) -> None:
        self._substrate = substrate
        self._specified = specified
        self.work_limit = work_limit
        """Stereo work (atom-isomers, :data:`STEREO_WORK_BUDGET`) each product of this substrate may use."""
        self.geometric = geometry_atoms(substrate)
        """Atoms of bridged or small fused ring systems (the same in every product)."""
        self._position: dict[int, Vec] | None = None
        self._tags: dict[int, Chem.ChiralType | None] = {}
        self._tried = False

    def _positions(self) -> dict[int, Vec] | None:
        mol = self._substrate
        ring_atoms = sorted(set().union(*_ring_systems(mol))) if mol.GetRingInfo().NumRings() else []
        if not ring_atoms:
            return None
        if self._specified:
            smiles = Chem.MolToSmiles(mol)
            atoms = list(range(mol.GetNumAtoms()))
        else:
            smiles = Chem.MolFragmentToSmiles(mol, atomsToUse=ring_atoms, isomericSmiles=False)
            atoms = ring_atoms
        order = list(mol.GetPropsAsDict(True, True)["_smilesAtomOutputOrder"])
        coords = _ring_coordinates(smiles)
        if coords is None or len(coords) != len(order):
            return None
        placed = {atom: coords[pos] for pos, atom in enumerate(order)}
        return {a: placed[a] for a in atoms if a in placed}

    def tags(self, atoms: list[int]) -> dict[int, Chem.ChiralType] | None:
        """Feasible tags for those of ``atoms`` the skeleton fixes (None: cannot embed).

        An atom that was CH2 in the substrate has no tag there: which of its
        two hydrogens is replaced is the product's own choice, so it stays open.
        The geometry is found at the first call; each atom's tag when first asked for.
        """
        if not self._tried:
            try:
                self._position = self._positions()
            except Exception:  # noqa: BLE001 - any RDKit failure just means "cannot check"
                self._position = None
            self._tried = True
        if self._position is None:
            return None
        out = {}
        for i in atoms:
            if i not in self._tags:
                self._tags[i] = _tag_from_positions(self._substrate, i, self._position)
            tag = self._tags[i]
            if tag is not None:
                out[i] = tag
        return out


def _assignments(product: Chem.Mol, open_elements: list) -> Iterable[tuple[tuple[int, ...], Chem.Mol]]:
    """Every combination of the open elements' configurations, with its choice vector."""
    choices: list[list[tuple[Any, ...]]] = []  # ("atom", index, tag) or ("bond", index, stereo, ends)
    for e in open_elements:
        if e.type == _TETRAHEDRAL:
            choices.append([("atom", e.centeredOn, _CW), ("atom", e.centeredOn, _CCW)])
        elif e.type == _DOUBLE_BOND and len(e.controllingAtoms) == 4:
            ends = (e.controllingAtoms[0], e.controllingAtoms[2])
            choices.append([("bond", e.centeredOn, _CIS, ends), ("bond", e.centeredOn, _TRANS, ends)])
    for picks in itertools.product(*(range(len(c)) for c in choices)):
        m = Chem.Mol(product)
        for options, pick in zip(choices, picks):
            choice = options[pick]
            if choice[0] == "atom":
                m.GetAtomWithIdx(choice[1]).SetChiralTag(choice[2])
            else:
                bond = m.GetBondWithIdx(choice[1])
                bond.SetStereoAtoms(*choice[3])
                bond.SetStereo(choice[2])
        if any(c[0][0] == "bond" for c in choices):
            # Legacy perception reads E/Z from bond directions; derive them from the labels.
            Chem.SetDoubleBondNeighborDirections(m)
        yield picks, m


def _independent(product: Chem.Mol, elements: list, symmetries: Symmetries | None = None) -> bool:
    """True when no symmetry of the product can touch any stereo element.

    Every automorphism must fix each centre and each of its neighbours (each
    double-bond end likewise). Then each of the 2^k configurations is a
    different stereoisomer and no enumeration is needed. With the product's
    automorphisms given this is checked exactly; otherwise tie-free ranks
    stand in (they may merge inequivalent atoms, which only makes the test
    fail more often, never wrongly pass).
    """
    watched: list[int] = []
    for e in elements:
        if e.type == _TETRAHEDRAL:
            centres = [e.centeredOn]
        elif e.type == _DOUBLE_BOND:
            bond = product.GetBondWithIdx(e.centeredOn)
            centres = [bond.GetBeginAtomIdx(), bond.GetEndAtomIdx()]
            if any(cumulated(product.GetAtomWithIdx(c)) for c in centres):
                return False  # allenes: axial, not E/Z, stereo — leave to enumeration
        else:
            return False
        for c in centres:
            atom = product.GetAtomWithIdx(c)
            if atom.GetTotalNumHs() > 1:
                return False
            watched.append(c)
            watched.extend(n.GetIdx() for n in atom.GetNeighbors())
    n_substrate = product.GetNumAtoms() - 1  # the halogen is the last atom; automorphisms fix it
    if symmetries is not None:
        watched = [w for w in watched if w < n_substrate]
        if isinstance(symmetries, np.ndarray):
            return bool((symmetries[:, watched] == np.array(watched, dtype=symmetries.dtype)).all())
        return all(perm[w] == w for perm in symmetries for w in watched)
    ranks = list(Chem.CanonicalRankAtoms(product, breakTies=False, includeChirality=False))
    counts: dict[int, int] = {}
    for r in ranks:
        counts[r] = counts.get(r, 0) + 1
    return all(counts[ranks[w]] == 1 for w in watched)


_ACHIRAL = StereoOutcome("achiral", 1, 1)
#: The stereo columns of a product not analysed: never formed (vinyl, aryl, alkynyl C–H), or not
#: a possible major in a screen (empty outcome, zero counts).
NOT_ANALYSED = StereoOutcome("", 0, 0)


def fixes_handedness(elements: list) -> bool:
    """True when the input fixes a tetrahedral configuration, so products are not formed with their mirror images.

    Only a fixed tetrahedral centre does: reflection leaves a double bond's E/Z
    geometry as it is, so an input whose only set stereo is E/Z is its own
    mirror image and gives every chiral product as a racemate.
    """
    return any(e.type == _TETRAHEDRAL and e.specified != _UNSPECIFIED for e in elements)


def _counted(n_open: int, chiral: bool, handed: bool, skeleton_forms: int = 1) -> StereoOutcome:
    """Outcome for independent elements: skeleton forms × 2^k isomers, no enumeration.

    ``chiral``: the product has any tetrahedral centre (with independence, that
    makes every isomer chiral). ``handed``: :func:`fixes_handedness` of the
    product's elements. ``skeleton_forms`` is 2 when a bridged skeleton occurs
    as both mirror forms, else 1.
    """
    n = skeleton_forms * 2**n_open
    if handed or not chiral:
        # Nothing is mirrored: a fixed input centre stays fixed, and E/Z isomers are achiral.
        if n == 1:
            return StereoOutcome("one-enantiomer" if chiral else "achiral", 1, 1)
        return StereoOutcome("diastereomers", n, n)
    n_dia = n // 2
    return StereoOutcome("racemate" if n_dia == 1 else "diastereomers", n, n_dia)


def _classify(isomers: dict[str, Chem.Mol], mirrors: dict[str, str], approximate: bool) -> StereoOutcome:
    """Count stereoisomers and mirror-image classes; ``mirrors`` may be partial."""
    for smi, mol in isomers.items():
        if smi not in mirrors:
            mirrors[smi] = canonical(mirror(mol))
    classes = {frozenset((smi, mirrors[smi])) for smi in isomers}
    n = len(isomers)
    if n == 1:
        smi = next(iter(isomers))
        return StereoOutcome("achiral" if mirrors[smi] == smi else "one-enantiomer", 1, 1, approximate)
    if len(classes) == 1:
        return StereoOutcome("racemate", n, 1, approximate)
    return StereoOutcome("diastereomers", n, len(classes), approximate)


#: Largest configuration set × automorphism count that the orbit count walks explicitly
#: (bridged skeletons); beyond it the enumeration below takes over.
MAX_ORBIT_WORK = 4096


def _parity_table() -> dict[tuple[int, ...], int]:
    table = {}
    for n in (2, 3, 4):
        for perm in itertools.permutations(range(n)):
            inversions = sum(1 for i in range(n) for j in range(i + 1, n) if perm[i] > perm[j])
            table[perm] = inversions % 2
    return table


#: Parity (1: odd) of each permutation of up to four neighbour positions.
_PARITY = _parity_table()


def _signed_actions(
    product: Chem.Mol, elements: list[tuple], symmetries: Symmetries
) -> tuple[list[list[tuple[int, int]]], list[int]] | None:
    """How the automorphisms move the stereo elements: distinct actions and how many automorphisms give each.

    A configuration gives each element a bit (tetrahedral: the tag, CW or
    CCW, relative to the centre's bond order; double bond: cis or trans of
    its two reference atoms). Carrying a configuration along an automorphism
    puts element ``e``'s bit on its image, inverted when the carried
    neighbours come out in odd order (tetrahedral) or a reference atom lands
    on the other substituent (double bond). An action is, per element,
    (image element, flip). Automorphisms that agree on the atoms around the
    elements act alike (the methyls of a tert-butyl, say), so each distinct
    action is worked out once. None when an image is not an element or an
    element is not of these two kinds (then enumeration decides).
    """
    n_substrate = product.GetNumAtoms() - 1  # the halogen is the last atom; automorphisms fix it
    found = element_parts(product, elements)
    if found is None:
        return None
    keys = {("t", centre): pos for pos, centre, _ in found.tetrahedral}
    nbrs_of = {centre: list(nbrs) for _, centre, nbrs in found.tetrahedral}
    by_position: dict[int, tuple] = {pos: ("t", centre) for pos, centre, _ in found.tetrahedral}
    by_position.update({pos: ("d", u, w, ref_u, ref_w) for pos, u, w, ref_u, ref_w in found.double})
    parts = [by_position[pos] for pos in range(len(elements))]
    ends = {(min(u, w), max(u, w)): (pos, ("d", u, w, ref_u, ref_w)) for pos, u, w, ref_u, ref_w in found.double}
    relevant = sorted({a for part in parts for a in part[1:]} | {n for nbrs in nbrs_of.values() for n in nbrs})
    relevant = [a for a in relevant if a < n_substrate]
    restrict = operator.itemgetter(*relevant, relevant[0])  # a trailing repeat keeps one atom a tuple too
    rows = symmetries.tolist() if isinstance(symmetries, np.ndarray) else symmetries
    counts = Counter(map(restrict, rows))
    actions, weights = [], []
    for key, weight in counts.items():
        image = dict(zip(relevant, key))
        moved = []
        for part in parts:
            if part[0] == "t":
                centre = part[1]
                target_centre = image.get(centre, centre)
                target_nbrs = nbrs_of.get(target_centre)
                if target_nbrs is None:
                    return None
                try:
                    order = tuple(target_nbrs.index(image.get(n, n)) for n in nbrs_of[centre])
                except ValueError:
                    return None
                moved.append((keys[("t", target_centre)], _PARITY[order]))
            else:
                _, u, w, ref_u, ref_w = part
                u1, w1 = image.get(u, u), image.get(w, w)
                hit = ends.get((min(u1, w1), max(u1, w1)))
                if hit is None:
                    return None
                target, (_, u2, w2, ref_u2, ref_w2) = hit
                r_u, r_w = image.get(ref_u, ref_u), image.get(ref_w, ref_w)
                if u1 == u2:
                    flip = (r_u != ref_u2) ^ (r_w != ref_w2)
                else:
                    flip = (r_u != ref_w2) ^ (r_w != ref_u2)
                moved.append((target, int(flip)))
        actions.append(moved)
        weights.append(weight)
    return actions, weights


def _fixed_count(action: list[tuple[int, int]], extra_flips: list[int]) -> int:
    """Configurations of the full 2^k set left unchanged by one signed permutation (Burnside's lemma)."""
    seen = [False] * len(action)
    cycles = 0
    for start in range(len(action)):
        if seen[start]:
            continue
        parity, e = 0, start
        while not seen[e]:
            seen[e] = True
            target, flip = action[e]
            parity ^= flip ^ extra_flips[e]
            e = target
        if parity:
            return 0  # going round the cycle inverts the bit: no configuration survives
        cycles += 1
    return 2**cycles


def _apply(action: list[tuple[int, int]], config: int, extra: int) -> int:
    out = 0
    for e, (target, flip) in enumerate(action):
        if ((config >> e) & 1) ^ flip ^ ((extra >> e) & 1):
            out |= 1 << target
    return out


def _orbit_outcome(
    product: Chem.Mol, elements: list[tuple], symmetries: Symmetries, skeleton: Skeleton, later: bool = False
) -> StereoOutcome | OrbitJob | None:
    """Stereo outcome of one product of a stereo-free input by counting orbits, without building isomers.

    Stereoisomers are the configurations of the open elements up to the
    product's automorphisms, and pairs of mirror images are the orbits once
    reflection (every tetrahedral bit inverted) joins the group. On the full
    set of 2^k configurations Burnside's lemma counts them from the cycles of
    each automorphism; where a bridged skeleton allows only its two mirror
    forms, the feasible configurations are walked explicitly. None hands the
    product to enumeration (too many elements, an unusual element, a skeleton
    that does not embed). ``elements``: (type, centred-on index, controlling
    atoms) of each element, all open. ``later``: give the :class:`OrbitJob` whose array count
    (:func:`halosift.engine.orbit_counts.count_orbits`) decides the outcome instead of counting it now.
    """
    k = len(elements)
    geometric = [pos for pos, (kind, centre, _) in enumerate(elements) if kind == _TETRAHEDRAL and centre in skeleton.geometric]
    if not geometric and not use_reference:
        # The common case, counted with other products' in array passes (engine.orbit_counts).
        job = orbit_job(product, elements, np.asarray(symmetries))
        if job is None or later:
            return job
        counts = count_orbits([job])[0]
        return None if counts is None else _from_orbits(counts)
    signed = _signed_actions(product, elements, symmetries)
    if signed is None:
        return None
    actions, weights = signed
    order = sum(weights)
    tetra = [int(kind == _TETRAHEDRAL) for kind, _, _ in elements]
    none = [0] * k
    tags = skeleton.tags([elements[pos][1] for pos in geometric]) if geometric else {}
    if tags is None:
        return None  # cannot embed: enumeration marks the count approximate
    if not tags:
        # Burnside's sum costs (distinct actions × elements), whatever k: exact for any chain length.
        fixed = sum(w * _fixed_count(a, none) for a, w in zip(actions, weights))
        mirrored = sum(w * _fixed_count(a, tetra) for a, w in zip(actions, weights))
        n, n_pairs = fixed // order, (fixed + mirrored) // (2 * order)
    else:
        pinned = {pos: int(tags[elements[pos][1]] == _CCW) for pos in geometric if elements[pos][1] in tags}
        free = [pos for pos in range(k) if pos not in pinned]
        if 2 ** (len(free) + 1) * len(actions) > MAX_ORBIT_WORK:
            return None  # checked before the walk: a cage pins its atoms, not a long open side chain
        base = sum(bit << pos for pos, bit in pinned.items())
        inverted = sum((1 - bit) << pos for pos, bit in pinned.items())
        feasible = set()
        for choice in range(2 ** len(free)):
            spread = sum(((choice >> j) & 1) << pos for j, pos in enumerate(free))
            feasible.add(base | spread)
            feasible.add(inverted | spread)
        mirror_mask = sum(bit << pos for pos, bit in enumerate(tetra))
        n = n_pairs = 0
        for config in feasible:
            images = [_apply(a, config, 0) for a in actions]
            if any(i not in feasible for i in images):
                return None  # the embedding disagrees with the symmetry: let enumeration decide
            if config == min(images):
                n += 1
            if config == min(images + [_apply(a, config, mirror_mask) for a in actions]):
                n_pairs += 1
    return _from_orbits(OrbitCount(n, n_pairs))


def _from_orbits(counts: OrbitCount) -> StereoOutcome:
    """The outcome of a product counted by orbits."""
    if counts.n_stereoisomers == 1:
        return _ACHIRAL
    kind = "racemate" if counts.n_diastereomers == 1 else "diastereomers"
    return StereoOutcome(kind, counts.n_stereoisomers, counts.n_diastereomers)


#: True inside :func:`halosift.engine.perception.reference_mode`: count orbits by the per-product
#: Python reference (:func:`_signed_actions`, :func:`_fixed_count`) instead of engine.orbit_counts.
use_reference = False


def capped(outcome: StereoOutcome) -> StereoOutcome:
    """``outcome`` with counts above :data:`COUNT_CAP` stored as the cap and marked approximate."""
    if outcome.n_stereoisomers <= COUNT_CAP and outcome.n_diastereomers <= COUNT_CAP:
        return outcome
    return StereoOutcome(outcome.outcome, min(outcome.n_stereoisomers, COUNT_CAP),
                         min(outcome.n_diastereomers, COUNT_CAP), True)


def _number(n: int) -> str:
    """A count as text: a large power of two as 2^k (bounds are sums of them), else in digits."""
    if n >= 2**16 and n & (n - 1) == 0:
        return f"2^{n.bit_length() - 1}"
    return str(n)


def count_text(outcome: str, n: int, approximate: bool | None = None) -> str:
    """The count shown after a stereo outcome: '' for one stereoisomer, else '(n)', or the bound it is.

    ``approximate``: the row's ``stereo_approx`` (None where a table does not carry
    it: :data:`NOT_COUNTED` and a count at :data:`COUNT_CAP` still say what they are).
    """
    if outcome == NOT_COUNTED:
        return f"(bound beyond {_number(COUNT_CAP)})" if n >= COUNT_CAP else f"(at most {_number(n)})"
    if n >= COUNT_CAP:
        return f"(at least {_number(COUNT_CAP)})"
    if approximate:
        return f"(at most {_number(n)})"  # a cage that would not embed: every combination counted
    return "" if n <= 1 else f"({_number(n)})"


def work_share(n_products: int) -> int:
    """Each product's share of :data:`STEREO_WORK_BUDGET` when a structure has ``n_products`` with stereo worked out."""
    return STEREO_WORK_BUDGET // max(1, n_products)


def _not_counted(products: list[Chem.Mol], elements: dict[int, list]) -> StereoOutcome:
    """The honest fallback: no count, but the bound every configuration of every product gives."""
    bound = 0
    for i, product in enumerate(products):
        found = elements[i] if i in elements else potential_stereo(product)
        bound += 2 ** sum(e.specified == _UNSPECIFIED for e in found)
    return StereoOutcome(NOT_COUNTED, bound, bound, True)


def stereo_outcome(
    products: list[Chem.Mol], skeleton: Skeleton, symmetries: Symmetries | None = None
) -> StereoOutcome:
    """Stereoisomers formed when H is replaced at one or more equivalent carbons (counts capped: :func:`capped`).

    Enumeration stops before it starts when it would cost more than
    ``skeleton.work_limit``: the product is then :data:`NOT_COUNTED`.
    """
    found = _outcome(products, skeleton, symmetries, "now")
    assert isinstance(found, StereoOutcome)  # "now" never hands back a job
    return capped(found)


@dataclass(frozen=True)
class PendingStereo:
    """A product whose stereo outcome waits for its orbit count (see :func:`stereo_outcome_later`)."""

    job: OrbitJob
    """The count that decides it."""
    products: list[Chem.Mol]
    """The arguments of :func:`stereo_outcome`, for the rare job the arrays hand back."""
    skeleton: Skeleton
    """As for :func:`stereo_outcome`."""
    symmetries: Symmetries | None
    """As for :func:`stereo_outcome`."""


def stereo_outcome_later(
    products: list[Chem.Mol], skeleton: Skeleton, symmetries: Symmetries | None = None
) -> StereoOutcome | PendingStereo:
    """:func:`stereo_outcome`, or, where an orbit count decides it, the pending count: many products'
    counts then cost one set of array passes (:func:`resolve_pending`)."""
    found = _outcome(products, skeleton, symmetries, "later")
    if isinstance(found, OrbitJob):
        return PendingStereo(found, products, skeleton, symmetries)
    return capped(found)


def resolve_pending(pending: list[PendingStereo]) -> list[StereoOutcome]:
    """The outcome of each pending product, all counted at once; the same as :func:`stereo_outcome`'s."""
    counts = count_orbits([p.job for p in pending])
    out = []
    for p, counted in zip(pending, counts):
        if counted is None:  # an automorphism leaves the elements: enumeration decides, as without arrays
            found = _outcome(p.products, p.skeleton, p.symmetries, "never")
            assert isinstance(found, StereoOutcome)
            out.append(capped(found))
        else:
            out.append(capped(_from_orbits(counted)))
    return out


def _outcome(
    products: list[Chem.Mol], skeleton: Skeleton, symmetries: Symmetries | None, orbits: Literal["now", "later", "never"]
) -> StereoOutcome | OrbitJob:
    """Stereoisomers formed when H is replaced at one or more equivalent carbons.

    Each product keeps the input's specified stereo and leaves the new (or
    destroyed) centre open; open elements are enumerated, so the count is
    relative to what the input fixes. In bridged or small fused rings the
    skeleton fixes the bridgeheads: one 3D embedding gives their feasible
    configuration (and its inverse), so impossible isomers such as a twisted
    norbornane are never counted. ``symmetries`` (all automorphisms of a single
    product, when known) lets a product of a stereo-free input be counted by
    orbits (:func:`_orbit_outcome`) instead: exact where canonical SMILES are
    not (an axially chiral spirane, a bridge carbon on a mirror plane), and
    much cheaper. ``orbits``: "now" counts them at once, "later" hands back the
    :class:`OrbitJob` of an array count, "never" skips counting by orbits (the path
    taken when a count gives up).
    """
    approximate = False
    plans: list[_Plan] = []
    seen: dict[int, list] = {}
    single = len(products) == 1
    for index, product in enumerate(products):
        elements = seen[index] = potential_stereo(product)
        open_elements = [e for e in elements if e.specified == _UNSPECIFIED]
        if not elements and single:
            return _ACHIRAL  # no stereo element at all: the common primary/achiral case
        if single and symmetries is not None and len(open_elements) == len(elements) and orbits != "never":
            info = [(e.type, e.centeredOn, _controlling(e)) for e in elements]
            counted = _orbit_outcome(product, info, symmetries, skeleton, later=orbits == "later")
            if counted is not None:
                return counted
        if not open_elements:
            plans.append(_Plan([product], [], False))
            continue
        geometric = [e.centeredOn for e in open_elements if e.type == _TETRAHEDRAL and e.centeredOn in skeleton.geometric]
        handed = fixes_handedness(elements)
        if single and not geometric and _independent(product, elements, symmetries):
            # The common case, without enumeration.
            chiral = any(e.type == _TETRAHEDRAL for e in elements)
            return _counted(len(open_elements), chiral, handed)
        variants = [product]
        # With nothing specified, the mirror image of an enumerated isomer is the
        # one with every tetrahedral choice flipped (and the other skeleton form),
        # so mirror images come free instead of costing a canonicalisation each.
        free_mirrors = not any(e.specified != _UNSPECIFIED for e in elements)
        if geometric:
            tags = skeleton.tags(geometric)
            if tags is None:
                approximate = True  # cannot check: every combination is counted
            elif tags:
                open_elements = [e for e in open_elements if e.type != _TETRAHEDRAL or e.centeredOn not in tags]
                variants = [_with_tags(product, tags)]
                if not handed:
                    # Nothing in the input fixes the skeleton's handedness (set E/Z cannot): both forms occur.
                    variants.append(_with_tags(product, {i: _invert(t) for i, t in tags.items()}))
                if single and len(open_elements) + len(tags) == len([e for e in elements if e.specified == _UNSPECIFIED]) \
                        and _independent(product, elements):
                    # Every centre, bridgeheads included, is untouched by symmetry: count, don't enumerate.
                    chiral = any(e.type == _TETRAHEDRAL for e in elements)
                    return _counted(len(open_elements), chiral, handed, skeleton_forms=len(variants))
                # One skeleton form only: the flipped choices are not its mirror image.
                free_mirrors = free_mirrors and len(variants) == 2
        plans.append(_Plan(variants, open_elements, free_mirrors))
    # Every product is priced before any isomer is built: over the share, nothing is spent.
    cost = sum(len(plan.variants) * 2 ** len(plan.open_elements) * plan.variants[0].GetNumAtoms()
               * (1 if plan.free_mirrors else 2) for plan in plans)
    if cost > skeleton.work_limit:
        return _not_counted(products, seen)
    isomers: dict[str, Chem.Mol] = {}
    mirrors: dict[str, str] = {}
    for plan in plans:
        tetrahedral = [e.type == _TETRAHEDRAL for e in plan.open_elements]
        by_key: dict[tuple, str] = {}
        for v, variant in enumerate(plan.variants):
            for picks, iso in _assignments(variant, plan.open_elements):
                smi = canonical(iso)
                isomers.setdefault(smi, iso)
                by_key[(v, picks)] = smi
        if plan.free_mirrors:
            for (v, picks), smi in by_key.items():
                flipped = tuple(1 - p if t else p for p, t in zip(picks, tetrahedral))
                mirrors[smi] = by_key[(len(plan.variants) - 1 - v, flipped)]
    return _classify(isomers, mirrors, approximate)


@dataclass(frozen=True)
class _Plan:
    """How one product's stereoisomers are to be enumerated (worked out, and priced, before any is built)."""

    variants: list[Chem.Mol]
    """The product, or its two skeleton forms (one when the input fixes the handedness)."""
    open_elements: list
    """Stereo elements left to enumerate (those a skeleton pins are already set)."""
    free_mirrors: bool
    """Mirror images follow from the choices (nothing specified), with no canonical SMILES of their own."""


def _with_tags(product: Chem.Mol, tags: dict[int, Chem.ChiralType]) -> Chem.Mol:
    mol = Chem.Mol(product)
    for idx, tag in tags.items():
        mol.GetAtomWithIdx(idx).SetChiralTag(tag)
    return mol
