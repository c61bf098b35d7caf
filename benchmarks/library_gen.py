"""Large, realistic hydrocarbon libraries for benchmarks, built combinatorially.

Ring-containing structures are a ring-system *core* (cyclohexane, decalin,
adamantane, naphthalene, norbornene, ...) carrying acyclic alkyl or alkenyl
substituents at distinct hydrogen-bearing core atoms. Such a molecule
decomposes uniquely into its ring system and the acyclic trees hanging off it,
so two structures are the same exactly when they use the same core and their
substitution patterns are related by a symmetry of the core. Each pattern is
therefore reduced to the smallest code in its orbit under the core's
automorphism group (found once per core with RDKit) and deduplicated as an
integer; no per-molecule RDKit call is needed for them.

Acyclic alkanes and alkenes have no core. They are grown as random carbon
trees and deduplicated by RDKit canonical SMILES; they are a small share of
the library, so this stays affordable. A million structures take about half a
minute, most of it spent on the acyclic share.

``make_library(n, seed)`` is deterministic for a given ``(n, seed)``.
"""

from __future__ import annotations

import argparse
import math
import re
from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from rdkit import Chem

MIN_HEAVY = 8
"""Fewest heavy atoms in a ring-containing structure."""
MAX_HEAVY = 20
"""Most heavy atoms in a ring-containing structure."""
ACYCLIC_CARBONS = (3, 16)
"""Inclusive carbon-count range of acyclic structures."""

_BITS = 5
"""Bits per position in a substitution code; 0 means hydrogen, so at most 31 substituents."""
_MAX_POSITIONS = 12
"""Positions per core that fit a 63-bit code at ``_BITS`` bits each."""
_MAX_BATCH = 400_000
"""Most patterns drawn for one source in one go (bounds memory)."""
MAX_N = 2_000_000
"""Largest library ``make_library`` accepts; the combinatorial space thins out beyond it."""

# Substituent SMILES (attachment atom first) with a relative draw weight;
# small groups are favoured, as in real building-block collections.
_ALKYL: tuple[tuple[str, float], ...] = (
    ("C", 6.0), ("CC", 4.0), ("CCC", 2.0), ("C(C)C", 3.0),
    ("CCCC", 1.5), ("CC(C)C", 1.5), ("C(C)CC", 1.2), ("C(C)(C)C", 3.0),
    ("CCCCC", 1.0), ("CCC(C)C", 1.0), ("CC(C)(C)C", 1.0), ("C(C)(C)CC", 1.0),
    ("C(C)CCC", 0.6), ("CC(C)CC", 0.6), ("C(CC)CC", 0.6), ("C(C)C(C)C", 0.6),
    ("CCCCCC", 0.8), ("CCCC(C)C", 0.5), ("CCC(C)(C)C", 0.5), ("C(C)(C)CCC", 0.4),
    ("CC(CC)CC", 0.4), ("CC(C)(C)CC", 0.4), ("CCCCCCC", 0.4), ("CCCCCCCC", 0.3),
    ("CC(CC)CCCC", 0.3),
)
_ALKENYL: tuple[tuple[str, float], ...] = (
    ("C=C", 0.8), ("CC=C", 0.8), ("C(C)=C", 0.5), ("CC(C)=C", 0.4),
    ("CCC=C", 0.4), ("CC=C(C)C", 0.4),
)
_SUBSTITUENTS = _ALKYL + _ALKENYL

# Chance of 0, 1, 2, 3 or 4 substituents on a core (before the size filter).
_K_PROBS = np.array([0.03, 0.30, 0.35, 0.22, 0.10])

