"""Faults a screen must survive: a damaged or unusable cache, signals, a dead parent, too many workers.

Every answer after a fault is compared with a run that never touches the cache;
every process a screen starts must be gone after it is signalled or killed.
"""

from __future__ import annotations

import importlib.util
import os
import random
import shutil
import signal
import subprocess
import sys
import time
import warnings
from pathlib import Path
from types import ModuleType

import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq
import pytest
from halosift.engine import cache as cache_mod
from halosift.engine import parallel
from halosift.engine.cache import CacheWarning, PerceptionCache
from halosift.engine.cores import capped_workers, usable_cores

from halosift import engine
from halosift.cli import main

ROOT = Path(__file__).resolve().parents[1]
#: Distinct structures in the signalled screens: enough for worker processes and for minutes of work.
SIGNAL_ROWS = 20_000
#: Upper bound on every wait in this file, so a regression fails instead of hanging.
WAIT_S = 60.0


@pytest.fixture(autouse=True, scope="module")
def _signals_not_ignored():
    """The processes these tests signal must not inherit an ignored SIGINT or SIGHUP.

    A shell starts a background job (``cmd &``, ``nohup``) with them ignored, an ignored
    signal stays ignored across exec, and halosift rightly leaves an ignored signal
    ignored: run that way, every child here would shrug the signal off and finish.
    Handled (not ignored) here, they reach each child as the default action.
    """
    changed = {}
    for signum in (signal.SIGINT, signal.SIGHUP, signal.SIGTERM):
        if signal.getsignal(signum) is signal.SIG_IGN:
            changed[signum] = signal.SIG_IGN
            signal.signal(signum, signal.default_int_handler if signum == signal.SIGINT else signal.SIG_DFL)
    yield
    for signum, old in changed.items():
        signal.signal(signum, old)


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


# ---------------------------------------------------------------- the cache

#: Distinct structures in the cache checks: a few of every kind the generator makes, quick to screen.
CACHE_ROWS = 80


@pytest.fixture(scope="module")
def frame() -> pd.DataFrame:
    smiles = _library_gen().make_library(CACHE_ROWS, seed=11)
    return pd.DataFrame({"id": [f"WS-C{i:04d}" for i in range(len(smiles))], "smiles": smiles})


@pytest.fixture(scope="module")
def reference(frame: pd.DataFrame) -> pd.DataFrame:
    """The answer of a run that never touches a cache."""
    return engine.screen(frame, use_cache=False)


def _manifests(root: Path) -> list[Path]:
    return sorted(root.rglob("*.manifest.json"))


def _data_files(root: Path) -> list[Path]:
    return sorted(root.rglob("*.parquet"))


