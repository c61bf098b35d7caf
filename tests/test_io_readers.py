"""Tests for engine.io reading: every format, every row accounted for, one-line whole-file errors."""

from __future__ import annotations

import gzip
import os
import random
from pathlib import Path

import pandas as pd
import pyarrow.parquet as pq
import pytest
from halosift.engine.io import LibraryError, RawBatch, open_frame, open_library, write_table
from halosift.engine.io.coerce import settle_types
from halosift.engine.rdkit_log import quiet_rdkit as rdkit_quiet
from rdkit import Chem, RDLogger, rdBase

# An invented supplier's catalogue: IDs chosen to trip naive NA handling.
IDS = ["NA", "null", "QX-0007", "QX-0008", "N/A"]
SMILES = ["CCC", "CC(C)C", "C1CCCCC1", "CC(C)(C)C", "Cc1ccccc1"]


def _frame() -> pd.DataFrame:
    return pd.DataFrame(
        {
            "catalog_id": IDS,
            "smiles": SMILES,
            "mw": [44.097, 58.124, 84.162, 72.151, 92.141],
            "stock": [10, 0, 3, 7, 12],
            "lot": ["007", "010", "011", "012", "013"],
        }
    )


def _write(path: Path, data: bytes | str) -> Path:
    path.write_bytes(data.encode("utf-8") if isinstance(data, str) else data)
    return path


def _all_batches(path: Path, batch_rows: int = 2, **kw) -> tuple[list[RawBatch], RawBatch]:
    source = open_library(path, **kw)
    batches = list(source.iter_batches(batch_rows))
    return batches, source.read_all(batch_rows)


# --- round trips ---------------------------------------------------------------------


@pytest.mark.parametrize("name", ["lib.csv", "lib.tsv", "lib.parquet", "lib.csv.gz", "lib.TSV.GZ"])
def test_table_round_trip_keeps_rows_order_columns_and_types(tmp_path: Path, name: str) -> None:
    frame = _frame()
    path = write_table(frame, tmp_path / name, metadata={"tool": "halosift"})
    source = open_library(path)
    assert source.columns == tuple(frame.columns)
    assert source.smiles_column == "smiles"
    assert source.id_column == "catalog_id"
    whole = source.read_all(batch_rows=2)
    got = whole.frame
    assert list(got.columns) == list(frame.columns)
    assert got["catalog_id"].tolist() == IDS  # "NA", "null", "N/A" stay text
    assert got["smiles"].tolist() == SMILES
    assert got["mw"].dtype == "float64" and got["mw"].tolist() == frame["mw"].tolist()
    assert got["stock"].dtype == "int64" and got["stock"].tolist() == frame["stock"].tolist()
    assert got["lot"].tolist() == ["007", "010", "011", "012", "013"]  # leading zeros kept
    assert whole.smiles == SMILES
    assert whole.row_errors == [""] * 5


def test_parquet_keeps_extension_dtypes_and_total_rows(tmp_path: Path) -> None:
    frame = pd.DataFrame(
        {
            "SMILES": ["CCC", None, "CC"],
            "n": pd.array([1, None, 3], dtype="Int64"),
            "grade": pd.Categorical(["a", "b", "a"]),
            "ok": [True, False, True],
        },
        index=[10, 20, 30],  # a stored pandas index is not an input column
    )
    path = tmp_path / "typed.parquet"
    frame.to_parquet(path)
    source = open_library(path)
    assert source.total_rows == 3
    assert source.columns == ("SMILES", "n", "grade", "ok")
    batches = list(source.iter_batches(2))
    assert [b.start_row for b in batches] == [0, 2]
    for batch in batches:
        assert isinstance(batch.frame.index, pd.RangeIndex) and batch.frame.index.start == 0
    got = pd.concat([b.frame for b in batches], ignore_index=True)
    assert str(got["n"].dtype) == "Int64"
    assert isinstance(got["grade"].dtype, pd.CategoricalDtype)
    assert got["ok"].dtype == bool
    assert [s for b in batches for s in b.smiles] == ["CCC", None, "CC"]
    assert source.settle_types(got) is got  # Parquet types are already final


