"""Stereoisomer counts by orbits, for many products at once: Burnside's lemma over numpy arrays.

A product of a stereo-free input has ``k`` open stereo elements; its stereoisomers are
the 2^k configurations up to the product's automorphisms, and mirror-image pairs are the
orbits once reflection (every tetrahedral bit inverted) joins the group. Each automorphism
acts on the elements as a signed permutation (image element, flip): see
:func:`halosift.engine.stereo._signed_actions`, the per-product reference this module
reproduces exactly. Burnside's lemma counts the orbits as the mean number of configurations
an automorphism leaves unchanged: 0 when some cycle of its signed permutation inverts the
bit it carries round, else 2^(cycles).

:func:`orbit_job` gathers one product's elements and automorphisms (a few RDKit reads);
:func:`count_orbits` then works out every automorphism's signed permutation and its cycles
for a whole list of jobs in a fixed number of array passes, so a batch of structures costs
a handful of numpy calls instead of Python loops per automorphism and element.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from rdkit import Chem

_TETRAHEDRAL = Chem.StereoType.Atom_Tetrahedral
_DOUBLE_BOND = Chem.StereoType.Bond_Double

#: Slots (automorphisms × elements) counted in one set of array passes; a longer job list is
#: split, so memory stays bounded whatever a batch holds.
SLOTS_PER_PASS = 200_000


@dataclass(frozen=True)
class ElementParts:
    """The atoms that say how an automorphism moves each stereo element of a product."""

    tetrahedral: tuple[tuple[int, int, tuple[int, ...]], ...]
    """(element position, centre atom, neighbours in bond order) of each tetrahedral element."""
    double: tuple[tuple[int, int, int, int, int], ...]
    """(element position, end u, end w, reference atom on u, reference atom on w) of each double bond."""


@dataclass(frozen=True)
class OrbitJob:
    """One product's open stereo elements and automorphisms, ready to be counted."""

    symmetries: np.ndarray
    """The product's automorphisms over the substrate's atoms, one row each (int, rows × substrate atoms);
    the halogen (the product's last atom) is fixed by all of them."""
    n_substrate: int
    """Atoms of the substrate: indices at or above it (the halogen) are fixed."""
    n_elements: int
    """Open stereo elements of the product (all of its elements)."""
    parts: ElementParts
    """Where each element sits (:func:`element_parts`)."""


def cumulated(atom: Chem.Atom) -> bool:
    """True for the middle atom of an allene-like C=C=C (two double bonds)."""
    return sum(b.GetBondType() == Chem.BondType.DOUBLE for b in atom.GetBonds()) > 1


def bond_neighbours(mol: Chem.Mol, idx: int) -> list[int]:
    """Neighbours of an atom in bond order: the order an RDKit tetrahedral tag refers to."""
    return [b.GetOtherAtomIdx(idx) for b in mol.GetAtomWithIdx(idx).GetBonds()]


def element_parts(product: Chem.Mol, elements: Sequence[tuple]) -> ElementParts | None:
    """The parts of ``elements`` ((type, centred-on index, controlling atoms) of each, all open).

    None where a count by orbits cannot follow an element and enumeration decides instead:
    an element of another kind, an allene, or a double bond whose reference atoms are not
    bonded to its ends. Shared by the array count and the per-product reference.
    """
    tetrahedral: list[tuple[int, int, tuple[int, ...]]] = []
    double: list[tuple[int, int, int, int, int]] = []
    for pos, (kind, centre, controlling) in enumerate(elements):
        if kind == _TETRAHEDRAL:
            tetrahedral.append((pos, centre, tuple(bond_neighbours(product, centre))))
        elif kind == _DOUBLE_BOND and len(controlling) == 4:
            bond = product.GetBondWithIdx(centre)
            u, w = bond.GetBeginAtomIdx(), bond.GetEndAtomIdx()
            ref_u, ref_w = controlling[0], controlling[2]
            if cumulated(product.GetAtomWithIdx(u)) or cumulated(product.GetAtomWithIdx(w)):
                return None  # allenes: axial stereo
            if product.GetBondBetweenAtoms(u, ref_u) is None or product.GetBondBetweenAtoms(w, ref_w) is None:
                return None
            double.append((pos, u, w, ref_u, ref_w))
        else:
            return None
    return ElementParts(tuple(tetrahedral), tuple(double))


def orbit_job(product: Chem.Mol, elements: Sequence[tuple], symmetries: np.ndarray) -> OrbitJob | None:
    """The job for ``product`` (``elements`` as for :func:`element_parts`; None where that gives None)."""
    parts = element_parts(product, elements)
    if parts is None:
        return None
    return OrbitJob(symmetries, product.GetNumAtoms() - 1, len(elements), parts)


@dataclass(frozen=True)
class OrbitCount:
    """The counts of one job."""

    n_stereoisomers: int
    """Orbits of the configurations under the product's automorphisms."""
    n_diastereomers: int
    """Orbits once reflection joins the group (mirror-image pairs counted once)."""