def _screen_noting(frame: pd.DataFrame, root: Path) -> tuple[pd.DataFrame, list[str]]:
    """Screen through the cache in ``root``; the answer and the cache's notes."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        result = engine.screen(frame, cache_folder=root)
    return result, [str(w.message) for w in caught if issubclass(w.category, CacheWarning)]


def _flip(path: Path, seed: int, n: int = 3) -> None:
    data = bytearray(path.read_bytes())
    rng = random.Random(seed)
    for _ in range(n):
        i = rng.randrange(len(data))
        data[i] ^= 1 << rng.randrange(8)
    path.write_bytes(bytes(data))


def _truncate(path: Path, seed: int) -> None:
    path.write_bytes(path.read_bytes()[: len(path.read_bytes()) // 2])


def _other_schema(path: Path, seed: int) -> None:
    pq.write_table(pa.table({"smiles": ["CCC", "CC"], "score": [1.0, 2.0]}), path)


def _garbage(path: Path, seed: int) -> None:
    path.write_bytes(b"\x00not what was written\x00")


def _remove(path: Path, seed: int) -> None:
    path.unlink()


DAMAGE = {"flip3": _flip, "truncate": _truncate, "other_schema": _other_schema, "garbage": _garbage,
          "missing": _remove}


CASES = [("flip3", "structures"), ("flip3", "sites"), ("flip3", "allylic"), ("flip3", "manifest"),
         ("truncate", "structures"), ("truncate", "sites"), ("other_schema", "structures"),
         ("other_schema", "allylic"), ("garbage", "manifest"), ("garbage", "sites"), ("missing", "allylic"),
         ("missing", "manifest")]


@pytest.mark.parametrize(("damage", "part"), CASES, ids=[f"{d}-{p}" for d, p in CASES])
def test_damaged_entry_is_a_miss_rebuilt_once_and_removed(
    tmp_path: Path, frame: pd.DataFrame, reference: pd.DataFrame, damage: str, part: str
) -> None:
    root = tmp_path / "cache"
    pd.testing.assert_frame_equal(engine.screen(frame, cache_folder=root), reference)
    (manifest,) = _manifests(root)
    target = manifest if part == "manifest" else manifest.with_name(manifest.name.replace("manifest.json",
                                                                                          f"{part}.parquet"))
    DAMAGE[damage](target, seed=len(damage) * 7 + len(part))
    result, notes = _screen_noting(frame, root)
    pd.testing.assert_frame_equal(result, reference)
    if damage == "missing" and part == "manifest":
        # Data without a manifest may be a write in progress: a miss now, removed once it is old.
        assert notes == [] and len(_data_files(root)) == 6
        hour_ago = time.time() - 3600
        for path in _data_files(root):
            if not path.name.startswith(_manifests(root)[0].name[:32]):
                os.utime(path, (hour_ago, hour_ago))
        _screen_noting(frame, root)
    else:
        assert len(notes) == 1 and "damaged" in notes[0]
    # The damaged shard is gone and one new one holds the rebuilt entries.
    (rebuilt,) = _manifests(root)
    assert rebuilt != manifest and len(_data_files(root)) == 3
    result, notes = _screen_noting(frame, root)
    pd.testing.assert_frame_equal(result, reference)
    assert notes == [] and _manifests(root) == [rebuilt]


def test_flipped_bytes_never_change_an_answer(tmp_path: Path, frame: pd.DataFrame, reference: pd.DataFrame) -> None:
    """Many random three-byte flips anywhere in a shard: every answer stays the cache-free one."""
    root = tmp_path / "cache"
    engine.screen(frame, cache_folder=root)
    (manifest,) = _manifests(root)
    folder = manifest.parent
    pristine = {p.name: p.read_bytes() for p in folder.iterdir()}
    for seed in range(8):
        for path in folder.iterdir():
            path.unlink()
        for name, data in pristine.items():
            (folder / name).write_bytes(data)
        _flip(folder / sorted(pristine)[seed % len(pristine)], seed)
        result, notes = _screen_noting(frame, root)
        pd.testing.assert_frame_equal(result, reference)
        assert len(notes) == 1


def test_shard_count_stays_bounded(tmp_path: Path, frame: pd.DataFrame, reference: pd.DataFrame,
                                   monkeypatch: pytest.MonkeyPatch) -> None:
    """Growing libraries and a truncated shard now and then: compaction keeps the shard count bounded."""
    monkeypatch.setattr(cache_mod, "MAX_SHARDS", 3)
    root = tmp_path / "cache"
    step = len(frame) // 12
    for run in range(1, 13):
        part = frame.iloc[: run * step].reset_index(drop=True)
        result, _ = _screen_noting(part, root)
        pd.testing.assert_frame_equal(result, reference.iloc[: run * step].reset_index(drop=True))
        assert 1 <= len(_manifests(root)) <= 3
        if run % 4 == 0:
            _truncate(sorted(_data_files(root))[0], run)
    result, _ = _screen_noting(frame.iloc[: 12 * step], root)
    assert len(_manifests(root)) <= 3
    assert len(_data_files(root)) == 3 * len(_manifests(root))


def test_size_limit_drops_least_recently_used(tmp_path: Path, frame: pd.DataFrame, reference: pd.DataFrame,
                                              monkeypatch: pytest.MonkeyPatch) -> None:
    root = tmp_path / "cache"
    half = len(frame) // 2
    first, second = frame.iloc[:half].reset_index(drop=True), frame.iloc[half:].reset_index(drop=True)
    engine.screen(first, cache_folder=root)
    (old,) = _manifests(root)
    one_shard = sum(p.stat().st_size for p in old.parent.iterdir())
    monkeypatch.setattr(cache_mod, "MAX_BYTES", int(one_shard * 1.5))
    past = time.time() - 60
    os.utime(old, (past, past))
    engine.screen(second, cache_folder=root)
    (kept,) = _manifests(root)
    assert kept != old and not old.exists()
    assert sum(p.stat().st_size for p in kept.parent.iterdir()) <= cache_mod.MAX_BYTES
    hit, _ = PerceptionCache(root).lookup(list(second["smiles"]))
    assert hit.all()
    pd.testing.assert_frame_equal(engine.screen(second, cache_folder=root),
                                  reference.iloc[half:].reset_index(drop=True))


def test_leftovers_of_killed_runs_and_old_engines_are_removed(tmp_path: Path, frame: pd.DataFrame) -> None:
    root = tmp_path / "cache"
    engine.screen(frame.iloc[:10], cache_folder=root)
    (manifest,) = _manifests(root)
    folder = manifest.parent
    old, fresh = time.time() - 3600, time.time()
    left = {
        ".0123abcd.structures.parquet.5e5e5e5e.tmp": old,  # a write killed an hour ago
        ".0123abcd.sites.parquet.tmp": old,  # an earlier layout's temp name
        ".4567cdef.manifest.json.77777777.tmp": fresh,  # a concurrent write in progress
        "89abcdef0123.sites.parquet": old,  # data whose manifest was never written
    }
    for name, when in left.items():
        (folder / name).write_bytes(b"partial")
        os.utime(folder / name, (when, when))
    stale = root / "perception-0123456789abcdef"  # an older engine (and layout), unused for days
    stale.mkdir()
    (stale / "a.structures.parquet").write_bytes(b"old")
    days = time.time() - 3 * 86400
    os.utime(stale, (days, days))
    recent = root / "perception-2-fedcba9876543210"  # another version, in use today
    recent.mkdir()
    unrelated = root / "notes"  # not the cache's: never touched
    unrelated.mkdir()
    os.utime(unrelated, (days, days))
    engine.screen(frame.iloc[:10], cache_folder=root)
    assert sorted(p.name for p in folder.iterdir() if p.name.startswith(".") or ".manifest" not in p.name) == sorted(
        [".4567cdef.manifest.json.77777777.tmp", *(p.name for p in folder.glob(f"{manifest.name[:32]}.*.parquet"))]
    )
    assert not stale.exists() and recent.is_dir() and unrelated.is_dir()


def test_cache_path_is_a_file(tmp_path: Path, frame: pd.DataFrame, reference: pd.DataFrame,
                              capsys: pytest.CaptureFixture, monkeypatch: pytest.MonkeyPatch) -> None:
    blocker = tmp_path / "cache"
    blocker.write_text("a file where the cache folder should be")
    monkeypatch.setenv("HALOSIFT_CACHE_DIR", str(blocker))
    src = tmp_path / "lib.csv"
    frame.to_csv(src, index=False)
    out = tmp_path / "out.csv"
    assert main(["screen", str(src), "-o", str(out), "--quiet"]) == 0
    err = capsys.readouterr().err
    assert "Traceback" not in err
    notes = [line for line in err.splitlines() if line.startswith("halosift: note: perception cache")]
    assert len(notes) == 1 and len(err.strip().splitlines()) == 1
    assert blocker.read_text() == "a file where the cache folder should be"
    pd.testing.assert_frame_equal(engine.screen(frame, use_cache=False), reference)
    assert pd.read_csv(out)["verdict"].tolist() == reference["verdict"].tolist()


def _make_read_only(folder: Path) -> str | None:
    """Make ``folder`` refuse new and removed entries; how it was done ('chattr' or 'chmod'), None if impossible."""
    if os.geteuid() != 0:
        folder.chmod(0o555)
        return "chmod"
    if shutil.which("chattr") and subprocess.run(["chattr", "+i", str(folder)], capture_output=True).returncode == 0:
        try:
            (folder / ".probe").write_text("x")
        except OSError:
            return "chattr"
        (folder / ".probe").unlink()
        subprocess.run(["chattr", "-i", str(folder)], capture_output=True)
    return None  # root without an immutable flag: nothing makes a folder read-only here


def _undo_read_only(folder: Path, how: str | None) -> None:
    if how == "chattr":
        subprocess.run(["chattr", "-i", str(folder)], capture_output=True)
    elif how == "chmod":
        folder.chmod(0o755)


def test_read_only_cache_still_serves_and_is_noted(tmp_path: Path, frame: pd.DataFrame,
                                                    reference: pd.DataFrame) -> None:
    root = tmp_path / "cache"
    half = len(frame) // 2
    engine.screen(frame.iloc[:half], cache_folder=root)
    (manifest,) = _manifests(root)
    _flip(manifest.with_name(manifest.name.replace("manifest.json", "sites.parquet")), 5)  # damage it cannot remove
    folders = [manifest.parent, root]
    done = [(f, _make_read_only(f)) for f in folders]
    try:
        if any(how is None for _, how in done):
            pytest.skip("cannot make a folder read-only for root here (no chattr +i)")
        result, notes = _screen_noting(frame, root)
        pd.testing.assert_frame_equal(result, reference)
        assert any("damaged" in n for n in notes)
        unusable = [n for n in notes if "not used" in n]
        assert len(unusable) == 1 and "cannot write" in unusable[0]
        assert _manifests(root) == [manifest]  # nothing could be added or removed
    finally:
        for folder, how in reversed(done):
            _undo_read_only(folder, how)


def test_no_home_means_no_cache_not_a_stray_folder(tmp_path: Path, frame: pd.DataFrame, reference: pd.DataFrame,
                                                   monkeypatch: pytest.MonkeyPatch) -> None:
    """With no HOME and no password entry, "~" is not expanded: the cache must not land in the working folder."""
    monkeypatch.delenv("HALOSIFT_CACHE_DIR", raising=False)
    monkeypatch.delenv("HOME", raising=False)
    monkeypatch.delenv("XDG_CACHE_HOME", raising=False)
    monkeypatch.setattr(os.path, "expanduser", lambda path: path)  # what a user unknown to the system gets
    monkeypatch.chdir(tmp_path)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        result = engine.screen(frame)
    pd.testing.assert_frame_equal(result, reference)
    notes = [str(w.message) for w in caught if issubclass(w.category, CacheWarning)]
    assert len(notes) == 1 and "HALOSIFT_CACHE_DIR" in notes[0]
    assert list(tmp_path.iterdir()) == []


_SHARER = """
import sys, warnings
import pandas as pd
from halosift import engine
from halosift.engine import cache
from halosift.engine.cache import CacheWarning

