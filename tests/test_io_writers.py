"""Tests for engine.io writing: formats, metadata placement, refusals, atomicity."""

from __future__ import annotations

import gzip
import os
import stat
from pathlib import Path

import halosift.engine.io.writers as writers
import pandas as pd
import pyarrow.parquet as pq
import pytest
from halosift.engine.io import LibraryError, about_path, atomic_path, open_library, output_format, write_table
from halosift.engine.io.delimited import FORMULA_RULE
from halosift.engine.io.metadata import PCT_PRECISION, file_metadata
from rdkit import Chem

META = {"tool": "halosift", "caution": "Invented caution line one.\nInvented caution line two."}


def _results() -> pd.DataFrame:
    """A small results-like frame from an invented supplier."""
    return pd.DataFrame(
        {
            "id": ["NA", "QX-0002", "QX-0003"],
            "smiles": ["CCC", "not a smiles", "CC(C)C"],
            "status": ["ok", "rejected", "ok"],
            "cl2_major_pct": [55.5, float("nan"), 64.0],
            "n_products": pd.array([2, None, 2], dtype="Int64"),
            "canonical_smiles": ["CCC", "", "CC(C)C"],
        }
    )


def _leftovers(folder: Path) -> list[str]:
    """Temporary files left in folder (hidden names are ours)."""
    return sorted(p.name for p in folder.iterdir() if p.name.startswith("."))


# --- formats ---------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("name", "fmt"),
    [
        ("a.csv", "csv"),
        ("a.TSV", "tsv"),
        ("a.parquet", "parquet"),
        ("a.sdf", "sdf"),
        ("a.csv.gz", "csv"),
        ("a.Tsv.Gz", "tsv"),
        ("a.sdf.gz", "sdf"),
    ],
)
def test_output_format_accepts(name: str, fmt: str) -> None:
    assert output_format(name) == fmt


@pytest.mark.parametrize("name", ["a.xlsx", "a.smi", "a", "a.gz", "a.parquet.gz", ".csv"])
def test_output_format_refuses(name: str) -> None:
    with pytest.raises(LibraryError):
        output_format(name)


def test_csv_is_plain_with_sidecar(tmp_path: Path) -> None:
    out = write_table(_results(), tmp_path / "short.csv", metadata=META)
    assert out == tmp_path / "short.csv"
    lines = out.read_text(encoding="utf-8").splitlines()
    assert lines[0] == "id,smiles,status,cl2_major_pct,n_products,canonical_smiles"
    assert lines[1] == "NA,CCC,ok,55.5,2,CCC"
    assert lines[2] == "QX-0002,not a smiles,rejected,,,"
    assert len(lines) == 4
    about = (tmp_path / "short.csv.about.txt").read_text(encoding="utf-8")
    assert about == (
        "halosift_tool: halosift\nhalosift_caution: Invented caution line one.\n  Invented caution line two.\n"
        f"halosift_percent_precision: {PCT_PRECISION}\nhalosift_formula_cells: {FORMULA_RULE}\n"
    )
    assert about_path(out) == tmp_path / "short.csv.about.txt"


def test_tsv_gz_is_gzip_and_reads_back(tmp_path: Path) -> None:
    out = write_table(_results(), tmp_path / "r.tsv.gz", metadata=META)
    assert out.read_bytes()[:2] == b"\x1f\x8b"
    text = gzip.decompress(out.read_bytes()).decode()
    assert text.splitlines()[0].split("\t")[0] == "id"
    assert (tmp_path / "r.tsv.gz.about.txt").exists()
    whole = open_library(out).read_all()
    assert whole.frame["id"].tolist() == ["NA", "QX-0002", "QX-0003"]
    assert whole.frame["cl2_major_pct"].tolist()[0] == 55.5


def test_gzip_output_is_reproducible(tmp_path: Path) -> None:
    first = write_table(_results(), tmp_path / "a.csv.gz", metadata=META).read_bytes()
    second = write_table(_results(), tmp_path / "a.csv.gz", metadata=META, force=True).read_bytes()
    assert first == second


