"""Polyhalogenation planner: integrated competitive consecutive kinetics (engine.polyhalogenation)."""

from __future__ import annotations

import json
import math

import numpy as np
import pandas as pd
import pytest
from halosift.engine import parameters as P
from halosift.engine.polyhalogenation import Split, monohalide, plan

from halosift import engine
from halosift.cli import main


@pytest.mark.parametrize(("k1", "k2"), [(1.0, 0.3), (1.0, 0.75), (2.0, 5.0), (1.0, 1.0)])
def test_monohalide_is_the_analytic_a_b_c_solution(k1: float, k2: float) -> None:
    # Consecutive first-order reactions A → B → C (textbook kinetics, e.g. Atkins' Physical Chemistry,
    # "consecutive elementary reactions"; from memory): [B]/[A]0 = k1/(k2 − k1)·(e^(−k1 t) − e^(−k2 t)),
    # and k1 t e^(−k1 t) when k1 = k2. With A = e^(−k1 t) that is B(A) with φ = 1, κ = k2/k1.
    for t in (0.05, 0.5, 1.0, 3.0):
        a = math.exp(-k1 * t)
        if k1 == k2:
            expected = k1 * t * math.exp(-k1 * t)
        else:
            expected = k1 / (k2 - k1) * (math.exp(-k1 * t) - math.exp(-k2 * t))
        assert float(monohalide(np.array([a]), np.array([1.0]), np.array([k2 / k1]))[0]) == pytest.approx(expected)


def _simulate(h: list[int], k: list[float], f: float, halogen: float, dt: float = 2e-4) -> tuple[float, float, float]:
    """Explicit Euler integration of A + X2 → B_i, B_i + X2 → P until the halogen is gone (test-local).

    Rates: h_i·k_i·[A]·[X2] for A → B_i and f·(K − k_i)·[B_i]·[X2] for B_i → P, with K = Σ h_j k_j:
    the same kinetic scheme the module integrates in closed form, written out in time.
    """
    hk = np.array(h, float) * np.array(k, float)
    total = hk.sum()
    kb = f * (total - np.array(k, float))
    a, b, x, p = 1.0, np.zeros(len(h)), halogen, 0.0
    while x > 1e-7:
        form = hk * a * x * dt
        onward = kb * b * x * dt
        used = form.sum() + onward.sum()
        if used > x:  # last step: take only what is left
            scale = x / used
            form, onward, used = form * scale, onward * scale, x
        a -= form.sum()
        b += form - onward
        p += onward.sum()
        x -= used
    return a, float(b.sum()), p


@pytest.mark.parametrize("ratio", [1.0, 2.0, 4.0])
@pytest.mark.parametrize("reagent", ["cl2", "br2"])
def test_closed_form_matches_a_numerical_simulation(ratio: float, reagent: str) -> None:
    # n-butane-like substrate: 6 primary H and 4 secondary H, per-H rates 1 and 3.7.
    h, k = [6, 4], [1.0, 3.7]
    shares = 100 * np.array(h) * np.array(k) / np.dot(h, k)
    f = P.POLY_DEACTIVATION[engine.EXPLAIN_REAGENTS[reagent]].value
    a, mono, poly = _simulate(h, k, f, 1.0 / ratio)
    p = plan(reagent, h, list(shares), ratio=ratio)
    assert p.unreacted_pct == pytest.approx(100 * a, abs=0.1)
    assert p.mono_pct_of_charge == pytest.approx(100 * mono, abs=0.1)
    assert p.poly_pct_of_charge == pytest.approx(100 * poly, abs=0.1)


def _poly_share(conversion: float, h: list[int], pct: list[float], f: float) -> float:
    """Polyhalide fraction of the halogenated product at a conversion (test-local wrapper of Split)."""
    split = Split(np.zeros(len(h), dtype=np.int64), np.asarray(h, float), np.asarray(pct, float) / 100.0, f, 1)
    return float(split.poly_fraction(np.array([1.0 - conversion]))[0])


def test_deactivation_lowers_polyhalide() -> None:
    split = engine.explain("CCCC")
    h = [p.h_count for p in split.products]
    pct = [p.pct["cl2"] for p in split.products]
    assert _poly_share(0.5, h, pct, f=0.6) < _poly_share(0.5, h, pct, f=1.0)


def test_one_to_one_identity_and_excess_helps() -> None:
    # At 1 : 1 with all halogen used, 2(1 − A) − ΣB = 1 means polyhalide = substrate left (mass balance).
    e = engine.explain("C1CCCCC1")
    h = [p.h_count for p in e.products]
    pct = [p.pct["cl2"] for p in e.products]
    p1 = plan("cl2", h, pct, ratio=1.0)
    assert p1.poly_pct_of_charge == pytest.approx(p1.unreacted_pct, abs=1e-6)
    polys = [plan("cl2", h, pct, ratio=r).poly_pct for r in (1, 2, 5, 20)]
    assert polys == sorted(polys, reverse=True) and polys[-1] < 3