def test_parquet_smiles_column_must_hold_text(tmp_path: Path) -> None:
    path = tmp_path / "numbers.parquet"
    pd.DataFrame({"smiles": [1, 2], "id": ["a", "b"]}).to_parquet(path)
    with pytest.raises(LibraryError, match=r"column 'smiles' in .*numbers.parquet holds int64 values"):
        open_library(path)


@pytest.mark.parametrize("name", ["lib.smi", "lib.smi.gz"])
def test_smi_round_trip_with_header_names_and_blank_lines(tmp_path: Path, name: str) -> None:
    text = "SMILES name\nCCC propane gas\n\nCC(C)C\tQX-0002\n   \nC1CCCCC1 QX 0003\n"
    data = text.encode()
    path = _write(tmp_path / name, gzip.compress(data) if name.endswith(".gz") else data)
    source = open_library(path)
    assert source.format == "smi"
    assert source.columns == ("smiles", "name")
    assert (source.smiles_column, source.id_column) == ("smiles", "name")
    whole = source.read_all()
    # The header line and the blank lines are not rows; names keep inner spaces.
    assert whole.frame["smiles"].tolist() == ["CCC", "CC(C)C", "C1CCCCC1"]
    assert whole.frame["name"].tolist() == ["propane gas", "QX-0002", "QX 0003"]
    assert whole.smiles == ["CCC", "CC(C)C", "C1CCCCC1"]


def test_smi_without_header_keeps_first_line(tmp_path: Path) -> None:
    path = _write(tmp_path / "plain.smi", "CCC a\nCC b\n")
    assert open_library(path).read_all().smiles == ["CCC", "CC"]


@pytest.mark.parametrize("name", ["lib.sdf", "lib.sdf.gz"])
def test_sdf_round_trip_keeps_rows_titles_and_properties(tmp_path: Path, name: str) -> None:
    frame = _frame()
    frame["canonical_smiles"] = frame["smiles"]
    path = write_table(frame, tmp_path / name, metadata={"tool": "halosift"})
    source = open_library(path)
    assert source.format == "sdf"
    assert source.columns[:2] == ("smiles", "name")
    assert source.smiles_column == "smiles"
    assert source.id_column == "catalog_id"  # an id-like property beats the title
    whole = source.read_all(batch_rows=2)
    got = whole.frame
    assert len(got) == 5
    assert got["name"].tolist() == IDS  # titles come from the id column
    assert got["catalog_id"].tolist() == IDS
    assert got["stock"].tolist() == [10, 0, 3, 7, 12]
    assert got["mw"].dtype == "float64"
    assert got["halosift_tool"].tolist() == ["halosift", "", "", "", ""]  # metadata: on the first record only
    # Structures survive (RDKit canonical forms of the written SMILES).
    expected = [Chem.MolToSmiles(Chem.MolFromSmiles(s)) for s in SMILES]
    assert whole.smiles == expected
    assert whole.row_errors == [""] * 5


def _molblock(smiles: str, title: str) -> str:
    mol = Chem.MolFromSmiles(smiles)
    mol.SetProp("_Name", title)
    return Chem.MolToMolBlock(mol)


def test_sdf_from_rdkit_writer_with_crlf_and_late_property(tmp_path: Path) -> None:
    records = [
        _molblock("CCC", "QX-1") + ">  <supplier>\nAcme Invented\n\n$$$$\n",
        _molblock("C[C@H](Cl)CC", "QX-2") + ">  <supplier>\nAcme Invented\n\n>  <price>\n12.5\n\n$$$$\n",
    ]
    path = _write(tmp_path / "crlf.sdf", "".join(records).replace("\n", "\r\n"))
    source = open_library(path)
    assert source.columns == ("smiles", "name", "supplier")  # from the first record
    batches = list(source.iter_batches(1))
    assert list(batches[0].frame.columns) == ["smiles", "name", "supplier"]
    assert list(batches[1].frame.columns) == ["smiles", "name", "supplier", "price"]
    whole = source.read_all()
    assert whole.frame["price"].tolist()[1] == 12.5
    assert pd.isna(whole.frame["price"].tolist()[0])
    # The stereocentre survives the trip through 2D wedges.
    assert whole.smiles == ["CCC", Chem.MolToSmiles(Chem.MolFromSmiles("C[C@H](Cl)CC"))]
    assert whole.frame["name"].tolist() == ["QX-1", "QX-2"]