def test_parquet_keeps_dtypes_and_metadata(tmp_path: Path) -> None:
    frame = _results()
    out = write_table(frame, tmp_path / "r.parquet", metadata=META)
    table = pq.read_table(out)
    stored = {k.decode(): v.decode() for k, v in table.schema.metadata.items()}
    assert stored["halosift_tool"] == "halosift"
    assert stored["halosift_caution"] == META["caution"]
    back = table.to_pandas()
    assert list(back.columns) == list(frame.columns)
    assert str(back["n_products"].dtype) == "Int64"
    assert back["cl2_major_pct"].dtype == "float64"
    assert back["id"].tolist() == frame["id"].tolist()


def test_parquet_mixed_object_column_becomes_text(tmp_path: Path) -> None:
    frame = pd.DataFrame({"smiles": ["C", "CC", "CCC"], "mixed": pd.Series([1, "two", None], dtype=object)})
    out = write_table(frame, tmp_path / "mixed.parquet", metadata={})
    back = pq.read_table(out).to_pandas()
    assert back["mixed"].tolist()[:2] == ["1", "two"]
    assert pd.isna(back["mixed"].tolist()[2])


def test_parquet_non_range_index_is_not_misaligned(tmp_path: Path) -> None:
    frame = _results()
    frame.index = [7, 3, 9]
    back = pq.read_table(write_table(frame, tmp_path / "ix.parquet", metadata={})).to_pandas()
    assert back["id"].tolist() == frame["id"].tolist()
    assert back.columns.tolist() == frame.columns.tolist()


def test_sdf_every_row_is_a_record(tmp_path: Path) -> None:
    out = write_table(_results(), tmp_path / "r.sdf", metadata=META)
    text = out.read_text(encoding="utf-8")
    records = [r for r in text.split("$$$$\n") if r.strip()]
    assert len(records) == 3
    # Titles come from the id column; the invalid row is an empty molecule with its properties.
    assert [r.splitlines()[0] for r in records] == ["NA", "QX-0002", "QX-0003"]
    mols = list(Chem.SDMolSupplier(str(out)))
    assert all(m is not None for m in mols)
    assert [m.GetNumAtoms() for m in mols] == [3, 0, 4]
    assert mols[1].GetProp("status") == "rejected"
    assert mols[1].GetProp("cl2_major_pct") == ""
    assert mols[0].GetProp("smiles") == "CCC"  # the input column is a property too
    assert not mols[0].HasProp("canonical_smiles")  # it is the structure
    # The metadata is written once, on the first record.
    assert mols[0].GetProp("halosift_tool") == "halosift"
    assert mols[0].GetProp("halosift_caution") == META["caution"]
    assert not any(m.HasProp("halosift_tool") or m.HasProp("halosift_caution") for m in mols[1:])
    assert text.count("<halosift_caution>") == 1
    assert mols[0].GetConformer().Is3D() is False


def test_sdf_title_falls_back_to_row_number(tmp_path: Path) -> None:
    frame = pd.DataFrame({"canonical_smiles": ["C", "CC"], "mw": [16.0, 30.1]})
    out = write_table(frame, tmp_path / "noid.sdf.gz", metadata={})
    mols = list(Chem.ForwardSDMolSupplier(gzip.open(out)))
    assert [m.GetProp("_Name") for m in mols] == ["1", "2"]
    assert [Chem.MolToSmiles(m) for m in mols] == ["C", "CC"]


def test_sdf_without_structure_column_uses_detected_smiles(tmp_path: Path) -> None:
    frame = pd.DataFrame({"SMILES": ["CCO"], "catalog_id": ["QX-9"]})
    out = write_table(frame, tmp_path / "det.sdf", metadata={}, smiles_column="canonical_smiles")
    mol = next(Chem.SDMolSupplier(str(out)))
    assert Chem.MolToSmiles(mol) == "CCO"
    assert mol.GetProp("_Name") == "QX-9"


