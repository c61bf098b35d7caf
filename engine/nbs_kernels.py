"""Batch kernels of NBS perception: radical classes and allyl partners of every allylic/benzylic C–H at once.

:func:`halosift.engine.nbs.radical_class` and :func:`halosift.engine.nbs._termini` walk RDKit atoms in
Python, one site at a time. Here the same rules are evaluated over the directed-bond arrays of
:class:`halosift.engine.kernels.BatchSites` for a whole batch; only the product molecules (RDKit
edits and SMILES) are left to the per-structure step. The rules in terms of the arrays:

* ``_pi_bonds(n, skip=x)`` for the directed bond x→n: n is aromatic or has a non-single bond other
  than the one to x (x→n itself counts only when non-single);
* ``_sp3_carbon(n)``: not aromatic and every bond single (every atom is a carbon here);
* an allyl partner of a is each (b, c) with a–b a bond and b=c a double (order 2, not aromatic) bond,
  c ≠ a, visited in RDKit's neighbour order of a (see :func:`nbs_facts`).

``tests/test_nbs_kernels.py`` compares these with the walks atom by atom; ``tests/test_kernels.py``
and ``benchmarks/bench_kernels.py --differential`` compare the whole tables.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from halosift.engine.kernels import DOUBLE, SINGLE, BatchSites
from halosift.engine.site_classes import SITE_CODE
from rdkit import Chem

#: Radical class code of (kind, alkyl substituents on the termini capped at 2); kind 1 allylic, 2 benzylic.
_RADICAL_CODE = np.array(
    [[-1, -1, -1]] + [[SITE_CODE[f"{k}-{d}"] for d in ("primary", "secondary", "tertiary")]
                      for k in ("allylic", "benzylic")],
    dtype=np.int16,
)
_CONJUGATED = SITE_CODE["conjugated"]


@dataclass(frozen=True)
class NbsBatch:
    """NBS facts of a batch: per atom (flat, as in BatchSites) and per allyl partner (grouped by atom)."""

    radical_code: np.ndarray
    """Per atom: site code of :func:`halosift.engine.nbs.radical_class` for an allylic/benzylic C–H, else -1."""
    partner_start: np.ndarray
    """Per atom: offset of its first allyl partner in the partner arrays; one extra entry at the end."""
    b: np.ndarray
    """Per partner: the neighbour b of a (index within its molecule)."""
    c: np.ndarray
    """Per partner: the far carbon c of the double bond b=c (index within its molecule)."""
    substrate_subst: np.ndarray
    """Per partner: carbon substituents on the substrate's b=c (each other excluded)."""
    substrate_conj: np.ndarray
    """Per partner: 1 when the substrate's b=c is conjugated with an arene or another multiple bond."""
    product_subst: np.ndarray
    """Per partner: carbon substituents on the shifted product's new a=b."""
    product_conj: np.ndarray
    """Per partner: 1 when the shifted product's a=b is conjugated."""


@dataclass(frozen=True)
class AllylPartner:
    """One a–b=c allyl partner of a radical carbon a, with its two C=C's substitution and conjugation."""

    b: int
    """The neighbour of a that carries the double bond."""
    c: int
    """The far carbon of b=c, which takes Br in the shifted product."""
    substrate_subst: int
    """Carbon substituents on the substrate's b=c."""
    substrate_conj: int
    """1 when the substrate's b=c is conjugated, else 0."""
    product_subst: int
    """Carbon substituents on the product's a=b."""
    product_conj: int
    """1 when the product's a=b is conjugated, else 0."""


@dataclass(frozen=True)
class NbsLists:
    """:class:`NbsBatch` as Python lists, made once per batch so that each structure reads plain ints."""

    radical_code: list[int]
    """Per atom of the batch: as :attr:`NbsBatch.radical_code`."""
    partner_start: list[int]
    """Per atom of the batch, plus one: as :attr:`NbsBatch.partner_start`."""
    columns: list[list[int]]
    """Per partner: b, c, substrate_subst, substrate_conj, product_subst, product_conj (AllylPartner's fields)."""


