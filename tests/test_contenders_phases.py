"""The contender test (engine.contenders) against brute force over phases, temperatures and solvent exponents.

Random class patterns, π-activated classes included, weighed through the engine's own rate code
(rate tables and engine.solvent.scale_rates) on a dense grid; every class that leads at a grid
point must be a contender. Also checks that a solvent leaves the benzylic excess as measured.
"""

from __future__ import annotations

import numpy as np
import pytest
from halosift.engine.conditions import MAX_TEMP_C
from halosift.engine.contenders import contending_classes
from halosift.engine.parameters import KELVIN
from halosift.engine.rates import rate_table
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CODE
from halosift.engine.solvent import scale_rates


def _patterns(n: int, seed: int) -> list[tuple[tuple[int, int], ...]]:
    rng = np.random.default_rng(seed)
    out = []
    for _ in range(n):
        k = int(rng.integers(2, 7))
        codes = rng.choice(len(ABSTRACTABLE), size=k, replace=False)
        hs = rng.integers(1, 13, size=k)
        out.append(tuple(sorted((int(c), int(h)) for c, h in zip(codes, hs))))
    return out


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_cl_winners_on_a_dense_grid_are_contenders(seed: int) -> None:
    temps_k = np.geomspace(60.0, MAX_TEMP_C + KELVIN, 40)
    exponents = [0.0, 0.3, 0.7, 1.0, 1.6, 2.5, 4.0, 7.0]
    gas = np.array([rate_table("cl", "gas").per_h(t) for t in temps_k])
    liquid = np.array([scale_rates(rate_table("cl", "liquid").per_h(t), s) for t in temps_k for s in exponents])
    for pattern in _patterns(150, seed):
        codes = np.array([c for c, _ in pattern])
        h = np.array([n for _, n in pattern], dtype=float)
        allowed = contending_classes(pattern, "cl")
        for k in (gas, liquid):
            winners = set(codes[np.argmax(h[None, :] * k[:, codes], axis=1)].tolist())
            assert winners <= allowed, pattern


def test_solvent_keeps_the_benzylic_excess() -> None:
    # engine.solvent: a π-activated class keeps its excess over the alkyl class of the same degree.
    k = rate_table("cl", "liquid").per_h(298.15)
    scaled = scale_rates(k, 2.5)
    b, s = SITE_CODE["benzylic-secondary"], SITE_CODE["secondary"]
    assert scaled[b] / scaled[s] == pytest.approx(k[b] / k[s])
    p = SITE_CODE["primary"]
    assert scaled[s] / scaled[p] == pytest.approx((k[s] / k[p]) ** 2.5)