def test_sdf_unreadable_records_become_rows_with_reasons(tmp_path: Path, capfd) -> None:
    good = _molblock("CCCC", "QX-1") + ">  <ID>\nQX-1\n\n$$$$\n"
    garbage = "QX-2\n  garbage\n\n  this is not a counts line\nM  END\n>  <ID>\nQX-2\n\n$$$$\n"
    # Hand-written molblock: a carbon with five C-C bonds parses but fails sanitization.
    atoms = "".join(f"    {x:.4f}    0.0000    0.0000 C   0  0  0  0  0  0  0  0  0  0  0  0\n" for x in range(6))
    bonds = "".join(f"  1  {j}  1  0\n" for j in range(2, 7))
    pentavalent = "QX-3\n     invented\n\n  6  5  0  0  0  0  0  0  0  0999 V2000\n" + atoms + bonds + "M  END\n"
    pentavalent += ">  <ID>\nQX-3\n\n$$$$\n"
    truncated = "QX-4\n\n\n  3  2  0  0  0  0  0  0  0  0999 V2000\n    0.0000    0.0000\n>  <ID>\nQX-4\n\n$$$$\n"
    last = _molblock("C1CC1", "QX-5") + ">  <ID>\nQX-5\n\n"  # final record without $$$$
    path = _write(tmp_path / "mixed.sdf", good + garbage + pentavalent + truncated + last)
    capfd.readouterr()
    whole = open_library(path).read_all()
    out, err = capfd.readouterr()
    assert err == "" and out == ""  # RDKit's complaints are silenced
    assert whole.frame["ID"].tolist() == ["QX-1", "QX-2", "QX-3", "QX-4", "QX-5"]
    assert whole.smiles[0] == "CCCC" and whole.smiles[4] == "C1CC1"
    assert whole.smiles[1] is None and whole.row_errors[1] == "unreadable molblock"
    assert whole.row_errors[0] == whole.row_errors[4] == ""
    assert whole.smiles[2] is None
    assert whole.row_errors[2].startswith("molblock structure is invalid (")
    assert "valence" in whole.row_errors[2].lower() and "\n" not in whole.row_errors[2]
    assert whole.smiles[3] is None and whole.row_errors[3] == "unreadable molblock"


def test_sdf_property_name_clash_is_renamed(tmp_path: Path) -> None:
    path = _write(tmp_path / "clash.sdf", _molblock("CCC", "t") + ">  <SMILES>\nCC\n\n>  <name>\nx\n\n$$$$\n")
    source = open_library(path)
    assert source.columns == ("smiles", "name", "sdf_SMILES", "sdf_name")
    whole = source.read_all()
    assert whole.frame["sdf_SMILES"].tolist() == ["CC"]
    assert whole.smiles == ["CCC"]
    # The user may take structures from a property instead of the molblock.
    assert open_library(path, smiles_column="sdf_smiles").read_all().smiles == ["CC"]


def test_empty_molecule_record_is_a_row_without_structure(tmp_path: Path) -> None:
    path = _write(tmp_path / "empty_mol.sdf", Chem.MolToMolBlock(Chem.Mol()) + "$$$$\n" + _molblock("C", "m") + "$$$$\n")
    whole = open_library(path).read_all()
    assert whole.smiles == [None, "C"]
    assert whole.row_errors == ["", ""]


# --- batches and row accounting --------------------------------------------------------


def test_batches_are_consecutive_with_fresh_range_index(tmp_path: Path) -> None:
    rows = "".join(f"QX-{i},{'C' * (1 + i % 5)}\n" for i in range(23))
    path = _write(tmp_path / "many.csv", "id,smiles\n" + rows)
    batches, whole = _all_batches(path, batch_rows=5)
    assert [b.start_row for b in batches] == [0, 5, 10, 15, 20]
    assert [len(b) for b in batches] == [5, 5, 5, 5, 3]
    for batch in batches:
        assert list(batch.frame.index) == list(range(len(batch)))
        assert len(batch.smiles) == len(batch.row_errors) == len(batch.frame)
    assert whole.frame["id"].tolist() == [f"QX-{i}" for i in range(23)]
    # Iterating again starts from the top.
    assert [b.start_row for b in open_library(path).iter_batches(10)] == [0, 10, 20]


