"""Perception: the one expensive RDKit pass per structure, into two compact tables.

Everything condition-dependent (reagent, temperature, threshold) is computed
later from these tables by :mod:`halosift.engine.weigh` without touching RDKit again.
"""

from __future__ import annotations

from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass

import numpy as np
import pandas as pd
import pyarrow as pa
from halosift.engine import contenders as contenders_module
from halosift.engine import stereo as stereo_module
from halosift.engine.contenders import contenders
from halosift.engine.kernels import BatchSites, MolArrays, classify, mol_arrays, site_names
from halosift.engine.molecules import Parsed, parse_hydrocarbon, quiet_rdkit
from halosift.engine.nbs import ALLYLIC_SCHEMA, allylic_rows, empty_frame, frame_from_rows  # noqa: F401  (schema re-exported with the others)
from halosift.engine.nbs_kernels import MolNbsFacts, NbsLists, as_lists, mol_facts, nbs_facts
from halosift.engine.parameters import DEFAULT_MAX_HEAVY_ATOMS
from halosift.engine.shares import cast_checked
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CLASSES, SITE_CODE, site_bde
from halosift.engine.sites import has_specified_stereo, norbornane_positions, site_groups
from halosift.engine.special_sites import (
    CAGE_MAX_RING,
    is_small_bridgehead,
    kernel_flags,
    small_bridgeheads,
    structure_flags,
)
from halosift.engine.stereo import (
    NOT_ANALYSED,
    PendingStereo,
    Skeleton,
    StereoOutcome,
    resolve_pending,
    stereo_outcome_later,
    work_share,
)
from rdkit import Chem

_ABSTRACTABLE = frozenset(ABSTRACTABLE)

#: Column types of :attr:`Perception.structures`, with what each column means.
STRUCTURE_SCHEMA = pa.schema(
    [
        pa.field("status", pa.string(), metadata={"doc": "ok or rejected"}),
        pa.field("reason_code", pa.string(), metadata={"doc": "empty when ok, else a rejection code"}),
        pa.field("reason", pa.string(), metadata={"doc": "why it was rejected, for the chemist"}),
        pa.field("canonical_smiles", pa.string(), metadata={"doc": "RDKit canonical isomeric SMILES"}),
        pa.field("abstractable_h", pa.int32(), metadata={"doc": "hydrogens on abstractable sp3 C–H"}),
        pa.field("n_heavy", pa.int32(), metadata={"doc": "carbon atoms"}),
        pa.field(
            "flags", pa.string(),
            metadata={"doc": "comma-joined special-site flags (engine.special_sites.FLAGS); empty when none or rejected"},
        ),
    ]
)

#: Column types of :attr:`Perception.sites` (one row per constitutional monohalide).
SITE_SCHEMA = pa.schema(
    [
        pa.field("struct", pa.int32(), metadata={"doc": "row of the structures table"}),
        pa.field("product", pa.string(), metadata={"doc": "canonical SMILES of the monochloride; empty for a group that cannot be major when perceived without detail"}),
        pa.field("site", pa.string(), metadata={"doc": "site class (engine.SITE_CLASSES)"}),
        pa.field("site_code", pa.int8(), metadata={"doc": "index of site in engine.SITE_CLASSES"}),
        pa.field("h_count", pa.int32(), metadata={"doc": "hydrogens in the symmetry group"}),
        pa.field("n_carbons", pa.int32(), metadata={"doc": "equivalent carbons in the group"}),
        pa.field("atom", pa.int32(), metadata={"doc": "a representative carbon, index in canonical-SMILES atom order"}),
        pa.field("bde", pa.float64(), metadata={"doc": "C–H bond dissociation enthalpy, kcal/mol"}),
        pa.field("stereo", pa.string(), metadata={"doc": "achiral / one-enantiomer / racemate / diastereomers / not counted (engine.stereo.NOT_COUNTED: over the stereo budget, see stereo_approx); empty for C–H never abstracted and for products not detailed"}),
        pa.field("n_stereoisomers", pa.int64(), metadata={"doc": "stereoisomers of this product formed; exact unless stereo_approx; never above engine.stereo.COUNT_CAP (2**53)"}),
        pa.field("n_diastereomers", pa.int64(), metadata={"doc": "of those, distinct up to mirror image; same cap"}),
        pa.field("stereo_approx", pa.bool_(), metadata={"doc": "counts not exact: stereo 'not counted' (too many open stereo elements for the per-structure budget engine.stereo.STEREO_WORK_BUDGET; both counts hold the upper bound 2^open elements, summed over the group's products), a cage that would not embed (an upper bound), or a count above 2**53 stored as 2**53 (at least that many)"}),
    ]
)

