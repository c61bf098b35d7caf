"""Solvent effect on Cl· selectivity against Russell's 2,3-dimethylbutane series.

Source for every number checked: Russell, J. Am. Chem. Soc. 1958, 80, 4987
(per-H tertiary : primary at 25 °C; values from memory). The measured points
are the calibration of engine.solvent, so checks at them guard the derivation;
the checks between them test the stated log-linear interpolation.
"""

from __future__ import annotations

import math

import pytest
from halosift.engine import Conditions
from halosift.engine.solvent import measured_ratio, selectivity_exponent

from halosift import engine
from halosift.cli import main


def tert_to_prim_per_h(conditions: Conditions) -> float:
    e = engine.explain("CC(C)C(C)C", conditions)
    by_site = {p.site: p for p in e.products}
    t, p = by_site["tertiary"], by_site["primary"]
    return (t.pct["cl2"] / t.h_count) / (p.pct["cl2"] / p.h_count)


@pytest.mark.parametrize(
    ("solvent", "molar", "published"),
    [("benzene", 0.0, 4.0), ("benzene", 4.0, 14.0), ("benzene", 8.0, 49.0), ("cs2", 12.0, 225.0)],
)
def test_russell_points(solvent: str, molar: float, published: float) -> None:
    # Russell 1958: ≈ 4 neat, ≈ 14 in 4 M benzene, ≈ 49 in 8 M benzene, ≈ 225 in 12 M CS2.
    got = tert_to_prim_per_h(Conditions(cl2_solvent=solvent, cl2_solvent_molar=molar))
    assert got == pytest.approx(published, rel=0.01)


def test_log_linear_between_points() -> None:
    # Midway (6 M benzene) the interpolation gives the geometric mean of 14 and 49.
    assert measured_ratio("benzene", 6.0) == pytest.approx(math.sqrt(14 * 49))
    got = tert_to_prim_per_h(Conditions(cl2_solvent="benzene", cl2_solvent_molar=6.0))
    assert got == pytest.approx(math.sqrt(14 * 49), rel=0.01)


def test_more_solvent_more_selective() -> None:
    ratios = [tert_to_prim_per_h(Conditions(cl2_solvent="benzene", cl2_solvent_molar=c)) for c in (1, 3, 5, 7, 9, 11)]
    assert ratios == sorted(ratios)


def test_no_solvent_leaves_model_alone() -> None:
    assert selectivity_exponent("none", 0.0) == 1.0
    assert engine.explain("CCC", Conditions()).products == engine.explain("CCC", Conditions(cl2_solvent="none")).products


def test_solvent_touches_cl2_only() -> None:
    plain = {p.smiles: p.pct for p in engine.explain("CCC", Conditions()).products}
    solv = {p.smiles: p.pct for p in engine.explain("CCC", Conditions(cl2_solvent="cs2", cl2_solvent_molar=12)).products}
    for smi in plain:
        assert solv[smi]["br2"] == pytest.approx(plain[smi]["br2"])
        assert solv[smi]["so2cl2"] == pytest.approx(plain[smi]["so2cl2"])
    assert solv["CC(C)Cl"]["cl2"] > plain["CC(C)Cl"]["cl2"]


def test_solvent_rates_are_estimates() -> None:
    e = engine.explain("CCC", Conditions(cl2_solvent="benzene", cl2_solvent_molar=4))
    assert {p.rate_basis["cl2"] for p in e.products} == {"estimate"}


@pytest.mark.parametrize(
    ("solvent", "molar", "message"),
    [("water", 1.0, "unknown solvent"), ("benzene", -1.0, "outside"), ("benzene", 20.0, "outside"),
     ("none", 3.0, "needs a solvent")],
)
def test_bad_solvent_values(solvent: str, molar: float, message: str) -> None:
    with pytest.raises(ValueError, match=message):
        Conditions(cl2_solvent=solvent, cl2_solvent_molar=molar).validate()


def test_extrapolation_warns() -> None:
    assert any("extrapolated" in w for w in Conditions(cl2_solvent="benzene", cl2_solvent_molar=10).warnings())
    assert not Conditions(cl2_solvent="benzene", cl2_solvent_molar=6).warnings()


def test_warnings_name_reagents_as_chemists_write_them() -> None:
    # Every warning a chemist reads says Cl2, Br2, SO2Cl2, NBS: the lowercase tokens are option values, not names.
    import re

    hot = Conditions(cl2_phase="gas", cl2_temp_c=400, br2_temp_c=400, so2cl2_temp_c=150, nbs_temp_c=140,
                     cl2_solvent="none")
    cold = Conditions(cl2_phase="solution", cl2_solvent="benzene", cl2_solvent_molar=10, cl2_temp_c=60)
    warned = hot.warnings() + cold.warnings()
    assert len(warned) >= 3
    for text in warned:
        assert not re.search(r"\b(cl2|br2|so2cl2|nbs)\b", text), text


def test_cli_solvent(capsys: pytest.CaptureFixture) -> None:
    assert main(["explain", "CC(C)C(C)C", "--solvent", "benzene=8", "--reagent", "cl2"]) == 0
    out = capsys.readouterr().out
    assert "in 8 M benzene" in out and "confidence estimate" in out
    with pytest.raises(SystemExit) as usage:  # argparse usage error: exit 2, one line
        main(["explain", "CCC", "--solvent", "benzene"])
    assert usage.value.code == 2
    assert "concentration" in capsys.readouterr().err
    assert main(["explain", "CCC", "--solvent", "toluene=3"]) == 2
    assert "unknown solvent" in capsys.readouterr().err


def test_cli_screen_solvent(tmp_path) -> None:
    import pandas as pd

    src = tmp_path / "in.csv"
    src.write_text("smiles\nCC(C)C(C)C\nCC1CC1\nCCO\n")
    out = tmp_path / "out.csv"
    assert main(["screen", str(src), "-o", str(out), "--no-cache", "--quiet", "--solvent", "benzene=8"]) == 0
    back = pd.read_csv(out, keep_default_na=False)
    # Methylcyclopropane: every reagent is ruled out (its radical ring-opens), so no rate basis counts.
    assert list(back["confidence"]) == ["estimate", "", ""]
    assert list(back["flags"]) == ["", "cyclopropylmethyl,cyclopropane", ""]
    assert "8 M benzene" in (tmp_path / "out.csv.about.txt").read_text()
    # 2,3-dimethylbutane in 8 M benzene: tertiary chloride 2 H × 49 vs primary 12 H × 1 (Russell 1958, from memory).
    assert float(back["cl2_major_pct"].iloc[0]) == pytest.approx(100 * 2 * 49 / (2 * 49 + 12), rel=0.01)