def test_ragged_rows_are_kept_with_reasons(tmp_path: Path) -> None:
    path = _write(
        tmp_path / "ragged.csv",
        "id,smiles,mw\nQX-1,CCC,44\nQX-2,CC,30,extra,more\nQX-3\nQX-4,CCCC,58\n\nQX-5,C,16\n",
    )
    whole = open_library(path).read_all()
    assert whole.frame["id"].tolist() == ["QX-1", "QX-2", "QX-3", "QX-4", "QX-5"]
    assert whole.row_errors == [
        "",
        "row has 5 fields, header has 3",
        "row has 1 fields, header has 3",
        "",
        "",
    ]
    assert whole.smiles == ["CCC", None, None, "CCCC", "C"]
    assert whole.frame["mw"].tolist()[3] == 58


@pytest.mark.parametrize(
    "body",
    [
        'id,smiles\nQX-1,"CCC\nQX-2,CC\nQX-3,C\n',  # open to the end of the file
        'id,smiles,n\nQX-1,"CCC,1\nQX-2,CC,2\nQX-3,C,3\n',
        'id,smiles,n\nQX-1,"CCC,1\nQX-2,CC,2\nQX-3,"C"x,3\n',  # closed by a later stray quote
    ],
)
def test_unbalanced_quote_does_not_swallow_later_rows(tmp_path: Path, body: str) -> None:
    path = _write(tmp_path / "quote.csv", body)
    whole = open_library(path).read_all()
    assert whole.frame["id"].tolist() == ["QX-1", "QX-2", "QX-3"]
    assert whole.row_errors[0].startswith("unbalanced quote in row")
    assert whole.smiles[:2] == [None, "CC"]
    assert whole.row_errors[1] == ""


def test_text_after_closing_quote_is_read_leniently(tmp_path: Path) -> None:
    path = _write(tmp_path / "lenient.csv", 'id,smiles\n"QX-1" ,CCC\nQX-2,CC\n')
    whole = open_library(path).read_all()
    assert whole.frame["id"].tolist() == ["QX-1 ", "QX-2"]
    assert whole.row_errors == ["", ""]


def test_quoted_fields_with_commas_and_newlines_are_one_row(tmp_path: Path) -> None:
    path = _write(tmp_path / "quoted.csv", 'id,smiles,note\nQX-1,CCC,"a, b"\nQX-2,CC,"two\nlines"\nQX-3,C,x\n')
    whole = open_library(path).read_all()
    assert whole.frame["note"].tolist() == ["a, b", "two\nlines", "x"]
    assert whole.row_errors == ["", "", ""]


def test_undecodable_bytes_mark_only_their_row(tmp_path: Path) -> None:
    body = "smiles,id,supplier\nCCC,QX-1,Acme\nCC,QX-2,Caf\xe9 Invented\nC,QX-3,Acme\n".encode("latin-1")
    path = _write(tmp_path / "latin1.csv", body)
    whole = open_library(path).read_all()
    assert whole.frame["id"].tolist() == ["QX-1", "QX-2", "QX-3"]
    assert whole.row_errors == ["", "undecodable bytes in row", ""]
    assert whole.smiles == ["CCC", None, "C"]
    assert "\ufffd" in whole.frame["supplier"].tolist()[1]


def test_whole_file_in_another_encoding_loses_no_rows(tmp_path: Path) -> None:
    random.seed(7)
    accented = "\xe9"
    lines = [f"C{'C' * (i % 4)},QX-{i},{accented if i % 3 == 0 else 'e'}" for i in range(3000)]
    path = _write(tmp_path / "cp1252.csv", ("smiles,id,tag\n" + "\n".join(lines) + "\n").encode("cp1252"))
    whole = open_library(path).read_all(batch_rows=700)
    assert len(whole.frame) == 3000
    assert whole.frame["id"].tolist() == [f"QX-{i}" for i in range(3000)]
    flagged = [i for i, e in enumerate(whole.row_errors) if e]
    assert flagged == [i for i in range(3000) if i % 3 == 0]