_BDE_BY_CODE = np.array([site_bde(s).value for s in SITE_CLASSES])


@dataclass(frozen=True)
class Perception:
    """Per-structure and per-product tables for a list of input strings."""

    structures: pd.DataFrame
    """One row per input string, columns of :data:`STRUCTURE_SCHEMA`."""
    sites: pd.DataFrame
    """One row per constitutional monohalide, columns of :data:`SITE_SCHEMA`."""
    allylic: pd.DataFrame
    """NBS products: one row per allylic/benzylic site group and product, columns of
    :data:`halosift.engine.nbs.ALLYLIC_SCHEMA` (see :mod:`halosift.engine.nbs`)."""

    def __len__(self) -> int:
        return len(self.structures)


@dataclass(frozen=True)
class _Prepared:
    """What the kernel path knows of one accepted structure when its per-structure step starts."""

    mol: Chem.Mol
    """The parsed molecule."""
    canonical: str
    """Its canonical SMILES."""
    order: list[int]
    """Atom indices in canonical-SMILES output order."""
    h_counts: list[int]
    """Hydrogens per atom."""
    batch: BatchSites
    """The kernel results of the batch it came in."""
    nbs: NbsLists
    """The NBS kernel results (radical classes, allyl partners) of that batch."""
    index: int
    """Its position among the batch's accepted structures."""


def _perceive_one(
    smiles: object, max_heavy: int, detail: bool, prepared: _Prepared | None = None,
    pending: list[_Waiting] | None = None,
) -> tuple[tuple, list[tuple], list[tuple]]:
    """One structure's rows: from the kernel results in ``prepared``, or (None) by the reference
    path, where every rule is its own RDKit pattern search. ``pending``: see :func:`_finish`."""
    if prepared is not None:
        return _from_kernels(prepared, detail, pending)
    parsed = parse_hydrocarbon(smiles, max_heavy)
    if not parsed.ok:
        return _rejected(parsed)
    mol = parsed.mol
    canonical = Chem.MolToSmiles(mol)
    order = list(mol.GetPropsAsDict(True, True)["_smilesAtomOutputOrder"])
    specified = has_specified_stereo(canonical)
    bridgeheads = small_bridgeheads(mol)
    groups = site_groups(mol, specified, bridgeheads)
    flags = ",".join(structure_flags(mol, bridgeheads))
    return _finish(mol, canonical, order, specified, groups, flags, detail)


def _from_kernels(prepared: _Prepared, detail: bool, pending: list[_Waiting] | None = None) -> _Outcome:
    """:func:`_perceive_one` for a structure whose site classes and pattern flags the batch kernels found."""
    batch, k, mol = prepared.batch, prepared.index, prepared.mol
    lo, hi = int(batch.atom_start[k]), int(batch.atom_start[k + 1])
    # Only a junction carbon can be a small bridgehead; the path search runs on those alone.
    candidates = np.flatnonzero(batch.junction[lo:hi])
    bridgeheads = frozenset(int(j) for j in candidates if is_small_bridgehead(mol.GetAtomWithIdx(int(j))))
    bicyclic = norbornane_positions(mol)
    specified = has_specified_stereo(prepared.canonical)
    groups = site_groups(
        mol, specified, bridgeheads, prepared.h_counts, lambda atoms: site_names(batch, k, atoms, bridgeheads, bicyclic)
    )
    patterns = {"cyclopropylmethyl": bool(batch.cyclopropylmethyl[k]), "cyclopropane": bool(batch.cyclopropane[k]),
                "alkene": bool(batch.alkene[k]), "alkyne": bool(batch.alkyne[k]),
                "propargylic": bool(batch.propargylic[k])}
    flags = ",".join(kernel_flags(mol, bridgeheads, patterns, bool(batch.small_ring[k])))
    return _finish(mol, prepared.canonical, prepared.order, specified, groups, flags, detail,
                   mol_facts(prepared.nbs, batch, k), pending)


def _rejected(parsed: Parsed) -> _Outcome:
    return ("rejected", parsed.reason_code, parsed.reason, "", 0, 0, ""), [], []


