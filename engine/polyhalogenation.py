"""Over-halogenation planner: how much polyhalide to expect at a given conversion.

Model (an estimate for planning, stated in full):

* Substrate A and its monohalides B_i react with the same chain carrier at
  the same radical concentration (consecutive first-order steps in A).
* A monohalide keeps every C–H of the substrate except the one replaced, with
  unchanged per-H rate constants: the halogen's own effect on neighbouring
  C–H is ignored (an estimate; it is not small in reality).
* Everything a monohalide turns into is counted as "polyhalide".

With K = Σ h_j k_j (substrate) and k_i the per-H rate of site i, each B_i is
consumed at K − k_i, and integrating gives, at fraction A = 1 − X of the
substrate left,

    B_i = h_i · (A^(1 − k_i/K) − A),

where k_i/K = (share_i / 100) / h_i follows from the monohalide split alone.
Polyhalide = X − Σ B_i (moles per mole of substrate charged).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

#: One line for output files and JSON: what the estimate assumes.
MODEL_NOTE = (
    "consecutive first-order statistics: substrate and monohalides meet the same radical; each monohalide keeps "
    "the substrate's other C–H with unchanged rates (halogen substituent effects ignored: an estimate); "
    "B_i = h_i·(A^(1 − k_i/K) − A)"
)
#: Default cap on polyhalides, percent of halogenated product (common practice: a planning figure, no source).
DEFAULT_MAX_POLY_PCT = 10.0


@dataclass(frozen=True)
class PolyPlan:
    """Monohalide versus polyhalide for one reagent at one conversion."""

    reagent: str
    """Reagent the split was weighed for."""
    conversion_pct: float
    """Substrate converted, percent."""
    mono_pct: float
    """Monohalides, percent of the halogenated product (moles)."""
    poly_pct: float
    """Polyhalides, percent of the halogenated product (moles)."""
    max_poly_pct: float
    """The cap asked for, percent of halogenated product."""
    max_conversion_pct: float
    """Highest conversion (percent) that keeps polyhalides at or under the cap."""


def _mono(conversion: float, h: np.ndarray, frac_per_h: np.ndarray) -> float:
    """Moles of monohalide per mole of substrate at fractional ``conversion``."""
    left = 1.0 - conversion
    return float(np.sum(h * (left ** (1.0 - frac_per_h) - left)))


def poly_share(conversion: float, h_counts: Sequence[int], shares_pct: Sequence[float]) -> float:
    """Polyhalide fraction of halogenated product (0–1) at fractional ``conversion`` (0 < c < 1)."""
    h = np.asarray(h_counts, dtype=np.float64)
    share = np.asarray(shares_pct, dtype=np.float64) / 100.0
    use = (share > 0) & (h > 0)
    if not use.any() or conversion <= 0:
        return 0.0
    frac = share[use] / h[use]
    mono = _mono(conversion, h[use], frac)
    return max(0.0, (conversion - mono) / conversion)


def plan(
    reagent: str,
    h_counts: Sequence[int],
    shares_pct: Sequence[float],
    conversion_pct: float,
    max_poly_pct: float = DEFAULT_MAX_POLY_PCT,
) -> PolyPlan:
    """Split at ``conversion_pct`` and the highest conversion keeping polyhalides ≤ ``max_poly_pct``."""
    if not 0 < conversion_pct < 100:
        raise ValueError(f"conversion {conversion_pct:g} % must lie strictly between 0 and 100")
    if not 0 < max_poly_pct < 100:
        raise ValueError(f"polyhalide cap {max_poly_pct:g} % must lie strictly between 0 and 100")
    poly = poly_share(conversion_pct / 100.0, h_counts, shares_pct)
    # Polyhalide share rises monotonically with conversion: bisect for the cap.
    lo, hi = 0.0, 1.0 - 1e-12
    if poly_share(hi, h_counts, shares_pct) <= max_poly_pct / 100.0:
        lo = hi
    else:
        for _ in range(60):
            mid = (lo + hi) / 2
            if poly_share(mid, h_counts, shares_pct) <= max_poly_pct / 100.0:
                lo = mid
            else:
                hi = mid
    return PolyPlan(reagent, conversion_pct, 100.0 * (1 - poly), 100.0 * poly, max_poly_pct, 100.0 * lo)
