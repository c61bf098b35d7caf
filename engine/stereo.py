"""Stereochemical outcome of a monohalide: achiral, racemate or diastereomers."""

from __future__ import annotations

import itertools
from collections.abc import Iterable
from dataclasses import dataclass

from rdkit import Chem
from rdkit.Chem import rdDistGeom

#: At most this many open stereo elements are enumerated (2**8 = 256 combinations);
#: beyond, the count is marked approximate.
MAX_OPEN_ELEMENTS = 8
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

OUTCOMES = ("achiral", "single", "racemate", "diastereomers")


@dataclass(frozen=True)
class StereoOutcome:
    """What a product looks like stereochemically."""

    outcome: str
    """'achiral' (one stereoisomer, superimposable on its mirror image);
    'single' (one chiral stereoisomer, its configuration fixed by the input);
    'racemate' (a pair of enantiomers formed 1:1);
    'diastereomers' (two or more stereoisomers that are not mirror images)."""
    n_stereoisomers: int
    """Number of stereoisomers formed (enantiomers counted separately)."""
    n_diastereomers: int
    """Number of stereoisomers up to mirror image (1 for a racemate)."""
    approximate: bool = False
    """True when the count is not fully checked: more than :data:`MAX_OPEN_ELEMENTS`
    open elements, or a bridged ring system that could not be embedded in 3D."""


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


def _needs_geometry(mol: Chem.Mol, idx: int) -> bool:
    """True for a centre whose configuration a small or bridged ring system may forbid.

    Bridged rings (two rings sharing three or more atoms: norbornane,
    bicyclo[2.2.2]octane, adamantane) couple their bridgehead configurations;
    fusion to a three- or four-membered ring forbids most trans fusions.
    Ordinary fused rings (decalin, hydrindane) exist both cis and trans.
    """
    rings = [set(r) for r in mol.GetRingInfo().AtomRings() if idx in r]
    for i, a in enumerate(rings):
        for b in rings[i + 1 :]:
            shared = len(a & b)
            if shared >= 3 or (shared == 2 and min(len(a), len(b)) <= 4):
                return True
    return False


class Skeleton:
    """The substrate's 3D geometry, embedded once and only if a product needs it.

    The ring skeleton fixes how bridgeheads sit relative to each other, so one
    embedding of the substrate yields a feasible configuration for every
    product's bridgeheads (its inverse is the other). Products are the
    substrate plus one appended halogen, so atom indices carry over, and a tag
    copied onto the substituted carbon means retention, which is what a
    bridgehead radical in a small cage undergoes.
    """

    def __init__(self, substrate: Chem.Mol) -> None:
        self._substrate = substrate
        self._tags: dict[int, Chem.ChiralType] | None = None
        self._tried = False

    def _embed(self) -> dict[int, Chem.ChiralType] | None:
        # Embed the canonical form, so the result cannot depend on input atom
        # order, then read tags off those coordinates in the input's numbering.
        try:
            smiles = Chem.MolToSmiles(self._substrate)
            order = list(self._substrate.GetPropsAsDict(True, True)["_smilesAtomOutputOrder"])
            canon = Chem.MolFromSmiles(smiles)
            canon_h = Chem.AddHs(canon)
            params = rdDistGeom.ETKDGv3()
            params.randomSeed = 0xC0FFEE
            params.maxIterations = EMBED_ATTEMPTS
            if rdDistGeom.EmbedMolecule(canon_h, params) < 0:
                return None
            placed = canon_h.GetConformer()
            mol = Chem.Mol(self._substrate)
            # Unique isotopes make every tetrahedral carbon a formal stereocentre,
            # so RDKit reads a tag for bridgeheads that are not stereogenic in
            # the substrate but become so in a product.
            for i in range(mol.GetNumAtoms()):
                mol.GetAtomWithIdx(i).SetIsotope(i + 1)
            conf = Chem.Conformer(mol.GetNumAtoms())
            for pos, atom in enumerate(order):
                conf.SetAtomPosition(atom, placed.GetAtomPosition(pos))
            conf.Set3D(True)
            mol.RemoveAllConformers()
            mol.AddConformer(conf, assignId=True)
            Chem.AssignAtomChiralTagsFromStructure(mol, replaceExistingTags=True)
        except Exception:  # noqa: BLE001 - any RDKit failure just means "cannot check"
            return None
        return {i: mol.GetAtomWithIdx(i).GetChiralTag() for i in range(mol.GetNumAtoms())}

    def tags(self, atoms: list[int]) -> dict[int, Chem.ChiralType] | None:
        """Feasible tags for those of ``atoms`` the skeleton fixes (None: cannot embed).

        An atom that was CH2 in the substrate has no tag there: which of its
        two hydrogens is replaced is the product's own choice, so it stays open.
        """
        if not self._tried:
            self._tags, self._tried = self._embed(), True
        if self._tags is None:
            return None
        return {i: self._tags[i] for i in atoms if self._tags[i] in (_CW, _CCW)}


