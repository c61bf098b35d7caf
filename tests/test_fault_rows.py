"""Row isolation and outputs under attack: what one row, a result file or a second writer can do.

Every library here is invented (Wrenfield Saturates IDs). Each attack goes through the
command line (in process, as tests/test_cli.py does), the Python API and, where it
concerns screening, the app.
"""

from __future__ import annotations

import gzip
import os
import subprocess
import sys
import threading
from collections.abc import Callable
from pathlib import Path

import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq
import pytest

import engine
from halosift.cli import main
from tui_helpers import async_test, settle

REPO = Path(__file__).resolve().parents[1]
#: A 150-carbon comb: within the size limit, but with ~10^22 stereoisomers per product.
COMB = "C" + "C(C)" * 74 + "C"


# ----------------------------------------------------------------- libraries with no modelable row

def _csv(path: Path, text: str) -> None:
    path.write_text(text, encoding="utf-8")


def _write_all_rejected(kind: str, folder: Path) -> tuple[Path, int]:
    """An input file of ``kind`` in which no row can be modelled, and its number of rows."""
    if kind == "csv-heteroatoms":
        path = folder / "wrenfield.csv"
        _csv(path, "id,smiles\nWS-A,CCO\nWS-B,CCN\n")
        return path, 2
    if kind == "csv-empty-cells":
        path = folder / "wrenfield.csv"
        _csv(path, "id,smiles\nWS-A,\nWS-B,  \n")
        return path, 2
    if kind == "csv-latin1":
        path = folder / "wrenfield.csv"
        path.write_bytes(b"id,smiles\nWS-\xe9A,CC\xe9C\nWS-B,C\xe8C\n")
        return path, 2
    if kind == "csv-oversize":
        path = folder / "wrenfield.csv"
        _csv(path, "id,smiles\nWS-BIG," + "C" * 151 + "\n")
        return path, 1
    if kind == "tsv":
        path = folder / "wrenfield.tsv"
        _csv(path, "id\tsmiles\nWS-A\tCCO\nWS-B\tnot a smiles\n")
        return path, 2
    if kind == "csv-gz":
        path = folder / "wrenfield.csv.gz"
        path.write_bytes(gzip.compress(b"id,smiles\nWS-A,CCO\n"))
        return path, 1
    if kind == "parquet":
        path = folder / "wrenfield.parquet"
        pq.write_table(pa.table({"id": ["WS-A", "WS-B"], "smiles": ["CCO", "[Na+].[Cl-]"]}), path)
        return path, 2
    if kind == "parquet-all-null":
        path = folder / "wrenfield.parquet"
        pq.write_table(pa.table({"id": ["WS-A", "WS-B", "WS-C"], "smiles": pa.array([None] * 3, type=pa.string())}), path)
        return path, 3
    if kind == "parquet-null-type":
        path = folder / "wrenfield.parquet"
        pq.write_table(pa.table({"id": ["WS-A", "WS-B"], "smiles": pa.nulls(2)}), path)
        return path, 2
    if kind == "smi":
        path = folder / "wrenfield.smi"
        _csv(path, "CCO WS-A\nC[13CH3] WS-B\n")
        return path, 2
    if kind == "sdf-no-m-end":
        path = folder / "wrenfield.sdf"
        block = "WS-A\n  invented\n\n  1  0  0  0  0  0  0  0  0  0999 V2000\n    0.0000    0.0000    0.0000 C   0  0\n"
        _csv(path, block + "$$$$\n" + block.replace("WS-A", "WS-B") + "$$$$\n")
        return path, 2
    raise AssertionError(kind)


ALL_REJECTED = [
    "csv-heteroatoms", "csv-empty-cells", "csv-latin1", "csv-oversize", "tsv", "csv-gz", "parquet",
    "parquet-all-null", "parquet-null-type", "smi", "sdf-no-m-end",
]


def _all_rejected(result: pd.DataFrame, n_rows: int) -> None:
    assert len(result) == n_rows
    assert (result["status"] == "rejected").all()
    assert result["reason"].astype(str).str.len().gt(0).all()
    assert result["duplicate_of"].isna().all()


@pytest.mark.parametrize("kind", ALL_REJECTED)
def test_all_rejected_library_through_screen(kind: str, tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    source, n_rows = _write_all_rejected(kind, tmp_path)
    for suffix in (".csv", ".parquet"):
        out = tmp_path / f"result{suffix}"
        code = main(["screen", str(source), "-o", str(out), "--no-cache", "--workers", "1"])
        err = capsys.readouterr().err
        assert code == 0, err
        assert "Traceback" not in err and f"rejected {n_rows}" in err
        _all_rejected(pd.read_parquet(out) if suffix == ".parquet" else pd.read_csv(out, keep_default_na=False,
                                                                                       na_values=[""]), n_rows)


@pytest.mark.parametrize("kind", ALL_REJECTED)
def test_all_rejected_library_through_report(kind: str, tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    source, n_rows = _write_all_rejected(kind, tmp_path)
    out = tmp_path / "report.html"
    code = main(["report", str(source), "-o", str(out), "--no-cache", "--workers", "1"])
    err = capsys.readouterr().err
    assert code == 0, err
    assert f"summary of {n_rows} rows" in err
    assert out.read_text(encoding="utf-8").startswith("<!")


@pytest.mark.parametrize("kind", ALL_REJECTED)
def test_all_rejected_library_through_the_api(kind: str, tmp_path: Path) -> None:
    source, n_rows = _write_all_rejected(kind, tmp_path)
    _all_rejected(engine.screen(source, use_cache=False, workers=1), n_rows)
    library = engine.load_library(source, use_cache=False, workers=1)
    _all_rejected(library.evaluate(engine.Conditions(br2_temp_c=60)), n_rows)


@pytest.mark.parametrize(
    "frame",
    [
        pd.DataFrame({"smiles": ["CCO", "O"]}),
        pd.DataFrame({"smiles": [None, None]}),
        pd.DataFrame({"smiles": pd.Series([], dtype=object)}),
    ],
    ids=["heteroatoms", "all-missing", "no-rows"],
)
def test_all_rejected_and_empty_frames_through_the_api(frame: pd.DataFrame) -> None:
    result = engine.screen(frame, use_cache=False, workers=1)
    _all_rejected(result, len(frame))
    assert list(result.columns) == ["smiles", *engine.RESULT_COLUMNS]


@pytest.mark.parametrize("kind", ["csv-heteroatoms", "csv-latin1", "parquet-all-null", "sdf-no-m-end"])
@async_test
async def test_all_rejected_library_in_the_app(kind: str, tmp_path: Path) -> None:
    from tui.app import HalosiftApp
    from tui.table import LibraryTable

    source, n_rows = _write_all_rejected(kind, tmp_path)
    app = HalosiftApp(str(source), use_cache=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot, app)
        assert app.phase == "ready"
        _all_rejected(app.frame, n_rows)
        await pilot.press("v", "v")  # the rejected rows' view lists them all
        await settle(pilot, app)
        assert app.view == "rejected"
        assert len(app.query_one(LibraryTable).rows) == n_rows