# Ring-system cores by family. Templates use only unbracketed atoms so that a
# branch can be spliced in after any atom and RDKit fills in the hydrogens.
_CORES: dict[str, tuple[str, ...]] = {
    "monocyclic": (
        "C1CC1", "C1CCC1", "C1CCCC1", "C1CCCCC1", "C1CCCCCC1", "C1CCCCCCC1",
        "C1CCCCCCCCCCC1",
    ),
    "bicyclic": (
        "C1CCC2CCCCC2C1",          # decalin
        "C1CCC2CCCC2C1",           # hydrindane
        "C1CC2CCCC2C1",            # bicyclo[3.3.0]octane
        "C1CCC2CC2C1",             # norcarane
        "C1CCC2CCC2C1",            # bicyclo[4.2.0]octane
        "C1CCC2(C1)CCCC2",         # spiro[4.4]nonane
        "C1CCC2(C1)CCCCC2",        # spiro[4.5]decane
        "C1CCC2(CC1)CCCCC2",       # spiro[5.5]undecane
        "C1CCC2(CC1)CC2",          # spiro[2.5]octane
        "C1CCC(CC1)C1CCCCC1",      # bicyclohexyl
        "C1CCC(C1)C1CCCCC1",       # cyclopentylcyclohexane
    ),
    "cage": (
        "C1C2CC3CC1CC(C2)C3",      # adamantane
        "C1CC2CCC1C2",             # norbornane
        "C1CC2CCC1CC2",            # bicyclo[2.2.2]octane
        "C12C3C4C1C1C2C3C41",      # cubane
        "C1C2CC1C2",               # bicyclo[1.1.1]pentane
        "C1CC2CCC(C1)C2",          # bicyclo[3.2.1]octane
        "C1CC2CCCC(C1)C2",         # bicyclo[3.3.1]nonane
        "C1CC2CC3CCC2CC13",        # twistane
        "C1C2CC3CC1CC3C2",         # noradamantane
        "C1CC2CC3CC1CC(C2)C3",     # homoadamantane
        "C1C2CC3C4CC5CC(C14)C(C2)C3C5",  # diamantane (apical CH and CH2 positions only)
    ),
    "alkylbenzene": (
        "c1ccccc1",                # benzene
        "c1ccc2c(c1)CCCC2",        # tetralin
        "c1ccc2c(c1)CCC2",         # indane
        "c1ccc(cc1)-c1ccccc1",     # biphenyl
        "c1ccc2c(c1)Cc1ccccc1-2",  # fluorene
    ),
    "alkylnaphthalene": (
        "c1ccc2ccccc2c1",          # naphthalene
        "C1Cc2cccc3cccc1c23",      # acenaphthene
    ),
    "cycloalkene": (
        "C1=CCCC1", "C1=CCCCC1", "C1=CCCCCC1", "C1=CCCCCCC1",
        "C1=CC=CCC1", "C1=CCC=CC1",
        "C1CC2C=CC1C2",            # norbornene
        "C1CC2CCC1C=C2",           # bicyclo[2.2.2]oct-2-ene
        "C1C=Cc2ccccc21",          # indene
    ),
}

# Share of the library per family; acyclic covers alkanes and alkenes.
_FAMILY_WEIGHTS: dict[str, float] = {
    "acyclic": 0.05, "monocyclic": 0.16, "bicyclic": 0.17, "cage": 0.17,
    "alkylbenzene": 0.19, "alkylnaphthalene": 0.10, "cycloalkene": 0.16,
}

_ATOM = re.compile(r"[Cc]")
_RING_BOND = re.compile(r"\d|%\d\d")


@dataclass(frozen=True)
class Core:
    """A ring system prepared for fast substitution."""

    family: str
    """Family name used for the library mix (e.g. ``cage``)."""
    template: str
    """SMILES of the bare ring system."""
    pieces: tuple[str, ...]
    """The template cut right after each substitutable atom; ``len == positions + 1``."""
    heavy: int
    """Heavy atoms in the bare ring system."""
    perms: np.ndarray
    """Automorphisms of the core acting on positions, shape (group order, positions)."""


@dataclass(frozen=True)
class Substituents:
    """The substituent alphabet shared by all cores; index 0 is hydrogen."""

    branches: np.ndarray
    """Object array: ``""`` for hydrogen, else ``"(<smiles>)"``."""
    heavy: np.ndarray
    """Heavy atoms per symbol (0 for hydrogen)."""
    probs: np.ndarray
    """Draw probabilities of symbols 1..n (length n)."""


