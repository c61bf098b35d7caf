"""One import name: halosift, with the engine, the app and the sample catalogue as its subpackages."""

from __future__ import annotations

import ast
import json
import subprocess
import sys
from pathlib import Path

import pytest
from project_files import ROOT, python_files

tomllib = pytest.importorskip("tomllib")  # Python 3.11+

OLD_TOP_LEVEL = ("engine", "tui", "sample_libraries")


def _imported_names(path: Path) -> list[str]:
    names: list[str] = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            names += [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
            names.append(node.module)
    return names


def test_no_source_file_imports_a_folder_as_a_top_level_module() -> None:
    offenders = []
    for path in python_files(with_tests=True):
        for name in _imported_names(path):
            if name.split(".")[0] in OLD_TOP_LEVEL:
                offenders.append(f"{path.relative_to(ROOT)}: {name}")
    assert not offenders, offenders


def test_packaging_installs_only_the_halosift_name() -> None:
    config = tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]
    assert {p.split(".")[0] for p in config["packages"]} == {"halosift"}
    for package, folder in config["package-dir"].items():
        assert (ROOT / folder / "__init__.py").is_file(), (package, folder)
    assert (ROOT / "halosift" / "py.typed").is_file()


def test_each_module_is_loaded_once_under_one_name(tmp_path) -> None:
    """Run the documented API in a fresh process, from the repository root (where the folders
    could shadow) and from elsewhere: no module file is loaded under two names."""
    code = (
        "import sys, json, collections, halosift as hs; "
        "import pandas as pd; "
        "r = hs.screen(pd.DataFrame({'smiles': ['CC(C)C', 'C1CCCCC1', 'CCO']}), hs.Conditions()); "
        "lib = hs.load_library(pd.DataFrame({'smiles': ['CCC']})); "
        "x = hs.explain('CC(C)C'); "
        "import halosift.tui.app, halosift.sample_libraries; "
        "files = collections.defaultdict(list); "
        "[files[getattr(m, '__file__', None)].append(n) for n, m in list(sys.modules.items()) "
        " if getattr(m, '__file__', None) and 'halosift' in n]; "
        "print(json.dumps({'twice': {f: ns for f, ns in files.items() if len(ns) > 1}, "
        "'old': [n for n in sys.modules if n.split('.')[0] in ('engine', 'tui', 'sample_libraries')], "
        "'rows': len(r), 'verdict': x.verdict}))"
    )
    for cwd in (ROOT, tmp_path):
        proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=300, cwd=cwd)
        assert proc.returncode == 0, proc.stderr
        seen = json.loads(proc.stdout.strip().splitlines()[-1])
        assert seen["twice"] == {} and seen["old"] == [], seen
        assert seen["rows"] == 3 and seen["verdict"], seen


def test_documented_api_names() -> None:
    import halosift as hs

    for name in ("screen", "load_library", "explain", "Conditions", "__version__"):
        assert name in hs.__all__ and getattr(hs, name) is not None
    assert hs.Conditions is __import__("halosift.engine.conditions", fromlist=["Conditions"]).Conditions
