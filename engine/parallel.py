"""The unit of parallel work: an Arrow batch of SMILES in, two Arrow batches out.

Worker processes receive plain strings (cheap to send) rather than molecules,
and send back Arrow record batches (cheap to pickle, typed).
"""

from __future__ import annotations

import ctypes
import multiprocessing
import os
import signal
import sys
import threading
import time
from collections.abc import Callable, Iterator, Sequence
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from contextlib import contextmanager

import pyarrow as pa
from halosift.engine.cores import capped_workers, usable_cores
from halosift.engine.nbs import frame_from_rows
from halosift.engine.parameters import DEFAULT_MAX_HEAVY_ATOMS
from halosift.engine.perception import ALLYLIC_SCHEMA, SITE_SCHEMA, STRUCTURE_SCHEMA, Perception, concat, perceive

#: Most strings per task: big enough to amortise the hand-off, small enough for a smooth progress bar.
CHUNK = 2_000
#: Fewest strings per task. Tasks shrink towards the end (each takes a share of
#: what is left, divided by TASKS_PER_WORKER per worker), so the last ones are
#: short and no worker waits long for another to finish.
MIN_CHUNK = 100
TASKS_PER_WORKER = 4
#: Most strings in each worker's first task when the caller takes results as they come (``on_part``):
#: the first rows are on screen within a fraction of a second of the workers starting.
FIRST_CHUNK = 200
#: Below this many strings, process start-up costs more than it saves.
MIN_PARALLEL = 6_000
#: Niceness added to worker processes that serve an interactive caller (``background=True``): the
#: caller's interface then gets a CPU as soon as it wants one, and a lock its own threads hold is not
#: held up by a descheduled thread; idle cores still go to the workers, so a run barely slows.
BACKGROUND_NICE = 10
#: Seconds between a worker's checks that the process that started it is still alive.
PARENT_CHECK_S = 0.5
#: Seconds to wait for terminated workers before killing them outright.
STOP_GRACE_S = 2.0


class Cancelled(Exception):
    """Raised when a caller's cancel event was set during perception."""


def _start_worker(parent: int, nice: int) -> None:
    """Worker initializer: lower this process's priority by ``nice`` (if above 0), then :func:`_die_with_parent`."""
    if nice > 0 and hasattr(os, "nice"):
        try:
            os.nice(nice)
        except OSError:
            pass  # a priority we may not set: the worker runs as it is
    _die_with_parent(parent)


def _die_with_parent(parent: int) -> None:
    """End this process when ``parent`` ends, however it ends.

    Linux delivers SIGKILL on the parent's death (PR_SET_PDEATHSIG), which also
    reaches a worker blocked writing a large result into a pipe nobody reads.
    A daemon thread watching the parent id covers other systems and the race of
    a parent dying before prctl ran. SIGINT is blocked, not merely ignored: a
    Ctrl-C reaches the whole process group, and the parent, which owns the run,
    stops the workers; RDKit installs its own SIGINT handler while embedding,
    and a Ctrl-C caught there would cancel the embedding and change an answer.
    SIGTERM and SIGHUP are unblocked (a parent may have blocked them) so that
    terminating a worker works.
    """
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if hasattr(signal, "pthread_sigmask"):
        signal.pthread_sigmask(signal.SIG_BLOCK, {signal.SIGINT})  # before the watch thread: it inherits the mask
        signal.pthread_sigmask(signal.SIG_UNBLOCK, {getattr(signal, n) for n in ("SIGTERM", "SIGHUP")
                                                    if hasattr(signal, n)})
    if sys.platform.startswith("linux"):
        try:
            pr_set_pdeathsig = 1
            ctypes.CDLL(None, use_errno=True).prctl(pr_set_pdeathsig, int(signal.SIGKILL), 0, 0, 0)
        except (OSError, AttributeError):
            pass  # the watchdog below still ends the worker
    if os.getppid() != parent:
        os._exit(1)

    def watch() -> None:
        while os.getppid() == parent:
            time.sleep(PARENT_CHECK_S)
        os._exit(1)  # no clean-up: the run this worker served is gone

    threading.Thread(target=watch, name="halosift-parent-watch", daemon=True).start()