def test_inverse_cap_is_consistent() -> None:
    split = engine.explain("CC(C)C")
    h = [p.h_count for p in split.products]
    pct = [p.pct["cl2"] for p in split.products]
    p = plan("cl2", h, pct, max_poly_pct=10.0)
    f = P.POLY_DEACTIVATION["cl"].value
    assert _poly_share(p.max_conversion_pct / 100, h, pct, f) == pytest.approx(0.10, abs=1e-6)
    # Charging the minimum excess and using all halogen lands exactly on the cap.
    at_min = plan("cl2", h, pct, ratio=p.min_ratio, max_poly_pct=10.0)
    assert at_min.poly_pct == pytest.approx(10.0, abs=1e-3)
    assert 100 - at_min.unreacted_pct == pytest.approx(p.max_conversion_pct, abs=1e-3)


@pytest.mark.parametrize("reagent", ["cl2", "br2"])
def test_screen_column_explain_plan_and_app_detail_give_one_number(reagent: str) -> None:
    """One polyhalide figure: the screen column, explain's planner and the app's detail text agree."""
    from halosift.tui.detail import poly_text

    from halosift.formatting import poly_lines

    smiles = ["CCCC", "C1CCCCC1", "c1ccccc1", "CC(C)C", "CCC(C)CC"]
    library = engine.load_library(pd.DataFrame({"smiles": smiles}), use_cache=False)
    frame = library.evaluate(engine.Conditions())
    col = frame[f"{reagent}_poly_pct"].to_numpy(dtype=float)
    for i, smi in enumerate(smiles):
        e = engine.explain(smi)
        if e.verdict == "inert":
            assert math.isnan(col[i])
            continue
        p = plan(reagent, [x.h_count for x in e.products], [x.pct[reagent] for x in e.products])
        # The same solver: agreement to rounding, not to a looser bisection.
        assert col[i] == pytest.approx(p.poly_pct_at_ratio, abs=1e-9) and p.poly_pct == p.poly_pct_at_ratio
        shown = f"{col[i]:.1f} % of the halogenated product"
        assert shown in "\n".join(poly_lines(p))
        assert shown in poly_text(library.products(i, engine.Conditions())).plain


def test_split_with_nothing_reacting() -> None:
    s = Split(np.zeros(0, dtype=np.int64), np.zeros(0), np.zeros(0), 1.0, 2)
    assert list(s.reacts) == [False, False]
    p = plan("cl2", [], [])
    assert p.unreacted_pct == 100.0 and p.poly_pct_at_ratio == 0.0


@pytest.mark.parametrize(
    "kwargs", [{"conversion_pct": 0.0}, {"conversion_pct": 100.0}, {"max_poly_pct": 0.0}, {"ratio": 0.0}, {"ratio": -1.0}]
)
def test_plan_rejects_bad_values(kwargs: dict) -> None:
    with pytest.raises(ValueError):
        plan("cl2", [4], [100.0], **kwargs)


def test_cli_planner(capsys: pytest.CaptureFixture) -> None:
    assert main(["explain", "C", "--conversion", "50", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    # Methane at 50 %, f = 0.6: κ = 0.6·3/4 = 0.45, B = (0.5^0.45 − 0.5)/0.55 = 0.4950 mol,
    # polyhalide (0.5 − 0.4950)/0.5 = 1.0 % of the halogenated product.
    kappa = 0.6 * 0.75
    b = (0.5**kappa - 0.5) / (1 - kappa)
    assert data["polyhalogenation"]["cl2"]["poly_pct"] == pytest.approx(100 * (0.5 - b) / 0.5, abs=0.01)
    assert "estimate" in data["polyhalogenation_model"]
    assert main(["explain", "CCC", "--ratio", "3", "--max-poly", "5"]) == 0
    out = capsys.readouterr().out
    assert "at 3 : 1 substrate : halogen" in out and "polyhalide ≤ 5 % of the halogenated product" in out
    assert main(["explain", "c1ccccc1", "--ratio", "2"]) == 0  # inert: nothing planned
    assert "polyhalide" not in capsys.readouterr().out.replace("polyhalogenated", "")
    assert main(["explain", "CCC", "--ratio", "0"]) == 2
    assert "ratio" in capsys.readouterr().err


@pytest.mark.parametrize("ratio", [0.9, 0.8, 0.6, 0.51])
def test_excess_bromine_on_a_tertiary_dominated_substrate(ratio: float) -> None:
    # Isobutane-like with Br·: 9 primary H at 1 and 1 tertiary H at 1600 per H (the textbook per-H
    # ratio at 127 °C, engine.parameters). The tertiary bromide keeps only slow primary C–H (κ ≈ 0.006),
    # so with halogen in excess the substrate is spent long before the monobromide: the root lies far
    # below 1e-300 in A. Checked against the explicit simulation, which has no such limit.
    h, k = [9, 1], [1.0, 1600.0]
    shares = 100 * np.array(h) * np.array(k) / np.dot(h, k)
    a, mono, poly = _simulate(h, k, 1.0, 1.0 / ratio)
    p = plan("br2", h, list(shares), ratio=ratio)
    assert p.unreacted_pct == pytest.approx(100 * a, abs=0.1)
    assert p.mono_pct_of_charge == pytest.approx(100 * mono, abs=0.1)
    assert p.poly_pct_of_charge == pytest.approx(100 * poly, abs=0.1)
    assert p.poly_pct == pytest.approx(100 * poly / (1 - a), abs=0.1)