def _atom_ends(template: str) -> list[int]:
    """String offset just after each atom and its ring-bond digits, in atom order."""
    ends: list[int] = []
    i = 0
    while i < len(template):
        if _ATOM.match(template, i):
            i += 1
            while (m := _RING_BOND.match(template, i)) is not None:
                i = m.end()
            ends.append(i)
        elif template[i] == "[":
            raise ValueError(f"core template {template!r} must not use bracket atoms")
        else:
            i += 1
    return ends


def _positions(mol: Chem.Mol, template: str) -> list[int]:
    """Atoms that may carry a substituent: every atom with a hydrogen, except
    diamantane, whose 14 would overflow the code, keeps only its 8 CH/CH2 sites
    of the apical and methylene orbits (a union of orbits, so symmetry still closes)."""
    with_h = [a.GetIdx() for a in mol.GetAtoms() if a.GetTotalNumHs() > 0]
    if len(with_h) <= _MAX_POSITIONS:
        return with_h
    ranks = list(Chem.CanonicalRankAtoms(mol, breakTies=False))
    orbits: dict[int, list[int]] = {}
    for idx in with_h:
        orbits.setdefault(ranks[idx], []).append(idx)
    keep: list[int] = []
    # Smallest orbits first: apical CH (2) then one of the 6-membered orbits.
    for orbit in sorted(orbits.values(), key=lambda o: (len(o), o)):
        if len(keep) + len(orbit) <= _MAX_POSITIONS:
            keep += orbit
    if not keep:
        raise ValueError(f"core {template!r} has no usable positions")
    return sorted(keep)


def _build_core(family: str, template: str) -> Core:
    """Parse a template, find its positions and its automorphism group."""
    mol = Chem.MolFromSmiles(template)
    if mol is None:
        raise ValueError(f"core template {template!r} does not parse")
    ends = _atom_ends(template)
    if len(ends) != mol.GetNumAtoms():
        raise ValueError(f"core template {template!r}: atom scan disagrees with RDKit")
    pos = _positions(mol, template)
    index = {atom: j for j, atom in enumerate(pos)}
    matches = mol.GetSubstructMatches(mol, uniquify=False, useChirality=False,
                                      maxMatches=1_000_000)
    perms = []
    for match in matches:
        try:
            perms.append([index[match[atom]] for atom in pos])
        except KeyError as exc:  # an automorphism left the position set
            raise ValueError(f"core {template!r}: positions are not closed under symmetry") from exc
    cuts = [0] + [ends[atom] for atom in pos] + [len(template)]
    pieces = tuple(template[a:b] for a, b in zip(cuts, cuts[1:]))
    return Core(family, template, pieces, mol.GetNumAtoms(), np.array(perms, dtype=np.int64))


@lru_cache(maxsize=1)
def cores() -> tuple[Core, ...]:
    """All cores, in a fixed order (built once per process)."""
    return tuple(_build_core(family, t) for family, ts in _CORES.items() for t in ts)


@lru_cache(maxsize=1)
def substituents() -> Substituents:
    """The substituent alphabet, checked to be distinct groups."""
    if len(_SUBSTITUENTS) >= 2 ** _BITS:
        raise ValueError("too many substituents for the code width")
    keys = {Chem.MolToSmiles(Chem.MolFromSmiles("*" + s)) for s, _ in _SUBSTITUENTS}
    if len(keys) != len(_SUBSTITUENTS):
        raise ValueError("substituent list repeats a group")
    branches = np.array([""] + [f"({s})" for s, _ in _SUBSTITUENTS], dtype=object)
    heavy = np.array([0] + [Chem.MolFromSmiles(s).GetNumAtoms() for s, _ in _SUBSTITUENTS],
                     dtype=np.int64)
    weights = np.array([w for _, w in _SUBSTITUENTS], dtype=float)
    return Substituents(branches, heavy, weights / weights.sum())