class _Pool(ProcessPoolExecutor):
    """A process pool whose workers start with SIGINT blocked."""

    def submit(self, fn: Callable[..., object], /, *args: object, **kwargs: object) -> Future:
        """As ProcessPoolExecutor.submit; workers are started in here, and inherit this thread's signal mask.

        Blocking SIGINT in the initializer would be too late: numpy and Arrow
        start threads while the worker imports, and a thread that accepts
        SIGINT lets RDKit's embedding handler catch it.
        """
        if not hasattr(signal, "pthread_sigmask"):
            return super().submit(fn, *args, **kwargs)
        old = signal.pthread_sigmask(signal.SIG_BLOCK, {signal.SIGINT})
        try:
            return super().submit(fn, *args, **kwargs)
        finally:
            signal.pthread_sigmask(signal.SIG_SETMASK, old)


@contextmanager
def worker_pool(processes: int, background: bool = False) -> Iterator[ProcessPoolExecutor]:
    """A process pool whose workers die with this process and are stopped, not awaited, on any exception.

    ``background``: the workers run at a lower priority (:data:`BACKGROUND_NICE`), for an
    interactive caller whose interface must not wait for them.

    A normal exit waits for the workers as usual. On an exception (a signal
    turned into KeyboardInterrupt, a cancel, an error) the workers are
    terminated at once, so the caller can exit without waiting for queued tasks.
    """
    # spawn, not fork: the caller may be a threaded UI, and forking threads is unsafe.
    ctx = multiprocessing.get_context("spawn")
    pool = _Pool(max_workers=processes, mp_context=ctx, initializer=_start_worker,
                 initargs=(os.getpid(), BACKGROUND_NICE if background else 0))
    try:
        yield pool
    except BaseException:
        _stop(pool)
        raise
    pool.shutdown(wait=True)


def _stop(pool: ProcessPoolExecutor) -> None:
    """Terminate the pool's workers, kill those still alive after :data:`STOP_GRACE_S`, and shut it down."""
    # The executor offers no way to stop running tasks; its process table is the only handle on them.
    processes = list((getattr(pool, "_processes", None) or {}).values())
    for proc in processes:
        try:
            proc.terminate()
        except (OSError, ValueError):
            pass
    deadline = time.monotonic() + STOP_GRACE_S
    for proc in processes:
        try:
            proc.join(max(0.0, deadline - time.monotonic()))
            if proc.is_alive():
                proc.kill()
                proc.join(STOP_GRACE_S)
        except (OSError, ValueError, AssertionError):
            pass
    pool.shutdown(wait=False, cancel_futures=True)


def perceive_batch(
    batch: pa.RecordBatch, max_heavy_atoms: int = DEFAULT_MAX_HEAVY_ATOMS, detail: bool = True
) -> tuple[pa.RecordBatch, pa.RecordBatch, pa.RecordBatch]:
    """Perceive the ``smiles`` column of ``batch`` (``detail``: as :func:`halosift.engine.perception.perceive`).

    Returns (structures, sites, allylic) as record batches with
    :data:`halosift.engine.perception.STRUCTURE_SCHEMA`, :data:`SITE_SCHEMA` and
    :data:`ALLYLIC_SCHEMA`; ``struct`` counts rows of this batch from 0.
    """
    p = perceive(batch.column("smiles").to_pylist(), max_heavy_atoms, detail)
    structures = pa.RecordBatch.from_pandas(p.structures, schema=STRUCTURE_SCHEMA, preserve_index=False)
    sites = pa.RecordBatch.from_pandas(p.sites, schema=SITE_SCHEMA, preserve_index=False)
    allylic = pa.RecordBatch.from_pandas(p.allylic, schema=ALLYLIC_SCHEMA, preserve_index=False)
    return structures, sites, allylic


def _from_batches(structures: pa.RecordBatch, sites: pa.RecordBatch, allylic: pa.RecordBatch) -> Perception:
    return Perception(structures.to_pandas(), sites.to_pandas(), frame_from_rows(allylic.to_pandas()))