def _output_order(mol: Chem.Mol) -> list[int]:
    """Atom indices in the order the last MolToSmiles wrote them (RDKit stores them as text '[i,j,...]')."""
    text = mol.GetProp("_smilesAtomOutputOrder")
    return [int(x) for x in text.strip("[]").split(",") if x]


def _perceive_batch(smiles: Sequence[object], max_heavy: int, detail: bool) -> list[_Outcome]:
    """The kernel path: RDKit parses and writes canonical SMILES per structure, site classes and
    pattern flags of the whole batch come from :mod:`halosift.engine.kernels`, then each structure's
    groups, stereo and products are worked out as in :func:`_perceive_one`."""
    outcomes: list[_Outcome | None] = [None] * len(smiles)
    accepted: list[tuple[int, Chem.Mol, str, list[int], MolArrays]] = []
    for i, smi in enumerate(smiles):
        try:
            parsed = parse_hydrocarbon(smi, max_heavy)
            if not parsed.ok:
                outcomes[i] = _rejected(parsed)
                continue
            mol = parsed.mol
            canonical = Chem.MolToSmiles(mol)
            accepted.append((i, mol, canonical, _output_order(mol), mol_arrays(mol)))
        except Exception as exc:  # an RDKit corner we did not foresee: reject, never raise
            outcomes[i] = _internal("perception failed", exc)
    try:
        batch = classify([a[4] for a in accepted], [len(a[4].h_counts) for a in accepted], CAGE_MAX_RING)
        nbs = as_lists(nbs_facts(batch, [a[1] for a in accepted]))
    except Exception:  # never expected; the reference path still answers every row
        batch = nbs = None
    waiting: dict[int, list[_Waiting]] = {}  # structure → its site rows waiting for orbit counts
    for k, (i, mol, canonical, order, arrays) in enumerate(accepted):
        try:
            prepared = None if batch is None or nbs is None else _Prepared(
                mol, canonical, order, arrays.h_counts, batch, nbs, k)
            mine: list[_Waiting] = []
            outcomes[i] = _perceive_one(smiles[i], max_heavy, detail, prepared, mine)
            if mine:
                waiting[i] = mine
        except Exception as exc:  # an RDKit corner we did not foresee: reject, never raise
            outcomes[i] = _internal("perception failed", exc)
    try:
        _resolve([w for ws in waiting.values() for w in ws])  # the whole batch's orbit counts at once
    except Exception:  # never expected: count structure by structure, so one cannot fail the others
        for i, ws in waiting.items():
            try:
                _resolve(ws)
            except Exception as exc:
                outcomes[i] = _internal("perception failed", exc)
    return outcomes  # type: ignore[return-value]  # every slot is filled above


def _finish(
    mol: Chem.Mol, canonical: str, order: list[int], specified: bool, groups: list, flags: str, detail: bool,
    nbs: MolNbsFacts | None = None,
    pending: list[_Waiting] | None = None,
) -> _Outcome:
    """One accepted structure's rows, from its site groups and flags (shared by both paths).

    ``nbs``: the kernels' NBS facts of the molecule; None walks its atoms instead (the reference path).
    ``pending``: where the batch gathers orbit counts (a screen's kernel path), the site rows
    still waiting for theirs are added to it, their stereo columns filled in by :func:`_resolve`.
    """
    position = {atom: pos for pos, atom in enumerate(order)}
    rows: list[tuple] = []
    # One stereo budget per structure, shared by every product that may need stereo (NBS
    # gives up to two per allylic/benzylic group), counted alike in a screen and in detail.
    stereo_products = sum(g.site in _ABSTRACTABLE for g in groups) + 2 * sum(
        g.site.startswith(("allylic", "benzylic")) for g in groups
    )
    skeleton = Skeleton(mol, specified, work_share(stereo_products))
    # A screen names only majors: Cl2 contenders need their SMILES, Br2 contenders also their stereo.
    named, stereo_wanted = (None, None) if detail else contenders([(SITE_CODE[g.site], g.h_count) for g in groups])
    outcomes: list[StereoOutcome] = []
    waiting: list[tuple[int, PendingStereo]] = []  # (row, its pending count)
    for g, group in enumerate(groups):
        formed = group.site in _ABSTRACTABLE
        if formed and (stereo_wanted is None or g in stereo_wanted):
            # Equivalent carbons of a stereo-defined input can give different
            # stereoisomers (e.g. enantiomers); the group forms all of them.
            products = [prod for _, prod in group.member_products] if specified else [group.product]
            found = stereo_outcome_later(products, skeleton, group.stabiliser if len(products) == 1 else None)
            if isinstance(found, PendingStereo):
                waiting.append((len(rows), found))
                st = NOT_ANALYSED  # until counted, below or by the batch
            else:
                st = found
        else:
            st = NOT_ANALYSED  # never formed (vinyl/aryl/alkynyl C–H), or not a possible Br2 major
        shown = named is None or g in named or (stereo_wanted is not None and g in stereo_wanted)
        outcomes.append(st)
        rows.append(
            (
                group.product_smiles if shown else "",
                group.site,
                group.h_count,
                len(group.atoms),
                min(position[i] for i in group.atoms),
                st.outcome,
                st.n_stereoisomers,
                st.n_diastereomers,
                st.approximate,
            )
        )
    mine: list[_Waiting] = [(rows, r, p) for r, p in waiting]
    if mine and (detail or pending is None):
        # The NBS rows reuse these outcomes (detail), or no batch gathers the counts: count them now.
        for (_, r, _), st in zip(mine, _resolve(mine)):
            outcomes[r] = st
    elif mine:
        pending.extend(mine)  # type: ignore[union-attr]  # checked above
    abstractable_h = sum(group.h_count for group in groups if group.site in _ABSTRACTABLE)
    allylic = allylic_rows(mol, groups, specified, skeleton, outcomes if detail else None, stereo=detail, facts=nbs)
    return ("ok", "", "", canonical, abstractable_h, mol.GetNumHeavyAtoms(), flags), rows, allylic


