"""Faults a screen must survive: a damaged or unusable cache, signals, a dead parent, too many workers.

Every answer after a fault is compared with a run that never touches the cache;
every process a screen starts must be gone after it is signalled or killed.
"""

from __future__ import annotations

import importlib.util
import os
import signal
import subprocess
import sys
import textwrap
import time
from collections.abc import Iterator
from pathlib import Path
from types import ModuleType

import pandas as pd
import pytest

import engine
from engine import parallel
from engine.cores import capped_workers, usable_cores
from halosift.cli import main

ROOT = Path(__file__).resolve().parents[1]
#: Distinct structures in the signalled screens: enough for worker processes and for minutes of work.
SIGNAL_ROWS = 20_000
#: Upper bound on every wait in this file, so a regression fails instead of hanging.
WAIT_S = 60.0


def _library_gen() -> ModuleType:
    """benchmarks/library_gen.py, imported by path (benchmarks is not an installed package)."""
    path = ROOT / "benchmarks" / "library_gen.py"
    spec = importlib.util.spec_from_file_location("fault_library_gen", path)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up here
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def big_library(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A CSV of SIGNAL_ROWS distinct generated hydrocarbons (invented Wrenfield IDs)."""
    smiles = _library_gen().make_library(SIGNAL_ROWS, seed=7)
    path = tmp_path_factory.mktemp("big") / "wrenfield_bulk.csv"
    pd.DataFrame({"id": [f"WS-B{i:05d}" for i in range(len(smiles))], "smiles": smiles}).to_csv(path, index=False)
    return path


# ---------------------------------------------------------------- processes


def _stat(pid: int) -> tuple[str, int, int] | None:
    """(state, parent pid, session id) of a live process from /proc, or None once it is gone or a zombie."""
    try:
        text = Path(f"/proc/{pid}/stat").read_text()
    except OSError:
        return None
    fields = text[text.rindex(")") + 2:].split()
    if fields[0] in ("Z", "X"):
        return None  # dead, waiting to be reaped
    return fields[0], int(fields[1]), int(fields[3])


def _session(sid: int) -> list[int]:
    """Live processes of session ``sid`` (a screen started as its own session leader, and all it started)."""
    pids = []
    for entry in Path("/proc").iterdir():
        if entry.name.isdigit():
            st = _stat(int(entry.name))
            if st is not None and st[2] == sid:
                pids.append(int(entry.name))
    return pids


def _wait_for(condition, timeout: float = WAIT_S, step: float = 0.1) -> bool:
    """Poll ``condition`` until it is true or ``timeout`` seconds have passed."""
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if condition():
            return True
        time.sleep(step)
    return bool(condition())


def _kill_all(pids: list[int]) -> None:
    """Clean up after a failed check: SIGKILL the given processes (all started by this test)."""
    for pid in pids:
        try:
            os.kill(pid, signal.SIGKILL)
        except OSError:
            pass


needs_proc = pytest.mark.skipif(not Path("/proc/self/stat").exists(), reason="needs /proc to see child processes")
needs_two_cores = pytest.mark.skipif(usable_cores() < 2, reason="worker processes start only with 2+ usable cores")


def _env(cache: Path) -> dict[str, str]:
    return {**os.environ, "HALOSIFT_CACHE_DIR": str(cache), "PYTHONPATH": str(ROOT)}


@needs_proc
@needs_two_cores
@pytest.mark.parametrize("signum", [signal.SIGTERM, signal.SIGHUP, signal.SIGKILL], ids=lambda s: s.name)
def test_signalled_screen_leaves_no_process_and_no_temp_file(
    tmp_path: Path, big_library: Path, signum: signal.Signals
) -> None:
    out = tmp_path / "out" / "screened.csv"
    out.parent.mkdir()
    out.write_text("old result\n")
    cache = tmp_path / "cache"
    # stderr to a file, not a pipe: a left-over worker holding a pipe open must not stall the test.
    err_file = (tmp_path / "stderr.txt").open("w")
    proc = subprocess.Popen(
        [sys.executable, "-m", "halosift", "screen", str(big_library), "-o", str(out), "--force", "--quiet",
         "--workers", "2"],
        cwd=ROOT, env=_env(cache), stdout=subprocess.DEVNULL, stderr=err_file,
        start_new_session=True,  # its own session: everything it starts can be found by session id
    )
    err_file.close()
    seen: list[int] = []
    try:
        # Wait until a worker process runs, then give it a moment to be busy perceiving.
        assert _wait_for(lambda: len(_session(proc.pid)) >= 2), "no worker process started"
        time.sleep(1.0)
        seen = _session(proc.pid)
        assert proc.poll() is None, "the screen finished before it could be signalled"
        os.kill(proc.pid, signum)
        proc.wait(timeout=WAIT_S)
        assert _wait_for(lambda: not _session(proc.pid), timeout=20), f"left behind: {_session(proc.pid)}"
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait(timeout=WAIT_S)
        _kill_all(_session(proc.pid) + seen)
    err = (tmp_path / "stderr.txt").read_text()
    if signum == signal.SIGKILL:
        assert proc.returncode == -signal.SIGKILL
    else:
        assert proc.returncode == 128 + signum
        assert "Traceback" not in err
        assert err.strip().splitlines()[-1] == f"halosift: stopped by {signum.name}"
    assert out.read_text() == "old result\n"
    assert sorted(p.name for p in out.parent.iterdir()) == ["screened.csv"]
    assert not [p for p in cache.rglob("*") if p.is_file() and p.name.startswith(".")]


_STUCK_WORKER = """
import os, sys, time
from engine.parallel import worker_pool

def big(n):
    return b"x" * n

if __name__ == "__main__":
    with worker_pool(1) as pool:
        print(pool.submit(os.getpid).result(), flush=True)
        pool.submit(big, 200_000_000)  # far more than a pipe holds
        time.sleep(0.5)
        os.kill(os.getpid(), 9)  # the parent dies; nobody reads the result
"""


@needs_proc
def test_worker_blocked_on_a_result_dies_with_its_parent(tmp_path: Path) -> None:
    script = tmp_path / "stuck_worker.py"
    script.write_text(_STUCK_WORKER)
    pid_file = tmp_path / "worker.pid"
    with pid_file.open("w") as sink:
        proc = subprocess.Popen([sys.executable, str(script)], cwd=ROOT, env=_env(tmp_path / "cache"),
                                stdout=sink, stderr=subprocess.DEVNULL, start_new_session=True)
    worker = 0
    try:
        proc.wait(timeout=WAIT_S)
        worker = int(pid_file.read_text())
        assert proc.returncode == -signal.SIGKILL
        assert _wait_for(lambda: _stat(worker) is None, timeout=20), "the worker outlived its parent"
        assert _wait_for(lambda: not _session(proc.pid), timeout=20), f"left behind: {_session(proc.pid)}"
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait(timeout=WAIT_S)
        _kill_all(_session(proc.pid) + ([worker] if worker else []))


_SIGNAL_IN_WRITE = """
import os, signal, sys, time
from pathlib import Path
from engine.io.atomic import atomic_path
from halosift.cli import _stop_on_signals

out = Path(sys.argv[1])
try:
    with _stop_on_signals():
        with atomic_path(out) as temp:
            temp.write_text("half a new result")
            os.kill(os.getpid(), int(sys.argv[2]))
            time.sleep(30)
except KeyboardInterrupt:
    sys.exit(3)
"""


@pytest.mark.parametrize("signum", [signal.SIGTERM, signal.SIGHUP, signal.SIGINT], ids=lambda s: s.name)
def test_signal_during_a_write_removes_the_temp_file(tmp_path: Path, signum: signal.Signals) -> None:
    script = tmp_path / "write.py"
    script.write_text(_SIGNAL_IN_WRITE)
    folder = tmp_path / "out"
    folder.mkdir()
    (folder / "result.csv").write_text("old result\n")
    done = subprocess.run([sys.executable, str(script), str(folder / "result.csv"), str(int(signum))],
                          cwd=ROOT, env=_env(tmp_path / "cache"), capture_output=True, text=True, timeout=WAIT_S)
    assert done.returncode == 3, done.stderr
    assert sorted(p.name for p in folder.iterdir()) == ["result.csv"]
    assert (folder / "result.csv").read_text() == "old result\n"


def test_ignored_hangup_stays_ignored() -> None:
    """nohup's SIG_IGN is respected: a batch run started under nohup must survive the hang-up."""
    from halosift.cli import _stop_on_signals

    old = signal.signal(signal.SIGHUP, signal.SIG_IGN)
    try:
        with _stop_on_signals():
            assert signal.getsignal(signal.SIGHUP) is signal.SIG_IGN
            assert signal.getsignal(signal.SIGTERM) not in (signal.SIG_DFL, signal.SIG_IGN)
        assert signal.getsignal(signal.SIGTERM) is not None
    finally:
        signal.signal(signal.SIGHUP, old)


def test_next_write_removes_temp_files_of_killed_runs(tmp_path: Path) -> None:
    """A SIGKILL leaves a temp file no handler can remove; the next write into the folder does, once it is old."""
    src = tmp_path / "few.csv"
    pd.DataFrame({"smiles": ["CCC", "CC(C)C"]}).to_csv(src, index=False)
    out_dir = tmp_path / "out"
    out_dir.mkdir()
    old = out_dir / ".screened.csv.0badf00d.halosift-tmp"
    live = out_dir / ".other.parquet.1234abcd.halosift-tmp"  # a concurrent write still in progress
    mine = out_dir / ".notes.txt.tmp"  # not ours: never touched
    for path in (old, live, mine):
        path.write_text("partial")
    hour_ago = time.time() - 3600
    os.utime(old, (hour_ago, hour_ago))
    os.utime(mine, (hour_ago, hour_ago))
    assert main(["screen", str(src), "-o", str(out_dir / "screened.csv"), "--no-cache", "--quiet"]) == 0
    left = {p.name for p in out_dir.iterdir()}
    assert old.name not in left
    assert {live.name, mine.name, "screened.csv"} <= left


# ---------------------------------------------------------------- worker count


def test_worker_count_is_capped_at_usable_cores() -> None:
    cores = usable_cores()
    assert capped_workers(None) == cores
    assert capped_workers(cores + 10) == cores
    assert capped_workers(1) == 1
    assert capped_workers(0) == 1


def test_perception_starts_no_more_processes_than_cores(monkeypatch: pytest.MonkeyPatch) -> None:
    started: list[int] = []

    class Enough(Exception):
        pass

    def fake_pool(processes: int):
        started.append(processes)
        raise Enough()

    monkeypatch.setattr(parallel, "worker_pool", fake_pool)
    monkeypatch.setattr(parallel, "MIN_PARALLEL", 10)
    monkeypatch.setattr(parallel, "usable_cores", lambda: 2)
    monkeypatch.setattr("engine.cores.usable_cores", lambda: 2)
    with pytest.raises(Enough):
        parallel.perceive_parallel(["CCC"] * 50, workers=12)
    assert started == [2]


def test_cli_notes_a_capped_worker_count(tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    src = tmp_path / "few.csv"
    pd.DataFrame({"smiles": ["CCC", "CC(C)C"]}).to_csv(src, index=False)
    asked = usable_cores() + 10
    assert main(["screen", str(src), "-o", str(tmp_path / "out.csv"), "--no-cache", "--quiet",
                 "--workers", str(asked)]) == 0
    err = capsys.readouterr().err
    assert f"--workers {asked} capped at {usable_cores()}" in err
    assert len([line for line in err.splitlines() if "capped" in line]) == 1
