"""The command line: explain and screen, their output and their one-line errors."""

from __future__ import annotations

import json
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pyarrow.parquet as pq
import pytest
from halosift.sample_libraries import sample_path
from project_files import ROOT, python_files

from halosift.cli import main


def run(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "halosift", *args], capture_output=True, text=True, timeout=300)


def test_explain_table(capsys: pytest.CaptureFixture) -> None:
    assert main(["explain", "CCC"]) == 0
    out = capsys.readouterr().out
    assert "CC(C)Cl" in out and "CCCCl" in out
    assert "verdict    selective" in out and "serves     Br2" in out
    assert "SAFETY" in out


def test_explain_json(capsys: pytest.CaptureFixture) -> None:
    assert main(["explain", "CCC", "--json", "--phase", "gas"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["verdict"] == "selective" and data["serves"] == "br2"
    by_smiles = {p["smiles"]: p for p in data["products"]}
    assert set(by_smiles) == {"CC(C)Cl", "CCCCl"}
    assert by_smiles["CCCCl"]["h_count"] == 6
    assert by_smiles["CCCCl"]["site"] == "primary"
    assert by_smiles["CCCCl"]["pct"]["cl2"] == pytest.approx(44.7, abs=0.1)
    assert set(by_smiles["CCCCl"]["pct"]) == {"cl2", "br2"}
    assert data["warnings"] == []


def test_explain_reagent_and_temperature(capsys: pytest.CaptureFixture) -> None:
    # 150 °C: inside what a neat liquid accepts (engine.conditions), outside the liquid rate data (22–98 °C)
    assert main(["explain", "CCC", "--json", "--reagent", "cl2", "--temp", "150"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert set(data["products"][0]["pct"]) == {"cl2"}
    assert data["conditions"]["cl2_temp_c"] == 150
    assert data["conditions"]["br2_temp_c"] == 125
    assert any("outside" in w for w in data["warnings"])


def test_explain_rejects_with_exit_2(capsys: pytest.CaptureFixture) -> None:
    assert main(["explain", "CCO", "--json"]) == 2
    data = json.loads(capsys.readouterr().out)
    assert data["status"] == "rejected" and "oxygen" in data["reason"]


@pytest.mark.parametrize("temp", ["-300", "abc", "xx=4"])
def test_bad_temperature_is_one_line(temp: str) -> None:
    proc = run("explain", "CCC", "--temp", temp)
    assert proc.returncode == 2
    assert proc.stderr.strip().count("\n") == 0 and "Traceback" not in proc.stderr


@pytest.mark.parametrize("suffix", [".csv", ".tsv", ".parquet", ".sdf", ".csv.gz"])
def test_screen_round_trip(tmp_path: Path, suffix: str) -> None:
    out = tmp_path / f"result{suffix}"
    proc = run("screen", str(sample_path("bad_rows.csv")), "-o", str(out), "--no-cache")
    assert proc.returncode == 0, proc.stderr
    assert "rows read 23" in proc.stderr and "wrote" in proc.stderr
    source = pd.read_csv(sample_path("bad_rows.csv"), keep_default_na=False)
    if suffix == ".parquet":
        back = pd.read_parquet(out)
        meta = pq.read_schema(out).metadata
        assert b"halosift_caution" in meta and b"halosift_conditions" in meta
    elif suffix == ".sdf":
        from rdkit import Chem

        back = pd.DataFrame([m.GetPropsAsDict() if m else {} for m in Chem.SDMolSupplier(str(out), sanitize=False)])
    else:
        back = pd.read_csv(out, sep="\t" if suffix == ".tsv" else ",", keep_default_na=False)
        assert "caution" in Path(str(out) + ".about.txt").read_text()
    assert len(back) == len(source)
    assert list(back["catalog_id"].astype(str)) == list(source["catalog_id"].astype(str))
    assert set(back["status"]) == {"ok", "rejected"}


def test_screen_refuses_to_overwrite(tmp_path: Path) -> None:
    out = tmp_path / "r.csv"
    assert run("screen", str(sample_path("bad_rows.csv")), "-o", str(out)).returncode == 0
    proc = run("screen", str(sample_path("bad_rows.csv")), "-o", str(out))
    assert proc.returncode == 2 and "--force" in proc.stderr
    assert run("screen", str(sample_path("bad_rows.csv")), "-o", str(out), "--force").returncode == 0


def test_screen_refuses_its_input(tmp_path: Path) -> None:
    src = tmp_path / "in.csv"
    src.write_text("smiles\nCCC\n")
    proc = run("screen", str(src), "-o", str(src), "--force")
    assert proc.returncode == 2 and "input" in proc.stderr
    assert src.read_text() == "smiles\nCCC\n"


def _whole_file_cases(tmp: Path) -> list[tuple[list[str], str]]:
    (tmp / "empty.csv").write_text("")
    (tmp / "junk.parquet").write_bytes(bytes(range(256)) * 8)
    (tmp / "nosmiles.csv").write_text("id,weight\na,1\n")
    (tmp / "lib.xyz").write_text("smiles\nCCC\n")
    return [
        ([str(tmp / "missing.csv")], "no such file"),
        ([str(tmp / "empty.csv")], "empty"),
        ([str(tmp / "junk.parquet")], "Parquet"),
        ([str(tmp / "nosmiles.csv")], "id, weight"),
        ([str(tmp / "lib.xyz")], "unknown"),
    ]


def test_whole_file_errors(tmp_path: Path) -> None:
    for args, expected in _whole_file_cases(tmp_path):
        proc = run("screen", *args, "-o", str(tmp_path / "o.csv"))
        assert proc.returncode == 2, (args, proc.stderr)
        line = proc.stderr.strip()
        assert "\n" not in line and "Traceback" not in line, line
        assert expected in line, (expected, line)
        assert not (tmp_path / "o.csv").exists()


def test_phase_option(capsys: pytest.CaptureFixture) -> None:
    # --phase picks the Cl2 rate table: the neat liquid (default) is less selective than the gas phase here.
    shares = {}
    for phase in ("gas", "liquid"):
        assert main(["explain", "CCC", "--json", "--phase", phase]) == 0
        data = json.loads(capsys.readouterr().out)
        assert data["conditions"]["cl2_phase"] == phase
        shares[phase] = {p["smiles"]: p["pct"]["cl2"] for p in data["products"]}["CCCCl"]
    assert shares["liquid"] > shares["gas"]
    # solution without a solvent is refused in one line
    assert main(["explain", "CCC", "--phase", "solution"]) == 2
    assert "needs a solvent" in capsys.readouterr().err


# --- conventions: --version, standard input and output, no terminal, light --help, completion ------------------


def _pty_run(args: list[str], *, stdin_tty: bool, stdout_tty: bool, stdin_data: bytes = b"") -> tuple[int, bytes, str]:
    """Run ``python -m halosift ARGS`` with stdin and/or stdout on a pseudo-terminal: (exit status, stdout, stderr)."""
    import os
    import pty

    master, slave = pty.openpty()
    try:
        proc = subprocess.Popen(
            [sys.executable, "-m", "halosift", *args],
            stdin=slave if stdin_tty else subprocess.PIPE,
            stdout=slave if stdout_tty else subprocess.PIPE,
            stderr=subprocess.PIPE,
        )
        out, err = proc.communicate(None if stdin_tty else stdin_data, timeout=300)
    finally:
        os.close(slave)
        os.close(master)
    return proc.returncode, out or b"", err.decode()


def test_version_comes_from_the_one_place_it_is_written() -> None:
    from halosift._version import __version__

    proc = run("--version")
    assert proc.returncode == 0 and proc.stdout == f"halosift {__version__}\n"
    written = [p for p in python_files(with_tests=False) if "__version__ = " in p.read_text(encoding="utf-8")]
    assert [p.relative_to(ROOT).as_posix() for p in written] == ["halosift/_version.py"]


HEAVY = ("rdkit", "pandas", "pyarrow", "textual", "numpy", "halosift.engine", "halosift.tui")


def test_help_and_completion_import_no_heavy_module() -> None:
    # --help must stay under 0.3 s (benchmarks/bench_cli_help.py times it); what keeps it there is that the
    # command line imports none of the heavy packages until a command runs.
    code = (
        "import sys\n"
        "import halosift.cli as cli\n"
        "loaded = {'import': sorted(sys.modules)}\n"
        "import contextlib, io\n"
        "for argv in (['--help'], ['--version'], ['screen', '--help'], ['report', '--help'], ['explain', '--help'],"
        " ['browse', '--help'], ['completion', 'bash'], ['completion', 'fish']):\n"
        "    with contextlib.redirect_stdout(io.StringIO()):\n"
        "        try:\n"
        "            cli.main(argv)\n"
        "        except SystemExit:\n"
        "            pass\n"
        "    loaded[' '.join(argv)] = sorted(sys.modules)\n"
        "import json; print(json.dumps(loaded))\n"
    )
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    for step, modules in json.loads(proc.stdout).items():
        heavy = [m for m in modules if any(m == h or m.startswith(h + ".") for h in HEAVY)]
        assert heavy == [], (step, heavy)


def test_bare_command_without_a_terminal_says_what_to_run() -> None:
    proc = subprocess.run([sys.executable, "-m", "halosift"], capture_output=True, text=True, timeout=60,
                          stdin=subprocess.DEVNULL)
    assert proc.returncode == 2 and proc.stdout == ""
    lines = proc.stderr.splitlines()
    assert len(lines) == 2 and "Traceback" not in proc.stderr
    assert "no terminal" in lines[0] and "halosift screen" in lines[1] and "--help" in lines[1]
    # A terminal on stdin but not on stdout is still no place for the app.
    code, out, err = _pty_run([], stdin_tty=True, stdout_tty=False)
    assert code == 2 and out == b"" and "no terminal" in err


def _catalogue_csv() -> bytes:
    return sample_path("bad_rows.csv").read_bytes()


def test_screen_reads_standard_input_and_writes_standard_output(tmp_path: Path) -> None:
    from halosift.engine.io import about_path

    via_file = tmp_path / "file.csv"
    assert run("screen", str(sample_path("bad_rows.csv")), "-o", str(via_file), "--no-cache").returncode == 0
    proc = subprocess.run([sys.executable, "-m", "halosift", "screen", "-", "-o", "-", "--no-cache"],
                          input=_catalogue_csv(), capture_output=True, timeout=300)
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout == via_file.read_bytes()  # the same rows and columns, byte for byte
    err = proc.stderr.decode()
    assert "SAFETY" in err and "sidecar" in err and "wrote standard output" in err  # no sidecar: the caution here
    assert f"halosift_source: {sample_path('bad_rows.csv')}" in about_path(via_file).read_text()


@pytest.mark.parametrize(
    ("data", "extra", "expected_columns"),
    [
        (b"CCC propane\nCC(C)C isobutane\n", [], ["smiles", "name"]),  # sniffed: SMILES and a name
        (b"smiles\tid\nCCC\tWS-1\nCC(C)C\tWS-2\n", [], ["smiles", "id"]),  # sniffed: TSV
        (b"CCC;WS-1\nCC(C)C;WS-2\n", ["--in-format", "smi"], ["smiles", "name"]),  # told: not a CSV
    ],
)
def test_standard_input_formats(data: bytes, extra: list[str], expected_columns: list[str]) -> None:
    proc = subprocess.run([sys.executable, "-m", "halosift", "screen", "-", "-o", "-", "--out-format", "tsv",
                           "--no-cache", "--quiet", *extra], input=data, capture_output=True, timeout=300)
    assert proc.returncode == 0, proc.stderr
    lines = proc.stdout.decode().splitlines()
    header = lines[0].split("\t")
    assert header[: len(expected_columns)] == expected_columns and "verdict" in header
    assert len(lines) == 3


def test_gzipped_standard_input_and_parquet_through_a_pipe(tmp_path: Path) -> None:
    import gzip
    import io

    proc = subprocess.run([sys.executable, "-m", "halosift", "screen", "-", "-o", "-", "--out-format", "parquet",
                           "--no-cache", "--quiet"], input=gzip.compress(_catalogue_csv()), capture_output=True,
                          timeout=300)
    assert proc.returncode == 0, proc.stderr
    table = pq.read_table(io.BytesIO(proc.stdout))
    assert table.num_rows == 23
    assert table.schema.metadata[b"halosift_source"] == b"standard input"
    assert b"halosift_caution" in table.schema.metadata
    assert proc.stderr == b""  # Parquet carries the caution itself; --quiet says nothing more


@pytest.mark.parametrize(
    ("args", "data", "expected"),
    [
        (["screen", "-", "-o", "-"], b"", "standard input is empty"),
        (["screen", "-", "-o", "-"], b"  \n", "standard input is empty"),
        (["screen", "-", "-o", "-"], b"id,weight\nWS-1,3\n", "standard input"),  # no SMILES column, named so
        (["screen", "-", "-o", "-", "--in-format", "parquet"], b"smiles\nCCC\n", "standard input"),
        (["screen", "lib.csv", "-o", "-", "--in-format", "csv"], b"", "--in-format is for input -"),
        (["screen", "-", "-o", "out.parquet", "--out-format", "csv"], b"smiles\nC\n", "--out-format csv is for -o -"),
        (["report", "-", "-o", "-"], b"smiles\nCCC\n", ".html"),
    ],
)
def test_standard_input_and_output_problems_are_one_line(
    tmp_path: Path, args: list[str], data: bytes, expected: str
) -> None:
    (tmp_path / "lib.csv").write_text("smiles\nCCC\n")
    proc = subprocess.run([sys.executable, "-m", "halosift", *args, "--no-cache"], input=data, capture_output=True,
                          timeout=300, cwd=tmp_path)
    err = proc.stderr.decode()
    assert proc.returncode == 2, err
    assert err.count("\n") == 1 and "Traceback" not in err and expected in err, err
    assert "halosift-stdin-" not in err  # the temporary copy is never named


def test_standard_input_that_is_a_terminal_and_parquet_to_a_terminal_are_refused() -> None:
    code, out, err = _pty_run(["screen", "-", "-o", "-", "--no-cache"], stdin_tty=True, stdout_tty=False)
    assert code == 2 and out == b"" and err.count("\n") == 1 and "terminal" in err, err
    code, out, err = _pty_run(["screen", "-", "-o", "-", "--out-format", "parquet", "--no-cache"],
                              stdin_tty=False, stdout_tty=True, stdin_data=b"smiles\nCCC\n")
    assert code == 2 and err.count("\n") == 1 and "refusing to write parquet" in err and "Traceback" not in err


def test_report_quiet_says_nothing(tmp_path: Path) -> None:
    out = tmp_path / "r.html"
    proc = run("report", str(sample_path("bad_rows.csv")), "-o", str(out), "--no-cache", "--quiet")
    assert proc.returncode == 0 and proc.stderr == "" and proc.stdout == ""
    assert "<html" in out.read_text(encoding="utf-8")
    loud = run("report", str(sample_path("bad_rows.csv")), "-o", str(tmp_path / "l.html"), "--no-cache")
    assert "wrote" in loud.stderr


@pytest.mark.parametrize(
    "args",
    [
        ["--frobnicate"],
        ["screen"],
        ["screen", "lib.csv"],
        ["screen", "lib.csv", "-o", "x.csv", "--workers", "many"],
        ["screen", "lib.csv", "-o", "-", "--out-format", "xlsx"],
        ["completion", "tcsh"],
        ["completion"],
        ["nonsense"],
        ["report", "lib.csv", "-o", "r.html", "--max-pages", "lots"],
    ],
)
def test_bad_arguments_are_one_line(args: list[str]) -> None:
    proc = run(*args)
    assert proc.returncode == 2
    assert proc.stderr.count("\n") == 1 and proc.stderr.startswith("halosift: ") and "Traceback" not in proc.stderr


def test_cli_format_lists_match_the_engine() -> None:
    from halosift.engine.io import INPUT_FORMATS, OUTPUT_FORMATS

    from halosift import cli

    assert cli.IN_FORMATS == INPUT_FORMATS and cli.OUT_FORMATS == OUTPUT_FORMATS


@pytest.mark.parametrize(
    ("head", "expected"),
    [
        (b"PAR1\x15\x04", ("parquet", False)),
        (b"smiles,id\nCCC,1\n", ("csv", False)),
        (b"smiles;id\nCCC;1\n", ("csv", False)),
        (b"SMILES\nCCC\n", ("csv", False)),
        (b"smiles\tid\nCCC\t1\n", ("tsv", False)),
        (b"CCC\tpropane\n", ("smi", False)),
        (b"CCC propane\n", ("smi", False)),
        (b"CCC\n", ("smi", False)),
        (b"\n  RDKit          2D\n\n  3  2  0  0  0  0  0  0  0  0999 V2000\nM  END\n$$$$\n", ("sdf", False)),
    ],
)
def test_sniff_format(head: bytes, expected: tuple[str, bool]) -> None:
    import gzip

    from halosift.engine.io.formats import sniff_format

    assert sniff_format(head) == expected
    if expected[0] != "parquet":
        assert sniff_format(gzip.compress(head)) == (expected[0], True)


# --- completion -------------------------------------------------------------------------------------------


def _parser_words() -> tuple[list[str], list[str]]:
    """(subcommands, every option spelling of the program and its subcommands), walked from the parser."""
    import argparse

    from halosift.cli import build_parser

    parser = build_parser()
    sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    options = [f for a in parser._actions for f in a.option_strings]
    for child in sub.choices.values():
        options += [f for a in child._actions for f in a.option_strings]
    return list(sub.choices), options


@pytest.mark.parametrize("shell", ["bash", "zsh", "fish"])
def test_completion_script_mentions_every_subcommand_and_option(shell: str) -> None:
    proc = run("completion", shell)
    assert proc.returncode == 0 and proc.stderr == ""
    commands, options = _parser_words()
    assert {"explain", "screen", "report", "browse", "completion"} <= set(commands)
    for word in commands:
        assert re.search(rf"(?<![\w-]){re.escape(word)}(?![\w-])", proc.stdout), word
    for option in options:
        spelled = f"-l {option[2:]}" if shell == "fish" and option.startswith("--") else (
            f"-s {option[1:]}" if shell == "fish" else option)
        assert spelled in proc.stdout, option


def _complete(script: Path, words: list[str], cwd: Path) -> list[str]:
    """What bash offers for the last word of ``words`` with the generated script loaded."""
    quoted = " ".join(f"'{w}'" for w in words)
    code = (f"source '{script}'; COMP_WORDS=({quoted}); COMP_CWORD=$((${{#COMP_WORDS[@]}}-1)); "
            "_halosift_complete; printf '%s\\n' \"${COMPREPLY[@]}\"")
    proc = subprocess.run(["bash", "-c", code], capture_output=True, text=True, cwd=cwd, timeout=30)
    assert proc.returncode == 0, proc.stderr
    return [w for w in proc.stdout.splitlines() if w]


@pytest.mark.skipif(not Path("/bin/bash").exists() and not Path("/usr/bin/bash").exists(), reason="no bash")
def test_bash_completion_completes(tmp_path: Path) -> None:
    script = tmp_path / "halosift.bash"
    script.write_text(run("completion", "bash").stdout)
    assert subprocess.run(["bash", "-n", str(script)]).returncode == 0
    (tmp_path / "lib.csv").write_text("smiles\nC\n")
    assert _complete(script, ["halosift", "sc"], tmp_path) == ["screen"]
    assert set(_complete(script, ["halosift", ""], tmp_path)) == set(_parser_words()[0])
    assert _complete(script, ["halosift", "screen", "--ph"], tmp_path) == ["--phase"]
    assert _complete(script, ["halosift", "screen", "x.csv", "--phase", ""], tmp_path) == ["gas", "liquid", "solution"]
    assert _complete(script, ["halosift", "screen", "li"], tmp_path) == ["lib.csv"]
    assert _complete(script, ["halosift", "report", "lib.csv", "-o", "l"], tmp_path) == ["lib.csv"]
    assert _complete(script, ["halosift", "screen", "lib.csv", "--temp", ""], tmp_path) == []
    assert _complete(script, ["halosift", "explain", ""], tmp_path) == []  # a SMILES, not a file
    assert _complete(script, ["halosift", "completion", ""], tmp_path) == ["bash", "zsh", "fish"]
    assert _complete(script, ["halosift", "--ver"], tmp_path) == ["--version"]


@pytest.mark.skipif(shutil.which("fish") is None, reason="fish is not installed")
def test_fish_completion_completes(tmp_path: Path) -> None:
    script = tmp_path / "halosift.fish"
    script.write_text(run("completion", "fish").stdout)
    assert subprocess.run(["fish", "-n", str(script)]).returncode == 0
    (tmp_path / "lib.csv").write_text("smiles\nC\n")

    def offered(line: str) -> list[str]:
        proc = subprocess.run(["fish", "-c", f"source {script}; complete -C '{line}'"], capture_output=True,
                              text=True, cwd=tmp_path, timeout=30)
        assert proc.returncode == 0, proc.stderr
        return [row.split("\t")[0] for row in proc.stdout.splitlines()]

    assert offered("halosift sc") == ["screen"]
    assert offered("halosift screen --ph") == ["--phase"]
    assert offered("halosift screen lib.csv --phase ") == ["gas", "liquid", "solution"]
    assert offered("halosift screen li") == ["lib.csv"]
    assert sorted(offered("halosift completion ")) == ["bash", "fish", "zsh"]


@pytest.mark.skipif(shutil.which("zsh") is None, reason="zsh is not installed")
def test_zsh_completion_registers(tmp_path: Path) -> None:
    script = tmp_path / "halosift.zsh"
    script.write_text(run("completion", "zsh").stdout)
    code = f"autoload -U compinit; compinit -u -d {tmp_path}/zcompdump; source {script}; print -r -- $_comps[halosift]"
    proc = subprocess.run(["zsh", "-f", "-c", code], capture_output=True, text=True, timeout=30)
    assert proc.returncode == 0 and proc.stderr == "", proc.stderr
    assert "_halosift_complete" in proc.stdout  # zsh's bash layer runs the bash function


def _condition_options(parser_name: str) -> set[str]:
    from halosift.cli import build_parser

    sub = next(a for a in build_parser()._subparsers._group_actions if a.dest == "command").choices[parser_name]
    group = next(g for g in sub._action_groups if g.title.startswith("conditions"))
    return {s for action in group._group_actions for s in action.option_strings}


def test_browse_takes_the_screen_condition_options(monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> None:
    assert _condition_options("browse") == _condition_options("screen") == {"--temp", "--threshold", "--solvent",
                                                                              "--phase"}
    seen: dict = {}

    def fake_run(path, **kwargs):  # the app itself is tested in test_tui_sessions.py
        seen.update(kwargs, path=path)
        return 0

    monkeypatch.setattr("halosift.tui.app.run", fake_run)
    library = tmp_path / "lib.csv"
    library.write_text("id,smiles\nWS-1,CCC\n")
    assert main(["browse", str(library), "--temp", "br2=60", "--temp", "so2cl2=50", "--phase", "solution",
                 "--solvent", "benzene=4", "--threshold", "80"]) == 0
    # Only the fields given: the rest come from the saved session (or the defaults).
    assert seen["conditions"] == {"br2_temp_c": 60.0, "so2cl2_temp_c": 50.0, "threshold_pct": 80.0,
                                  "cl2_solvent": "benzene", "cl2_solvent_molar": 4.0, "cl2_phase": "solution"}
    assert main(["browse", str(library)]) == 0 and seen["conditions"] == {}
    # A bare temperature sets both screen reagents, as for screen.
    assert main(["browse", str(library), "--temp", "40"]) == 0
    assert seen["conditions"] == {"cl2_temp_c": 40.0, "br2_temp_c": 40.0}


def test_browse_refuses_bad_conditions_in_one_line_before_the_app(tmp_path: Path) -> None:
    library = tmp_path / "lib.csv"
    library.write_text("id,smiles\nWS-1,CCC\n")
    proc = run("browse", str(library), "--phase", "solution")
    assert proc.returncode == 2
    assert proc.stderr.startswith("halosift: ") and "needs a solvent" in proc.stderr
    assert len(proc.stderr.strip().splitlines()) == 1 and "Traceback" not in proc.stderr


#: The options that set engine.Conditions; every command that weighs offers all of them.
CONDITION_OPTIONS = {"--temp", "--threshold", "--solvent", "--phase"}


def _subcommand_options(name: str) -> set[str]:
    from halosift.cli import build_parser

    parser = build_parser()
    sub = next(a for a in parser._actions if a.dest == "command")
    return {s for action in sub.choices[name]._actions for s in action.option_strings}


def test_every_weighing_command_offers_the_same_condition_options() -> None:
    from halosift.engine import Conditions

    offered = {name: _subcommand_options(name) & CONDITION_OPTIONS for name in ("explain", "screen", "report", "browse")}
    assert all(options == CONDITION_OPTIONS for options in offered.values()), offered
    # And the option set covers every condition the engine has: a new field must get an option here.
    from dataclasses import fields

    covered = {"cl2_temp_c", "br2_temp_c", "so2cl2_temp_c", "nbs_temp_c", "threshold_pct", "cl2_solvent",
               "cl2_solvent_molar", "cl2_phase"}
    assert {f.name for f in fields(Conditions)} == covered


def test_report_takes_a_solvent_for_a_solution_phase(tmp_path: Path) -> None:
    source = tmp_path / "lib.csv"
    pd.DataFrame({"id": ["WR-1", "WR-2"], "smiles": ["CCC", "CC(C)C"]}).to_csv(source, index=False)
    out = tmp_path / "r.html"
    assert main(["report", str(source), "-o", str(out), "--phase", "solution", "--solvent", "benzene=4", "--quiet"]) == 0
    assert "benzene" in out.read_text(encoding="utf-8")


def test_ratio_takes_s_to_x_or_a_number(capsys: pytest.CaptureFixture) -> None:
    plans = {}
    for ratio in ("2:1", "2", "4:2"):
        assert main(["explain", "CC(C)C", "--json", "--ratio", ratio]) == 0
        plans[ratio] = json.loads(capsys.readouterr().out)["polyhalogenation"]
    assert plans["2:1"] == plans["2"] == plans["4:2"]
    assert plans["2:1"]["cl2"]["ratio"] == 2


@pytest.mark.parametrize("ratio", ["2:x", "2:0", "a", "1:2:3", ":"])
def test_bad_ratio_is_one_line(ratio: str) -> None:
    proc = run("explain", "CC(C)C", "--ratio", ratio)
    assert proc.returncode == 2
    assert proc.stderr.strip().count("\n") == 0 and "Traceback" not in proc.stderr
    assert "substrate:halogen" in proc.stderr


def test_condition_help_names_every_reagent_and_what_the_threshold_governs() -> None:
    from halosift.cli import build_parser

    parser = build_parser()
    sub = next(a for a in parser._actions if a.dest == "command")
    for name in ("explain", "screen", "report", "browse"):
        text = " ".join(sub.choices[name].format_help().split())
        assert all(f"{r}=°C" in text for r in ("cl2", "br2", "so2cl2", "nbs")), name
        assert "bromination share" not in text and "every reagent" in text, name


def test_help_carries_the_safety_caution(capsys: pytest.CaptureFixture) -> None:
    """Like every output (README, app help, exports): the caution, in full, under --help."""
    from halosift.engine import CAUTION

    with pytest.raises(SystemExit):
        main(["--help"])
    out = " ".join(capsys.readouterr().out.split())
    assert CAUTION in out


@pytest.mark.parametrize("smiles", ["CCC", "CC(C)Cc1ccccc1", "C=CCC", "C1CC2CCC1C2", "CC1CC1"])
def test_explain_text_names_reagents_as_chemists_write_them(smiles: str, capsys: pytest.CaptureFixture) -> None:
    # The text a chemist reads says Cl2, Br2, SO2Cl2, NBS; the lowercase tokens are values of options
    # (--reagent cl2) and of the files' serves column, never how the page names a reagent.
    import re

    assert main(["explain", smiles, "--reagent", "cl2", "--reagent", "br2", "--reagent", "nbs"]) == 0
    out = capsys.readouterr().out
    assert "serves     " in out and "  reagent " in out
    for line in out.splitlines():
        assert not re.search(r"\b(cl2|br2|so2cl2|nbs)\b", line), line