#: A site row waiting for its orbit count: (the structure's row list, row index, the pending count).
_Waiting = tuple[list[tuple], int, PendingStereo]


def _with_stereo(row: tuple, st: StereoOutcome) -> tuple:
    """A site row of :func:`_finish` with its stereo columns (the last four) set from ``st``."""
    return (*row[:-4], st.outcome, st.n_stereoisomers, st.n_diastereomers, st.approximate)


def _resolve(waiting: list[_Waiting]) -> list[StereoOutcome]:
    """Count every waiting row at once (a batch's, or one structure's), fill in its stereo columns,
    and give the outcomes in order."""
    outcomes = resolve_pending([p for _, _, p in waiting])
    for (rows, r, _), st in zip(waiting, outcomes):
        rows[r] = _with_stereo(rows[r], st)
    return outcomes


def perceive(
    smiles: Sequence[object], max_heavy_atoms: int = DEFAULT_MAX_HEAVY_ATOMS, detail: bool = True
) -> Perception:
    """Validate and perceive every string; rejected ones keep their row with a reason.

    ``detail=False`` is the library screen's mode: product SMILES are worked
    out only for the groups that can be the Cl2 or Br2 major product under
    some conditions, and stereo only for the possible Br2 majors (see
    :mod:`halosift.engine.contenders`); the other groups keep their counts, class and
    weights but get an empty ``product`` or ``stereo``, and NBS products get no
    stereo.
    :meth:`halosift.engine.library.Library.products` fills in one structure on demand.
    The batch kernels (:mod:`halosift.engine.kernels`) do the per-atom work; :func:`reference_mode`
    switches to the per-structure reference path the differential tests compare them with.
    """
    outcomes: list[_Outcome] = []
    with quiet_rdkit():
        if _reference:
            for smi in smiles:
                try:
                    outcomes.append(_perceive_one(smi, max_heavy_atoms, detail))
                except Exception as exc:  # an RDKit corner we did not foresee: reject, never raise
                    outcomes.append(_internal("perception failed", exc))
        else:
            smiles = list(smiles)
            # Kernel batches of a few hundred: numpy's per-call cost is spread thin, yet the parsed
            # molecules die young (a whole chunk held alive at once measured 15 % slower).
            for start in range(0, len(smiles), KERNEL_BATCH):
                outcomes.extend(_perceive_batch(smiles[start:start + KERNEL_BATCH], max_heavy_atoms, detail))
    try:
        return _tables(outcomes)
    except Exception:
        # Some row's values do not fit the typed tables (say a count beyond int32): that row
        # alone is rejected, so no single structure can fail the batch it came in.
        for i, error in _unfit(outcomes, 0, len(outcomes)):
            outcomes[i] = _internal("its results do not fit the result tables", error)
        return _tables(outcomes)


#: Structures per batch of the kernels (see :func:`perceive`).
KERNEL_BATCH = 256

