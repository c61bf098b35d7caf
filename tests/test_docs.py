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
    for command in ("explain", "screen", "report", "browse", "completion"):
        proc = subprocess.run([sys.executable, "-m", "halosift", command, "--help"], capture_output=True, text=True)
        assert proc.returncode == 0 and "usage" in proc.stdout, command


# --- documented signatures, fields and columns against the code -------------------------------------------

ENGINE_API = README.parent / "docs" / "engine-api.md"

#: Functions whose documented signature must list every parameter (the public API, hs.*).
COMPLETE = ("halosift.engine.screen", "halosift.engine.load_library", "halosift.engine.explain")

_SIGNATURE = re.compile(r"`((?:halosift\.)?(?:engine|Library|Explanation|Conditions)[\w.]*)\(([^`()]*)\)(?:\s*->[^`]*)?`")


def _resolve(dotted: str) -> object:
    """The object a documented name such as halosift.engine.io.write_table or Library.evaluate names."""
    import importlib

    aliases = {"Library": "halosift.Library", "Explanation": "halosift.Explanation", "Conditions": "halosift.Conditions"}
    head = dotted.split(".")[0]
    if head in aliases:
        dotted = aliases[head] + dotted[len(head):]
    elif head == "engine":
        dotted = "halosift." + dotted
    parts = dotted.split(".")
    obj = importlib.import_module(parts[0])
    for at, name in enumerate(parts[1:], start=2):
        # An attribute first: halosift.engine.explain is the function, not the module of that name.
        obj = getattr(obj, name) if hasattr(obj, name) else importlib.import_module(".".join(parts[:at]))
    if obj is not None:
        return obj
    raise AssertionError(f"cannot resolve {dotted}")


def _documented_signatures(text: str) -> list[tuple[str, list[str]]]:
    found = []
    for match in _SIGNATURE.finditer(text):
        params = [p.strip() for p in " ".join(match.group(2).split()).split(",") if p.strip()]
        if params != ["..."]:
            found.append((match.group(1), params))
    return found


def _check_signature(name: str, documented: list[str]) -> None:
    import inspect

    signature = inspect.signature(_resolve(name))
    real = [p for p in signature.parameters.values() if p.name != "self"]
    by_name = {p.name: p for p in real}
    keyword_only = False
    order = []
    for entry in documented:
        if entry == "*":
            keyword_only = True
            continue
        bare = entry.split("=")[0].strip()
        if bare.startswith("**"):
            assert any(p.kind is p.VAR_KEYWORD for p in real), (name, entry)
            continue
        assert bare in by_name, f"{name}: documents {bare!r}, the code has {[p.name for p in real]}"
        kind = by_name[bare].kind
        if keyword_only:
            assert kind is inspect.Parameter.KEYWORD_ONLY, (name, bare, kind)
        elif "=" not in entry:
            assert kind is not inspect.Parameter.KEYWORD_ONLY, f"{name}: {bare} is keyword-only in the code"
        order.append(real.index(by_name[bare]))
    assert order == sorted(order), f"{name}: documented out of order"
    documented_names = {e.split("=")[0].strip().lstrip("*") for e in documented if e != "*"}
    required = [p.name for p in real if p.default is p.empty and p.kind not in (p.VAR_POSITIONAL, p.VAR_KEYWORD)]
    assert set(required) <= documented_names, f"{name}: required {required} not all documented"
    full = name if name.startswith("halosift.") else "halosift." + name
    if full in COMPLETE:
        listed = {p.name for p in real}
        assert documented_names == listed, f"{name}: documented {sorted(documented_names)}, code {sorted(listed)}"


def test_documented_signatures_match_the_code() -> None:
    checked = set()
    for path in (ENGINE_API, README):
        for name, params in _documented_signatures(path.read_text(encoding="utf-8")):
            _check_signature(name, params)
            checked.add(name if name.startswith("halosift.") else "halosift." + name)
    assert set(COMPLETE) <= checked, set(COMPLETE) - checked  # the public API is documented in full


def test_the_documentation_check_catches_a_wrong_signature() -> None:
    import pytest

    with pytest.raises(AssertionError):
        _check_signature("halosift.engine.load_library", ["source", "*", "smiles_column"])  # incomplete
    with pytest.raises(AssertionError):
        _check_signature("halosift.engine.perceive_batch", ["record_batch"])  # misnamed
    with pytest.raises(AssertionError):
        _check_signature("halosift.engine.io.write_table", ["frame", "path", "metadata"])  # keyword-only in the code


