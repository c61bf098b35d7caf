"""The benchmark library generator: unique, valid, realistic and deterministic."""

from __future__ import annotations

import importlib.util
import sys
from collections import Counter
from pathlib import Path
from types import ModuleType

import numpy as np
import pytest
from rdkit import Chem

N = 5000


def _load() -> ModuleType:
    """Import benchmarks/library_gen.py by path (benchmarks is not an installed package)."""
    path = Path(__file__).resolve().parents[1] / "benchmarks" / "library_gen.py"
    spec = importlib.util.spec_from_file_location("library_gen", path)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up here
    spec.loader.exec_module(module)
    return module


gen = _load()


@pytest.fixture(scope="module")
def library() -> tuple[list[str], list[str]]:
    return gen.generate(N, seed=0)


@pytest.fixture(scope="module")
def mols(library: tuple[list[str], list[str]]) -> list[Chem.Mol]:
    return [Chem.MolFromSmiles(s) for s in library[0]]


def test_length_and_types(library: tuple[list[str], list[str]]) -> None:
    smiles, families = library
    assert len(smiles) == len(families) == N
    assert all(isinstance(s, str) and s for s in smiles)


def test_every_smiles_parses_as_a_plain_hydrocarbon(mols: list[Chem.Mol]) -> None:
    assert all(m is not None for m in mols)
    for m in mols:
        assert all(a.GetAtomicNum() == 6 and a.GetFormalCharge() == 0
                   and a.GetNumRadicalElectrons() == 0 and a.GetIsotope() == 0
                   for a in m.GetAtoms())
        assert len(Chem.GetMolFrags(m)) == 1


def test_structures_are_unique_by_canonical_smiles(mols: list[Chem.Mol]) -> None:
    canonical = [Chem.MolToSmiles(m) for m in mols]
    assert len(set(canonical)) == N


def test_sizes(library: tuple[list[str], list[str]], mols: list[Chem.Mol]) -> None:
    for family, m in zip(library[1], mols):
        heavy = m.GetNumAtoms()
        if family == "acyclic":
            assert m.GetRingInfo().NumRings() == 0
            assert gen.ACYCLIC_CARBONS[0] <= heavy <= gen.ACYCLIC_CARBONS[1]
        else:
            assert m.GetRingInfo().NumRings() >= 1
            assert gen.MIN_HEAVY <= heavy <= gen.MAX_HEAVY


def test_mix_covers_every_family_and_feature(library: tuple[list[str], list[str]],
                                             mols: list[Chem.Mol]) -> None:
    counts = Counter(library[1])
    assert set(counts) == {"acyclic", "monocyclic", "bicyclic", "cage", "alkylbenzene",
                           "alkylnaphthalene", "cycloalkene"}
    assert min(counts.values()) >= 0.03 * N

    def having(smarts: str) -> int:
        pattern = Chem.MolFromSmarts(smarts)
        return sum(m.HasSubstructMatch(pattern) for m in mols)

    assert having("C=C") > 0.1 * N                     # alkenes
    assert having("c1ccccc1") > 0.2 * N                # arenes
    assert having("c1ccc2ccccc2c1") > 0.03 * N         # naphthalenes
    assert having("C1C2CC3CC1CC(C2)C3") > 0            # adamantanes
    assert having("C12C3C4C1C5C2C3C45") > 0            # cubanes
    acyclic = [m for f, m in zip(library[1], mols) if f == "acyclic"]
    pattern = Chem.MolFromSmarts("C=C")
    assert any(m.HasSubstructMatch(pattern) for m in acyclic)
    assert any(not m.HasSubstructMatch(pattern) for m in acyclic)
    # Branched, not just straight chains: some carbon has three or more carbon neighbours.
    assert any(a.GetDegree() >= 3 for m in acyclic for a in m.GetAtoms())


def test_deterministic_per_seed(library: tuple[list[str], list[str]]) -> None:
    assert gen.make_library(N, seed=0) == library[0]
    other = gen.make_library(N, seed=1)
    assert other != library[0]
    assert len(set(other)) == N


def test_small_and_invalid_sizes() -> None:
    assert gen.make_library(0) == []
    assert len(set(gen.make_library(7, seed=3))) == 7
    with pytest.raises(ValueError, match="between 0 and"):
        gen.make_library(-1)
    with pytest.raises(ValueError, match="between 0 and"):
        gen.make_library(gen.MAX_N + 1)


def test_core_symmetry_groups() -> None:
    # Orders of the graph automorphism groups, which equal the number of
    # symmetry operations permuting the atoms: hexagon 12, adamantane Td 24,
    # cubane Oh 48, naphthalene D2h 4, norbornane C2v 4 (common knowledge).
    order = {c.template: len(c.perms) for c in gen.cores()}
    assert order["c1ccccc1"] == 12
    assert order["C1C2CC3CC1CC(C2)C3"] == 24
    assert order["C12C3C4C1C1C2C3C41"] == 48
    assert order["c1ccc2ccccc2c1"] == 4
    assert order["C1CC2CCC1C2"] == 4


def test_disubstituted_benzenes_collapse_to_three_isomers() -> None:
    # All 15 ways to put two methyls on benzene's six positions must reduce to
    # exactly three codes: ortho, meta and para xylene.
    assert gen._SUBSTITUENTS[0][0] == "C"  # symbol 1 is methyl
    benzene = next(c for c in gen.cores() if c.template == "c1ccccc1")
    source = gen._CoreSource(benzene, gen.substituents())
    patterns = []
    for i in range(6):
        for j in range(i + 1, 6):
            row = [0] * 6
            row[i] = row[j] = 1
            patterns.append(row)
    codes = source.canonical_codes(np.array(patterns, dtype=np.int64))
    assert len(np.unique(codes)) == 3
    made = {Chem.MolToSmiles(Chem.MolFromSmiles(s)) for s in source.smiles_for(np.unique(codes))}
    xylenes = {Chem.MolToSmiles(Chem.MolFromSmiles(s))
               for s in ("Cc1ccccc1C", "Cc1cccc(C)c1", "Cc1ccc(C)cc1")}
    assert made == xylenes