@dataclass(frozen=True)
class MolNbsFacts:
    """The NBS facts of one molecule of a batch (atom indices within the molecule)."""

    lists: NbsLists
    """The batch's facts."""
    first_atom: int
    """Flat index of the molecule's atom 0 in the batch."""

    def radical_code(self, a: int) -> int:
        """Site code of the radical formed at atom ``a`` (-1 where no allylic/benzylic C–H)."""
        return self.lists.radical_code[self.first_atom + a]

    def partners(self, a: int) -> list[AllylPartner]:
        """The allyl partners of atom ``a``, in the order :func:`halosift.engine.nbs._termini` visits them."""
        at = self.first_atom + a
        lo, hi = self.lists.partner_start[at], self.lists.partner_start[at + 1]
        return [AllylPartner(*(column[j] for column in self.lists.columns)) for j in range(lo, hi)]


def nbs_facts(batch: BatchSites, mols: Sequence[Chem.Mol]) -> NbsBatch:
    """Radical classes and allyl partners of every allylic/benzylic C–H of a batch (``mols`` in batch order)."""
    src, dst, o = batch.src, batch.dst, batch.bond_order
    total = int(batch.atom_start[-1])
    kind = batch.kind
    site = (kind == 1) | (kind == 2)
    if not site.any():  # a batch of alkanes, say: nothing to compute
        none = np.zeros(0, dtype=np.int64)
        return NbsBatch(np.full(total, -1, dtype=np.int16), np.zeros(total + 1, dtype=np.int64),
                        none, none, none, none, none, none)
    degree, aromatic = batch.degree, batch.aromatic
    multiple = o != SINGLE
    n_multiple = np.bincount(src[multiple], minlength=total)
    sp3_carbon = ~aromatic & (n_multiple == 0)
    # pi[e] is _pi_bonds(dst[e], skip=src[e]).
    pi = aromatic[dst] | (n_multiple[dst] - multiple > 0)
    pi_sum = np.bincount(src[pi], minlength=total)
    sp3_sum = np.bincount(src[sp3_carbon[dst]], minlength=total)
    # beyond[e] for e = x→y: some neighbour of x other than y is a π atom (seen from x), as _conjugation asks.
    beyond = pi_sum[src] - pi > 0
    # The directed bonds are in (src, dst) order, so the reverse of each is found by binary search.
    key = src * total + dst
    rev = np.searchsorted(key, dst * total + src)

    # radical_class. An allylic or benzylic atom a is sp3 (all its bonds single), so no double bond of
    # its π neighbour b leads back to a, and b (single-bonded to a) has at most one double bond.
    dbl = np.flatnonzero(o == DOUBLE)
    b_of, c_of = src[dbl], dst[dbl]
    far_alkyl = np.bincount(b_of, weights=sp3_sum[c_of] - sp3_carbon[b_of], minlength=total)
    far_conj = np.bincount(b_of[beyond[rev[dbl]]], minlength=total) > 0
    via_pi = np.flatnonzero(pi & site[src])  # a→b for every π neighbour b of a site atom
    alkyl_far = np.bincount(src[via_pi], weights=far_alkyl[dst[via_pi]], minlength=total).astype(np.int64)
    conj_far = np.bincount(src[via_pi[far_conj[dst[via_pi]]]], minlength=total) > 0
    allylic = kind == 1
    # With two π neighbours the radical is conjugated; with one, b is it and its double bond is b=c.
    conjugated = (pi_sum > 1) | (allylic & conj_far)
    alkyl = sp3_sum + np.where(allylic, alkyl_far, 0)
    radical_code = np.where(
        site, np.where(conjugated, _CONJUGATED, _RADICAL_CODE[np.where(site, kind, 0), np.minimum(alkyl, 2)]), -1
    ).astype(np.int16)

    # Allyl partners: every bond a→b of a site atom, joined with every double bond b→c, c ≠ a.
    first = np.flatnonzero(site[src])
    dbl_count = np.bincount(b_of, minlength=total)
    dbl_start = np.cumsum(dbl_count) - dbl_count  # b_of is sorted: each atom's double bonds are one run
    per = dbl_count[dst[first]]
    e1 = np.repeat(first, per)
    within = np.arange(len(e1)) - np.repeat(np.cumsum(per) - per, per)
    e2 = dbl[dbl_start[dst[e1]] + within]
    keep = dst[e2] != src[e1]
    e1, e2 = e1[keep], e2[keep]
    pa, pb, pc = src[e1], dst[e1], dst[e2]
    # On the product's a=b: c lost its double bond (b–c is single now), so c — when also bonded to a —
    # stops being a π atom seen from a unless it is aromatic or keeps another multiple bond. Seen from
    # b, c and every other atom look as in the substrate (their bonds to atoms other than b are unchanged).
    ac = pa * total + pc
    at = np.minimum(np.searchsorted(key, ac), max(len(key) - 1, 0))
    ac_bonded = key[at] == ac if len(key) else np.zeros(len(ac), dtype=bool)
    c_still_pi = aromatic[pc] | (n_multiple[pc] - 1 > 0)
    from_a = pi_sum[pa] - pi[e1] - (ac_bonded & ~c_still_pi) > 0
    product_conj = from_a | beyond[rev[e1]]
    substrate_conj = beyond[e2] | beyond[rev[e2]]
    count = np.bincount(pa, minlength=total)
    # RDKit visits a's neighbours in its own bond order, which the adjacency matrix does not keep;
    # only atoms with two or more partners need it (per b there is at most one, see above).
    position = np.zeros(len(pa), dtype=np.int64)
    several = np.flatnonzero(count[pa] > 1)
    if len(several):
        mol_of = np.searchsorted(batch.atom_start, pa[several], side="right") - 1
        starts = batch.atom_start[mol_of]
        position[several] = [
            [n.GetIdx() for n in mols[k].GetAtomWithIdx(a).GetNeighbors()].index(b)
            for k, a, b in zip(mol_of.tolist(), (pa[several] - starts).tolist(), (pb[several] - starts).tolist())
        ]
        order = np.lexsort((position, pa))
        e1, e2, pa, pb, pc = e1[order], e2[order], pa[order], pb[order], pc[order]
        product_conj, substrate_conj = product_conj[order], substrate_conj[order]
    partner_start = np.zeros(total + 1, dtype=np.int64)
    np.cumsum(count, out=partner_start[1:])
    mol_start = batch.atom_start[np.searchsorted(batch.atom_start, pa, side="right") - 1]
    return NbsBatch(
        radical_code=radical_code,
        partner_start=partner_start,
        b=pb - mol_start,
        c=pc - mol_start,
        substrate_subst=degree[pb] + degree[pc] - 2,
        substrate_conj=substrate_conj.astype(np.int64),
        product_subst=degree[pa] + degree[pb] - 2,
        product_conj=product_conj.astype(np.int64),
    )


def as_lists(nbs: NbsBatch) -> NbsLists:
    """The batch's facts as lists (one conversion per array for the whole batch)."""
    columns = [nbs.b, nbs.c, nbs.substrate_subst, nbs.substrate_conj, nbs.product_subst, nbs.product_conj]
    return NbsLists(nbs.radical_code.tolist(), nbs.partner_start.tolist(), [col.tolist() for col in columns])


def mol_facts(lists: NbsLists, batch: BatchSites, k: int) -> MolNbsFacts:
    """The facts of molecule ``k`` of the batch, for the per-structure step."""
    return MolNbsFacts(lists, int(batch.atom_start[k]))