cache.MAX_SHARDS = 2  # compact often, so compactions overlap the other screen's reads and writes
warnings.simplefilter("error", CacheWarning)  # any note (a shard seen as damaged) fails the run
pool = pd.read_csv(sys.argv[2])
reference = engine.screen(pool, use_cache=False)
seed = int(sys.argv[3])
for round in range(6):
    rows = pool.sample(frac=0.6, random_state=seed * 100 + round).sort_index()
    got = engine.screen(rows.reset_index(drop=True), cache_folder=sys.argv[1])
    pd.testing.assert_frame_equal(got, reference.loc[rows.index].reset_index(drop=True))
print("ok")
"""


def test_concurrent_screens_share_one_cache(tmp_path: Path, frame: pd.DataFrame) -> None:
    script = tmp_path / "sharer.py"
    script.write_text(_SHARER)
    pool = tmp_path / "pool.csv"
    frame.to_csv(pool, index=False)
    root = tmp_path / "cache"
    procs = [subprocess.Popen([sys.executable, str(script), str(root), str(pool), str(seed)], cwd=ROOT,
                              env=_env(root), stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
             for seed in (1, 2)]
    outs = []
    try:
        for proc in procs:
            outs.append(proc.communicate(timeout=WAIT_S * 2))
    finally:
        for proc in procs:
            if proc.poll() is None:
                proc.kill()
                proc.communicate()
    for proc, (out, err) in zip(procs, outs):
        assert proc.returncode == 0 and out.strip() == "ok", err[-2000:]
    assert len(_manifests(root)) <= 3
    assert not [p for p in root.rglob(".*") if p.is_file()]


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
@pytest.mark.parametrize("signum", [signal.SIGINT, signal.SIGTERM, signal.SIGHUP, signal.SIGKILL],
                         ids=lambda s: s.name)
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
    elif signum == signal.SIGINT:
        assert proc.returncode == 130
        assert err.strip().splitlines()[-1] == "halosift: interrupted"
    else:
        assert proc.returncode == 128 + signum
        assert "Traceback" not in err
        assert err.strip().splitlines()[-1] == f"halosift: stopped by {signum.name}"
    assert out.read_text() == "old result\n"
    assert sorted(p.name for p in out.parent.iterdir()) == ["screened.csv"]
    assert not [p for p in cache.rglob("*") if p.is_file() and p.name.startswith(".")]


_STUCK_WORKER = """
import os, sys, time
from halosift.engine.parallel import worker_pool

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
from halosift.cli import _stop_on_signals

