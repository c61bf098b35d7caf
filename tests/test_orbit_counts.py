"""The array orbit counts (engine.orbit_counts) equal the per-product Python reference, product by product.

The reference is engine.stereo's own Burnside sum over its signed actions
(``_signed_actions`` + ``_fixed_count``); both are checked elsewhere against
enumeration and against symmetry cases (tests/test_stereo.py). Here every product of
a few thousand structures is counted both ways, alone and all at once, and the
orbit labels that split site groups are checked against orbits built as sets.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pytest
from halosift.engine import orbit_counts
from halosift.engine.molecules import parse_hydrocarbon
from halosift.engine.orbit_counts import OrbitCount, count_orbits, orbit_job
from halosift.engine.site_classes import ABSTRACTABLE
from halosift.engine.sites import automorphisms, site_groups
from halosift.engine.stereo import _controlling, _fixed_count, _signed_actions, potential_stereo

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent / "benchmarks"))
from alkanes import alkanes  # noqa: E402
from library_gen import make_library  # noqa: E402
from test_site_scan import EDGE_CASES  # noqa: E402

#: Symmetric and stereo-rich corners beyond the generated set: cages, spiranes, dienes, rings
#: with double bonds inside and outside, tert-butyl-rich chains (many automorphisms, one action).
CORNERS = [
    "C1C2CC3CC1CC(C2)C3", "CC1CCC2(CC1)CCCCC2", "CC1CCC2(CCC(C)CC2)CC1", "C1CC2CCC1CC2", "CC1C2CCC1CC2",
    "C12C3C4C1C5C2C3C45", "CC(C)(C)CC(C)(C)C", "CC1CC(C)CC(C)C1", "C/C=C/CC(C)C", "CC=CC=CC(C)CC",
    "CC1=CCC(C)CC1", "C=C1CCC(C)CC1", "CC1CCC(=CC)CC1", "CC1CCC(C)(C)CC1", "CCC1(CC)CCCCC1",
    "C1CCC2(CC1)CCC1(CC2)CCCC1", "CC1CC2CC1C2", "CC(C)C1CCC(C)CC1", "C1CC1C1CC1", "CC1(C)C2CCC1(C)CC2",
]


def _reference(product, info, symmetries) -> OrbitCount | None:
    signed = _signed_actions(product, info, symmetries)
    if signed is None:
        return None
    actions, weights = signed
    tetra = [int(kind.name == "Atom_Tetrahedral") for kind, _, _ in info]
    fixed = sum(w * _fixed_count(a, [0] * len(info)) for a, w in zip(actions, weights))
    mirrored = sum(w * _fixed_count(a, tetra) for a, w in zip(actions, weights))
    order = sum(weights)
    return OrbitCount(fixed // order, (fixed + mirrored) // (2 * order))


def _cases(smiles: list[str]) -> list[tuple]:
    """(product, element info, stabiliser) of every abstractable group's product that has open stereo."""
    out = []
    for smi in smiles:
        parsed = parse_hydrocarbon(smi)
        if not parsed.ok:
            continue
        for group in site_groups(parsed.mol, False):
            if group.site not in ABSTRACTABLE or group.stabiliser is None:
                continue
            elements = potential_stereo(group.product)
            if not elements:
                continue
            info = [(e.type, e.centeredOn, _controlling(e)) for e in elements]
            out.append((group.product, info, group.stabiliser))
    return out


@pytest.fixture(scope="module")
def cases() -> list[tuple]:
    smiles = EDGE_CASES + CORNERS + sorted(s for n in range(4, 11) for s in alkanes(n)) + make_library(2500, seed=31)
    return _cases(smiles)


