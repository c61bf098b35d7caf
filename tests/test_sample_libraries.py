"""The bundled sample data: valid hydrocarbons, stable IDs, CSV/Parquet agreement,
and a bad-rows file that really contains every kind of rejected input."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pyarrow.parquet as pq
import pytest
from halosift.sample_libraries import build_catalogue
from rdkit import Chem, RDLogger

from halosift import sample_libraries

COLUMNS = list(build_catalogue.COLUMNS)
REJECTION_KINDS = {"unparsable", "empty", "heteroatom", "charged", "radical",
                   "fragments", "isotope", "too_large"}


def read_csv(name: str) -> pd.DataFrame:
    """Read a bundled CSV the way halosift must: every cell as written."""
    return pd.read_csv(sample_libraries.sample_path(name), keep_default_na=False,
                       dtype={"catalog_id": str, "name": str, "smiles": str, "class": str})


def parse(smiles: str) -> Chem.Mol | None:
    """RDKit molecule, or None (quietly) when the SMILES is unparsable."""
    RDLogger.DisableLog("rdApp.*")
    try:
        return Chem.MolFromSmiles(smiles)
    finally:
        RDLogger.EnableLog("rdApp.*")


def is_plain_hydrocarbon(mol: Chem.Mol) -> bool:
    """Neutral, unlabelled, single-fragment, closed-shell, C and H only."""
    return (all(a.GetAtomicNum() in (1, 6) and a.GetFormalCharge() == 0
                and a.GetNumRadicalElectrons() == 0 and a.GetIsotope() == 0
                for a in mol.GetAtoms())
            and len(Chem.GetMolFrags(mol)) == 1)


@pytest.fixture(scope="module")
def catalogue() -> pd.DataFrame:
    return read_csv("catalogue.csv")


@pytest.fixture(scope="module")
def bad_rows() -> pd.DataFrame:
    return read_csv("bad_rows.csv")


def test_sample_path_finds_every_bundled_file() -> None:
    for name in sample_libraries.FILES:
        path = sample_libraries.sample_path(name)
        assert isinstance(path, Path) and path.is_file()
    assert sample_libraries.sample_path().name == "catalogue.csv"
    assert sample_libraries.DEFAULT.endswith(".parquet")
    with pytest.raises(ValueError, match="no bundled sample file"):
        sample_libraries.sample_path("../pyproject.toml")


def test_catalogue_shape(catalogue: pd.DataFrame) -> None:
    assert list(catalogue.columns) == COLUMNS
    assert 300 <= len(catalogue) <= 400
    assert set(catalogue["class"]) == set(build_catalogue.CLASSES)


def test_every_catalogue_smiles_is_a_plain_hydrocarbon(catalogue: pd.DataFrame) -> None:
    failures = []
    for row in catalogue.itertuples(index=False):
        mol = parse(row.smiles)
        if mol is None or not is_plain_hydrocarbon(mol):
            failures.append((row.catalog_id, row.name, row.smiles))
    assert failures == []


def test_catalogue_ids_are_unique_and_non_empty(catalogue: pd.DataFrame) -> None:
    ids = catalogue["catalog_id"]
    assert ids.is_unique
    assert (ids.str.len() > 0).all()


def test_only_the_declared_duplicates_repeat_a_structure(catalogue: pd.DataFrame) -> None:
    first: dict[str, str] = {}
    repeats = []
    for row in catalogue.itertuples(index=False):
        key = Chem.MolToSmiles(parse(row.smiles))
        if key in first:
            repeats.append((row.smiles, first[key]))
        else:
            first[key] = row.smiles
    expected = [(smiles, original) for _n, smiles, _c, original in build_catalogue.DUPLICATES]
    assert sorted(repeats) == sorted(expected)
    # Each repeat is written differently, so only canonicalisation can find it.
    assert all(smiles != original for smiles, original in repeats)
    assert len(repeats) >= 5


def test_csv_and_parquet_hold_identical_rows(catalogue: pd.DataFrame) -> None:
    parquet = pd.read_parquet(sample_libraries.sample_path(sample_libraries.DEFAULT))
    pd.testing.assert_frame_equal(catalogue, parquet, check_dtype=False)
    # Typed columns in the Parquet file itself, not just after pandas reads it.
    schema = pq.read_schema(sample_libraries.sample_path(sample_libraries.DEFAULT))
    types = {field.name: str(field.type) for field in schema}
    assert types == {"catalog_id": "string", "name": "string", "smiles": "string",
                     "pack_size_g": "double", "price_eur": "double", "purity_pct": "double",
                     "in_stock": "bool", "class": "string"}


def test_na_id_stays_a_string(catalogue: pd.DataFrame) -> None:
    row = catalogue[catalogue["name"] == "naphthalene"]
    assert row["catalog_id"].tolist() == ["NA"]
    # The trap is real: pandas' default reading would lose the ID.
    default = pd.read_csv(sample_libraries.sample_path("catalogue.csv"))
    assert default.loc[row.index[0], "catalog_id"] != "NA"
    assert default["catalog_id"].isna().sum() == 1


def test_files_match_the_build_script(tmp_path: Path) -> None:
    build_catalogue.write_all(tmp_path)
    for name in ("catalogue.csv", "bad_rows.csv"):
        fresh = (tmp_path / name).read_bytes()
        assert fresh == sample_libraries.sample_path(name).read_bytes(), name
    rebuilt = pd.read_parquet(tmp_path / "catalogue.parquet")
    bundled = pd.read_parquet(sample_libraries.sample_path("catalogue.parquet"))
    pd.testing.assert_frame_equal(rebuilt, bundled)


def test_bad_rows_cover_every_rejection_kind(bad_rows: pd.DataFrame) -> None:
    assert list(bad_rows.columns) == COLUMNS + ["note"]
    kinds = {note.split(":", 1)[0] for note in bad_rows["note"]}
    assert REJECTION_KINDS <= kinds
    assert {"ok", "duplicate"} <= kinds
    assert kinds <= REJECTION_KINDS | {"ok", "duplicate"}
    assert 15 <= len(bad_rows) <= 30


def _shows(kind: str, smiles: str, earlier_ok: list[str]) -> bool:
    """Does this SMILES really have the defect its note names?"""
    if kind == "empty":
        return smiles.strip() == ""
    mol = parse(smiles) if smiles else None
    if kind == "unparsable":
        return smiles != "" and mol is None
    if mol is None:
        return False
    atoms = list(mol.GetAtoms())
    if kind == "heteroatom":
        return any(a.GetAtomicNum() not in (1, 6) for a in atoms)
    if kind == "charged":
        return any(a.GetFormalCharge() for a in atoms)
    if kind == "radical":
        return any(a.GetNumRadicalElectrons() for a in atoms)
    if kind == "fragments":
        return len(Chem.GetMolFrags(mol)) > 1
    if kind == "isotope":
        return any(a.GetIsotope() for a in atoms)
    if kind == "too_large":
        return is_plain_hydrocarbon(mol) and mol.GetNumHeavyAtoms() >= 150
    key = Chem.MolToSmiles(mol)
    if kind == "duplicate":
        return any(key == Chem.MolToSmiles(parse(s)) and s != smiles for s in earlier_ok)
    if kind == "ok":
        return is_plain_hydrocarbon(mol) and mol.GetNumHeavyAtoms() < 150
    return False


def test_each_bad_row_has_the_defect_its_note_names(bad_rows: pd.DataFrame) -> None:
    earlier_ok: list[str] = []
    wrong = []
    for row in bad_rows.itertuples(index=False):
        kind = row.note.split(":", 1)[0]
        if not _shows(kind, row.smiles, earlier_ok):
            wrong.append((row.name, row.smiles, row.note))
        if kind == "ok":
            earlier_ok.append(row.smiles)
    assert wrong == []


def test_single_defect_rows_carry_no_second_defect(bad_rows: pd.DataFrame) -> None:
    # Rows meant to show one defect should not also carry another, apart from
    # the tetramethylammonium row whose note says it is also a heteroatom case.
    for row in bad_rows.itertuples(index=False):
        kind = row.note.split(":", 1)[0]
        if kind not in REJECTION_KINDS or kind in ("empty", "unparsable") or "also" in row.note:
            continue
        others = {k for k in REJECTION_KINDS - {kind, "empty", "unparsable"}
                  if _shows(k, row.smiles, [])}
        assert others == set(), (row.name, others)
