"""The screen's polyhalide solve (engine.polyhalogenation.left_and_mono_at_ratio) against a plain scalar solve."""

from __future__ import annotations

import math

import numpy as np
import pytest
from halosift.engine import polyhalogenation as ph
from halosift.engine.polyhalogenation import Split, left_and_mono_at_ratio, plan, poly_pct_of_block
from halosift.engine.shares import blocks_by_length

from halosift import engine


def _mono(left: float, phi: list[float], kappa: list[float]) -> float:
    """ΣB_i at substrate left ``left``, term by term (test-local)."""
    total = 0.0
    for p, k in zip(phi, kappa):
        if abs(1.0 - k) < 1e-9:
            total += -p * left * math.log(left) if left > 0 else 0.0
        else:
            total += p / (1.0 - k) * (left**k - left)
    return total


def _reference(phi: list[float], kappa: list[float], ratio: float) -> tuple[float, float]:
    """(substrate left, polyhalide percent) by bisection on 2(1 − A) − ΣB(A) = 1/ratio, one structure at a time."""
    lo, hi = 0.0, 1.0
    for _ in range(100):
        mid = (lo + hi) / 2
        if 2.0 * (1.0 - mid) - _mono(mid, phi, kappa) >= 1.0 / ratio:
            lo = mid
        else:
            hi = mid
    converted = 1.0 - lo
    return lo, 100.0 * max(0.0, converted - _mono(lo, phi, kappa)) / converted


def _random_block(rng: np.random.Generator, terms: int, structures: int) -> tuple[np.ndarray, np.ndarray]:
    """(φ, κ) as a site table gives them: H counts and per-H rates drawn, κ = f·(1 − k_i/K), some padding zeros.

    Rates span twelve decades, so some κ come within 1e-9 of 1 under f = 1 (the −φ·A·ln A limit).
    """
    h = rng.integers(1, 7, size=(terms, structures)).astype(float)
    k = 10.0 ** rng.uniform(-10.0, 2.0, size=(terms, structures))
    if terms > 1:
        k[-1, ::3] = 0.0  # padding terms: no share
    total = (h * k).sum(axis=0)
    f = np.where(np.arange(structures) % 2 == 0, 1.0, 0.6)
    return h * k / total, f * (1.0 - k / total)


# Substrate in excess (the screen's 1 : 1 and the planner's regime): roots lie well inside (0, 1).
@pytest.mark.parametrize("ratio", [1.0, 1.5, 2.5, 10.0])
@pytest.mark.parametrize("terms", [1, 2, 5])
def test_block_solve_matches_scalar_bisection(ratio: float, terms: int) -> None:
    rng = np.random.default_rng(terms * 100 + int(ratio * 10))
    phi, kappa = _random_block(rng, terms, 60)
    left, mono = left_and_mono_at_ratio(phi, kappa, ratio)
    poly = poly_pct_of_block(phi, kappa, ratio)
    for j in range(phi.shape[1]):
        ref_left, ref_poly = _reference(list(phi[:, j]), list(kappa[:, j]), ratio)
        assert left[j] == pytest.approx(ref_left, abs=1e-9)
        assert mono[j] == pytest.approx(_mono(left[j], list(phi[:, j]), list(kappa[:, j])), abs=1e-12)
        assert poly[j] == pytest.approx(ref_poly, abs=1e-6)


def _log_left_by_bisection(split: Split, ratio: float) -> np.ndarray:
    """ln A where halogen used = 1/ratio, bisected in ln A with Split's own ΣB (test-local reference)."""
    lo, hi = np.full(1, ph.LOG_FLOOR), np.zeros(1)
    for _ in range(200):
        mid = (lo + hi) / 2
        above = 2.0 * (1.0 - np.exp(mid)) - split.mono_log(mid) >= 1.0 / ratio
        lo, hi = np.where(above, mid, lo), np.where(above, hi, mid)
    return np.where(1.0 / ratio >= 2.0, -np.inf, lo)