def test_array_counts_equal_the_reference_product_by_product(cases: list[tuple]) -> None:
    jobs, expected = [], []
    for product, info, stabiliser in cases:
        job = orbit_job(product, info, stabiliser)
        reference = _reference(product, info, stabiliser)
        if job is None:
            assert reference is None  # both hand the product to enumeration
            continue
        jobs.append(job)
        expected.append(reference)
    one_by_one = [count_orbits([job])[0] for job in jobs]
    all_at_once = count_orbits(jobs)
    assert one_by_one == expected
    assert all_at_once == expected
    # The comparison covers real symmetry: several automorphisms, several elements, mirror pairs.
    assert sum(len(job.symmetries) > 1 for job in jobs) > 300
    assert sum(job.n_elements >= 3 for job in jobs) > 300
    assert sum(c.n_diastereomers < c.n_stereoisomers for c in expected) > 300


def test_a_pass_split_gives_the_same_counts(cases: list[tuple], monkeypatch: pytest.MonkeyPatch) -> None:
    jobs = [job for job in (orbit_job(p, i, s) for p, i, s in cases[:600]) if job is not None]
    whole = count_orbits(jobs)
    monkeypatch.setattr(orbit_counts, "SLOTS_PER_PASS", 7)
    assert count_orbits(jobs) == whole


def test_an_automorphism_moving_an_element_off_the_elements_hands_over_to_enumeration() -> None:
    # A made-up "automorphism" swapping a stereocentre with a methyl carbon, which is no element:
    # the reference gives up (None), and so must the arrays, without disturbing the other jobs.
    from rdkit import Chem

    product = Chem.MolFromSmiles("CC(CC(C)CC)CCCl")
    elements = potential_stereo(product)
    info = [(e.type, e.centeredOn, _controlling(e)) for e in elements]
    n_sub = product.GetNumAtoms() - 1
    identity = np.arange(n_sub)[None, :]
    swap = identity.copy()
    centre = info[0][1]
    other = next(i for i in range(n_sub) if i != centre and product.GetAtomWithIdx(i).GetDegree() == 1)
    swap[0, [centre, other]] = [other, centre]
    symmetries = np.vstack([identity, swap])
    assert _reference(product, info, symmetries) is None
    good = orbit_job(product, info, identity)
    bad = orbit_job(product, info, symmetries)
    assert good is not None and bad is not None
    assert count_orbits([good, bad, good]) == [count_orbits([good])[0], None, count_orbits([good])[0]]


def test_orbit_labels_are_the_orbits() -> None:
    # site_groups names an atom's orbit by its lowest image; compare with orbits built as sets.
    for smi in CORNERS + EDGE_CASES + make_library(400, seed=5):
        parsed = parse_hydrocarbon(smi)
        if not parsed.ok:
            continue
        perms = automorphisms(parsed.mol)
        if perms is None:
            continue
        labels = perms.min(axis=0)
        for atom in range(parsed.mol.GetNumAtoms()):
            orbit = {int(p[atom]) for p in perms}
            assert labels[atom] == min(orbit)
            assert {a for a in range(parsed.mol.GetNumAtoms()) if labels[a] == labels[atom]} == orbit


def test_a_count_handed_back_is_decided_by_enumeration() -> None:
    # resolve_pending's fallback: a job the arrays give up on gets the enumeration's answer.
    from halosift.engine.stereo import PendingStereo, Skeleton, resolve_pending, stereo_outcome
    from rdkit import Chem

    substrate = Chem.MolFromSmiles("CC(CC(C)CC)CCC")
    product = Chem.MolFromSmiles("CC(CC(C)CC)CCCCl")
    elements = potential_stereo(product)
    info = [(e.type, e.centeredOn, _controlling(e)) for e in elements]
    n_sub = product.GetNumAtoms() - 1
    swap = np.arange(n_sub)[None, :].repeat(2, axis=0)
    centre = info[0][1]
    other = next(i for i in range(n_sub) if i != centre and product.GetAtomWithIdx(i).GetDegree() == 1)
    swap[1, [centre, other]] = [other, centre]
    job = orbit_job(product, info, swap)
    assert job is not None and count_orbits([job]) == [None]
    skeleton = Skeleton(substrate, False)
    resolved = resolve_pending([PendingStereo(job, [product], skeleton, swap)])
    assert resolved == [stereo_outcome([product], skeleton, None)]
    assert resolved[0].outcome == "diastereomers" and resolved[0].n_stereoisomers == 4
