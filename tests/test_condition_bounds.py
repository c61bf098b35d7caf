"""Conditions.validate refuses condensed-phase temperatures no one runs and a solution in 0 M solvent."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest
from halosift.engine import Conditions
from halosift.engine.parameters import MAX_LIQUID_TEMP_C, MAX_NBS_TEMP_C

ROOT = Path(__file__).resolve().parent.parent


@pytest.mark.parametrize(
    ("conditions", "words"),
    [
        (Conditions(cl2_temp_c=1000.0), "neat liquid"),
        (Conditions(cl2_temp_c=MAX_LIQUID_TEMP_C.value + 1), "neat liquid"),
        (Conditions(cl2_temp_c=300.0, cl2_phase="solution", cl2_solvent="benzene", cl2_solvent_molar=4.0), "solution"),
        (Conditions(so2cl2_temp_c=MAX_LIQUID_TEMP_C.value + 1), "SO2Cl2"),
        (Conditions(nbs_temp_c=MAX_NBS_TEMP_C.value + 1), "NBS"),
        (Conditions(cl2_phase="solution", cl2_solvent="benzene", cl2_solvent_molar=0.0), "above 0 M"),
    ],
)
def test_refused_with_a_one_line_reason(conditions: Conditions, words: str) -> None:
    with pytest.raises(ValueError, match=words) as info:
        conditions.validate()
    assert "\n" not in str(info.value)


@pytest.mark.parametrize(
    "conditions",
    [
        Conditions(cl2_temp_c=1000.0, cl2_phase="gas"),
        Conditions(cl2_temp_c=MAX_LIQUID_TEMP_C.value),
        Conditions(br2_temp_c=450.0),  # Br2 substitution of a C=C substrate is vapour-phase: high range kept
        Conditions(nbs_temp_c=MAX_NBS_TEMP_C.value),
        Conditions(cl2_phase="solution", cl2_solvent="benzene", cl2_solvent_molar=0.5),
        Conditions(cl2_phase="liquid", cl2_solvent="benzene", cl2_solvent_molar=0.0),  # Russell's neat point
    ],
)
def test_accepted(conditions: Conditions) -> None:
    conditions.validate()


@pytest.mark.parametrize(
    "args",
    [["--temp", "cl2=1000"], ["--solvent", "benzene=0", "--phase", "solution"]],
)
def test_cli_refuses_in_one_line_with_exit_2(args: list[str]) -> None:
    run = subprocess.run([sys.executable, "-m", "halosift", "explain", "CCC", *args], capture_output=True,
                         text=True, cwd=ROOT, env={"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin"})
    assert run.returncode == 2
    assert len(run.stderr.strip().splitlines()) == 1 and "Traceback" not in run.stderr
