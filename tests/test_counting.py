"""Counting checks against integer sequences (OEIS)."""

from __future__ import annotations

import pytest
from alkanes import alkanes

from halosift import engine

# OEIS A000602: number of alkane isomers CnH2n+2 (n = 1..10).
A000602 = [1, 1, 1, 2, 3, 5, 9, 18, 35, 75]
# OEIS A000598: number of rooted quartic trees = alkyl groups CnH2n+1 (n = 1..10).
A000598 = [1, 1, 2, 4, 8, 17, 39, 89, 211, 507]


@pytest.mark.parametrize("n", range(1, 11))
def test_isomer_enumeration_matches_oeis_a000602(n: int) -> None:
    assert len(alkanes(n)) == A000602[n - 1]


@pytest.mark.parametrize("n", range(1, 11))
def test_monochlorides_over_all_isomers_match_oeis_a000598(n: int) -> None:
    # Each alkyl group CnH2n+1 is exactly one monochloride of exactly one alkane.
    isomers = sorted(alkanes(n))
    p = engine.perceive(isomers)
    summary = engine.summarise(p, engine.Conditions())
    assert int(summary["n_products"].sum()) == A000598[n - 1]
