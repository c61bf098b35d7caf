"""The README documents what the program actually does."""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

from halosift.engine.library import RESULT_COLUMNS, RESULT_DOCS

README = Path(__file__).resolve().parents[1] / "README.md"


def test_every_result_column_is_documented() -> None:
    text = README.read_text(encoding="utf-8")
    for column in RESULT_COLUMNS:
        assert f"| `{column}` |" in text, column
        assert column in RESULT_DOCS, column


def test_readme_gives_the_two_commands_and_ci_runs_the_test_one() -> None:
    text = README.read_text(encoding="utf-8")
    blocks = re.findall(r"```sh\n(.+?)\n```", text, flags=re.S)
    assert blocks[0].strip() == "python3 -m pip install . && halosift"
    test_command = blocks[1].strip()
    assert "pytest" in test_command
    ci = (README.parent / ".ci" / "run").read_text(encoding="utf-8")
    assert test_command in ci.splitlines()


def test_readme_mentions_safety() -> None:
    text = README.read_text(encoding="utf-8").lower()
    for word in ("toxic", "corrosive", "exothermic", "polyhalogenated", "local codes", "licensed practice", "estimates"):
        assert word in text, word


def test_every_subcommand_has_help() -> None:
    for command in ("explain", "screen", "report", "browse"):
        proc = subprocess.run([sys.executable, "-m", "halosift", command, "--help"], capture_output=True, text=True)
        assert proc.returncode == 0 and "usage" in proc.stdout, command
