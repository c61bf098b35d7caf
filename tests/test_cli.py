"""The command line: explain and screen, their output and their one-line errors."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pyarrow.parquet as pq
import pytest

from halosift.cli import main
from halosift.sample_libraries import sample_path


def run(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "halosift", *args], capture_output=True, text=True, timeout=300)


def test_explain_table(capsys: pytest.CaptureFixture) -> None:
    assert main(["explain", "CCC"]) == 0
    out = capsys.readouterr().out
    assert "CC(C)Cl" in out and "CCCCl" in out
    assert "verdict    selective" in out and "serves     br2" in out
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
    assert main(["explain", "CCC", "--json", "--reagent", "cl2", "--temp", "300"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert set(data["products"][0]["pct"]) == {"cl2"}
    assert data["conditions"]["cl2_temp_c"] == 300
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
        assert b"caution" in meta and b"conditions" in meta
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