def count_orbits(jobs: Sequence[OrbitJob]) -> list[OrbitCount | None]:
    """The counts of every job, in order; None for a job some automorphism of which maps an element
    onto an atom or bond that is not one (the reference then enumerates)."""
    out: list[OrbitCount | None] = []
    start = 0
    while start < len(jobs):
        end, slots = start, 0
        while end < len(jobs) and (end == start or slots + _slots(jobs[end]) <= SLOTS_PER_PASS):
            slots += _slots(jobs[end])
            end += 1
        out.extend(_count_pass(jobs[start:end]))
        start = end
    return out


def _slots(job: OrbitJob) -> int:
    return len(job.symmetries) * job.n_elements


def _count_pass(jobs: Sequence[OrbitJob]) -> list[OrbitCount | None]:
    """:func:`count_orbits` for a job list small enough for one set of arrays."""
    n_jobs = len(jobs)
    if n_jobs == 0:
        return []
    # Every job's automorphisms in one flat array: atom a's image under row R is
    # flat[row_base[R] + a] (a below the job's substrate size; the halogen above it is fixed).
    rows_of = np.array([len(job.symmetries) for job in jobs], dtype=np.int64)
    n_sub = np.array([job.n_substrate for job in jobs], dtype=np.int64)
    k_of = np.array([job.n_elements for job in jobs], dtype=np.int64)
    flat = np.concatenate([job.symmetries.ravel() for job in jobs]).astype(np.int64, copy=False)
    sym_base = np.concatenate([[0], np.cumsum(rows_of * n_sub)[:-1]])
    job_of_row = np.repeat(np.arange(n_jobs), rows_of)
    row_in_job = np.arange(len(job_of_row)) - np.repeat(np.concatenate([[0], np.cumsum(rows_of)[:-1]]), rows_of)
    row_base = sym_base[job_of_row] + row_in_job * n_sub[job_of_row]

    # Elements, numbered over all jobs (element g of job j is elem_base[j] + its position).
    elem_base = np.concatenate([[0], np.cumsum(k_of)[:-1]])
    n_elem = int(k_of.sum())
    tetra_rows: list[tuple[int, int, int, int, int, int, int]] = []  # element, job, centre, 4 neighbours (-1 pads)
    double_rows: list[tuple[int, int, int, int, int, int]] = []  # element, job, u, w, ref_u, ref_w
    offsets = elem_base.tolist()
    for j, job in enumerate(jobs):
        for pos, centre, nbrs in job.parts.tetrahedral:
            tetra_rows.append((offsets[j] + pos, j, centre, *nbrs, *(-1,) * (4 - len(nbrs))))
        for pos, u, w, ref_u, ref_w in job.parts.double:
            double_rows.append((offsets[j] + pos, j, u, w, ref_u, ref_w))
    tetra = np.zeros(n_elem, dtype=bool)
    nbr_atom = np.full((n_elem, 4), -2, dtype=np.int64)  # -2 never equals an image (atoms are ≥ 0)
    centre_atom = np.zeros(n_elem, dtype=np.int64)
    ends_atom = np.zeros((n_elem, 4), dtype=np.int64)  # u, w, ref_u, ref_w
    span = int(n_sub.max()) + 2
    tetra_keys = double_keys = np.zeros((0, 2), dtype=np.int64)  # (lookup key, element), sorted by key
    if tetra_rows:
        t = np.array(tetra_rows, dtype=np.int64)
        tetra[t[:, 0]] = True
        centre_atom[t[:, 0]] = t[:, 2]
        nbr_atom[t[:, 0]] = np.where(t[:, 3:] >= 0, t[:, 3:], -2)
        tetra_keys = _sorted_keys(t[:, 1] * span + t[:, 2], t[:, 0])
    if double_rows:
        d = np.array(double_rows, dtype=np.int64)
        ends_atom[d[:, 0]] = d[:, 2:]
        low, high = np.minimum(d[:, 2], d[:, 3]), np.maximum(d[:, 2], d[:, 3])
        double_keys = _sorted_keys((d[:, 1] * span + low) * span + high, d[:, 0])

    # Slots: one per (automorphism row, element of its job).
    k_of_row = k_of[job_of_row]
    slot_row = np.repeat(np.arange(len(job_of_row)), k_of_row)
    first_slot = np.concatenate([[0], np.cumsum(k_of_row)[:-1]])
    slot_elem = elem_base[job_of_row[slot_row]] + (np.arange(len(slot_row)) - first_slot[slot_row])
    slot_job = job_of_row[slot_row]
    base = row_base[slot_row]
    target = np.empty(len(slot_row), dtype=np.int64)
    flip = np.zeros(len(slot_row), dtype=bool)
    lost = np.zeros(len(slot_row), dtype=bool)

    slot_sub = n_sub[slot_job]

    def image(slots: np.ndarray, atoms: np.ndarray) -> np.ndarray:
        """Where each atom goes under its slot's automorphism (atoms: one per slot, or slots × columns)."""
        sub = slot_sub[slots] if atoms.ndim == 1 else slot_sub[slots][:, None]
        at = base[slots] if atoms.ndim == 1 else base[slots][:, None]
        return np.where(atoms >= sub, atoms, flat[at + np.clip(atoms, 0, sub - 1)])

    is_t = tetra[slot_elem]
    if is_t.any():
        s = np.flatnonzero(is_t)
        e = slot_elem[s]
        g_t, found = _look_up(tetra_keys, slot_job[s] * span + image(s, centre_atom[e]))
        valid = nbr_atom[e] >= 0
        image_nbrs = np.where(valid, image(s, nbr_atom[e]), -1)
        matches = image_nbrs[:, :, None] == nbr_atom[g_t][:, None, :]
        found &= np.all(matches.any(axis=2) | ~valid, axis=1)
        position = matches.argmax(axis=2)
        inversions = np.zeros(len(s), dtype=np.int64)
        for a in range(4):
            for b in range(a + 1, 4):
                inversions += valid[:, a] & valid[:, b] & (position[:, a] > position[:, b])
        target[s], flip[s], lost[s] = g_t, (inversions & 1).astype(bool), ~found
    if (~is_t).any():
        s = np.flatnonzero(~is_t)
        e = slot_elem[s]
        u1, w1, r_u, r_w = (image(s, ends_atom[e, i]) for i in range(4))
        key = (slot_job[s] * span + np.minimum(u1, w1)) * span + np.maximum(u1, w1)
        g_d, found = _look_up(double_keys, key)
        u2, ref_u2, ref_w2 = ends_atom[g_d, 0], ends_atom[g_d, 2], ends_atom[g_d, 3]
        flip[s] = np.where(u1 == u2, (r_u != ref_u2) ^ (r_w != ref_w2), (r_u != ref_w2) ^ (r_w != ref_u2))
        target[s], lost[s] = g_d, ~found

    lost_job = np.bincount(slot_job[lost], minlength=n_jobs) > 0
    target = np.where(lost, slot_elem, target)  # a lost job's walk must still be well defined
    next_slot = first_slot[slot_row] + (target - elem_base[slot_job])
    fixed = _fixed_sums(next_slot, flip, slot_row, job_of_row, n_jobs, int(k_of.max()))
    mirrored = _fixed_sums(next_slot, flip ^ is_t, slot_row, job_of_row, n_jobs, int(k_of.max()))
    out: list[OrbitCount | None] = []
    for j in range(n_jobs):
        if lost_job[j]:
            out.append(None)
            continue
        order = int(rows_of[j])
        out.append(OrbitCount(fixed[j] // order, (fixed[j] + mirrored[j]) // (2 * order)))
    return out


def _sorted_keys(keys: np.ndarray, values: np.ndarray) -> np.ndarray:
    """(key, value) rows sorted by key, for :func:`_look_up`."""
    order = np.argsort(keys, kind="stable")
    return np.stack([keys[order], values[order]], axis=1)


def _look_up(table: np.ndarray, keys: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """For each key, the value paired with it in ``table`` (:func:`_sorted_keys`; 0 where absent) and whether
    it was found."""
    if not len(table):
        return np.zeros(len(keys), dtype=np.int64), np.zeros(len(keys), dtype=bool)
    at = np.minimum(np.searchsorted(table[:, 0], keys), len(table) - 1)
    found = table[at, 0] == keys
    return np.where(found, table[at, 1], 0), found


def _fixed_sums(next_slot: np.ndarray, flip: np.ndarray, slot_row: np.ndarray, job_of_row: np.ndarray,
                n_jobs: int, k_max: int) -> list[int]:
    """Per job, the configurations each automorphism leaves unchanged, summed (exact integers).

    Every slot walks its cycle of the signed permutation for ``k_max`` steps (no cycle is
    longer), noting the parity of the flips when it first comes back and the lowest slot it
    met; the lowest slot of each cycle stands for the cycle.
    """
    start = np.arange(len(next_slot))
    current, lowest = start.copy(), start.copy()
    parity = np.zeros(len(next_slot), dtype=bool)
    closed = np.zeros(len(next_slot), dtype=bool)
    odd = np.zeros(len(next_slot), dtype=bool)
    for _ in range(k_max):
        parity ^= flip[current]
        current = next_slot[current]
        np.minimum(lowest, current, out=lowest)
        back = ~closed & (current == start)
        odd |= back & parity
        closed |= back
        if closed.all():
            break
    leader = lowest == start
    n_rows = len(job_of_row)
    inverted = np.bincount(slot_row[leader & odd], minlength=n_rows) > 0
    cycles = np.bincount(slot_row[leader], minlength=n_rows)
    sums = [0] * n_jobs
    good = ~inverted
    combos, counts = np.unique(job_of_row[good] * (k_max + 1) + cycles[good], return_counts=True)
    for combo, count in zip(combos.tolist(), counts.tolist()):
        job, c = divmod(combo, k_max + 1)
        sums[job] += count << c  # Python integers: 2^c is exact for any number of cycles
    return sums