out = Path(sys.argv[1])
try:
    with _stop_on_signals():  # entered before numpy and Arrow start threads, as halosift's main() does
        from halosift.engine.io.atomic import atomic_path

        with atomic_path(out) as temp:
            temp.write_text("half a new result")
            os.kill(os.getpid(), int(sys.argv[2]))
            time.sleep(30)  # the signal must cut this short, as it would a blocking read
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
    started = time.monotonic()
    done = subprocess.run([sys.executable, str(script), str(folder / "result.csv"), str(int(signum))],
                          cwd=ROOT, env=_env(tmp_path / "cache"), capture_output=True, text=True, timeout=WAIT_S)
    assert done.returncode == 3, done.stderr
    assert time.monotonic() - started < 20, "the signal waited for the sleep to end"
    assert sorted(p.name for p in folder.iterdir()) == ["result.csv"]
    assert (folder / "result.csv").read_text() == "old result\n"


#: A cage whose embedding takes tens of milliseconds: a signal sent at random lands inside RDKit.
_EMBED = """
from rdkit import Chem
from rdkit.Chem import rdDistGeom

def embed_for(seconds):
    import time
    mol = Chem.AddHs(Chem.MolFromSmiles("C1CC2CCC3CCC4CCC5CCC6CCC1C1C2C3C4C5C61"))
    params = rdDistGeom.ETKDGv3()
    params.randomSeed = 1
    params.useRandomCoords = True
    params.maxIterations = 200
    out, end = [], time.monotonic() + seconds
    while time.monotonic() < end:
        out.append(rdDistGeom.EmbedMolecule(mol, params))
    return out
"""