def test_undecodable_bytes_in_smi_and_sdf(tmp_path: Path) -> None:
    smi = _write(tmp_path / "bad.smi", b"CCC QX-1\nCC QX-\xff2\nC QX-3\n")
    assert open_library(smi).read_all().row_errors == ["", "undecodable bytes in row", ""]
    block = _molblock("CC", "QX-\xff").encode("utf-8").replace("QX-\xff".encode(), b"QX-\xff")
    sdf = _write(tmp_path / "bad.sdf", _molblock("C", "QX-1").encode() + b"$$$$\n" + block + b"$$$$\n")
    whole = open_library(sdf).read_all()
    assert whole.row_errors == ["", "undecodable bytes in row"]
    assert whole.smiles == ["C", None]


def test_bom_utf16_crlf_and_semicolons(tmp_path: Path) -> None:
    text = "SMILES,ID\r\nCCC,QX-\u00e91\r\nCC,QX-2\r\n"
    bom = _write(tmp_path / "bom.csv", "\ufeff".encode() + text.encode("utf-8"))
    utf16 = _write(tmp_path / "utf16.csv", text.encode("utf-16"))
    for path in (bom, utf16):
        source = open_library(path)
        assert source.columns == ("SMILES", "ID")
        whole = source.read_all()
        assert whole.frame["ID"].tolist() == ["QX-\u00e91", "QX-2"]
        assert whole.row_errors == ["", ""]
    semi = _write(tmp_path / "semi.csv", "smiles;id\nCCC;QX-1\n")
    assert open_library(semi).read_all().frame["id"].tolist() == ["QX-1"]


def test_tsv_keeps_commas_inside_fields(tmp_path: Path) -> None:
    path = _write(tmp_path / "lib.tsv", "smiles\tid\tnote\nCCC\tQX-1\ta, b\n")
    whole = open_library(path).read_all()
    assert whole.frame["note"].tolist() == ["a, b"]


# --- column detection --------------------------------------------------------------------


def test_smiles_and_id_detection_prefers_listed_order(tmp_path: Path) -> None:
    path = _write(tmp_path / "cols.csv", "Title,mol_smiles,Canonical_SMILES,compound_id\nt,C,CC,QX-1\n")
    source = open_library(path)
    assert source.smiles_column == "Canonical_SMILES"
    assert source.id_column == "compound_id"
    assert open_library(path, smiles_column="MOL_SMILES").smiles_column == "mol_smiles"
    assert open_library(path, id_column="title").id_column == "Title"


def test_no_id_column_is_fine(tmp_path: Path) -> None:
    path = _write(tmp_path / "noid.csv", "smiles,mw\nC,16\n")
    assert open_library(path).id_column is None


def test_smiles_and_id_columns_stay_text_even_if_numeric(tmp_path: Path) -> None:
    path = _write(tmp_path / "numeric_id.csv", "id,smiles,code\n1,C,1\n2,CC,2\n")
    got = open_library(path).read_all().frame
    assert got["id"].tolist() == ["1", "2"]
    assert got["code"].dtype == "int64"


def test_no_smiles_column_lists_the_columns(tmp_path: Path) -> None:
    path = _write(tmp_path / "nosmiles.csv", "a,b,c\n1,2,3\n")
    with pytest.raises(LibraryError) as info:
        open_library(path)
    assert str(info.value) == f"no SMILES column in {path}; columns found: a, b, c (use --smiles-column)"


def test_named_column_must_exist(tmp_path: Path) -> None:
    path = _write(tmp_path / "lib.csv", "smiles,id\nC,1\n")
    with pytest.raises(LibraryError, match="no column named 'structure' in .*; columns found: smiles, id"):
        open_library(path, smiles_column="structure")
    with pytest.raises(LibraryError, match="no column named 'code'"):
        open_library(path, id_column="code")


# --- whole-file errors ------------------------------------------------------------------------


def _message(path: Path) -> str:
    with pytest.raises(LibraryError) as info:
        open_library(path)
    message = str(info.value)
    assert "\n" not in message
    return message


def test_missing_file(tmp_path: Path) -> None:
    assert _message(tmp_path / "nope.csv") == f"no such file: {tmp_path / 'nope.csv'}"


