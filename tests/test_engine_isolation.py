"""The engine is pure computation: importing it pulls in no UI library."""

from __future__ import annotations

import subprocess
import sys


def test_engine_imports_without_textual_or_rich(tmp_path) -> None:
    code = (
        "import sys, halosift.engine as engine, halosift.engine.library, halosift.engine.io; "
        "engine.explain('CCC'); "
        "bad = [m for m in ('textual', 'rich') if m in sys.modules]; "
        "print(bad); sys.exit(1 if bad else 0)"
    )
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120, cwd=tmp_path)
    assert proc.returncode == 0, proc.stdout + proc.stderr
