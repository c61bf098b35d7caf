"""Partial libraries while perceiving: they grow chunk by chunk, agree with the whole, and a cancel keeps them cached."""

from __future__ import annotations

import threading
from dataclasses import replace

import numpy as np
import pandas as pd
import pytest
from halosift.engine import parallel
from halosift.engine.cache import PerceptionCache
from halosift.engine.library import PENDING

from halosift import engine

#: Invented supplier rows: alkanes, arenes, an alkene, a duplicate, a heteroatom and a broken SMILES.
SMILES = ["CCC", "CC(C)C", "Cc1ccccc1", "C1CCCCC1", "CC1=CCCCC1", "CCC", "O", "CCCC", "C(C)(C)C",
          "CCc1ccccc1", "not smiles", "CCC(C)CC", "C1CC1C", "CC(C)Cc1ccccc1", "CCCCCC", "C=CCC"]


def frame() -> pd.DataFrame:
    return pd.DataFrame({"id": [f"WS-{i:04d}" for i in range(len(SMILES))], "smiles": SMILES})


def fresh(library: engine.Library) -> engine.Library:
    """The same library with every memo dropped (summaries worked out again from its perception)."""
    return replace(library, _summaries={}, _parts={}, _details={})


@pytest.fixture
def small_chunks(monkeypatch: pytest.MonkeyPatch) -> list[list[str]]:
    """Chunks of 3 strings, perceived in this process; returns the list of chunks perceived."""
    calls: list[list[str]] = []
    real = parallel.perceive

    def counting(chunk, *args, **kwargs):
        calls.append(list(chunk))
        return real(chunk, *args, **kwargs)

    monkeypatch.setattr(parallel, "CHUNK", 3)
    monkeypatch.setattr(parallel, "perceive", counting)
    return calls


def test_partial_libraries_grow_and_agree_with_the_whole(small_chunks, tmp_path) -> None:
    conditions = engine.Conditions()
    seen: list[pd.DataFrame] = []

    def partial(library: engine.Library) -> None:
        assert library.partial
        result = library.evaluate(conditions)
        # Summaries carried over from the partial before (only new chunks weighed) equal a full weighing.
        pd.testing.assert_frame_equal(result, fresh(library).evaluate(conditions))
        seen.append(result)

    whole = engine.load_library(frame(), cache_folder=tmp_path, partial=partial, partial_interval=0.0, workers=1)
    final = whole.evaluate(conditions)
    assert not whole.partial
    pd.testing.assert_frame_equal(final, engine.load_library(frame(), use_cache=False, workers=1).evaluate(conditions))
    n_keys = len(set(SMILES))
    assert len(seen) == -(-n_keys // 3)  # one per chunk, with no wait between deliveries
    pending = [int((r["status"] == PENDING).sum()) for r in seen]
    assert pending == sorted(pending, reverse=True) and pending[0] > 0
    for result in seen:
        assert len(result) == len(SMILES)  # every input row, perceived or not
        done = (result["status"] != PENDING).to_numpy()
        pd.testing.assert_frame_equal(result[done], final[done])  # a perceived row is final at once
        assert (result.loc[~done, "reason"] == "not perceived yet").all()


def test_cancel_keeps_perceived_chunks_and_the_next_screen_resumes(small_chunks, tmp_path) -> None:
    cancel = threading.Event()
    partials: list[int] = []

    def partial(library: engine.Library) -> None:
        partials.append(int((library.evaluate()["status"] != PENDING).sum()))
        if len(partials) == 2:
            cancel.set()

    with pytest.raises(engine.Cancelled):
        engine.load_library(frame(), cache_folder=tmp_path, partial=partial, partial_interval=0.0, cancel=cancel,
                            workers=1)
    done = [s for chunk in small_chunks for s in chunk]
    assert len(done) == 6  # two chunks of three, then the cancel
    keys = list(dict.fromkeys(SMILES))
    hit, _ = PerceptionCache(tmp_path).lookup(keys)
    assert sorted(np.array(keys)[hit]) == sorted(done)  # what was perceived is cached

    small_chunks.clear()
    first: list[int] = []
    whole = engine.load_library(frame(), cache_folder=tmp_path, workers=1, partial_interval=0.0,
                                partial=lambda lib: first.append(int((lib.evaluate()["status"] != PENDING).sum())))
    again = [s for chunk in small_chunks for s in chunk]
    assert sorted(again) == sorted(set(keys) - set(done))  # only the rest is perceived
    assert first[0] == sum(s in done for s in SMILES)  # the cached rows come at once, before any perceiving
    final = whole.evaluate()
    assert (final["status"] != PENDING).all()
    pd.testing.assert_frame_equal(final, engine.load_library(frame(), use_cache=False, workers=1).evaluate())


def test_first_tasks_are_small_when_results_are_taken_as_they_come() -> None:
    bounds = parallel.chunk_bounds(21_800, 2, parallel.FIRST_CHUNK)
    assert [b - a for a, b in bounds[:2]] == [parallel.FIRST_CHUNK] * 2
    assert bounds[0][0] == 0 and bounds[-1][1] == 21_800
    assert all(a == b for (_, a), (b, _) in zip(bounds, bounds[1:]))  # contiguous, nothing lost
    assert parallel.chunk_bounds(21_800, 2) == parallel.chunk_bounds(21_800, 2, 0)


def _own_niceness() -> int:
    import os

    return os.nice(0)


@pytest.mark.skipif(not hasattr(__import__("os"), "nice"), reason="no process priorities here")
@pytest.mark.parametrize("background", [False, True])
def test_background_workers_run_at_a_lower_priority(background: bool) -> None:
    """An interactive caller's workers yield the CPU to its interface (the app asks for this)."""
    import os

    ours = os.nice(0)
    with parallel.worker_pool(1, background=background) as pool:
        theirs = pool.submit(_own_niceness).result(timeout=60)
    expected = min(19, ours + parallel.BACKGROUND_NICE) if background else ours
    assert theirs == expected