@pytest.mark.parametrize("name", ["e.csv", "e.tsv", "e.smi", "e.sdf", "e.parquet", "e.csv.gz"])
def test_empty_file(tmp_path: Path, name: str) -> None:
    path = _write(tmp_path / name, gzip.compress(b"") if name.endswith(".gz") else b"")
    assert _message(path) == f"{path} is empty"


def test_blank_lines_only_is_empty(tmp_path: Path) -> None:
    path = _write(tmp_path / "blank.csv", "\n\n  \n")
    assert _message(path) == f"{path} is empty"


def test_header_without_rows(tmp_path: Path) -> None:
    path = _write(tmp_path / "header.csv", "smiles,id\n")
    assert _message(path) == f"{path} has a header line but no rows"


def test_directory(tmp_path: Path) -> None:
    folder = tmp_path / "lib.csv"
    folder.mkdir()
    assert _message(folder) == f"{folder} is a directory"


def test_random_bytes_parquet(tmp_path: Path) -> None:
    path = _write(tmp_path / "junk.parquet", random.Random(3).randbytes(4096))
    assert _message(path).startswith(f"{path} is not a readable Parquet file (")


def test_unknown_extension(tmp_path: Path) -> None:
    path = _write(tmp_path / "lib.xlsx", "x")
    message = _message(path)
    assert message.startswith(f"unknown file type for {path}; use .csv, .tsv, .parquet, .smi or .sdf")


def test_gzipped_parquet_is_refused(tmp_path: Path) -> None:
    path = _write(tmp_path / "lib.parquet.gz", gzip.compress(b"x"))
    assert "cannot be gzipped" in _message(path)