def test_sdf_values_that_would_break_the_format(tmp_path: Path) -> None:
    frame = pd.DataFrame(
        {"canonical_smiles": ["C"], "note": ["line one\n\nline three"], "weird<name>": ["$$$$ trick"]}
    )
    out = write_table(frame, tmp_path / "odd.sdf", metadata={})
    mols = list(Chem.SDMolSupplier(str(out)))
    assert len(mols) == 1
    assert mols[0].GetProp("note") == "line one\nline three"
    assert mols[0].GetProp("weird_name_") == " $$$$ trick"


# --- refusals --------------------------------------------------------------------------------


def test_refuses_to_overwrite_without_force(tmp_path: Path) -> None:
    target = tmp_path / "out.csv"
    target.write_text("keep me\n")
    with pytest.raises(LibraryError) as info:
        write_table(_results(), target, metadata=META)
    assert str(info.value) == f"{target} exists; use --force to replace it"
    assert target.read_text() == "keep me\n"
    write_table(_results(), target, metadata=META, force=True)
    assert target.read_text().startswith("id,smiles")


def test_protects_the_input_file_even_with_force(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    source = tmp_path / "input.csv"
    source.write_text("smiles\nC\n")
    monkeypatch.chdir(tmp_path)
    link = tmp_path / "alias.csv"
    link.symlink_to(source)
    for spelling in (source, Path("input.csv"), Path("./sub/../input.csv"), link):
        (tmp_path / "sub").mkdir(exist_ok=True)
        with pytest.raises(LibraryError) as info:
            write_table(_results(), spelling, metadata=META, force=True, protect=[source])
        assert str(info.value) == f"refusing to write over the input file {source}"
    assert source.read_text() == "smiles\nC\n"


def test_missing_folder_and_directory_target(tmp_path: Path) -> None:
    with pytest.raises(LibraryError, match="folder .* does not exist"):
        write_table(_results(), tmp_path / "nowhere" / "out.csv", metadata=META)
    folder = tmp_path / "out.parquet"
    folder.mkdir()
    with pytest.raises(LibraryError, match="is a directory"):
        write_table(_results(), folder, metadata=META, force=True)


def test_unknown_output_extension(tmp_path: Path) -> None:
    with pytest.raises(LibraryError, match="unknown file type"):
        write_table(_results(), tmp_path / "out.xlsx", metadata=META)


# --- atomicity -------------------------------------------------------------------------------


@pytest.mark.parametrize("name", ["a.csv", "a.tsv.gz", "a.parquet", "a.sdf", "a.sdf.gz"])
def test_success_leaves_no_temp_files(tmp_path: Path, name: str) -> None:
    write_table(_results(), tmp_path / name, metadata=META)
    assert _leftovers(tmp_path) == []


@pytest.mark.parametrize(
    ("name", "target"),
    [
        ("a.csv", "write_delimited"),
        ("a.parquet", "write_parquet"),
        ("a.sdf", "write_sdf"),
    ],
)
def test_failure_mid_write_leaves_old_file_and_no_temp(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, name: str, target: str
) -> None:
    out = tmp_path / name
    out.write_bytes(b"previous contents")
    if name.endswith(".csv"):
        about_path(out).write_text("previous about\n")
    real = getattr(writers, target)

    def half_then_fail(frame, temp, *args):
        real(frame.iloc[:1], temp, *args)  # something really reaches the temp file
        assert Path(temp).stat().st_size > 0
        raise RuntimeError("disk vanished")

    monkeypatch.setattr(writers, target, half_then_fail)
    with pytest.raises(RuntimeError, match="disk vanished"):
        write_table(_results(), out, metadata=META, force=True)
    assert out.read_bytes() == b"previous contents"
    if name.endswith(".csv"):
        assert about_path(out).read_text() == "previous about\n"
    assert _leftovers(tmp_path) == []


def test_os_error_mid_write_becomes_library_error(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    def full_disk(*_args):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(writers, "write_parquet", full_disk)
    with pytest.raises(LibraryError, match="could not write .*: No space left on device"):
        write_table(_results(), tmp_path / "x.parquet", metadata=META)
    assert list(tmp_path.iterdir()) == []


def test_atomic_path_replaces_only_on_success(tmp_path: Path) -> None:
    target = tmp_path / "t.txt"
    with atomic_path(target) as temp:
        assert temp.parent == tmp_path and temp != target
        assert not target.exists()
        temp.write_text("new")
    assert target.read_text() == "new"
    with pytest.raises(KeyError):
        with atomic_path(target) as temp:
            temp.write_text("half")
            raise KeyError("boom")
    assert target.read_text() == "new"
    assert [p.name for p in tmp_path.iterdir()] == ["t.txt"]


def test_atomic_path_permissions_follow_umask_and_existing_file(tmp_path: Path) -> None:
    old = os.umask(0o022)
    try:
        fresh = tmp_path / "fresh.txt"
        with atomic_path(fresh) as temp:
            temp.write_text("x")
        assert stat.S_IMODE(fresh.stat().st_mode) == 0o644
        fresh.chmod(0o640)
        with atomic_path(fresh) as temp:
            temp.write_text("y")
        assert stat.S_IMODE(fresh.stat().st_mode) == 0o640
    finally:
        os.umask(old)


def test_atomic_path_missing_folder(tmp_path: Path) -> None:
    with pytest.raises(LibraryError, match="does not exist"):
        with atomic_path(tmp_path / "no" / "x.txt"):
            pass


# --- metadata: one set of keys in every format; percentages rounded ------------------------------


def _sidecar(path: Path) -> dict[str, str]:
    """The .about.txt sidecar read back: "key: value" lines, two-space continuation lines."""
    meta: dict[str, str] = {}
    key = ""
    for line in about_path(path).read_text(encoding="utf-8").splitlines():
        if line.startswith("  "):
            meta[key] += "\n" + line[2:]
        else:
            key, _, value = line.partition(": ")
            meta[key] = value
    return meta


def _file_metadata_of(path: Path) -> dict[str, str]:
    """The halosift metadata a written file carries, read the way a user's tool would read it."""
    name = path.name
    if name.endswith(".parquet"):
        stored = pq.read_schema(path).metadata
        return {k.decode(): v.decode() for k, v in stored.items() if k != b"pandas"}
    if name.endswith(".sdf"):
        first = next(Chem.SDMolSupplier(str(path)))
        return {k: first.GetProp(k) for k in first.GetPropNames() if k.startswith("halosift_")}
    return _sidecar(path)


def test_every_format_records_the_same_metadata_keys(tmp_path: Path) -> None:
    from halosift.engine import Conditions, __version__
    from halosift.engine.provenance import export_metadata

    meta = export_metadata(Conditions(), source="invented.csv")
    seen = {}
    for name in ("m.csv", "m.tsv", "m.parquet", "m.sdf"):
        seen[name] = _file_metadata_of(write_table(_results(), tmp_path / name, metadata=meta))
    first = seen["m.csv"]
    assert all(found == first for found in seen.values()), {n: sorted(f) for n, f in seen.items()}
    assert set(first) == {f"halosift_{k}" for k in meta} | {"halosift_percent_precision", "halosift_formula_cells"}
    assert first["halosift_version"] == __version__
    assert first["halosift_caution"] == meta["caution"]
    assert first["halosift_percent_precision"] == PCT_PRECISION
    assert not any(k.startswith("halosift_halosift_") for k in first)


@pytest.mark.parametrize("key", ["halosift_version", "Version", "two words", ""])
def test_file_metadata_refuses_keys_that_would_be_misnamed(key: str) -> None:
    with pytest.raises(ValueError):
        file_metadata({key: "x"})


def test_sdf_metadata_once_even_for_many_rows(tmp_path: Path) -> None:
    frame = pd.DataFrame({"canonical_smiles": ["C" * n for n in range(1, 21)]})
    text = write_table(frame, tmp_path / "many.sdf", metadata=META).read_text(encoding="utf-8")
    assert text.count("$$$$\n") == 20
    assert text.count(">  <halosift_caution>") == 1 and text.count(">  <halosift_percent_precision>") == 1
    assert text.index(">  <halosift_caution>") < text.index("$$$$\n")  # on the first record


def _percent_frame() -> pd.DataFrame:
    """Result percentages with more digits than exports keep, beside input columns that must stay raw."""
    return pd.DataFrame(
        {
            "catalog_id": ["WS-0001", "WS-0002"],
            "purity_pct": [99.123, 12.345],  # the supplier's own column
            "input_cl2_major_pct": [1.2345, 6.789],  # a clashing input column, renamed by the screen
            "cl2_major_pct": [55.34999, float("nan")],
            "br2_major_pct": [96.46, 100.0],
            "nbs_major_pct": [33.333333, 0.04],
            "cl2_poly_pct": [7.25001, 0.0],
            "canonical_smiles": ["CCC", "CC(C)C"],
        }
    )


@pytest.mark.parametrize("name", ["p.csv", "p.tsv.gz", "p.parquet", "p.sdf"])
def test_result_percentages_are_rounded_to_a_tenth_in_every_format(tmp_path: Path, name: str) -> None:
    frame = _percent_frame()
    out = write_table(frame, tmp_path / name, metadata=META)
    if name.endswith(".parquet"):
        back = pd.read_parquet(out)
    elif name.endswith(".sdf"):
        back = pd.DataFrame([m.GetPropsAsDict() for m in Chem.SDMolSupplier(str(out))])
        back = back.replace("", float("nan"))
    else:
        back = open_library(out).read_all().frame
    assert back["cl2_major_pct"].astype(float).tolist()[0] == 55.3
    assert pd.isna(back["cl2_major_pct"].astype(float).tolist()[1])
    assert back["br2_major_pct"].astype(float).tolist() == [96.5, 100.0]
    assert back["nbs_major_pct"].astype(float).tolist() == [33.3, 0.0]
    assert back["cl2_poly_pct"].astype(float).tolist() == [7.3, 0.0]
    # Input columns are the supplier's data: written as they came.
    assert back["purity_pct"].astype(float).tolist() == [99.123, 12.345]
    assert back["input_cl2_major_pct"].astype(float).tolist() == [1.2345, 6.789]
    assert frame["cl2_major_pct"].tolist()[0] == 55.34999  # the caller's frame is not changed
    assert _file_metadata_of(out)["halosift_percent_precision"] == PCT_PRECISION


def test_a_screen_result_keeps_no_unrounded_percentage(tmp_path: Path) -> None:
    from halosift.engine import screen
    from halosift.engine.io.metadata import percent_columns
    from halosift.engine.library import RESULT_COLUMNS

    result = screen(pd.DataFrame({"smiles": ["CCC", "CCCC", "CC(C)CC", "CCc1ccccc1", "C=CCC"]}), use_cache=False)
    columns = percent_columns(list(result.columns))
    assert set(columns) == {c for c in RESULT_COLUMNS if c.endswith("_pct")}
    assert any((result[c].dropna() * 10 % 1 > 1e-6).any() for c in columns)  # the model's shares are finer
    back = pd.read_parquet(write_table(result, tmp_path / "s.parquet", metadata=META))
    for column in columns:
        values = back[column].dropna().to_numpy()
        assert (abs(values * 10 - (values * 10).round()) < 1e-9).all(), column


def test_sdf_result_reads_back_without_its_metadata(tmp_path: Path) -> None:
    from halosift.engine import Conditions, screen
    from halosift.engine.provenance import export_metadata

    result = screen(pd.DataFrame({"smiles": ["CCC", "CC(C)C"], "catalog_id": ["WS-1", "WS-2"]}), use_cache=False)
    out = write_table(result, tmp_path / "r.sdf", metadata=export_metadata(Conditions()))
    source = open_library(out)
    assert not any(c.startswith("halosift_") for c in source.columns)
    assert "canonical_smiles" in source.columns and "name" not in source.columns  # read as a result


def test_sdf_from_0_2_0_with_the_doubled_key_still_reads_as_a_result(tmp_path: Path) -> None:
    record = Chem.MolToMolBlock(Chem.MolFromSmiles("CCC")) + (
        ">  <status>\nok\n\n>  <halosift_halosift_version>\n0.2.0\n\n>  <halosift_caution>\nold\n\n$$$$\n"
    )
    old = tmp_path / "old.sdf"
    old.write_text(record * 2, encoding="utf-8")
    source = open_library(old)
    assert "canonical_smiles" in source.columns and "name" not in source.columns
    assert not any(c.startswith("halosift_") for c in source.columns)


@pytest.mark.parametrize("fmt", ["csv", "tsv", "parquet", "sdf"])
def test_write_stream_gives_the_bytes_a_file_would_hold(tmp_path: Path, fmt: str) -> None:
    import io

    from halosift.engine.io.writers import write_stream

    stream = io.BytesIO()
    meta = write_stream(_percent_frame(), stream, fmt, metadata=META)
    assert meta["halosift_tool"] == "halosift"
    written = write_table(_percent_frame(), tmp_path / f"f.{fmt}", metadata=META).read_bytes()
    if fmt == "parquet":
        assert pq.read_table(io.BytesIO(stream.getvalue())).equals(pq.read_table(io.BytesIO(written)))
        assert pq.read_schema(io.BytesIO(stream.getvalue())).metadata[b"halosift_tool"] == b"halosift"
    else:
        assert stream.getvalue() == written


def _odd_typed_library(path: Path) -> None:
    """A Parquet library whose other columns hold what real catalogues do: bytes, lists, structs, decimals, times."""
    import datetime
    import decimal

    import pyarrow as pa

    table = pa.table({
        "id": ["W-1", "W-2", "W-3"],
        "smiles": ["CCC", "C1CCCCC1", "not a smiles"],
        "fingerprint": pa.array([b"\x00\x01", b"=\r\n", None], pa.binary()),
        "tags": pa.array([["a", "b"], [], None], pa.list_(pa.string())),
        "lot": pa.array([{"n": 1}, {"n": None}, None], pa.struct([("n", pa.int64())])),
        "price": pa.array([decimal.Decimal("1.50"), None, decimal.Decimal("-3")], pa.decimal128(6, 2)),
        "received": pa.array([datetime.datetime(2026, 1, 2, 3, 4), None, datetime.datetime(2025, 5, 6)],
                             pa.timestamp("s")),
    })
    pq.write_table(table, path)


@pytest.mark.parametrize("out", ["x.csv", "x.tsv", "x.csv.gz", "x.parquet", "x.sdf", "x.html"])
def test_odd_typed_input_columns_write_every_row_in_every_format(tmp_path: Path, out: str) -> None:
    """The class of error: an object column that is not text (bytes from a Parquet binary column) made the CSV
    writer's text checks raise a TypeError (a traceback). Every format writes such a library, every row in it."""
    from halosift.cli import main

    source = tmp_path / "odd.parquet"
    _odd_typed_library(source)
    command = "report" if out.endswith(".html") else "screen"
    assert main([command, str(source), "-o", str(tmp_path / out), "--no-cache"]) == 0
    if out.endswith((".csv", ".tsv", ".csv.gz")):
        back = pd.read_csv(tmp_path / out, sep="\t" if ".tsv" in out else ",", dtype=str, keep_default_na=False)
        assert list(back["id"]) == ["W-1", "W-2", "W-3"] and back["status"].tolist()[2] == "rejected"
    elif out.endswith(".parquet"):
        assert pq.read_table(tmp_path / out).num_rows == 3
    elif out.endswith(".sdf"):
        assert (tmp_path / out).read_text().count("$$$$") == 3
    else:
        assert all(i in (tmp_path / out).read_text() for i in ("W-1", "W-2", "W-3"))


def test_odd_typed_input_columns_to_standard_output(tmp_path: Path, capsysbinary: pytest.CaptureFixture) -> None:
    from halosift.cli import main

    source = tmp_path / "odd.parquet"
    _odd_typed_library(source)
    assert main(["screen", str(source), "-o", "-", "--out-format", "csv", "--no-cache"]) == 0
    text = capsysbinary.readouterr().out.decode()
    assert "W-1" in text and "W-3" in text and "Traceback" not in text
