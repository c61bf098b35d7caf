"""The project's own Python files, for tests that read the source tree.

Walking the whole checkout would also read what an install leaves in it (``pip install .``
writes copies under ``build/``) and any virtual environment kept there, so these walk only
the folders the project writes, plus the top-level scripts.
"""

from __future__ import annotations

from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
#: Folders holding the project's code, tests excluded.
SOURCE_FOLDERS = ("engine", "tui", "halosift", "sample_libraries", "benchmarks")


def python_files(*, with_tests: bool) -> list[Path]:
    """Every ``.py`` file of the project, sorted; the tests' own files only when ``with_tests``."""
    folders = SOURCE_FOLDERS + (("tests",) if with_tests else ())
    found = [p for folder in folders for p in (ROOT / folder).rglob("*.py")]
    return sorted(found + list(ROOT.glob("*.py")))
