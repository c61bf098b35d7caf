"""Conditions.validate refuses condensed-phase temperatures no one runs and a solution in 0 M solvent."""

from __future__ import annotations

import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import pytest
from halosift.engine import Conditions
from halosift.engine.parameters import MAX_LIQUID_TEMP_C, MAX_NBS_TEMP_C

ROOT = Path(__file__).resolve().parent.parent


#: Condition fields no experiment can have, and a word of the one-line reason.
REFUSED = [
    (dict(cl2_temp_c=1000.0), "neat liquid"),
    (dict(cl2_temp_c=MAX_LIQUID_TEMP_C.value + 1), "neat liquid"),
    (dict(cl2_temp_c=300.0, cl2_phase="solution", cl2_solvent="benzene", cl2_solvent_molar=4.0), "solution"),
    (dict(so2cl2_temp_c=MAX_LIQUID_TEMP_C.value + 1), "SO2Cl2"),
    (dict(nbs_temp_c=MAX_NBS_TEMP_C.value + 1), "NBS"),
    (dict(cl2_phase="solution", cl2_solvent="benzene", cl2_solvent_molar=0.0), "above 0 M"),
    (dict(cl2_temp_c=-300.0), "absolute zero"),
    (dict(br2_temp_c=float("nan")), "not a number"),
    (dict(threshold_pct=float("nan")), "percentage"),
    (dict(threshold_pct=101.0), "percentage"),
]


@pytest.mark.parametrize(("fields", "words"), REFUSED)
def test_refused_with_a_one_line_reason(fields: dict, words: str) -> None:
    with pytest.raises(ValueError, match=words) as info:
        Conditions(**fields)
    assert "\n" not in str(info.value)


@pytest.mark.parametrize(("fields", "words"), REFUSED)
def test_no_invalid_condition_can_be_made_so_no_entry_point_weighs_one(fields: dict, words: str) -> None:
    """The class of error: a caller that forgets validate() (explain, summarise, a panel) once weighed 450 °C
    liquid Cl2. Construction and dataclasses.replace refuse, so no path can hold such a condition."""
    with pytest.raises(ValueError, match=words):
        replace(Conditions(), **fields)


@pytest.mark.parametrize(
    "fields",
    [
        dict(cl2_temp_c=1000.0, cl2_phase="gas"),
        dict(cl2_temp_c=MAX_LIQUID_TEMP_C.value),
        dict(br2_temp_c=450.0),  # Br2 substitution of a C=C substrate is vapour-phase: high range kept
        dict(nbs_temp_c=MAX_NBS_TEMP_C.value),
        dict(cl2_phase="solution", cl2_solvent="benzene", cl2_solvent_molar=0.5),
        dict(cl2_phase="liquid", cl2_solvent="benzene", cl2_solvent_molar=0.0),  # Russell's neat point
    ],
)
def test_accepted(fields: dict) -> None:
    Conditions(**fields).validate()


@pytest.mark.parametrize(
    "args",
    [["--temp", "cl2=1000"], ["--solvent", "benzene=0", "--phase", "solution"]],
)
def test_cli_refuses_in_one_line_with_exit_2(args: list[str]) -> None:
    run = subprocess.run([sys.executable, "-m", "halosift", "explain", "CCC", *args], capture_output=True,
                         text=True, cwd=ROOT, env={"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin"})
    assert run.returncode == 2
    assert len(run.stderr.strip().splitlines()) == 1 and "Traceback" not in run.stderr
