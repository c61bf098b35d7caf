"""Row isolation and outputs under attack: what one row, a result file or a second writer can do.

Every library here is invented (Wrenfield Saturates IDs). Each attack goes through the
command line (in process, as tests/test_cli.py does), the Python API and, where it
concerns screening, the app.
"""

from __future__ import annotations

import csv
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
from tui_helpers import async_test, settle

from halosift import engine
from halosift.cli import main

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
    # The result columns have the types a screen with ok rows gives them, so tables can be joined.
    usual = engine.screen(pd.DataFrame({"smiles": ["CCC", "CC"]}), use_cache=False, workers=1)
    columns = list(engine.RESULT_COLUMNS)
    pd.testing.assert_series_equal(result[columns].dtypes, usual[columns].dtypes)


@pytest.mark.parametrize("kind", ["csv-heteroatoms", "csv-latin1", "parquet-all-null", "sdf-no-m-end"])
@async_test
async def test_all_rejected_library_in_the_app(kind: str, tmp_path: Path) -> None:
    from halosift.tui.app import HalosiftApp
    from halosift.tui.table import LibraryTable

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


# ----------------------------------------------------------------- one row cannot fail its batch

def _comb_library(folder: Path) -> tuple[Path, int]:
    """2,001 rows: small alkanes, with the comb in the middle; returns the path and the comb's row."""
    rows = [(f"WS-{i:04d}", "C" * (1 + i % 9) + "C(C)C" * (i % 3)) for i in range(2000)]
    rows.insert(1000, ("WS-COMB", COMB))
    path = folder / "wrenfield_comb.csv"
    pd.DataFrame(rows, columns=["id", "smiles"]).to_csv(path, index=False)
    return path, 1000


def _comb_isolated(result: pd.DataFrame, comb_row: int) -> None:
    assert len(result) == 2001
    comb = result.iloc[comb_row]
    assert comb["id"] == "WS-COMB"
    # Either a result or a rejection with its reason: never the whole batch's failure.
    assert comb["status"] == "ok" or (comb["status"] == "rejected" and comb["reason"] and "\n" not in comb["reason"])
    others = result.drop(index=result.index[comb_row])
    assert (others["status"] == "ok").all()
    assert others["verdict"].isin(engine.VERDICTS).all()


