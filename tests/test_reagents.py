"""Reagents beyond Cl2/Br2: F2 and I2 refused with reasons, SO2Cl2 treated as Cl·."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest
from halosift.engine import parameters as P
from halosift.engine.reagents import NOT_PREDICTED, UnsupportedReagent, check_reagent

from halosift import engine
from halosift.cli import main


def test_check_reagent_accepts_modelled_ones() -> None:
    assert [check_reagent(r) for r in ("cl2", " BR2", "SO2Cl2", "NBS")] == ["cl2", "br2", "so2cl2", "nbs"]
    with pytest.raises(ValueError, match="unknown reagent"):
        check_reagent("nis")


@pytest.mark.parametrize("name", ["f2", "F2", "i2"])
def test_f2_i2_refused_with_reason(name: str) -> None:
    with pytest.raises(UnsupportedReagent) as info:
        check_reagent(name)
    message = str(info.value)
    assert "\n" not in message and "not predicted" in message
    assert info.value.refusal.sources


def test_iodine_refusal_uses_the_bond_enthalpies() -> None:
    # Blanksby & Ellison 2003 (from memory): CH3–H 105.0, H–I 71.3 → ΔH ≈ +34 kcal/mol.
    dh = P.BDE["methane"].value - P.BDE_HX["i"].value
    assert dh == pytest.approx(33.7)
    reason = NOT_PREDICTED["i2"].reason
    assert "endothermic by about 34 kcal/mol" in reason and "reversible" in reason and "HI" in reason


def test_fluorine_refusal_numbers() -> None:
    # F· per H ≈ 1 : 1.2 : 1.4 (textbook, from memory); CH3–H 105.0 vs H–F 136.3 (Blanksby & Ellison 2003).
    reason = NOT_PREDICTED["f2"].reason
    assert "1 : 1.2 : 1.4" in reason and "explosive" in reason
    assert f"{P.BDE_HX['f'].value - P.BDE['methane'].value:.1f}" in reason  # 31.3 kcal/mol exothermic
    assert "exothermic" in reason


@pytest.mark.parametrize("name", ["f2", "i2"])
def test_cli_refuses_f2_i2_exit_2(name: str, capsys: pytest.CaptureFixture) -> None:
    assert main(["explain", "CCC", "--reagent", name]) == 2
    err = capsys.readouterr().err.strip()
    assert err.count("\n") == 0 and err.startswith("halosift: ") and "not predicted" in err


def test_cli_refusal_json(capsys: pytest.CaptureFixture) -> None:
    assert main(["explain", "CCC", "--reagent", "i2", "--json"]) == 2
    data = json.loads(capsys.readouterr().out)
    assert data["status"] == "not predicted" and data["reagent"] == "i2" and data["sources"]


def test_cli_unknown_reagent_one_line() -> None:
    proc = subprocess.run([sys.executable, "-m", "halosift", "explain", "CCC", "--reagent", "xx"],
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 2 and proc.stderr.strip().count("\n") == 0 and "Traceback" not in proc.stderr


def test_so2cl2_is_cl_at_its_own_temperature() -> None:
    # Treated as Cl· (common practice, engine.parameters.SO2CL2_NOTE): at the same
    # temperature it must give exactly the Cl2 split, at another a different one.
    same = engine.explain("CCCC", engine.Conditions(cl2_temp_c=70.0, so2cl2_temp_c=70.0))
    for p in same.products:
        assert p.pct["so2cl2"] == pytest.approx(p.pct["cl2"])
        assert p.rate_basis["so2cl2"] in ("estimate", "not abstracted")
    hot = engine.explain("CCCC", engine.Conditions(cl2_temp_c=25.0, so2cl2_temp_c=150.0))
    prim = next(p for p in hot.products if p.smiles == "CCCCCl")
    assert prim.pct["so2cl2"] > prim.pct["cl2"]  # hotter, less selective


def test_cli_so2cl2_json(capsys: pytest.CaptureFixture) -> None:
    assert main(["explain", "CCC", "--reagent", "so2cl2", "--json", "--temp", "so2cl2=60"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["conditions"]["so2cl2_temp_c"] == 60
    assert set(data["products"][0]["pct"]) == {"so2cl2"}
    assert "so2cl2" in data["reagent_notes"] and "common practice" in data["reagent_notes"]["so2cl2"]
    assert data["confidence"] == "estimate"


def test_screen_gives_so2cl2_its_outcome_only() -> None:
    # A screen weighs SO2Cl2 for its outcome (engine.outcomes): major, share, outcome and reason, no polyhalide.
    result = engine.screen(__import__("pandas").DataFrame({"smiles": ["CCC"]}))
    assert {c for c in result.columns if c.startswith("so2cl2")} == {
        "so2cl2_major", "so2cl2_major_pct", "so2cl2_outcome", "so2cl2_reason"}
    assert {"cl2_major", "br2_major", "cl2_major_pct", "br2_major_pct"} <= set(result.columns)


def test_engine_api_refuses_f2_in_to_dict() -> None:
    e = engine.explain("CCC")
    with pytest.raises(UnsupportedReagent, match="F2 is not predicted"):
        e.to_dict(("f2",))
    assert set(e.to_dict(("so2cl2",))["products"][0]["pct"]) == {"so2cl2"}
