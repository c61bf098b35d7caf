"""Per-structure shares of per-row weights: the one normalisation every reagent's split uses."""

from __future__ import annotations

import numpy as np


def percent_of_structure(weights: np.ndarray, struct: np.ndarray, n_struct: int) -> np.ndarray:
    """Each row's weight as a percent of its structure's total (0 where the total is 0)."""
    totals = np.bincount(struct, weights=weights, minlength=n_struct)
    denom = totals[struct] if len(struct) else np.zeros(0)
    with np.errstate(invalid="ignore", divide="ignore"):
        # Divide first: 100·w/total can round to 99.99999999999999 for a lone product.
        return np.where(denom > 0, 100.0 * (weights / np.where(denom > 0, denom, 1.0)), 0.0)