def test_comb_row_inside_a_batch_through_screen(tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    source, comb_row = _comb_library(tmp_path)
    out = tmp_path / "result.parquet"
    code = main(["screen", str(source), "-o", str(out), "--no-cache", "--workers", "1", "--quiet"])
    assert code == 0, capsys.readouterr().err
    _comb_isolated(pd.read_parquet(out), comb_row)


def test_comb_row_inside_a_batch_through_the_api(tmp_path: Path) -> None:
    source, comb_row = _comb_library(tmp_path)
    _comb_isolated(engine.screen(source, use_cache=False, workers=1), comb_row)


def test_comb_row_in_a_worker_batch() -> None:
    """The worker processes' unit of work turns the comb into typed record batches too."""
    from halosift.engine.parallel import perceive_batch

    batch = pa.record_batch([pa.array(["CCC", COMB, "CC(C)C"], type=pa.string())], names=["smiles"])
    for detail in (False, True):
        structures, sites, _ = perceive_batch(batch, detail=detail)
        status = structures.column("status").to_pylist()
        assert len(status) == 3 and status[0] == status[2] == "ok"
        assert set(sites.column("struct").to_pylist()) >= {0, 2}


def _sabotaged(real: Callable, how: str) -> Callable:
    """``_perceive_one`` that misbehaves for ethane only, in the way ``how`` names."""

    def one(smiles: object, max_heavy: int, detail: bool, *prepared: object):
        srow, rows, nbs = real(smiles, max_heavy, detail, *prepared)
        if smiles != "CC":
            return srow, rows, nbs
        if how == "raises":
            raise RuntimeError("an unforeseen corner\nwith a second line")
        if how == "count-beyond-int64":
            return srow, [(*r[:6], 10**30, *r[7:]) for r in rows], nbs
        if how == "count-beyond-int32":  # the H count column is int32
            return srow, [(*r[:2], 2**40, *r[3:]) for r in rows], nbs
        if how == "product-not-text":
            return srow, [(12345, *r[1:]) for r in rows], nbs
        if how == "bad-structure-row":
            return (*srow[:4], 2**40, *srow[5:]), rows, nbs
        raise AssertionError(how)

    return one


@pytest.mark.parametrize(
    "how", ["raises", "count-beyond-int64", "count-beyond-int32", "product-not-text", "bad-structure-row"]
)
def test_any_misbehaving_row_is_rejected_alone(how: str, monkeypatch: pytest.MonkeyPatch) -> None:
    import halosift.engine.perception as perception

    monkeypatch.setattr(perception, "_perceive_one", _sabotaged(perception._perceive_one, how))
    smiles = ["CCC", "CC(C)C", "CC", "C1CCCCC1", "CCO", "CC", "Cc1ccccc1"] * 3
    frame = pd.DataFrame({"id": [f"WS-{i:03d}" for i in range(len(smiles))], "smiles": smiles})
    result = engine.screen(frame, use_cache=False, workers=1)
    assert len(result) == len(smiles)
    ethane = result["smiles"] == "CC"
    assert (result.loc[ethane, "status"] == "rejected").all()
    reasons = result.loc[ethane, "reason"]
    assert reasons.str.len().gt(0).all() and not reasons.str.contains("\n").any()
    ok = ~ethane & (result["smiles"] != "CCO")
    assert (result.loc[ok, "status"] == "ok").all()
    structures = perception.perceive(smiles, detail=False).structures
    assert set(structures.loc[structures.index[[s == "CC" for s in smiles]], "reason_code"]) == {"internal"}


# ----------------------------------------------------------------- a result screened again

def _supplier_library(folder: Path) -> Path:
    """An invented list with a supplier's own 'status' column, a rejected row and a duplicate."""
    path = folder / "wrenfield.csv"
    pd.DataFrame(
        {
            "id": ["WS-0101", "WS-0102", "WS-0103", "WS-0104", "WS-0105"],
            "smiles": ["CC(C)C", "CCO", "CCC(C)CC", "C(C)(C)C", "C1CCCCC1"],
            "status": ["in stock", "sold out", "in stock", "in stock", "backorder"],
            "pack_g": [5, 10, 25, 5, 100],
        }
    ).to_csv(path, index=False)
    return path


def _read(path: Path) -> pd.DataFrame:
    if path.suffix == ".parquet":
        return pd.read_parquet(path)
    if path.suffix == ".sdf":
        return engine.load_library(path, use_cache=False, workers=1).evaluate()
    return pd.read_csv(path, sep="\t" if path.suffix == ".tsv" else ",")


@pytest.mark.parametrize("suffix", [".parquet", ".csv", ".tsv", ".sdf"])
def test_a_result_screened_again_and_again_keeps_its_columns(
    suffix: str, tmp_path: Path, capsys: pytest.CaptureFixture
) -> None:
    source = _supplier_library(tmp_path)
    outputs = [tmp_path / f"round{i}{suffix}" for i in range(1, 4)]
    for before, after in zip([source, *outputs], outputs):
        code = main(["screen", str(before), "-o", str(after), "--no-cache", "--workers", "1", "--quiet"])
        assert code == 0, capsys.readouterr().err
    rounds = [_read(p) for p in outputs]
    first = rounds[0]
    assert list(first.columns[:4]) == ["id", "smiles", "input_status", "pack_g"]
    assert list(first.columns[4:]) == list(engine.RESULT_COLUMNS)
    assert first["input_status"].tolist()[:2] == ["in stock", "sold out"]
    for later in rounds[1:]:
        assert sorted(later.columns) == sorted(first.columns)
        assert len(set(later.columns)) == len(later.columns)
        pd.testing.assert_frame_equal(later[first.columns], first, check_dtype=suffix != ".sdf")
    assert first.loc[1, "status"] == "rejected" and "oxygen" in first.loc[1, "reason"]


def test_rescreening_a_result_frame_through_the_api_replaces_its_results() -> None:
    frame = pd.DataFrame({"id": ["WS-1", "WS-2"], "smiles": ["CCC", "CC"]})
    first = engine.screen(frame, use_cache=False, workers=1)
    library = engine.load_library(first, use_cache=False, workers=1)
    assert set(library.replaced) == set(engine.RESULT_COLUMNS) - {"smiles"}
    again = library.evaluate()
    assert list(again.columns) == list(first.columns)
    pd.testing.assert_frame_equal(again, first)


def test_input_columns_named_like_results_stay_distinct() -> None:
    # Not an earlier result (no reason/duplicate_of columns): both are the supplier's own.
    frame = pd.DataFrame({"smiles": ["CCC"], "status": ["in stock"], "input_status": ["checked"]})
    result = engine.screen(frame, use_cache=False, workers=1)
    assert len(set(result.columns)) == len(result.columns)
    assert result["input_status"].tolist() == ["checked"]
    assert result["input_status_2"].tolist() == ["in stock"]
    assert result["status"].tolist() == ["ok"]


def test_parquet_with_repeated_column_names_is_one_line(tmp_path: Path) -> None:
    path = tmp_path / "twice.parquet"
    pq.write_table(pa.Table.from_arrays([pa.array(["CC"]), pa.array(["CCC"])], names=["smiles", "smiles"]), path)
    proc = subprocess.run(
        [sys.executable, "-m", "halosift", "screen", str(path), "-o", str(tmp_path / "out.csv"), "--no-cache"],
        capture_output=True, text=True, timeout=120, cwd=REPO,
    )
    assert proc.returncode == 2
    assert proc.stderr.strip().count("\n") == 0 and "repeated column names: smiles" in proc.stderr


@async_test
async def test_the_app_shows_a_suppliers_status_column_under_its_result_name(tmp_path: Path) -> None:
    from halosift.tui.app import HalosiftApp
    from halosift.tui.table import LibraryTable

    app = HalosiftApp(str(_supplier_library(tmp_path)), use_cache=False)
    async with app.run_test(size=(160, 40)) as pilot:
        await settle(pilot, app)
        await pilot.press("c")
        await settle(pilot, app)
        keys = [c.key for c in app.query_one(LibraryTable).columns]
        assert "input_status" in keys and "status" not in keys
        assert app.frame["input_status"].tolist()[1] == "sold out"


# ----------------------------------------------------------------- two runs making the same new file

def _result_frame(tag: str) -> pd.DataFrame:
    frame = pd.DataFrame({"id": [f"WS-{tag}-1", f"WS-{tag}-2"], "smiles": ["CCC", "CC(C)C"]})
    return engine.screen(frame, use_cache=False, workers=1)


WRITERS = {".csv": "write_delimited", ".tsv.gz": "write_delimited", ".parquet": "write_parquet", ".sdf": "write_sdf"}


@pytest.mark.parametrize("links", [True, False], ids=["hard-links", "no-hard-links"])
@pytest.mark.parametrize("suffix", list(WRITERS))
def test_two_writers_of_one_new_file_one_is_refused(
    suffix: str, links: bool, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    import halosift.engine.io.writers as writers

    if not links:  # a file system without hard links (some network and FAT mounts)

        def no_link(*args, **kwargs):
            raise PermissionError(1, "Operation not permitted")

        monkeypatch.setattr(os, "link", no_link)

    target = tmp_path / f"shortlist{suffix}"
    real = getattr(writers, WRITERS[suffix])
    both_past_the_check = threading.Barrier(2, timeout=30)

    def held(*args, **kwargs):
        both_past_the_check.wait()  # each run has checked that the file is absent, and is now writing it
        return real(*args, **kwargs)

    monkeypatch.setattr(writers, WRITERS[suffix], held)
    outcomes: dict[str, object] = {}

    def run(tag: str) -> None:
        try:
            outcomes[tag] = writers.write_table(_result_frame(tag), target, metadata={"run": tag})
        except engine.LibraryError as exc:
            outcomes[tag] = exc

    threads = [threading.Thread(target=run, args=(tag,)) for tag in ("A", "B")]
    for t in threads:
        t.start()
    for t in threads:
        t.join(60)
    refused = [tag for tag, v in outcomes.items() if isinstance(v, engine.LibraryError)]
    assert len(outcomes) == 2 and len(refused) == 1, outcomes
    message = str(outcomes[refused[0]])
    assert message == f"{target} exists; use --force to replace it"
    winner = "B" if refused == ["A"] else "A"
    if suffix != ".sdf":
        written = pd.read_parquet(target) if suffix == ".parquet" else pd.read_csv(target, sep=None, engine="python")
        assert written["id"].tolist() == [f"WS-{winner}-1", f"WS-{winner}-2"]
    if suffix in (".csv", ".tsv.gz"):
        assert engine.io.about_path(target).read_text(encoding="utf-8").startswith(f"halosift_run: {winner}\n")
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".halosift-tmp")]