#: True inside :func:`reference_mode`: perceive by the per-structure reference path.
_reference = False


@contextmanager
def reference_mode() -> Iterator[None]:
    """Perceive by the reference implementations (per-structure patterns, loop-built contender vertices,
    orbit counts worked out per product in Python).

    For the differential tests and benchmarks; not thread-safe (it switches module state).
    """
    global _reference
    saved = _reference, contenders_module.use_reference, stereo_module.use_reference
    _reference, contenders_module.use_reference, stereo_module.use_reference = True, True, True
    try:
        yield
    finally:
        _reference, contenders_module.use_reference, stereo_module.use_reference = saved


#: What :func:`_perceive_one` gives per structure: its structures row, site rows and NBS rows.
_Outcome = tuple[tuple, list[tuple], list[tuple]]


def _internal(what: str, exc: BaseException) -> _Outcome:
    """A structure rejected with code ``internal`` and a one-line reason naming the exception."""
    detail = " ".join(str(exc).split())
    detail = f"{type(exc).__name__}: {detail}" if detail else type(exc).__name__
    if len(detail) > 100:
        detail = detail[:99] + "…"
    return ("rejected", "internal", f"{what} ({detail})", "", 0, 0, ""), [], []


def _tables(outcomes: Sequence[_Outcome]) -> Perception:
    """The typed tables of per-structure outcomes (``struct`` numbered by position).

    Raises when a value does not fit its column, in pandas or in the Arrow schema the
    worker processes and the cache use.
    """
    structures = pd.DataFrame([o[0] for o in outcomes], columns=STRUCTURE_SCHEMA.names)
    structures = cast_checked(structures, {"abstractable_h": "int32", "n_heavy": "int32"})
    sites = _site_frame([(i, *r) for i, o in enumerate(outcomes) for r in o[1]])
    allylic = frame_from_rows([(i, *r) for i, o in enumerate(outcomes) for r in o[2]])
    for frame, schema in ((structures, STRUCTURE_SCHEMA), (sites, SITE_SCHEMA), (allylic, ALLYLIC_SCHEMA)):
        pa.Table.from_pandas(frame, schema=schema, preserve_index=False)
    return Perception(structures, sites, allylic)


def _unfit(outcomes: Sequence[_Outcome], lo: int, hi: int) -> list[tuple[int, BaseException]]:
    """Positions in lo..hi whose outcome alone cannot be made into tables, with the error (by halving)."""
    try:
        _tables(outcomes[lo:hi])
        return []
    except Exception as exc:
        if hi - lo == 1:
            return [(lo, exc)]
        mid = (lo + hi) // 2
        found = _unfit(outcomes, lo, mid) + _unfit(outcomes, mid, hi)
        if not found:
            raise  # only a mix of rows fails, which no single rejection can cure
        return found


def _site_frame(rows: list[tuple]) -> pd.DataFrame:
    cols = ["struct", "product", "site", "h_count", "n_carbons", "atom", "stereo", "n_stereoisomers",
            "n_diastereomers", "stereo_approx"]
    df = pd.DataFrame(rows, columns=cols)
    df["site_code"] = df["site"].map(SITE_CODE).astype("int8")
    df["bde"] = _BDE_BY_CODE[df["site_code"].to_numpy()] if len(df) else pd.Series(dtype="float64")
    df = cast_checked(
        df,
        {"struct": "int32", "h_count": "int32", "n_carbons": "int32", "atom": "int32",
         "n_stereoisomers": "int64", "n_diastereomers": "int64", "stereo_approx": "bool"}
    )
    return df[SITE_SCHEMA.names]


def concat(parts: Sequence[Perception]) -> Perception:
    """Join perceptions of consecutive slices, renumbering ``struct``."""
    offset = 0
    sites, allylic = [], []
    for part in parts:
        s = part.sites.copy()
        s["struct"] = (s["struct"] + offset).astype("int32")
        sites.append(s)
        a = part.allylic.copy()
        a["struct"] = (a["struct"] + offset).astype("int32")
        allylic.append(a)
        offset += len(part.structures)
    structures = pd.concat([p.structures for p in parts], ignore_index=True) if parts else pd.DataFrame(
        columns=STRUCTURE_SCHEMA.names
    )
    return Perception(
        structures,
        pd.concat(sites, ignore_index=True) if sites else _site_frame([]),
        pd.concat(allylic, ignore_index=True) if allylic else empty_frame(),
    )
