"""The batch kernels (engine.kernels, the default perception path) agree with the reference path exactly.

The reference path is the per-structure one: seven substructure searches for the site
classes, pattern flags and bridgeheads per molecule, and contender vertices built loop by
loop. Both must give identical tables on every structure; the benchmark
``benchmarks/bench_kernels.py --differential N`` runs the same comparison on tens of thousands.
"""

from __future__ import annotations

import random
import sys
from pathlib import Path

import pandas as pd
import pytest
from halosift.engine import contenders as contenders_module
from halosift.engine.kernels import classify, mol_arrays, site_names
from halosift.engine.perception import reference_mode
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CODE
from halosift.engine.sites import norbornane_positions, site_classes
from halosift.engine.special_sites import (
    CAGE_MAX_RING,
    is_small_bridgehead,
    kernel_flags,
    small_bridgeheads,
    structure_flags,
)
from halosift.sample_libraries import sample_path
from rdkit import Chem

from halosift import engine

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent / "benchmarks"))
from alkanes import alkanes  # noqa: E402
from library_gen import make_library  # noqa: E402
from test_site_scan import EDGE_CASES  # noqa: E402

#: Beyond the site-scan edge cases: aromatic corners (fused, non-benzenoid, exocyclic double bonds),
#: explicit hydrogens, stereo marks, cumulenes, and rows that must be rejected.
EXTRA = [
    "c1ccc2ccccc2c1", "c1cc2ccc3cccc4ccc(c1)c2c34", "c1ccc2cccc2cc1", "C=C1C=CC=C1", "C1=CC=CC=CC=C1",
    "Cc1ccc(C=C)cc1", "C#Cc1ccccc1", "CC#CCc1ccccc1", "[CH3][CH2]C", "[H]C([H])([H])C", "C[C@H](CC)C=C",
    "C/C=C/C", r"C/C=C\CC", "C=C=C", "CC=C=C=CC", "C[C@@H]1CC[C@H](C)CC1", "C1CC1Cc1ccccc1", "CC1(C)CC1C=C",
    "C1C2CC3CC1CC(C2)C3", "C12(CC1)CC2", "c1ccccc1-c1ccccc1", "C(c1ccccc1)c1ccccc1", "C=CC=CC",
    "CCO", "", "not a smiles", "C.C", "[13CH4]", "[CH3+]", "[CH3]", "CC(C)(C)C(C)(C)C(C)(C)C(C)(C)C",
]
#: NBS corners: radicals conjugated or not, several allyl partners per carbon (in RDKit neighbour
#: orders that differ from index order), rings where the shifted C=C closes a small ring or a bridge.
NBS_CASES = [
    "C=CCc1ccccc1", "C=CCC=C", "CC=CC=C", "C1=CCC=CC1", "C1=CCCCC1", "CC=Cc1ccccc1", "C=C1CCCCC1",
    "C1=CC1", "CC1=CC1", "C1=CCC1", "C1=CC2CCC1C2", "C1=CC2CCC1CC2", "C12=CCC1CC2", "C1=CC=CC1",
    "CC1=CCC(C)=CC1", "C=C1CC=CCC1", "C1CC(C=C)C1=C", "C(C=C)(C=C)C=C", "C=CC(C)(C=C)Cc1ccccc1",
    r"C/C=C/CC", r"C/C=C\C", r"C/C=C(\C)CC", r"C[C@@H](C=C)CC", "C=C=CC", "CC#CC=CC", "c1ccc2c(c1)CC=C2",
    "C1=Cc2ccccc2C1", "C=C(C)Cc1ccccc1", "C1=CCC=C1", "CC1=C(C)CC1",
]


def _smiles(n_generated: int, seed: int) -> list[str]:
    catalogue = pd.read_csv(sample_path("catalogue.csv"), keep_default_na=False)
    small_alkanes = sorted(s for n in range(1, 10) for s in alkanes(n))
    return EDGE_CASES + EXTRA + NBS_CASES + list(catalogue["smiles"]) + small_alkanes + make_library(n_generated, seed=seed)


@pytest.fixture(scope="module")
def smiles() -> list[str]:
    return _smiles(2500, seed=3)