@pytest.mark.parametrize("ratio", [0.7, 1.0, 3.0])
def test_block_solve_agrees_with_a_log_bisection_of_the_split(ratio: float) -> None:
    # Halogen in excess can push the root far below what a double holds (A ≪ 1e-300 when one
    # product with κ ≈ 0 dominates); both solve in ln A there, so they still agree.
    rng = np.random.default_rng(int(ratio * 10))
    phi, kappa = _random_block(rng, 3, 40)
    poly = poly_pct_of_block(phi, kappa, ratio)
    for j in range(phi.shape[1]):
        h = np.ones(3)
        share = phi[:, j]
        f = 1.0 if j % 2 == 0 else 0.6
        # Split takes (h, share, f) and forms κ = f·(1 − share/h); h chosen to give this column's κ back.
        use = share > 0
        h[use] = share[use] / (1.0 - kappa[use, j] / f)
        split = Split(np.zeros(3, dtype=np.int64), h, share, f, 1)
        expected = 100.0 * split.poly_fraction_log(_log_left_by_bisection(split, ratio))[0]
        assert poly[j] == pytest.approx(expected, abs=1e-5)


def test_bisection_fallback_gives_the_same_answer(monkeypatch: pytest.MonkeyPatch) -> None:
    rng = np.random.default_rng(5)
    phi, kappa = _random_block(rng, 4, 40)
    expected = poly_pct_of_block(phi, kappa)
    monkeypatch.setattr(ph, "_SCREEN_STEPS", 0)  # no Halley step: every structure not settled at its start bisects
    assert poly_pct_of_block(phi, kappa) == pytest.approx(expected, abs=1e-6)


def test_more_than_two_halogens_per_substrate_leaves_none() -> None:
    # Ratio 0.4: 2.5 mol halogen per mol substrate, more than two substitutions can use (as Split.left_at_ratio).
    phi, kappa = np.array([[0.6], [0.4]]), np.array([[0.5], [0.3]])
    left, mono = left_and_mono_at_ratio(phi, kappa, 0.4)
    split = Split(np.zeros(2, dtype=np.int64), np.array([3.0, 2.0]), np.array([0.6, 0.4]), 1.0, 1)
    assert left[0] == 0.0 == plan("cl2", [3, 2], [60.0, 40.0], ratio=0.4).unreacted_pct
    assert mono[0] == pytest.approx(split.mono(np.zeros(1))[0])


def test_row_column_is_order_free_and_nan_for_inert() -> None:
    """The screen column does not depend on the order of the input rows; inert rows have none."""
    smiles = ["CCCC", "c1ccccc1", "CC(C)C", "C1CCCCC1"]
    p = engine.perceive(smiles)
    col = engine.summarise(p, engine.Conditions())["cl2_poly_pct"].to_numpy(dtype=float)
    assert math.isnan(col[1]) and not np.isnan(col[[0, 2, 3]]).any()
    order = [3, 0, 2, 1]
    again = engine.summarise(engine.perceive([smiles[i] for i in order]), engine.Conditions())
    again_col = again["cl2_poly_pct"].to_numpy(dtype=float)
    for j, i in enumerate(order):
        assert (math.isnan(col[i]) and math.isnan(again_col[j])) or again_col[j] == pytest.approx(col[i], rel=1e-12)


def test_blocks_cover_every_segment_once() -> None:
    rng = np.random.default_rng(2)
    lengths = rng.integers(0, 7, size=200)
    starts = np.cumsum(lengths) - lengths
    seen = np.zeros(len(lengths), dtype=int)
    for segments, index in blocks_by_length(starts, lengths):
        assert np.all(np.diff(segments) > 0)  # ascending, so per-block results scatter back in order
        for col, seg in enumerate(segments):
            assert index.shape[0] == lengths[seg]
            assert list(index[:, col]) == list(range(starts[seg], starts[seg] + lengths[seg]))
            seen[seg] += 1
    assert list(seen) == [1 if n else 0 for n in lengths]