def _another_writer_meanwhile(monkeypatch: pytest.MonkeyPatch, target: Path) -> None:
    """Make the target appear (another run finishing first) while this run writes its file."""
    import halosift.engine.io.writers as writers

    real = writers.write_parquet

    def racing(frame, temp, meta):
        target.write_text("the other run's file\n", encoding="utf-8")
        return real(frame, temp, meta)

    monkeypatch.setattr(writers, "write_parquet", racing)


def test_screen_refuses_an_output_made_meanwhile(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                                 capsys: pytest.CaptureFixture) -> None:
    source = _supplier_library(tmp_path)
    target = tmp_path / "result.parquet"
    _another_writer_meanwhile(monkeypatch, target)
    code = main(["screen", str(source), "-o", str(target), "--no-cache", "--workers", "1"])
    err = capsys.readouterr().err
    assert code == 2
    assert err.strip().splitlines()[-1] == f"halosift: {target} exists; use --force to replace it"
    assert "wrote" not in err
    assert target.read_text(encoding="utf-8") == "the other run's file\n"


def test_screen_with_force_replaces_an_output_made_meanwhile(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                                             capsys: pytest.CaptureFixture) -> None:
    source = _supplier_library(tmp_path)
    target = tmp_path / "result.parquet"
    _another_writer_meanwhile(monkeypatch, target)
    assert main(["screen", str(source), "-o", str(target), "--no-cache", "--workers", "1", "--force"]) == 0
    assert len(pd.read_parquet(target)) == 5


