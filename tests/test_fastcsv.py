"""The Arrow fast path for CSV/TSV gives exactly what the careful reader gives, and declines what it must."""

from __future__ import annotations

import gzip
import random
from pathlib import Path

import halosift.engine.io.delimited as delimited
import pandas as pd
import pytest
from halosift.engine.io import open_library
from halosift.engine.io.fastcsv import read_fast
from halosift.engine.io.source import concat_batches


def _batches(path: Path, monkeypatch: pytest.MonkeyPatch, careful: bool, batch_rows: int = 7) -> list:
    with monkeypatch.context() as patch:
        if careful:
            patch.setattr(delimited, "read_fast", lambda data, delimiter: None)
        source = open_library(path)
        return [source, list(source.iter_batches(batch_rows))]


def _same(path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    (fast_source, fast), (careful_source, careful) = (
        _batches(path, monkeypatch, careful=False),
        _batches(path, monkeypatch, careful=True),
    )
    assert fast_source.columns == careful_source.columns
    assert fast_source.smiles_column == careful_source.smiles_column
    assert fast_source.id_column == careful_source.id_column
    assert len(fast) == len(careful)
    for a, b in zip(fast, careful):
        assert a.start_row == b.start_row
        assert a.smiles == b.smiles
        assert a.row_errors == b.row_errors
        pd.testing.assert_frame_equal(a.frame, b.frame)
    pd.testing.assert_frame_equal(
        concat_batches(fast_source, fast).frame, concat_batches(careful_source, careful).frame
    )


CLEAN_FILES = {
    "plain": "id,smiles\nW-1,CCC\nW-2,CC(C)C\n",
    "crlf and bom": "\ufeffid,smiles\r\nW-1,CCC\r\nW-2, C1CCCCC1 \r\n",
    "blank lines and no final newline": "\n\nsmiles,id,mass\nCCC,W-1,44.1\n\nCC,W-2,\n\nC,W-3,16",
    "repeated and blank header names": "smiles,id,id,,note\nCCC,a,b,c,d\nCC,e,f,g,h\n",
    "empty smiles and NA text": "id,smiles\nNA,\nW-2,CCCC\nnull,NA\n",
    "semicolons": "id;smiles\nW-1;CCC\nW-2;CC\n",
    "one column": "smiles\nCCC\n\nCC\n   \n",
    "unicode names": "id,smiles,name\nW-1,CCC,propane – gas\nW-2,CC,éthane\n",
    "numbers that settle": "id,smiles,mass,count\nW-1,CCC,44.1,3\nW-2,CC,30.07,2\n",
}


@pytest.mark.parametrize("text", CLEAN_FILES.values(), ids=CLEAN_FILES.keys())
def test_fast_path_takes_clean_files_and_matches_careful_reader(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, text: str
) -> None:
    path = tmp_path / "lib.csv"
    path.write_text(text, encoding="utf-8", newline="")
    delimiter = ";" if "semicolons" in text or ";" in text.splitlines()[0] else ","
    assert read_fast(path.read_bytes(), delimiter) is not None
    _same(path, monkeypatch)


DAMAGED_FILES = {
    "quoted field": b'id,smiles\n"W,1",CCC\n',
    "stray quote": b'id,smiles\nW-1,CC"C\nW-2,CC\n',
    "ragged row": b"id,smiles\nW-1,CCC,extra\nW-2,CC\n",
    "short row": b"id,smiles\nW-1\nW-2,CC\n",
    "undecodable byte": b"id,smiles\nW-\xe91,CCC\nW-2,CC\n",
    "lone carriage return": b"id,smiles\rW-1,CCC\rW-2,CC\r",
    "whitespace header": b"   \nid,smiles\nW-1,CCC\n",
}


@pytest.mark.parametrize("data", DAMAGED_FILES.values(), ids=DAMAGED_FILES.keys())
def test_fast_path_declines_what_only_the_careful_reader_can_account_for(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, data: bytes
) -> None:
    assert read_fast(data, ",") is None
    path = tmp_path / "lib.csv"
    path.write_bytes(data)
    if data.startswith(b"   "):  # the careful reader takes the blank-looking line as the header
        with pytest.raises(delimited.LibraryError, match="no SMILES column"):
            open_library(path)
        return
    _same(path, monkeypatch)  # the careful reader both times: every row still accounted for


def test_fast_path_matches_careful_reader_on_a_generated_tsv_gz(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    rng = random.Random(11)
    lines = ["catalogue_id\tsmiles\tprice"]
    for i in range(3000):
        smiles = "C" * rng.randrange(1, 9) + rng.choice(["", "(C)C", "1CC1", " "])
        lines.append(f"WS-{i:05d}\t{smiles}\t{rng.choice(['', '12.5', 'n/a', '7'])}")
        if rng.random() < 0.01:
            lines.append("")
    path = tmp_path / "lib.tsv.gz"
    path.write_bytes(gzip.compress(("\n".join(lines) + "\n").encode()))
    assert read_fast(gzip.decompress(path.read_bytes()), "\t") is not None
    _same(path, monkeypatch)


def test_header_without_rows_is_still_a_whole_file_error(tmp_path: Path) -> None:
    path = tmp_path / "lib.csv"
    path.write_text("id,smiles\n\n")
    with pytest.raises(delimited.LibraryError, match="header line but no rows"):
        open_library(path)


def test_a_csv_is_opened_once(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    path = tmp_path / "lib.csv"
    path.write_text("id,smiles\nW-1,CCC\nW-2,CC\n")
    opened: list[str] = []
    real_open = open

    def counting_open(file, *args, **kwargs):  # type: ignore[no-untyped-def]
        if str(file) == str(path):
            opened.append(str(file))
        return real_open(file, *args, **kwargs)

    monkeypatch.setattr("builtins.open", counting_open)
    source = delimited.open_delimited(path, "csv", False, None, None)
    for _ in source.iter_batches():
        pass
    assert len(opened) == 1
