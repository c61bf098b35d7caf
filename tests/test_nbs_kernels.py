"""The NBS batch kernels (engine.nbs_kernels) give, atom by atom, what the walks of engine.nbs find.

For every H-bearing allylic or benzylic carbon of the test_kernels structure set: the radical class
of :func:`halosift.engine.nbs.radical_class`, and each allyl partner (b, c) in the order
:func:`halosift.engine.nbs._termini` visits them, with the substitution and conjugation of the
substrate's b=c and of the shifted product's a=b (read off the bromide RDKit builds).
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest
from halosift.engine.kernels import classify, mol_arrays
from halosift.engine.molecules import parse_hydrocarbon
from halosift.engine.nbs import (
    NBS_SITES,
    _alkene_substituents,
    _built_termini,
    _conjugation,
    _shifted_bromide,
    _termini,
    radical_class,
)
from halosift.engine.nbs_kernels import AllylPartner, as_lists, mol_facts, nbs_facts
from halosift.engine.site_classes import SITE_CODE
from halosift.engine.sites import site_classes
from halosift.engine.special_sites import CAGE_MAX_RING, small_bridgeheads
from rdkit import Chem

sys.path.insert(0, str(Path(__file__).resolve().parent))
from test_kernels import NBS_CASES, _smiles  # noqa: E402

_DOUBLE = Chem.BondType.DOUBLE


def _walked_partners(mol: Chem.Mol, a: int) -> list[AllylPartner]:
    """The allyl partners of ``a`` as _termini finds them, products built and read by RDKit."""
    found = []
    for b_atom in mol.GetAtomWithIdx(a).GetNeighbors():
        b = b_atom.GetIdx()
        for bond in b_atom.GetBonds():
            c = bond.GetOtherAtomIdx(b)
            if c == a or bond.GetBondType() != _DOUBLE or bond.GetIsAromatic():
                continue
            product = _shifted_bromide(mol, a, b, c)
            found.append(AllylPartner(b, c, _alkene_substituents(mol, b, c), _conjugation(mol, b, c),
                                      _alkene_substituents(product, a, b), _conjugation(product, a, b)))
    return found


@pytest.fixture(scope="module")
def mols() -> list[Chem.Mol]:
    parsed = (parse_hydrocarbon(s) for s in NBS_CASES + _smiles(2500, seed=3))
    return [p.mol for p in parsed if p.ok]


def test_nbs_facts_equal_the_walks_atom_by_atom(mols: list[Chem.Mol]) -> None:
    arrays = [mol_arrays(m) for m in mols]
    batch = classify(arrays, [len(a.h_counts) for a in arrays], CAGE_MAX_RING)
    nbs = as_lists(nbs_facts(batch, mols))
    seen_sites: set[str] = set()
    reordered = several = shifted = 0
    for k, mol in enumerate(mols):
        where = Chem.MolToSmiles(mol)
        facts = mol_facts(nbs, batch, k)
        lo = int(batch.atom_start[k])
        with_h = [i for i in range(mol.GetNumAtoms()) if mol.GetAtomWithIdx(i).GetTotalNumHs()]
        classes = dict(zip(with_h, site_classes(mol, with_h, small_bridgeheads(mol))))
        sites = {i: classes[i] for i in with_h if batch.kind[lo + i] in (1, 2)}
        # Every carbon NBS brominates is among the atoms the kernels give facts for.
        assert {i for i, s in classes.items() if s in NBS_SITES} <= set(sites), where
        for a in range(mol.GetNumAtoms()):
            if a not in sites:
                assert facts.radical_code(a) == -1 and facts.partners(a) == [], (where, a)
                continue
            if sites[a] in NBS_SITES:
                seen_sites.add(sites[a])
                assert facts.radical_code(a) == SITE_CODE[radical_class(mol, a, sites[a])], (where, a)
            walked = _walked_partners(mol, a)
            assert facts.partners(a) == walked, (where, a)
            shifted += len(walked)
            several += len(walked) > 1
            reordered += [p.b for p in walked] != sorted(p.b for p in walked)
            # The products and weights built from the facts are those of the walk.
            by_walk, by_facts = _termini(mol, a), _built_termini(mol, a, facts.partners(a))
            assert [(t.name, t.alkene_subst, t.conjugated, Chem.MolToSmiles(t.product)) for t in by_facts] == \
                [(t.name, t.alkene_subst, t.conjugated, Chem.MolToSmiles(t.product)) for t in by_walk], (where, a)
    # The set must reach the cases that can go wrong: several partners, in an order that is not index order.
    assert set(NBS_SITES) <= seen_sites
    print(f"{shifted} partners, {several} carbons with several, {reordered} of them not in index order")
    assert shifted > 1000 and several > 20 and reordered > 0