def test_report_refuses_an_output_made_meanwhile(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    from halosift.report import write_report

    target = tmp_path / "report.html"
    real = Path.write_text

    def racing(self: Path, text: str, *args, **kwargs):
        if self.name.endswith(".halosift-tmp"):
            real(target, "the other run's report\n")
        return real(self, text, *args, **kwargs)

    monkeypatch.setattr(Path, "write_text", racing)
    with pytest.raises(engine.LibraryError, match="exists; use --force"):
        write_report("<!doctype html><p>mine</p>", target)
    assert target.read_text() == "the other run's report\n"


# ----------------------------------------------------------------- spreadsheet formulas in text outputs

FORMULA_IDS = ['=HYPERLINK("http://example.invalid","WS-1")', "+WS-2", "-WS-3", "@WS-4", "\tWS-5", "\r=WS-6", "WS-7"]


def _formula_library(folder: Path) -> Path:
    path = folder / "wrenfield_formulas.csv"
    columns = {
        "id": FORMULA_IDS,
        "smiles": ["CCC", "CC(C)C", "C1CCCCC1", "CCCC", "CC", "CCC(C)C", "CCO"],
        "price_eur": ["-3.5", "12.0", "-0.25", "4.0", "0.001", "-7.0", "2.0"],  # a numeric column: stays numbers
        "note": ["-3.5", "+4", "=1+1", "-", "ok", "@home", "-2e3"],  # text, with numbers among it
        "=total": [str(i) for i in range(1, 8)],
    }
    with open(path, "w", encoding="utf-8", newline="") as handle:
        # CRLF line ends, so the csv writer quotes the cell holding a bare CR.
        writer = csv.writer(handle, lineterminator="\r\n")
        writer.writerow(columns)
        writer.writerows(zip(*columns.values()))
    return path


def _defused(value: str) -> str:
    return "'" + value


@pytest.mark.parametrize("suffix", [".csv", ".tsv", ".csv.gz"])
def test_text_outputs_defuse_formula_cells(suffix: str, tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    source = _formula_library(tmp_path)
    out = tmp_path / f"result{suffix}"
    assert main(["screen", str(source), "-o", str(out), "--no-cache", "--workers", "1", "--quiet"]) == 0
    written = pd.read_csv(out, sep="\t" if ".tsv" in suffix else ",", dtype=str, keep_default_na=False)
    assert list(written.columns[:5]) == ["id", "smiles", "price_eur", "note", "'=total"]
    assert written["id"].tolist() == [_defused(v) for v in FORMULA_IDS[:6]] + ["WS-7"]
    assert written["price_eur"].tolist() == ["-3.5", "12.0", "-0.25", "4.0", "0.001", "-7.0", "2.0"]
    assert written["note"].tolist() == ["-3.5", "+4", "'=1+1", "'-", "ok", "'@home", "-2e3"]
    assert written["smiles"].tolist()[:3] == ["CCC", "CC(C)C", "C1CCCCC1"]
    assert "formula" in engine.io.about_path(out).read_text(encoding="utf-8")
    # The bare CR in one ID is quoted, so the result reads back with its seven rows.
    again = engine.load_library(out, use_cache=False, workers=1)
    assert len(again) == 7 and (again.read_errors == "").all()


@pytest.mark.parametrize("suffix", [".parquet", ".sdf"])
def test_parquet_and_sdf_keep_raw_values(suffix: str, tmp_path: Path) -> None:
    source = _formula_library(tmp_path)
    out = tmp_path / f"result{suffix}"
    assert main(["screen", str(source), "-o", str(out), "--no-cache", "--workers", "1", "--quiet"]) == 0
    if suffix == ".parquet":
        written = pd.read_parquet(out)
        assert written["id"].tolist() == FORMULA_IDS and "=total" in written.columns
    else:
        text = out.read_text(encoding="utf-8")
        assert ">  <note>\n=1+1\n" in text and ">  <id>\n@WS-4\n" in text
        assert "'=" not in text and "'@" not in text


# ----------------------------------------------------------------- inputs that are not regular files

@pytest.fixture
def fifo(tmp_path: Path):
    """A named pipe called like a library; nothing writes to it, so reading it would wait for ever.

    A watchdog opens its write end after a few seconds and closes it again, so a reader
    stuck on it gets end-of-file: a test of a broken guard fails instead of hanging.
    """
    if not hasattr(os, "mkfifo"):
        pytest.skip("no named pipes on this system")
    path = tmp_path / "wrenfield_pipe.csv"
    os.mkfifo(path)
    done = threading.Event()

    def watchdog() -> None:
        if done.wait(5):
            return
        while not done.is_set():
            try:
                os.close(os.open(path, os.O_WRONLY | os.O_NONBLOCK))
            except OSError:  # no reader yet
                pass
            done.wait(0.05)

    thread = threading.Thread(target=watchdog, daemon=True)
    thread.start()
    yield path
    done.set()
    thread.join(5)


def _halosift(*args: str, timeout: float = 30) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "halosift", *args], capture_output=True, text=True,
                          timeout=timeout, cwd=REPO)