def test_binary_file_named_csv(tmp_path: Path) -> None:
    path = _write(tmp_path / "image.csv", b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR")
    assert _message(path) == f"{path} is not a text file (it contains NUL bytes)"


def test_not_gzip(tmp_path: Path) -> None:
    path = _write(tmp_path / "plain.csv.gz", "smiles\nC\n")
    assert _message(path).startswith(f"{path} is not a readable gzip file")


def test_text_that_is_not_sdf(tmp_path: Path) -> None:
    path = _write(tmp_path / "notes.sdf", "smiles,id\nC,1\n")
    assert "does not look like an SD file" in _message(path)


def test_truncated_gzip_csv_fails_at_open_with_library_error(tmp_path: Path) -> None:
    # A CSV is read whole when opened, so a stream cut short is a whole-file error before any work.
    rng = random.Random(5)
    body = "smiles,id\n" + "".join(f"C{'C' * rng.randrange(9)},{rng.random()}\n" for _ in range(200_000))
    data = gzip.compress(body.encode())
    path = _write(tmp_path / "cut.csv.gz", data[: len(data) // 2])
    with pytest.raises(LibraryError, match="is not a readable gzip file"):
        open_library(path)


def test_truncated_gzip_smi_fails_during_reading_with_library_error(tmp_path: Path) -> None:
    rng = random.Random(5)
    body = "".join(f"C{'C' * rng.randrange(9)} m{i}\n" for i in range(200_000))
    data = gzip.compress(body.encode())
    path = _write(tmp_path / "cut.smi.gz", data[: len(data) // 2])
    source = open_library(path)  # the start of the stream is fine
    with pytest.raises(LibraryError, match="is not a readable gzip file"):
        for _ in source.iter_batches():
            pass


@pytest.mark.skipif(os.name != "posix" or os.geteuid() == 0, reason="needs a non-root POSIX user")
def test_permission_denied(tmp_path: Path) -> None:
    path = _write(tmp_path / "secret.csv", "smiles\nC\n")
    path.chmod(0)
    try:
        assert _message(path) == f"permission denied: {path}"
    finally:
        path.chmod(0o644)


def test_library_error_is_one_line() -> None:
    assert str(LibraryError("a\nb\r\nc")) == "a b c"
    assert str(LibraryError("keeps  M  END spacing")) == "keeps  M  END spacing"


# --- DataFrames ---------------------------------------------------------------------------------


def test_open_frame_streams_a_dataframe_with_its_dtypes() -> None:
    frame = _frame()
    frame.loc[1, "smiles"] = None
    frame.index = [5, 6, 7, 8, 9]
    source = open_frame(frame)
    assert (source.path, source.format, source.total_rows) == (None, "frame", 5)
    assert source.columns == tuple(frame.columns)
    batches = list(source.iter_batches(2))
    assert [b.start_row for b in batches] == [0, 2, 4]
    got = pd.concat([b.frame for b in batches], ignore_index=True)
    assert got["stock"].dtype == frame["stock"].dtype
    assert [s for b in batches for s in b.smiles] == ["CCC", None, "C1CCCCC1", "CC(C)(C)C", "Cc1ccccc1"]
    assert list(batches[0].frame.index) == [0, 1]


def test_open_frame_non_text_cells_and_columns() -> None:
    frame = pd.DataFrame({"smiles": ["C", 3.5, "  ", None], "id": list("abcd")}, dtype=object)
    whole = open_frame(frame).read_all()
    assert whole.smiles == ["C", None, None, None]
    assert whole.row_errors == ["", "SMILES cell holds a float, not text", "", ""]
    with pytest.raises(LibraryError, match="holds int64 values, not SMILES text"):
        open_frame(pd.DataFrame({"smiles": [1, 2]}))
    with pytest.raises(LibraryError, match="no SMILES column in the DataFrame; columns found: x"):
        open_frame(pd.DataFrame({"x": ["C"]}))
    with pytest.raises(LibraryError, match="repeated column names: smiles"):
        open_frame(pd.DataFrame([["C", "CC"]], columns=["smiles", "smiles"]))


def test_open_frame_empty_frame_gives_no_batches() -> None:
    source = open_frame(pd.DataFrame({"smiles": pd.Series([], dtype=str)}))
    assert list(source.iter_batches()) == []
    assert len(source.read_all()) == 0


def test_batch_rows_must_be_positive(tmp_path: Path) -> None:
    with pytest.raises(ValueError):
        open_frame(pd.DataFrame({"smiles": ["C"]})).iter_batches(0)


# --- helpers ---------------------------------------------------------------------------------------


def test_settle_types_rules() -> None:
    frame = pd.DataFrame(
        {
            "ints": ["1", "2", "3"],
            "gappy_ints": ["1", "", "3"],
            "floats": ["1.5", " 2", "1e3"],
            "words": ["1", "two", "3"],
            "codes": ["007", "1", "2"],
            "long": ["12345678901234567", "1", "2"],
            "nan_text": ["nan", "1", "2"],
            "blank": ["", "", ""],
            "keep": ["1", "2", "3"],
        },
        dtype=str,
    )
    got = settle_types(frame, keep=["keep"])
    assert got["ints"].dtype == "int64"
    assert str(got["gappy_ints"].dtype) == "Int64" and got["gappy_ints"].isna().tolist() == [False, True, False]
    assert got["floats"].tolist() == [1.5, 2.0, 1000.0]
    for text_column in ("words", "codes", "long", "nan_text", "blank", "keep"):
        assert got[text_column].tolist() == frame[text_column].tolist()


def test_rdkit_quiet_restores_previous_log_state() -> None:
    before = rdBase.LogStatus()
    with rdkit_quiet():
        with rdkit_quiet():
            assert "enabled" not in rdBase.LogStatus()
        assert "enabled" not in rdBase.LogStatus()
    assert rdBase.LogStatus() == before
    RDLogger.DisableLog("rdApp.warning")
    try:
        changed = rdBase.LogStatus()
        with rdkit_quiet():
            pass
        assert rdBase.LogStatus() == changed
    finally:
        RDLogger.EnableLog("rdApp.warning")


def test_parquet_written_by_pyarrow_directly(tmp_path: Path) -> None:
    import pyarrow as pa

    table = pa.table({"smiles": pa.array(["C", "CC"], type=pa.large_string()), "id": ["QX-1", "QX-2"]})
    path = tmp_path / "plain.parquet"
    pq.write_table(table, path)
    whole = open_library(path).read_all()
    assert whole.smiles == ["C", "CC"]
    assert whole.frame["id"].tolist() == ["QX-1", "QX-2"]
