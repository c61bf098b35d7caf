"""Stereochemical outcome of a monohalide: achiral, racemate or diastereomers."""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass

from rdkit import Chem
from rdkit.Chem import rdDistGeom
from rdkit.Chem.EnumerateStereoisomers import EnumerateStereoisomers, StereoEnumerationOptions

#: Enumeration stops here; larger sets are reported as this many (with a flag).
MAX_ISOMERS = 256
#: Embedding attempts per isomer when checking bridged-ring geometry: enough to
#: find every real norbornane isomer, few enough that an impossible one fails fast.
EMBED_ATTEMPTS = 5
#: Embedding calls allowed per product group; past it the 3D check is skipped
#: and the outcome marked approximate (a cost bound for large cages).
MAX_EMBED_CHECKS = 48
_CW = Chem.ChiralType.CHI_TETRAHEDRAL_CW
_CCW = Chem.ChiralType.CHI_TETRAHEDRAL_CCW
_TETRAHEDRAL = Chem.StereoType.Atom_Tetrahedral
_UNSPECIFIED = Chem.StereoSpecified.Unspecified

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
    """True when the count is not fully checked: enumeration hit :data:`MAX_ISOMERS`,
    or the 3D feasibility check of a bridged ring system was skipped or inconclusive."""


def mirror_smiles(mol: Chem.Mol) -> str:
    """Canonical SMILES of the mirror image (double-bond geometry is unchanged by reflection)."""
    m = Chem.Mol(mol)
    for atom in m.GetAtoms():
        tag = atom.GetChiralTag()
        if tag == _CW:
            atom.SetChiralTag(_CCW)
        elif tag == _CCW:
            atom.SetChiralTag(_CW)
    return Chem.MolToSmiles(m)


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


def _embeds(isomer: Chem.Mol) -> bool:
    # Products are built without full sanitisation; ETKDG needs hybridisation,
    # so embed a freshly parsed copy.
    mol = Chem.MolFromSmiles(Chem.MolToSmiles(isomer))
    if mol is None:
        return False
    params = rdDistGeom.ETKDGv3()
    params.randomSeed = 0xC0FFEE
    params.maxIterations = EMBED_ATTEMPTS
    return rdDistGeom.EmbedMolecule(Chem.AddHs(mol), params) >= 0


def _classify(isomers: dict[str, Chem.Mol], approximate: bool) -> StereoOutcome:
    mirrors = {smi: mirror_smiles(m) for smi, m in isomers.items()}
    classes = {frozenset((smi, mirrors[smi])) for smi in isomers}
    n = len(isomers)
    if n == 1:
        smi = next(iter(isomers))
        return StereoOutcome("achiral" if mirrors[smi] == smi else "single", 1, 1, approximate)
    if len(classes) == 1:
        return StereoOutcome("racemate", n, 1, approximate)
    return StereoOutcome("diastereomers", n, len(classes), approximate)


def stereo_outcome(products: Iterable[Chem.Mol]) -> StereoOutcome:
    """Stereoisomers formed when H is replaced at one or more equivalent carbons.

    Each product keeps the input's specified stereo and leaves the new (or
    destroyed) centre open; unspecified elements are enumerated, so the count
    is relative to what the input fixes. Ring systems where a centre sits in
    two rings (bridged and fused rings) are checked by 3D embedding, which
    removes geometrically impossible isomers such as a twisted norbornane.
    """
    isomers: dict[str, Chem.Mol] = {}
    approximate = False
    embed_budget = MAX_EMBED_CHECKS
    for product in products:
        elements = Chem.FindPotentialStereo(product)
        open_elements = [e for e in elements if e.specified == _UNSPECIFIED]
        if not open_elements:
            isomers.setdefault(Chem.MolToSmiles(product), product)
            continue
        if len(elements) == 1 and open_elements[0].type == _TETRAHEDRAL and len(isomers) == 0:
            # One open centre and nothing else: a chiral product, formed as both
            # enantiomers. (Common case; skips the enumeration.)
            return StereoOutcome("racemate", 2, 1)
        check = any(e.type == _TETRAHEDRAL and _needs_geometry(product, e.centeredOn) for e in open_elements)
        options = StereoEnumerationOptions(onlyUnassigned=True, unique=True, maxIsomers=MAX_ISOMERS)
        candidates = list(EnumerateStereoisomers(product, options=options))
        approximate = approximate or len(candidates) >= MAX_ISOMERS
        if check and len(candidates) <= embed_budget:
            embed_budget -= len(candidates)
            # Keep the isomers that can exist in 3D; if none embeds (very strained
            # cages), the check tells us nothing and all candidates stay.
            feasible = [iso for iso in candidates if _embeds(iso)]
            approximate = approximate or not feasible
            candidates = feasible or candidates
        elif check:
            approximate = True
        for iso in candidates:
            isomers.setdefault(Chem.MolToSmiles(iso), iso)
    return _classify(isomers, approximate)
