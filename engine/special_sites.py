"""Structural features the site-by-site rate model cannot capture, found once per structure.

Each flag names a risk the percentages do not show (ring opening, addition,
cage rearrangement) or a site the ordinary degree classes would misjudge
(bridgeheads). :mod:`halosift.engine.outcomes` turns the risks into per-reagent
outcomes: a flag that names another pathway rules the reagents it concerns out. Flags are perception-level: computed with RDKit when a
structure is perceived, stored as a comma-joined string in the structures
table, and never depend on conditions.
"""

from __future__ import annotations

from dataclasses import dataclass

from halosift.engine import parameters as P
from rdkit import Chem

_DOUBLE = Chem.BondType.DOUBLE

#: Longest bridge (interior atoms) of a "small" bicycle: [1.1.1] up to [2.2.2].
MAX_BRIDGE_ATOMS = 2
#: A cage: at least this many carbons each on ≥ 3 rings of ≤ 4 atoms (cubane,
#: prismane, cuneane, tetrahedrane; bicyclo[1.1.1]pentane has only two such).
CAGE_MIN_ATOMS = 4
CAGE_MAX_RING = 4


def _power_of_ten(x: float) -> str:
    """1e8 rather than Python's 1e+08."""
    mantissa, exponent = f"{x:.0e}".split("e")
    return f"{mantissa}e{int(exponent)}"


@dataclass(frozen=True)
class FlagNote:
    """What one flag warns about."""

    flag: str
    """Short name, as stored in the ``flags`` column."""
    note: str
    """One line for the chemist."""
    source: str
    """Where the numbers in ``note`` come from."""


def _alkene_limits() -> str:
    """The temperatures below which addition wins, per radical, said once when they are equal."""
    cl, br = P.ALKENE_SUBSTITUTION_T_C.value, P.BR_ALKENE_SUBSTITUTION_T_C.value
    return f"{cl:.0f} °C" if f"{cl:.0f}" == f"{br:.0f}" else f"{cl:.0f} °C (Cl·) / {br:.0f} °C (Br·)"


FLAG_NOTES: dict[str, FlagNote] = {
    "cyclopropylmethyl": FlagNote(
        "cyclopropylmethyl",
        "a C–H next to a cyclopropane ring: the cyclopropylmethyl radical ring-opens with "
        f"k ≈ {_power_of_ten(P.K_CYCLOPROPYLMETHYL_OPENING.value)} s⁻¹ at 25 °C, so ring-opened (butenyl) "
        "halides are a risk that the percentages do not include",
        P.K_CYCLOPROPYLMETHYL_OPENING.source,
    ),
    "bridgehead": FlagNote(
        "bridgehead",
        "a bridgehead C–H of a small bicycle (every bridge ≤ 2 atoms): the radical cannot planarise, "
        "so that site is strongly disfavoured; e.g. " + P.NORBORNANE_CL2_NOTE
        + "; a norbornane 2-halide's exo/endo split is shown beside its stereo (engine.parameters.EXO_FRACTION)",
        "bridgehead C–H bond enthalpy: " + P.BDE_BRIDGEHEAD.source,
    ),
    "cage": FlagNote(
        "cage",
        "a strained polycyclic cage (cubane-like): no measured C–H rates and no model of the cage radical's "
        "rearrangement or ring opening, so every reagent is ruled out",
        P.CAGE_NOTE,
    ),
    "cyclopropane": FlagNote(
        "cyclopropane",
        "a cyclopropane ring: Br2 (and Br· under NBS) opens it by 1,3-addition, so bromination is ruled out; "
        "Cl2 and SO2Cl2 mostly substitute its C–H (chlorocyclopropane), some ring-opened 1,3-dichloride forms",
        P.CYCLOPROPANE_BR2_NOTE + "; " + P.CYCLOPROPANE_CL2_NOTE,
    ),
    "central_bond": FlagNote(
        "central_bond",
        "a strained central C–C bond (a bond on two 3-membered rings, as in bicyclo[1.1.0]butane, or on three "
        "rings of ≤ 4 atoms, as in small propellanes): halogens and radicals add across it, so every reagent "
        "is ruled out",
        P.CENTRAL_BOND_NOTE,
    ),
    "alkene": FlagNote(
        "alkene",
        "C=C present: Cl2, Br2 and SO2Cl2 add to the double bond at ordinary temperatures, so they are ruled out "
        f"below {_alkene_limits()}, "
        "where allylic substitution takes over (propene + Cl2 gives allyl chloride); "
        "NBS (Br· at low Br2 concentration) is the reagent that serves allylic substitution",
        P.ALKENE_SUBSTITUTION_T_C.source + "; Br2: " + P.BR_ALKENE_SUBSTITUTION_T_C.source,
    ),
    "alkyne": FlagNote(
        "alkyne",
        "C≡C present: Cl2, Br2 and SO2Cl2 add to the triple bond, so they are ruled out at every temperature; "
        "NBS is weighed on allylic and benzylic C–H only, and ruled out where a C–H is propargylic",
        P.ALKYNE_ADDITION_NOTE,
    ),
    "propargylic": FlagNote(
        "propargylic",
        "a C–H next to a C≡C: its radical can take Br at either end (propargyl or allenyl bromide), a split "
        "the NBS model does not have, so NBS is ruled out",
        P.PROPARGYL_NBS_NOTE,
    ),
}
FLAGS: tuple[str, ...] = tuple(FLAG_NOTES)


