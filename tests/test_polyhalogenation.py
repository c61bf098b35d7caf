"""Polyhalogenation planner: consecutive first-order statistics (engine.polyhalogenation)."""

from __future__ import annotations

import json

import numpy as np
import pytest

import engine
from engine.polyhalogenation import _mono, plan, poly_share
from halosift.cli import main


def test_matches_textbook_consecutive_kinetics() -> None:
    # A → B → C with k2/k1 = κ (textbook consecutive first-order kinetics):
    # B = (A^κ − A)/(1 − κ), maximal at A = κ^(1/(1−κ)) with B_max = κ^(κ/(1−κ)).
    # Methane, all four H alike: κ = 3/4.
    kappa = 0.75
    for x in (0.1, 0.4, 0.8):
        a = 1 - x
        assert _mono(x, np.array([4.0]), np.array([0.25])) == pytest.approx((a**kappa - a) / (1 - kappa))
    a_at_max = kappa ** (1 / (1 - kappa))
    xs = np.linspace(0.01, 0.99, 9801)
    best = xs[np.argmax([_mono(x, np.array([4.0]), np.array([0.25])) for x in xs])]
    assert best == pytest.approx(1 - a_at_max, abs=1e-3)


def test_low_conversion_limit_and_monotone() -> None:
    # At vanishing conversion every halogenated molecule is a monohalide; the share of
    # polyhalide then rises steadily with conversion (common practice: excess hydrocarbon).
    split = engine.explain("CCCC")
    h = [p.h_count for p in split.products]
    pct = [p.pct["cl2"] for p in split.products]
    assert poly_share(1e-6, h, pct) == pytest.approx(0, abs=1e-5)
    shares = [poly_share(x, h, pct) for x in (0.05, 0.2, 0.5, 0.8, 0.95)]
    assert shares == sorted(shares) and shares[-1] > 0.5


def test_plan_cap_is_consistent() -> None:
    split = engine.explain("CC(C)C")
    h = [p.h_count for p in split.products]
    pct = [p.pct["br2"] for p in split.products]
    p = plan("br2", h, pct, 30.0, 10.0)
    assert p.mono_pct + p.poly_pct == pytest.approx(100)
    assert poly_share(p.max_conversion_pct / 100, h, pct) == pytest.approx(0.10, abs=1e-6)


@pytest.mark.parametrize(("conv", "cap"), [(0.0, 10.0), (100.0, 10.0), (50.0, 0.0), (50.0, 100.0)])
def test_plan_rejects_bad_values(conv: float, cap: float) -> None:
    with pytest.raises(ValueError, match="strictly between"):
        plan("cl2", [4], [100.0], conv, cap)


def test_cli_conversion(capsys: pytest.CaptureFixture) -> None:
    assert main(["explain", "C", "--conversion", "50", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    # Methane at 50 %: B = 4(0.5^0.75 − 0.5) = 0.378 mol, poly 0.122 of 0.5 mol halogenated = 24.3 %.
    assert data["polyhalogenation"]["cl2"]["poly_pct"] == pytest.approx(24.3, abs=0.1)
    assert "estimate" in data["polyhalogenation_model"]
    assert main(["explain", "c1ccccc1", "--conversion", "50"]) == 0  # inert: nothing planned
    assert "polyhalide" not in capsys.readouterr().out.replace("polyhalogenated", "")
    assert main(["explain", "CCC", "--max-poly", "5"]) == 2