class _CoreSource:
    """Collects distinct substitution patterns of one core as integer codes."""

    def __init__(self, core: Core, subs: Substituents) -> None:
        self.core = core
        self.family = core.family
        self.subs = subs
        width = len(core.pieces) - 1
        self.shifts = np.arange(width - 1, -1, -1, dtype=np.int64) * _BITS
        self.codes = np.empty(0, dtype=np.int64)   # sorted, distinct

    def __len__(self) -> int:
        return len(self.codes)

    def draw(self, m: int, rng: np.random.Generator) -> tuple[int, int]:
        """Try ``m`` random patterns; return (size-valid draws, new structures)."""
        width = len(self.shifts)
        k = np.minimum(rng.choice(len(_K_PROBS), size=m, p=_K_PROBS), width)
        rank = rng.random((m, width)).argsort(axis=1).argsort(axis=1)
        sym = rng.choice(len(self.subs.probs), size=(m, width), p=self.subs.probs) + 1
        pattern = np.where(rank < k[:, None], sym, 0)
        heavy = self.core.heavy + self.subs.heavy[pattern].sum(axis=1)
        pattern = pattern[(heavy >= MIN_HEAVY) & (heavy <= MAX_HEAVY)]
        if len(pattern) == 0:
            return 0, 0
        fresh = np.setdiff1d(np.unique(self.canonical_codes(pattern)), self.codes,
                             assume_unique=True)
        self.codes = np.union1d(self.codes, fresh)
        return len(pattern), len(fresh)

    def canonical_codes(self, pattern: np.ndarray) -> np.ndarray:
        """One code per pattern row (symbol per position): the smallest code over
        all core symmetries, so symmetry-equivalent patterns share a code."""
        best = np.full(len(pattern), np.iinfo(np.int64).max, dtype=np.int64)
        for perm in self.core.perms:
            np.minimum(best, (pattern[:, perm] << self.shifts).sum(axis=1), out=best)
        return best

    def smiles_for(self, codes: np.ndarray) -> list[str]:
        """SMILES for substitution codes of this core (no RDKit call)."""
        pattern = (codes[:, None] >> self.shifts) & (2 ** _BITS - 1)
        out = np.full(len(codes), self.core.pieces[0], dtype=object)
        for j, piece in enumerate(self.core.pieces[1:]):
            out = out + self.subs.branches[pattern[:, j]] + piece
        return out.tolist()

    def smiles(self, picks: np.ndarray) -> list[str]:
        """SMILES for the collected structures at indices ``picks``."""
        return self.smiles_for(self.codes[picks])


class _AcyclicSource:
    """Collects distinct acyclic alkanes and alkenes, deduplicated by RDKit."""

    family = "acyclic"

    def __init__(self) -> None:
        sizes = np.arange(ACYCLIC_CARBONS[0], ACYCLIC_CARBONS[1] + 1)
        # Larger sizes have far more isomers, so draw them more often.
        self.sizes = sizes
        self.size_p = sizes ** 1.5 / (sizes ** 1.5).sum()
        self.items: list[str] = []
        self.seen: set[str] = set()

    def __len__(self) -> int:
        return len(self.items)

    @staticmethod
    def _tree(n: int, u: np.ndarray, alkene: float) -> str:
        """A random carbon tree of ``n`` atoms grown from pre-drawn numbers ``u``:
        each new carbon bonds to a random carbon that still has a hydrogen. With
        ``alkene`` in [0, 1) one bond between two CH-bearing carbons becomes C=C."""
        parent = [-1] * n
        degree = [0] * n
        kids: list[list[int]] = [[] for _ in range(n)]
        free = [0]
        for i in range(1, n):
            j = free[int(u[i] * len(free))]
            parent[i] = j
            kids[j].append(i)
            degree[j] += 1
            degree[i] = 1
            if degree[j] == 4:
                free.remove(j)
            free.append(i)
        double = -1
        if alkene >= 0.0:
            # A C=C needs one more free valence on each end than a single bond.
            edges = [i for i in range(1, n) if degree[i] < 4 and degree[parent[i]] < 4]
            if edges:
                double = edges[int(alkene * len(edges))]

        def write(atom: int) -> str:
            text = "C"
            for k, child in enumerate(kids[atom]):
                part = ("=" if child == double else "") + write(child)
                text += part if k == len(kids[atom]) - 1 else f"({part})"
            return text

        return write(0)

    def draw(self, m: int, rng: np.random.Generator) -> tuple[int, int]:
        """Try ``m`` random trees; return (draws, new structures)."""
        # Draw all random numbers at once: per-call numpy draws are slow.
        sizes = rng.choice(self.sizes, size=m, p=self.size_p)
        u = rng.random((m, int(self.sizes[-1])))
        alkene = np.where(rng.random(m) < 0.65, rng.random(m), -1.0)
        new = 0
        for i in range(m):
            key = Chem.MolToSmiles(Chem.MolFromSmiles(self._tree(int(sizes[i]), u[i], alkene[i])))
            if key not in self.seen:
                self.seen.add(key)
                self.items.append(key)
                new += 1
        return m, new

    def smiles(self, picks: np.ndarray) -> list[str]:
        """SMILES for the collected structures at indices ``picks``."""
        return [self.items[i] for i in picks]


