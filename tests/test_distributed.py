"""Screening on a Dask cluster (a local 2-worker cluster here) gives the local screen's DataFrame, row for row."""

from __future__ import annotations

import importlib.util
import sys
import warnings
from pathlib import Path

import pandas as pd
import pytest

distributed = pytest.importorskip("distributed")
dd = pytest.importorskip("dask.dataframe")

from halosift.engine import distributed as hs_dask  # noqa: E402

import halosift as hs  # noqa: E402
from halosift.cli import main  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
#: Distinct generated structures: enough for several perceive_batch tasks on two workers.
ROWS = 360


def _library_gen():  # type: ignore[no-untyped-def]
    path = ROOT / "benchmarks" / "library_gen.py"
    spec = importlib.util.spec_from_file_location("dask_library_gen", path)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def frame() -> pd.DataFrame:
    smiles = list(_library_gen().make_library(ROWS, seed=5))
    # Rows every output must keep, each with its reason: unparsable, empty, not a hydrocarbon, a repeat.
    smiles[7:7] = ["bad(", None, "CCO", smiles[0], ""]
    return pd.DataFrame({"id": [f"WS-D{i:04d}" for i in range(len(smiles))], "smiles": smiles,
                         "price_eur": [float(i % 17) for i in range(len(smiles))]})


@pytest.fixture(scope="module")
def client():  # type: ignore[no-untyped-def]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # Dask's own start-up notes are not under test
        cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None)
        with distributed.Client(cluster) as c:
            yield c
        cluster.close()


def test_cluster_screen_is_the_local_screen(frame: pd.DataFrame, client, tmp_path: Path) -> None:
    local = hs.screen(frame, use_cache=False)
    assert (local["status"] == "rejected").sum() >= 3
    with distributed.get_task_stream(client) as stream:
        remote = hs.screen(dd.from_pandas(frame, npartitions=4), use_cache=False, dask=client)
    pd.testing.assert_frame_equal(remote, local)
    ran = [t for t in stream.data if "perceive_batch" in t["key"]]
    assert len(ran) >= 3 and len({t["worker"] for t in ran}) == 2  # really perceived there, on both workers


def test_cluster_screen_uses_and_fills_the_cache(frame: pd.DataFrame, client, tmp_path: Path) -> None:
    local = hs.screen(frame, use_cache=False)
    half = frame.iloc[: len(frame) // 2]
    hs.screen(half, cache_folder=tmp_path)  # half of it screened before, locally
    with distributed.get_task_stream(client) as stream:
        remote = hs.screen(frame, cache_folder=tmp_path, dask=client)
    pd.testing.assert_frame_equal(remote, local)
    assert [t for t in stream.data if "perceive_batch" in t["key"]]  # the other half went to the cluster
    with distributed.get_task_stream(client) as stream:
        again = hs.screen(dd.from_pandas(frame, npartitions=3), cache_folder=tmp_path, dask=client)
    pd.testing.assert_frame_equal(again, local)
    assert not [t for t in stream.data if "perceive_batch" in t["key"]]  # every structure came from the cache


def test_dask_frame_uses_its_own_client(frame: pd.DataFrame, client) -> None:
    with distributed.get_task_stream(client) as stream:
        remote = hs.screen(dd.from_pandas(frame, npartitions=2), use_cache=False)
    pd.testing.assert_frame_equal(remote, hs.screen(frame, use_cache=False))
    assert [t for t in stream.data if "perceive_batch" in t["key"]]


@pytest.mark.parametrize("address", ["tcp://127.0.0.1:1", "local:0", "local:two", "two words"])
def test_bad_address_is_one_line(address: str, tmp_path: Path, capsys, monkeypatch) -> None:
    monkeypatch.setattr(hs_dask, "CONNECT_TIMEOUT_S", 1)
    src = tmp_path / "lib.csv"
    pd.DataFrame({"id": ["WS-1"], "smiles": ["CCCC"]}).to_csv(src, index=False)
    out = tmp_path / "out.csv"
    assert main(["screen", str(src), "-o", str(out), "--dask", address, "--quiet", "--no-cache"]) == 2
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1 and err.startswith("halosift: ") and "Traceback" not in err
    assert not out.exists()


def test_cli_local_cluster_writes_the_local_result(frame: pd.DataFrame, tmp_path: Path) -> None:
    src = tmp_path / "lib.csv"
    frame.to_csv(src, index=False)
    plain, spread = tmp_path / "plain.csv", tmp_path / "spread.csv"
    assert main(["screen", str(src), "-o", str(plain), "--quiet", "--no-cache"]) == 0
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        assert main(["screen", str(src), "-o", str(spread), "--quiet", "--no-cache", "--dask", "local:2"]) == 0
    assert spread.read_bytes() == plain.read_bytes()


def test_plain_screens_never_import_dask(tmp_path: Path) -> None:
    import subprocess

    code = ("import sys, pandas as pd, halosift as hs; hs.screen(pd.DataFrame({'smiles': ['CCC']}), use_cache=False);"
            "from halosift.cli import build_parser; build_parser();"
            "print([m for m in sys.modules if m.split('.')[0] in ('dask', 'distributed')])")
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True,
                         env={"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin", "HALOSIFT_CACHE_DIR": str(tmp_path)})
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "[]"


def test_stopping_a_cluster_screen_cancels_its_tasks_and_keeps_the_client(frame: pd.DataFrame, client) -> None:
    """A cancel during a cluster screen raises Cancelled at once, leaves no task of it running, and the
    same client screens again afterwards to the local answer."""
    import threading
    import time

    from halosift.engine.parallel import Cancelled

    cancel = threading.Event()

    def progress(done: int, total: int) -> None:
        cancel.set()  # the chemist presses Esc as soon as anything is reported

    before = set(client.who_has())
    with pytest.raises(Cancelled):
        hs.load_library(frame, use_cache=False, dask=client, cancel=cancel, progress=progress)
    def running() -> list[str]:
        return [str(k) for keys in client.processing().values() for k in keys if "perceive_batch" in str(k)]

    deadline = time.monotonic() + 30
    while running() and time.monotonic() < deadline:
        time.sleep(0.1)
    assert not running()
    assert not [k for k in set(client.who_has()) - before if "perceive_batch" in str(k)]  # no results kept there
    again = hs.screen(frame, use_cache=False, dask=client)
    pd.testing.assert_frame_equal(again, hs.screen(frame, use_cache=False))