def chunk_bounds(total: int, workers: int, first: int = 0) -> list[tuple[int, int]]:
    """(start, stop) of each task: up to :data:`CHUNK` strings, shrinking towards the end.

    One worker gets full-size tasks. With more, each task takes what is left
    divided by ``workers`` × :data:`TASKS_PER_WORKER` (at least
    :data:`MIN_CHUNK`, at most :data:`CHUNK`). ``first`` > 0: each worker's
    first task holds at most that many strings.
    """
    bounds: list[tuple[int, int]] = []
    start = 0
    while start < total:
        if workers > 1:
            size = max(MIN_CHUNK, -(-(total - start) // (workers * TASKS_PER_WORKER)))
        else:
            size = CHUNK
        size = max(1, min(size, CHUNK))  # a test may shrink CHUNK below MIN_CHUNK
        if first > 0 and len(bounds) < max(1, workers):
            size = min(size, first)
        bounds.append((start, min(start + size, total)))
        start += size
    return bounds


def default_workers() -> int:
    """Worker count when none is asked for: every core this process may use."""
    return usable_cores()


def perceive_parallel(
    smiles: Sequence[str | None],
    *,
    workers: int | None = None,
    max_heavy_atoms: int = DEFAULT_MAX_HEAVY_ATOMS,
    progress: Callable[[int, int], None] | None = None,
    cancel: threading.Event | None = None,
    detail: bool = True,
    caller_helps: bool = False,
    on_part: Callable[[int, Perception], None] | None = None,
    background: bool = False,
) -> Perception:
    """Perceive many strings, in worker processes when it pays; order is kept.

    ``detail=False`` works out product SMILES and stereo only where a major
    product can come from (see :func:`halosift.engine.perception.perceive`).
    ``caller_helps``: the calling thread perceives chunks itself between
    collecting results, so ``workers`` counts it and one process fewer is
    started (one interpreter and import fewer). For batch runs only: in an
    interactive app the calling process must stay free for the interface.
    ``on_part(start, part)``: called from this thread as each task's perception
    arrives (in any order), ``start`` being the position of its first string
    in ``smiles``; the first tasks are then small (:data:`FIRST_CHUNK`).
    ``background``: worker processes run at a lower priority (see :func:`worker_pool`).
    """
    total = len(smiles)
    workers = capped_workers(workers)
    bounds = chunk_bounds(total, workers, FIRST_CHUNK if on_part is not None else 0)
    chunks = [list(smiles[start:stop]) for start, stop in bounds]
    parts: list[Perception | None] = [None] * len(chunks)
    done = 0
    if progress:
        progress(0, total)
    if workers == 1 or total < MIN_PARALLEL:
        for i, chunk in enumerate(chunks):
            if cancel is not None and cancel.is_set():
                raise Cancelled()
            parts[i] = part = perceive(chunk, max_heavy_atoms, detail)
            done += len(chunk)
            if on_part:
                on_part(bounds[i][0], part)
            if progress:
                progress(done, total)
        return concat([p for p in parts if p is not None])

    processes = workers - 1 if caller_helps else workers
    with worker_pool(processes, background) as pool:
        pending: dict[Future, int] = {}
        next_chunk = 0  # chunks from next_chunk on are not handed out yet

        def submit() -> None:
            nonlocal next_chunk
            batch = pa.record_batch([pa.array(chunks[next_chunk], type=pa.string())], names=["smiles"])
            pending[pool.submit(perceive_batch, batch, max_heavy_atoms, detail)] = next_chunk
            next_chunk += 1

        def record(i: int, part: Perception) -> None:
            nonlocal done
            parts[i] = part
            done += len(chunks[i])
            if on_part:
                on_part(bounds[i][0], part)
            if progress:
                progress(done, total)

        # Keep a bounded number of tasks in flight so memory stays flat.
        while next_chunk < len(chunks) and len(pending) < 2 * processes:
            submit()
        while pending or next_chunk < len(chunks):
            if cancel is not None and cancel.is_set():
                raise Cancelled()  # worker_pool stops the workers
            timeout = 0.2
            if caller_helps and next_chunk < len(chunks):
                # The caller takes the next task in line too, so the short ones stay for last.
                mine = next_chunk
                next_chunk += 1
                record(mine, perceive(chunks[mine], max_heavy_atoms, detail))
                timeout = 0.0
            finished, _ = wait(pending, timeout=timeout, return_when=FIRST_COMPLETED) if pending else (set(), set())
            for fut in finished:
                i = pending.pop(fut)
                record(i, _from_batches(*fut.result()))
                if next_chunk < len(chunks):
                    submit()
    return concat([p for p in parts if p is not None])