@pytest.mark.parametrize("command", ["screen", "report", "browse"])
def test_a_named_pipe_as_input_is_one_line(command: str, fifo: Path, tmp_path: Path) -> None:
    args = [command, str(fifo)]
    if command != "browse":
        args += ["-o", str(tmp_path / ("out.html" if command == "report" else "out.csv")), "--no-cache"]
    proc = _halosift(*args)
    assert proc.returncode == 2
    assert proc.stderr == f"halosift: {fifo} is a named pipe (FIFO), not a regular file; save the library to a file first\n"


def test_a_named_pipe_as_id_list_is_one_line(fifo: Path, tmp_path: Path) -> None:
    source = _supplier_library(tmp_path)
    proc = _halosift("report", str(source), "-o", str(tmp_path / "r.html"), "--ids", str(fifo), "--no-cache")
    assert proc.returncode == 2
    assert proc.stderr.strip() == f"halosift: ID list {fifo} is a named pipe (FIFO), not a regular file"


def test_a_device_as_input_is_one_line(tmp_path: Path) -> None:
    if not Path("/dev/zero").exists():
        pytest.skip("no /dev/zero")
    link = tmp_path / "endless.csv"  # a name with a library's extension, pointing at a device that never ends
    link.symlink_to("/dev/zero")
    proc = _halosift("screen", str(link), "-o", str(tmp_path / "out.csv"), "--no-cache")
    assert proc.returncode == 2
    assert proc.stderr.strip().endswith("is a device, not a regular file; save the library to a file first")