def _allocate(n: int, weights: np.ndarray, caps: np.ndarray) -> np.ndarray:
    """Split ``n`` into integers proportional to ``weights`` without exceeding
    ``caps``; a capped share flows to the others (largest remainders round up)."""
    alloc = np.zeros(len(weights), dtype=np.int64)
    open_ = (caps > 0) & (weights > 0)
    remaining = n
    while remaining > 0 and open_.any():
        share = remaining * weights * open_ / weights[open_].sum()
        room = caps - alloc
        over = open_ & (share >= room)
        if over.any():
            # Fill the capped ones completely and share out the rest again.
            remaining -= int(room[over].sum())
            alloc[over] = caps[over]
            open_ &= ~over
            continue
        base = np.floor(share).astype(np.int64)
        left = remaining - int(base.sum())
        frac = np.where(open_, share - base, -1.0)
        order = np.lexsort((np.arange(len(frac)), -frac))[:left]
        base[order] += 1
        alloc += base
        remaining = 0
    return alloc


def generate(n: int, seed: int = 0) -> tuple[list[str], list[str]]:
    """``n`` unique hydrocarbon SMILES and the family of each, in shuffled order.

    Raises ``ValueError`` if ``n`` is outside 0..``MAX_N`` or more than the
    generator can supply.
    """
    if not 0 <= n <= MAX_N:
        raise ValueError(f"n must be between 0 and {MAX_N:,}, got {n:,}")
    rng = np.random.default_rng(seed)
    subs = substituents()
    sources: list[_CoreSource | _AcyclicSource] = [_AcyclicSource()]
    sources += [_CoreSource(core, subs) for core in cores()]
    per_family = Counter(s.family for s in sources)
    weights = np.array([_FAMILY_WEIGHTS[s.family] / per_family[s.family] for s in sources])
    caps = np.full(len(sources), np.iinfo(np.int64).max, dtype=np.int64)
    yield_est = np.ones(len(sources))
    for _round in range(200):
        target = _allocate(n, weights, caps)
        if int(target.sum()) < n:
            raise ValueError(f"cannot make {n} unique structures; at most {int(target.sum())}")
        have = np.array([len(s) for s in sources])
        short = np.flatnonzero(have < target)
        if len(short) == 0:
            break
        for i in short:
            need = int(target[i] - have[i])
            # Bounded batches keep memory flat; later rounds draw again if needed.
            m = min(_MAX_BATCH, 20 * need + 1000, math.ceil(need * 1.3 / yield_est[i]) + 8)
            valid, new = sources[i].draw(m, rng)
            yield_est[i] = max(0.05, new / m)
            # Few new structures among many valid draws: the space is nearly used
            # up, so stop drawing here and let the other sources make up the share.
            if new < need and (valid >= 200 and new < 0.05 * valid or valid == 0 and m >= 1000):
                caps[i] = len(sources[i])
    else:
        raise ValueError(f"could not collect {n} unique structures")
    smiles: list[str] = []
    families: list[str] = []
    for source, count in zip(sources, target):
        if count == 0:
            continue
        picks = np.sort(rng.choice(len(source), size=int(count), replace=False))
        smiles += source.smiles(picks)
        families += [source.family] * int(count)
    order = rng.permutation(len(smiles))
    return [smiles[i] for i in order], [families[i] for i in order]


def make_library(n: int, seed: int = 0) -> list[str]:
    """``n`` unique (by RDKit canonical SMILES) realistic hydrocarbon SMILES.

    The mix covers branched alkanes and alkenes, mono- and bicyclic ring
    systems, cages, alkylbenzenes, alkylnaphthalenes and cycloalkenes, mostly
    with 8-20 heavy atoms. The same ``(n, seed)`` always gives the same list.
    """
    return generate(n, seed)[0]