def is_small_bridgehead(atom: Chem.Atom) -> bool:
    """True when ``atom`` joins three bridges of 1–2 atoms each to another bridgehead.

    That is the bicyclo[a.b.c] skeleton with 1 ≤ a, b, c ≤ 2 ([1.1.1], [2.1.1],
    [2.2.1], [2.2.2]): three atom-disjoint paths to one partner atom, each with
    one or two interior atoms. Zero-atom bridges (bicyclo[n.m.0], fused rings)
    do not count: a fused-ring CH can flatten.
    """
    if atom.GetDegree() < 3 or not atom.IsInRing():
        return False
    me = atom.GetIdx()
    # partner atom → list of bridges (tuples of interior atom indices)
    bridges: dict[int, list[tuple[int, ...]]] = {}
    for n in atom.GetNeighbors():
        if not n.IsInRing():
            continue
        ni = n.GetIdx()
        for m in n.GetNeighbors():
            mi = m.GetIdx()
            if mi == me:
                continue
            bridges.setdefault(mi, []).append((ni,))
            if MAX_BRIDGE_ATOMS >= 2:
                for o in m.GetNeighbors():
                    oi = o.GetIdx()
                    if oi not in (me, ni):
                        bridges.setdefault(oi, []).append((ni, mi))
    for partner, paths in bridges.items():
        if partner == me or len(paths) < 3:
            continue
        if partner in {n.GetIdx() for n in atom.GetNeighbors()}:
            continue  # a zero-atom bridge: fused, not bridged
        # three pairwise atom-disjoint bridges (disjointness forces distinct first atoms)
        for i in range(len(paths)):
            for j in range(i + 1, len(paths)):
                if set(paths[i]) & set(paths[j]):
                    continue
                for k in range(j + 1, len(paths)):
                    if not (set(paths[k]) & set(paths[i]) or set(paths[k]) & set(paths[j])):
                        return True
    return False


def _small_ring_counts(mol: Chem.Mol) -> list[int]:
    """Per atom, how many rings of ≤ CAGE_MAX_RING atoms it lies on (symmetrised SSSR)."""
    counts = [0] * mol.GetNumAtoms()
    for ring in Chem.GetSymmSSSR(mol):
        if len(ring) <= CAGE_MAX_RING:
            for i in ring:
                counts[i] += 1
    return counts


#: An abstractable sp3 C–H beside an aliphatic C≡C atom: the flag here and engine.sites' site class alike.
PROPARGYLIC_SMARTS = "[CX4;!H0]-[A]#*"
_SMARTS = {
    # H-bearing carbon with only single bonds (an abstractable sp3 C–H), on two or more rings:
    # a small bicycle's bridgehead lies on at least two rings of any smallest set of rings.
    "ring_junction": "[CX4;!H0;!R0;!R1]",
    "cyclopropylmethyl": "[CX4;!H0;!r3]-[r3]",
    "alkene": "*=*",  # aromatic bonds do not match '='
    "alkyne": "*#*",
    "propargylic": PROPARGYLIC_SMARTS,
}
_PATTERNS = {name: Chem.MolFromSmarts(smarts) for name, smarts in _SMARTS.items()}