def test_readme_python_example_calls_match_the_code() -> None:
    import ast
    import inspect

    from halosift.engine.explain import Explanation
    from halosift.engine.library import Library

    import halosift as hs

    block = re.search(r"### Python\n\n```python\n(.+?)\n```", README.read_text(encoding="utf-8"), flags=re.S)
    assert block, "README has a Python example"
    tree = ast.parse(block.group(1))
    calls = [n for n in ast.walk(tree) if isinstance(n, ast.Call) and isinstance(n.func, ast.Attribute)]
    targets = {"screen": hs.screen, "load_library": hs.load_library, "explain": hs.explain,
               "Conditions": hs.Conditions, "evaluate": Library.evaluate, "to_dict": Explanation.to_dict}
    seen = set()
    for call in calls:
        name = call.func.attr
        if name not in targets:
            continue
        seen.add(name)
        signature = inspect.signature(targets[name])
        args = [object()] * len(call.args)
        if name in ("evaluate", "to_dict"):
            args = [object(), *args]  # self
        signature.bind(*args, **{k.arg: object() for k in call.keywords})  # TypeError if the README is wrong
    assert {"screen", "load_library", "explain", "Conditions", "evaluate"} <= seen


def _documented_conditions() -> list[tuple[str, str]]:
    """(field, default as written) from the Conditions paragraph of docs/engine-api.md."""
    text = ENGINE_API.read_text(encoding="utf-8")
    paragraph = text.split("`engine.Conditions` (frozen, hashable):", 1)[1].split("`validate()`", 1)[0]
    out = []
    for match in re.finditer(r"`(\w+)`(\s*\(([^()]*)\))?", paragraph):
        default = (match.group(3) or "").strip()
        word = re.match(r"`(\w+)`", default)
        out.append((match.group(1), word.group(1) if word else default.split(",")[0].strip()))
    return out


def test_documented_conditions_fields_and_defaults_match_the_dataclass() -> None:
    import dataclasses

    from halosift.engine.conditions import Conditions

    fields = dataclasses.fields(Conditions)
    documented = _documented_conditions()
    assert [name for name, _ in documented] == [f.name for f in fields]
    for (name, default), field in zip(documented, fields):
        if not default:
            continue  # documented without a default
        if isinstance(field.default, str):
            assert default == field.default, name
        else:
            assert float(default) == field.default, name


def test_readme_column_table_is_the_screens_output_and_its_docs() -> None:
    import pandas as pd
    from halosift.engine.library import RESULT_COLUMNS, RESULT_DOCS

    import halosift as hs

    table = re.findall(r"^\| `([a-z0-9_]+)` \| (.*) \|$", README.read_text(encoding="utf-8"), flags=re.M)
    inputs = pd.DataFrame({"smiles": ["CCC", "CCO"], "catalog_id": ["WS-1", "WS-2"]})
    result = hs.screen(inputs, use_cache=False)
    added = [c for c in result.columns if c not in inputs.columns]
    assert [name for name, _ in table] == added == list(RESULT_COLUMNS)
    for name, meaning in table:
        assert meaning == RESULT_DOCS[name], name
    assert set(RESULT_DOCS) >= set(added)


def test_readme_shell_examples_print_what_the_program_prints() -> None:
    """The class of error: the explain example went stale after a model change (55.3 shown, 50.7 printed).
    Every ``$ halosift …`` block in the README is run, and each line it shows must be a line of the output."""
    import shlex

    text = README.read_text(encoding="utf-8")
    blocks = re.findall(r"```\n\$ (halosift [^\n]+)\n(.*?)```", text, flags=re.S)
    assert blocks, "the README shows no command with its output"
    for command, shown in blocks:
        argv = [sys.executable, "-m", "halosift", *shlex.split(command)[1:]]
        run = subprocess.run(argv, capture_output=True, text=True, cwd=README.parent, timeout=300)
        printed = {line.rstrip() for line in run.stdout.splitlines()}
        for line in shown.splitlines():
            assert line.rstrip() in printed, f"README shows for {command!r} a line the program does not print: {line!r}"


def test_readme_defines_each_stereo_outcome_in_the_engine_words() -> None:
    from halosift.engine.stereo import STEREO_DOCS

    text = README.read_text(encoding="utf-8")
    for outcome, meaning in STEREO_DOCS.items():
        assert f"{outcome} — {meaning}" in text, outcome