def test_kernel_classes_flags_and_bridgeheads_match_the_patterns(smiles: list[str]) -> None:
    mols = [m for m in (Chem.MolFromSmiles(s) for s in smiles if s) if m is not None]
    mols = [m for m in mols if all(a.GetAtomicNum() == 6 for a in m.GetAtoms())]
    arrays = [mol_arrays(m) for m in mols]
    batch = classify(arrays, [len(a.h_counts) for a in arrays], CAGE_MAX_RING)
    seen: set[str] = set()
    for k, (mol, arr) in enumerate(zip(mols, arrays)):
        where = Chem.MolToSmiles(mol)
        bridgeheads = small_bridgeheads(mol)
        lo, hi = batch.atom_start[k], batch.atom_start[k + 1]
        junctions = [int(j) for j in (batch.junction[lo:hi]).nonzero()[0]]
        assert frozenset(j for j in junctions if is_small_bridgehead(mol.GetAtomWithIdx(j))) == bridgeheads, where
        atoms = [i for i, h in enumerate(arr.h_counts) if h]
        expected = site_classes(mol, atoms, bridgeheads)
        assert site_names(batch, k, atoms, bridgeheads, norbornane_positions(mol)) == expected, where
        patterns = {"cyclopropylmethyl": bool(batch.cyclopropylmethyl[k]), "cyclopropane": bool(batch.cyclopropane[k]),
                    "alkene": bool(batch.alkene[k]), "alkyne": bool(batch.alkyne[k]),
                    "propargylic": bool(batch.propargylic[k])}
        assert kernel_flags(mol, bridgeheads, patterns, bool(batch.small_ring[k])) == structure_flags(mol), where
        seen.update(expected)
    # The comparison must cover every class, or it proves little.
    assert {"methane", "aryl", "vinyl", "alkynyl", "cyclopropyl", "bridgehead", "benzylic-primary",
            "allylic-tertiary", "propargylic-secondary", "norbornyl-7-secondary"} <= seen


def _assert_same(kernel: engine.Perception, reference: engine.Perception) -> None:
    for name in ("structures", "sites", "allylic"):
        pd.testing.assert_frame_equal(getattr(kernel, name), getattr(reference, name), obj=name)


def _assert_nbs_covered(perception: engine.Perception) -> None:
    """The NBS table holds shifted bromides, conjugated radicals and carbons with several allyl partners."""
    allylic = perception.allylic
    assert (allylic["terminus"].str.contains("allylic shift")).sum() > 20
    assert (allylic["radical_code"] == SITE_CODE["conjugated"]).any()
    assert {"allylic-primary", "allylic-secondary", "allylic-tertiary", "benzylic-primary"} <= set(allylic["site"])
    shifted = allylic[allylic["terminus"].str.contains("allylic shift")]
    assert (shifted.groupby("struct")["product"].nunique() > 2).any()


def test_kernel_perception_equals_the_reference_in_a_screen(smiles: list[str]) -> None:
    kernel = engine.perceive(smiles, detail=False)
    with reference_mode():
        reference = engine.perceive(smiles, detail=False)
    _assert_same(kernel, reference)
    assert (kernel.structures["status"] == "rejected").sum() >= 7  # the bad rows went through both paths
    _assert_nbs_covered(kernel)


def test_kernel_perception_equals_the_reference_in_full_detail(smiles: list[str]) -> None:
    subset = EDGE_CASES + EXTRA + NBS_CASES + smiles[-300:]
    kernel = engine.perceive(subset, detail=True)
    with reference_mode():
        reference = engine.perceive(subset, detail=True)
    _assert_same(kernel, reference)
    _assert_nbs_covered(kernel)


def test_reference_mode_switches_back() -> None:
    with reference_mode():
        assert contenders_module.use_reference
    assert not contenders_module.use_reference


def test_contender_vertices_match_the_loops() -> None:
    rng = random.Random(4)
    for _ in range(400):
        codes = sorted(rng.sample(range(len(ABSTRACTABLE)), rng.randint(2, 9)))
        key = tuple((c, rng.choice([1, 2, 3, 4, 6, 8, 9, 12, 18, 27])) for c in codes)
        for radical in ("cl", "br"):
            assert contenders_module._contending_classes(key, radical, False) == \
                contenders_module._contending_classes(key, radical, True), key