def small_bridgeheads(mol: Chem.Mol) -> frozenset[int]:
    """Indices of the abstractable C–H carbons that are bridgeheads of a small bicycle.

    Only ring-junction carbons can be, so the path search of
    :func:`is_small_bridgehead` runs on those alone.
    """
    junctions = mol.GetSubstructMatches(_PATTERNS["ring_junction"], uniquify=False, maxMatches=100_000)
    return frozenset(i for (i,) in junctions if is_small_bridgehead(mol.GetAtomWithIdx(i)))


def has_central_bond(mol: Chem.Mol) -> bool:
    """True when some C–C bond lies on two 3-membered rings or on three rings of ≤ 4 atoms.

    That is the central bond of a bicyclo[1.1.0]butane (two triangles share it)
    or of a small propellane ([1.1.1]: three triangles; [2.2.2]: three
    four-membered rings). A cubane edge lies on two 4-rings only, so cages
    without such a bond are left to the ``cage`` flag.
    """
    for bond in mol.GetBonds():
        if not bond.IsInRing():
            continue
        a, b = bond.GetBeginAtomIdx(), bond.GetEndAtomIdx()
        na = {n.GetIdx() for n in mol.GetAtomWithIdx(a).GetNeighbors()} - {b}
        nb = {n.GetIdx() for n in mol.GetAtomWithIdx(b).GetNeighbors()} - {a}
        three = len(na & nb)
        four = sum(1 for c in na for d in nb if c != d and mol.GetBondBetweenAtoms(c, d) is not None)
        if three >= 2 or three + four >= 3:
            return True
    return False


def structure_flags(mol: Chem.Mol, bridgeheads: frozenset[int] | None = None) -> tuple[str, ...]:
    """Every flag of :data:`FLAGS` that applies to ``mol``, in :data:`FLAGS` order.

    ``bridgeheads``: :func:`small_bridgeheads` of ``mol`` when the caller has it already.
    """
    found: set[str] = set()
    if mol.HasSubstructMatch(_PATTERNS["cyclopropylmethyl"]):
        found.add("cyclopropylmethyl")
    if bridgeheads if bridgeheads is not None else small_bridgeheads(mol):
        found.add("bridgehead")
    ring_sizes = [len(r) for r in mol.GetRingInfo().AtomRings()]
    if any(size <= CAGE_MAX_RING for size in ring_sizes) and sum(c >= 3 for c in _small_ring_counts(mol)) >= CAGE_MIN_ATOMS:
        found.add("cage")
    # A smallest set of rings holds a triangle whenever the molecule has one (none is shorter).
    if any(size == 3 for size in ring_sizes):
        found.add("cyclopropane")
    if any(size <= CAGE_MAX_RING for size in ring_sizes) and has_central_bond(mol):
        found.add("central_bond")
    for flag in ("alkene", "alkyne", "propargylic"):
        if mol.HasSubstructMatch(_PATTERNS[flag]):
            found.add(flag)
    return tuple(f for f in FLAGS if f in found)


def kernel_flags(mol: Chem.Mol, bridgeheads: frozenset[int], patterns: dict[str, bool], small_ring: bool) -> tuple[str, ...]:
    """:func:`structure_flags` from the batch kernel's pattern flags (:class:`halosift.engine.kernels.BatchSites`).

    ``patterns``: cyclopropylmethyl, cyclopropane, alkene, alkyne, propargylic as the kernel found them;
    ``small_ring``: some ring of at most :data:`CAGE_MAX_RING` atoms, which gates the cage and
    central-bond walks exactly as in :func:`structure_flags`.
    """
    found = {name for name, hit in patterns.items() if hit}
    if bridgeheads:
        found.add("bridgehead")
    if small_ring:
        if sum(c >= 3 for c in _small_ring_counts(mol)) >= CAGE_MIN_ATOMS:
            found.add("cage")
        if has_central_bond(mol):
            found.add("central_bond")
    return tuple(f for f in FLAGS if f in found)


def flag_notes(flags: str) -> tuple[FlagNote, ...]:
    """The notes for a comma-joined ``flags`` cell (empty string: none)."""
    return tuple(FLAG_NOTES[f] for f in flags.split(",") if f)
