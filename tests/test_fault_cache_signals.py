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