#: Meso and other mirror-symmetric stereo substrates, written as a chemist might (not canonical).
MESO_EXAMPLES: tuple[str, ...] = (
    "CC[C@@H](C)C[C@@H](C)CC",  # meso-3,5-dimethylheptane
    "C1CC[C@H]2CCC[C@H]2C1",  # cis-hydrindane
    "C[C@H]1CC[C@@H](C(C)(C)C)CC1",  # cis-1-tert-butyl-4-methylcyclohexane
    "C[C@H]1CCC[C@@H](C)C1",  # cis-1,3-dimethylcyclohexane
    "C[C@H]1C=C[C@@H](C)C1",  # cis-3,5-dimethylcyclopentene
    "C[C@@H]1C[C@H](C)C[C@@H](C)C1",  # all-cis-1,3,5-trimethylcyclohexane
)


def stereo_variants(smiles: Sequence[str], seed: int = 0, per_structure: int = 2) -> list[str]:
    """Stereo-defined versions of the structures that have stereocentres, meso forms first.

    For each input with two or more open tetrahedral centres, up to ``per_structure``
    fully specified stereoisomers: those that are their own mirror image (meso: the
    case where mirror-related carbons give enantiomeric products) first, then chiral
    ones. Each is written from a random atom order (seeded), so no output relies on
    canonical numbering; :data:`MESO_EXAMPLES` come first.
    """
    from rdkit.Chem.EnumerateStereoisomers import EnumerateStereoisomers, StereoEnumerationOptions

    rng = np.random.default_rng(seed)
    options = StereoEnumerationOptions(onlyUnassigned=True, maxIsomers=16, unique=True)
    out = list(MESO_EXAMPLES)
    for smi in smiles:
        mol = Chem.MolFromSmiles(smi)
        if mol is None:
            continue
        centres = [e for e in Chem.FindPotentialStereo(mol) if e.type == Chem.StereoType.Atom_Tetrahedral]
        if len(centres) < 2:
            continue
        isomers = list(EnumerateStereoisomers(mol, options=options))
        meso, chiral = [], []
        for iso in isomers:
            text = Chem.MolToSmiles(iso)
            mirror = Chem.Mol(iso)
            for atom in mirror.GetAtoms():
                atom.InvertChirality()
            (meso if Chem.MolToSmiles(mirror) == text else chiral).append(iso)
        for iso in (meso + chiral)[:per_structure]:
            shuffled = Chem.RenumberAtoms(iso, [int(i) for i in rng.permutation(iso.GetNumAtoms())])
            out.append(Chem.MolToSmiles(shuffled, canonical=False))
    return out


_ALKENE = Chem.MolFromSmarts("C=C")
"""Non-aromatic carbon-carbon double bond, for the summary printout."""


def main(argv: Sequence[str] | None = None) -> int:
    """Print family counts and a size summary for a small library."""
    parser = argparse.ArgumentParser(description="Generate a benchmark hydrocarbon library.")
    parser.add_argument("-n", type=int, default=2000, help="structures to make (default 2000)")
    parser.add_argument("--seed", type=int, default=0, help="random seed (default 0)")
    args = parser.parse_args(argv)
    try:
        smiles, families = generate(args.n, args.seed)
    except ValueError as exc:
        parser.exit(2, f"error: {exc}\n")
    print(f"{len(smiles)} structures (seed {args.seed})")
    for family, count in sorted(Counter(families).items()):
        print(f"  {family:<17} {count}")
    mols = [Chem.MolFromSmiles(s) for s in smiles]
    heavy = np.array([m.GetNumAtoms() for m in mols])
    alkenes = sum(m.HasSubstructMatch(_ALKENE) for m in mols)
    if len(heavy):
        print(f"heavy atoms: min {heavy.min()}, median {int(np.median(heavy))}, max {heavy.max()}")
    print(f"with a non-aromatic C=C: {alkenes}")
    for s in smiles[:5]:
        print(f"  e.g. {s}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