def test_a_named_pipe_through_the_api(fifo: Path) -> None:
    with pytest.raises(engine.LibraryError, match=r"named pipe \(FIFO\), not a regular file"):
        engine.screen(fifo, use_cache=False, workers=1)


@async_test
async def test_a_named_pipe_in_the_app(fifo: Path) -> None:
    from halosift.tui.app import HalosiftApp

    app = HalosiftApp(str(fifo), use_cache=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot, app)
        assert app.phase == "stopped"
        content = app.query_one("#counts").content
        message = getattr(content, "plain", content)
        assert message == f"Cannot open {fifo.name}: {fifo} is a named pipe (FIFO), not a regular file; " \
            "save the library to a file first"


@async_test
async def test_the_app_shows_an_input_smiles_column_named_like_a_result(tmp_path: Path) -> None:
    from halosift.tui.app import HalosiftApp
    from halosift.tui.table import LibraryTable

    frame = pd.DataFrame({"id": ["WS-0201", "WS-0202"], "canonical_smiles": ["CCO", "CC(C)C"]})
    app = HalosiftApp(frame, use_cache=False)
    async with app.run_test(size=(160, 40)) as pilot:
        await settle(pilot, app)
        await pilot.press("v", "v")  # the rejected rows, whose result canonical_smiles is empty
        await settle(pilot, app)
        table = app.query_one(LibraryTable)
        smiles = next(c for c in table.columns if c.label == "SMILES")
        assert smiles.key == "input_canonical_smiles"
        assert app.frame.iloc[table.rows][smiles.key].tolist() == ["CCO"]


@pytest.mark.parametrize("force", [False, True])
def test_a_named_pipe_as_output_is_never_replaced(force: bool, fifo: Path, tmp_path: Path) -> None:
    target = fifo.with_name("result_pipe.csv")
    os.mkfifo(target)
    source = _supplier_library(tmp_path)
    proc = _halosift("screen", str(source), "-o", str(target), "--no-cache", *(["--force"] if force else []))
    assert proc.returncode == 2
    assert proc.stderr == f"halosift: cannot write {target}: it is a named pipe (FIFO), not a regular file\n"
    assert target.is_fifo()


def test_an_orbit_count_that_fails_rejects_only_its_structure(monkeypatch: pytest.MonkeyPatch) -> None:
    # The batch gathers every structure's orbit counts into one call; when that call fails, each
    # structure is counted on its own, so only the one whose count fails is rejected.
    import halosift.engine.perception as perception

    smiles = ["CCC(C)CC", "CCCCCC(C)C", "CC(C)CC(C)C", "CC1CCC(C)C1", "CCCC(C)C"]
    expected = perception.perceive(smiles, detail=False)
    real = perception.resolve_pending

    def failing(pending: list) -> list:
        if any(p.job.n_substrate == 8 for p in pending):  # 2-methylheptane, the only 8-carbon input
            raise RuntimeError("an unforeseen corner\nof the counts")
        return real(pending)

    monkeypatch.setattr(perception, "resolve_pending", failing)
    got = perception.perceive(smiles, detail=False)
    assert list(got.structures["status"]) == ["ok", "rejected", "ok", "ok", "ok"]
    assert got.structures.loc[1, "reason_code"] == "internal" and "\n" not in got.structures.loc[1, "reason"]
    for i in (0, 2, 3, 4):
        mine = got.sites[got.sites["struct"] == i].reset_index(drop=True)
        theirs = expected.sites[expected.sites["struct"] == i].reset_index(drop=True)
        pd.testing.assert_frame_equal(mine, theirs)
    assert (got.sites["stereo"] != "").any()  # the counts that did run filled their rows