def _assignments(product: Chem.Mol, open_elements: list) -> Iterable[Chem.Mol]:
    """Every combination of the open elements' configurations (tetrahedral and E/Z)."""
    choices = []
    for e in open_elements:
        if e.type == _TETRAHEDRAL:
            choices.append([("atom", e.centeredOn, _CW), ("atom", e.centeredOn, _CCW)])
        elif e.type == _DOUBLE_BOND and len(e.controllingAtoms) == 4:
            ends = (e.controllingAtoms[0], e.controllingAtoms[2])
            choices.append([("bond", e.centeredOn, _CIS, ends), ("bond", e.centeredOn, _TRANS, ends)])
    for combo in itertools.product(*choices):
        m = Chem.Mol(product)
        for choice in combo:
            if choice[0] == "atom":
                m.GetAtomWithIdx(choice[1]).SetChiralTag(choice[2])
            else:
                bond = m.GetBondWithIdx(choice[1])
                bond.SetStereoAtoms(*choice[3])
                bond.SetStereo(choice[2])
        yield m


def _classify(isomers: dict[str, Chem.Mol], approximate: bool) -> StereoOutcome:
    mirrors = {smi: canonical(mirror(m)) for smi, m in isomers.items()}
    classes = {frozenset((smi, mirrors[smi])) for smi in isomers}
    n = len(isomers)
    if n == 1:
        smi = next(iter(isomers))
        return StereoOutcome("achiral" if mirrors[smi] == smi else "single", 1, 1, approximate)
    if len(classes) == 1:
        return StereoOutcome("racemate", n, 1, approximate)
    return StereoOutcome("diastereomers", n, len(classes), approximate)


def stereo_outcome(products: Iterable[Chem.Mol], skeleton: Skeleton) -> StereoOutcome:
    """Stereoisomers formed when H is replaced at one or more equivalent carbons.

    Each product keeps the input's specified stereo and leaves the new (or
    destroyed) centre open; open elements are enumerated, so the count is
    relative to what the input fixes. In bridged or small fused rings the
    skeleton fixes the bridgeheads: one 3D embedding gives their feasible
    configuration (and its inverse), so impossible isomers such as a twisted
    norbornane are never counted.
    """
    isomers: dict[str, Chem.Mol] = {}
    approximate = False
    for product in products:
        elements = Chem.FindPotentialStereo(product)
        open_elements = [e for e in elements if e.specified == _UNSPECIFIED]
        geometric = [e.centeredOn for e in open_elements if e.type == _TETRAHEDRAL and _needs_geometry(product, e.centeredOn)]
        if not open_elements:
            isomers.setdefault(canonical(product), product)
            continue
        if len(elements) == 1 and not geometric and open_elements[0].type == _TETRAHEDRAL and not isomers:
            # The common case, without enumeration: one real open centre and no
            # other stereo element is a chiral product formed as both enantiomers.
            return StereoOutcome("racemate", 2, 1)
        variants = [product]
        if geometric:
            tags = skeleton.tags(geometric)
            if tags is None:
                approximate = True  # cannot check: every combination is counted
            else:
                fixed = set(tags)
                open_elements = [e for e in open_elements if e.centeredOn not in fixed or e.type != _TETRAHEDRAL]
                specified_geometric = any(
                    e.type == _TETRAHEDRAL and e.specified != _UNSPECIFIED and _needs_geometry(product, e.centeredOn)
                    for e in elements
                )
                variants = [_with_tags(product, tags)]
                if not specified_geometric:
                    # Nothing in the input fixes the skeleton's handedness: both forms occur.
                    variants.append(_with_tags(product, {i: _invert(t) for i, t in tags.items()}))
        if len(open_elements) > MAX_OPEN_ELEMENTS:
            approximate = True
            open_elements = open_elements[:MAX_OPEN_ELEMENTS]
        for variant in variants:
            for iso in _assignments(variant, open_elements):
                isomers.setdefault(canonical(iso), iso)
    return _classify(isomers, approximate)


def _with_tags(product: Chem.Mol, tags: dict[int, Chem.ChiralType]) -> Chem.Mol:
    mol = Chem.Mol(product)
    for idx, tag in tags.items():
        mol.GetAtomWithIdx(idx).SetChiralTag(tag)
    return mol