_CTRL_C_IN_RDKIT = """
import os, signal, sys, threading
from halosift.cli import _stop_on_signals

try:
    with _stop_on_signals():  # entered before numpy and Arrow start threads, as halosift's main() does
        exec(sys.argv[1])
        threading.Timer(0.5, os.kill, (os.getpid(), signal.SIGINT)).start()
        embed_for(20)
except KeyboardInterrupt:
    sys.exit(3)
sys.exit(0)
"""


def test_ctrl_c_during_an_rdkit_embedding_is_not_lost(tmp_path: Path) -> None:
    """RDKit catches SIGINT itself while embedding; a batch run must still stop on Ctrl-C."""
    script = tmp_path / "ctrl_c.py"
    script.write_text(_CTRL_C_IN_RDKIT)
    started = time.monotonic()
    done = subprocess.run([sys.executable, str(script), _EMBED + "\nimport numpy, pyarrow, engine\n"], cwd=ROOT,
                          env=_env(tmp_path / "cache"), capture_output=True, text=True, timeout=WAIT_S)
    assert done.returncode == 3, done.stderr[-2000:]
    assert time.monotonic() - started < 15


_CTRL_C_IN_WORKER = _EMBED + """
import os, signal, sys, time
from halosift.engine.parallel import worker_pool

if __name__ == "__main__":
    with worker_pool(1) as pool:
        worker = pool.submit(os.getpid).result()
        job = pool.submit(embed_for, 3.0)
        time.sleep(0.5)
        for _ in range(8):  # a terminal's Ctrl-C reaches every process of the group
            os.kill(worker, signal.SIGINT)
            time.sleep(0.2)
        results = job.result(timeout=60)
    print(len(results), sum(r < 0 for r in results))
"""


def test_ctrl_c_reaching_a_worker_cancels_no_embedding(tmp_path: Path) -> None:
    """A worker never lets RDKit see SIGINT: a cancelled embedding would change the stereo answer."""
    script = tmp_path / "worker_ctrl_c.py"
    script.write_text(_CTRL_C_IN_WORKER)
    done = subprocess.run([sys.executable, str(script)], cwd=ROOT, env=_env(tmp_path / "cache"),
                          capture_output=True, text=True, timeout=WAIT_S)
    assert done.returncode == 0, done.stderr[-2000:]
    embedded, cancelled = map(int, done.stdout.split())
    assert embedded > 0 and cancelled == 0


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

    def fake_pool(processes: int, background: bool = False):
        started.append(processes)
        raise Enough()

    monkeypatch.setattr(parallel, "worker_pool", fake_pool)
    monkeypatch.setattr(parallel, "MIN_PARALLEL", 10)
    monkeypatch.setattr(parallel, "usable_cores", lambda: 2)
    monkeypatch.setattr("halosift.engine.cores.usable_cores", lambda: 2)
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
