"""Over-halogenation planner: unreacted, mono- and polyhalide versus substrate : halogen ratio.

Model: competitive consecutive halogenation, integrated exactly (an estimate
for planning, assumptions stated in full).

* Substrate A and its monohalides B_i meet the same chain carrier at the
  same radical concentration; every step consumes one X2.
  A  → B_i   at rate h_i·k_i·[A]·r          (K = Σ h_j k_j)
  B_i → P    at rate f·(K − k_i)·[B_i]·r    (P: polyhalide)
  A monohalide keeps the substrate's other C–H; the halogen it carries slows
  them all by one factor f per radical
  (:data:`engine.parameters.POLY_DEACTIVATION`, an estimate).
* Dividing by dA/dt removes time and radical concentration: with φ_i =
  h_i k_i/K (the monohalide share) and κ_i = f·(1 − k_i/K),

      dB_i/dA = −φ_i + κ_i·B_i/A   ⇒   B_i = φ_i/(1 − κ_i)·(A^κ_i − A)

  (A as the fraction of substrate left; κ_i = 1 gives B_i = −φ_i·A·ln A).
  This is the textbook A → B → C solution with k2/k1 = κ_i.
* Halogen consumed per mole of substrate: X(A) = (1 − A) + P = 2(1 − A) − ΣB_i.
  P stands for every polyhalide; further steps (tri-, tetrahalides), which
  would use more halogen, are neglected — fair while P is small, the regime a
  plan aims for.
* With all halogen consumed at substrate : halogen = ρ, X(A) = 1/ρ fixes A.

The inverse: the conversion at which polyhalide reaches a cap (percent of
the halogenated product), and the smallest substrate excess ρ that stops
there.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from engine import parameters as P
from engine.reagents import RADICAL_OF

#: One line for output files and JSON: what the estimate assumes.
MODEL_NOTE = (
    "competitive consecutive halogenation, integrated: A → B_i (share φ_i), B_i → polyhalide at κ_i = "
    "f·(1 − k_i/K) times the substrate's rate, B_i = φ_i/(1 − κ_i)·(A^κ_i − A); halogen used 2(1 − A) − ΣB_i "
    "(tri- and higher halides neglected); f = deactivation by the first halogen (estimate, engine.parameters."
    "POLY_DEACTIVATION)"
)
#: Default cap on polyhalides, percent of halogenated product (common practice: a planning figure, no source).
DEFAULT_MAX_POLY_PCT = 10.0
DEFAULT_RATIO = P.POLY_SCREEN_RATIO
#: Bisection steps: 2⁻⁴⁸ in A for a plan; 2⁻¹⁶ (≈ 1.5e-5, below the 0.1 % shown) for the screen column,
#: which is recomputed on every re-weighing of a whole library.
_ITERATIONS = 48
_SCREEN_ITERATIONS = 16


def deactivation(reagent: str) -> float:
    """Factor f on a monohalide's remaining C–H rates for ``reagent`` (cl2, so2cl2, br2)."""
    return P.POLY_DEACTIVATION[RADICAL_OF[reagent]].value


def monohalide(left: np.ndarray, phi: np.ndarray, kappa: np.ndarray) -> np.ndarray:
    """B = φ/(1 − κ)·(A^κ − A), elementwise (A: substrate left, 0 ≤ A ≤ 1)."""
    left = np.clip(np.asarray(left, dtype=np.float64), 0.0, 1.0)
    phi = np.asarray(phi, dtype=np.float64)
    kappa = np.asarray(kappa, dtype=np.float64)
    near = np.abs(1.0 - kappa) < 1e-9
    safe = np.where(near, 0.5, kappa)
    with np.errstate(divide="ignore", invalid="ignore"):
        general = phi / (1.0 - safe) * (left**safe - left)
        limit = np.where(left > 0, -phi * left * np.log(np.where(left > 0, left, 1.0)), 0.0)
    return np.where(near, limit, general)


def _site_terms(h: np.ndarray, share: np.ndarray, f: float | np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(φ, κ) per product from H counts and monohalide shares (fractions)."""
    per_h = np.divide(share, h, out=np.zeros_like(share), where=h > 0)
    return share, f * (1.0 - per_h)


class Split:
    """Unreacted, mono- and polyhalide per structure, for many structures at once (vectorised)."""

    def __init__(self, struct: np.ndarray, h: np.ndarray, share: np.ndarray, f: float | np.ndarray, n: int) -> None:
        """``share``: monohalide fractions (summing to 1 per structure); ``struct`` groups rows; ``n`` structures."""
        use = (share > 0) & (h > 0)
        self.struct = np.asarray(struct)[use]
        f_rows = f[use] if isinstance(f, np.ndarray) else f
        self.phi, self.kappa = _site_terms(np.asarray(h, float)[use], np.asarray(share, float)[use], f_rows)
        self.n = n
        self.reacts = np.bincount(self.struct, minlength=n)[:n] > 0
        # Σ B_i = Σ c_i·A^κ_i − A·Σ c_i with c_i = φ_i/(1 − κ_i): the A-linear part is summed once here,
        # so each evaluation costs one exp per product (the bisections below call it many times).
        self._near = np.abs(1.0 - self.kappa) < 1e-9
        self._coef = np.where(self._near, 0.0, self.phi / np.where(self._near, 0.5, 1.0 - self.kappa))
        self._coef_sum = np.bincount(self.struct, weights=self._coef, minlength=n)[:n].astype(np.float64)

    def mono(self, left: np.ndarray) -> np.ndarray:
        """ΣB_i per structure at substrate left ``left`` (one value per structure)."""
        left = np.clip(np.asarray(left, dtype=np.float64), 0.0, 1.0)
        # A floored at 1e-300: A^κ → 0 at A = 0 for κ > 0, and stays 1 for κ = 0 (a substrate with one H).
        log_left = np.log(np.maximum(left, 1e-300))
        powered = np.exp(self.kappa * log_left[self.struct])
        total = np.bincount(self.struct, weights=self._coef * powered, minlength=self.n)[: self.n].astype(np.float64)
        total -= left * self._coef_sum
        if self._near.any():  # κ = 1: B = −φ·A·ln A
            rows = np.flatnonzero(self._near)
            a = left[self.struct[rows]]
            b = monohalide(a, self.phi[rows], self.kappa[rows])
            total += np.bincount(self.struct[rows], weights=b, minlength=self.n)[: self.n]
        return total

    def _mono_and_slope(self, left: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """ΣB_i and dΣB_i/dA per structure (for Newton steps; κ = 1 rows use their own limit form)."""
        safe = np.clip(left, 1e-300, 1.0)
        powered = np.exp(self.kappa * np.log(safe)[self.struct])
        mono = np.bincount(self.struct, weights=self._coef * powered, minlength=self.n)[: self.n] - left * self._coef_sum
        slope = (
            np.bincount(self.struct, weights=self._coef * self.kappa * powered, minlength=self.n)[: self.n] / safe
            - self._coef_sum
        )
        if self._near.any():
            rows = np.flatnonzero(self._near)
            a = safe[self.struct[rows]]
            mono += np.bincount(self.struct[rows], weights=monohalide(a, self.phi[rows], self.kappa[rows]), minlength=self.n)[: self.n]
            slope += np.bincount(self.struct[rows], weights=-self.phi[rows] * (np.log(a) + 1.0), minlength=self.n)[: self.n]
        return mono, slope

    def _start(self, available: np.ndarray) -> np.ndarray:
        """A first guess per structure from a one-site stand-in (share-weighted mean κ).

        Solving the stand-in costs one value per structure rather than per product, so
        it can be bisected finely; the full model then needs only a few Newton steps.
        """
        weight = np.bincount(self.struct, weights=self.phi, minlength=self.n)[: self.n]
        mean_kappa = np.divide(
            np.bincount(self.struct, weights=self.phi * self.kappa, minlength=self.n)[: self.n], weight,
            out=np.zeros(self.n), where=weight > 0,
        )
        k = np.clip(mean_kappa, 0.0, 1.0 - 1e-6)
        lo, hi = np.zeros(self.n), np.ones(self.n)
        for _ in range(12):  # a start, not the answer: Newton on the full model finishes it
            mid = (lo + hi) / 2
            used = 2.0 * (1.0 - mid) - (mid**k - mid) / (1.0 - k)
            above = used >= available  # too much halogen used: more substrate must survive
            lo = np.where(above, mid, lo)
            hi = np.where(above, hi, mid)
        # Kept off A = 0, where A^κ is too steep for Newton steps.
        return np.clip((lo + hi) / 2, 1e-3, 1.0)

    def left_at_ratio_fast(self, ratio: float, steps: int = 12) -> np.ndarray:
        """As :meth:`left_at_ratio`, by bracketed Newton steps (each costs one exp per product, as one
        bisection step does, but converges quadratically). Rows that do not settle fall back to bisection."""
        available = np.full(self.n, 1.0 / ratio)
        lo, hi = np.zeros(self.n), np.ones(self.n)
        left = self._start(available)
        for _ in range(steps):
            mono, slope = self._mono_and_slope(left)
            excess = 2.0 * (1.0 - left) - mono - available  # halogen used minus halogen given; falls as A rises
            if np.all(np.abs(excess) <= 1e-10):
                break
            lo = np.where(excess >= 0, left, lo)
            hi = np.where(excess < 0, left, hi)
            d_excess = -2.0 - slope
            with np.errstate(divide="ignore", invalid="ignore"):
                step = left - excess / d_excess
            inside = np.isfinite(step) & (step >= lo) & (step <= hi)
            left = np.where(inside, step, (lo + hi) / 2)
        mono, _ = self._mono_and_slope(left)
        residual = np.abs(2.0 * (1.0 - left) - mono - available)
        unsettled = residual > 1e-7
        if unsettled.any():
            left = np.where(unsettled, self.left_at_ratio(ratio), left)
        left = np.where(available >= 2.0, 0.0, left)
        return np.where(self.reacts, left, 1.0)

    def halogen_used(self, left: np.ndarray) -> np.ndarray:
        """X(A) = 2(1 − A) − ΣB_i per structure."""
        return 2.0 * (1.0 - left) - self.mono(left)

    def poly_fraction(self, left: np.ndarray) -> np.ndarray:
        """Polyhalide, fraction of the halogenated product (0 at no conversion)."""
        converted = 1.0 - left
        poly = np.maximum(0.0, converted - self.mono(left))
        return np.divide(poly, converted, out=np.zeros_like(converted), where=converted > 1e-15)

    def _bisect(self, test, target: np.ndarray, iterations: int) -> np.ndarray:
        """Largest A in [0, 1] per structure with test(A) ≥ target, where test falls as A rises."""
        lo, hi = np.zeros(self.n), np.ones(self.n)
        for _ in range(iterations):
            mid = (lo + hi) / 2
            above = test(mid) >= target
            lo = np.where(above, mid, lo)
            hi = np.where(above, hi, mid)
        return lo

    def left_at_ratio(self, ratio: float, iterations: int = _ITERATIONS) -> np.ndarray:
        """Substrate left when halogen (1/ratio mol per mol substrate) is used up; 1 where nothing reacts."""
        available = np.full(self.n, 1.0 / ratio)
        left = np.where(available >= 2.0, 0.0, self._bisect(self.halogen_used, available, iterations))
        return np.where(self.reacts, left, 1.0)

    def left_at_cap(self, cap: float) -> np.ndarray:
        """Substrate left at the conversion where polyhalide reaches ``cap`` (fraction of product)."""
        # poly_fraction falls as A rises: the largest-conversion A with poly ≤ cap is the smallest A with it.
        lo, hi = np.zeros(self.n), np.ones(self.n)
        ok_at_full = self.poly_fraction(np.zeros(self.n)) <= cap
        for _ in range(_ITERATIONS):
            mid = (lo + hi) / 2
            fine = self.poly_fraction(mid) <= cap
            hi = np.where(fine, mid, hi)
            lo = np.where(fine, lo, mid)
        return np.where(ok_at_full | ~self.reacts, np.where(self.reacts, 0.0, 1.0), hi)


def poly_pct_at_ratio(
    struct: np.ndarray, h: np.ndarray, share_pct: np.ndarray, reagent: str, n: int, ratio: float = DEFAULT_RATIO
) -> np.ndarray:
    """Per structure: polyhalide, percent of halogenated product, at ``ratio`` with all halogen used (NaN: inert)."""
    share = np.asarray(share_pct, float) / 100.0
    # Products under a millionth of the mixture change nothing shown; dropping them halves the work for Br2.
    share = np.where(share < 1e-6, 0.0, share)
    split = Split(struct, h, share, deactivation(reagent), n)
    left = split.left_at_ratio_fast(ratio)
    out = 100.0 * split.poly_fraction(left)
    return np.where(split.reacts, out, np.nan)


def poly_share(conversion: float, h_counts: Sequence[int], shares_pct: Sequence[float], f: float = 1.0) -> float:
    """Polyhalide fraction of halogenated product (0–1) at fractional ``conversion`` for one structure."""
    h = np.asarray(h_counts, dtype=np.float64)
    split = Split(np.zeros(len(h), dtype=np.int64), h, np.asarray(shares_pct, float) / 100.0, f, 1)
    return float(split.poly_fraction(np.array([1.0 - conversion]))[0])


@dataclass(frozen=True)
class PolyPlan:
    """Unreacted, mono- and polyhalide for one reagent, and what keeps polyhalide under a cap."""

    reagent: str
    """Reagent the split was weighed for."""
    ratio: float
    """Substrate : halogen charged (mol/mol), all halogen consumed."""
    unreacted_pct: float
    """Substrate left at that ratio, percent of substrate charged."""
    mono_pct_of_charge: float
    """Monohalides at that ratio, percent of substrate charged."""
    poly_pct_of_charge: float
    """Polyhalides at that ratio, percent of substrate charged."""
    conversion_pct: float
    """Substrate converted (at the ratio, or the --conversion asked for), percent."""
    mono_pct: float
    """Monohalides at ``conversion_pct``, percent of the halogenated product (moles)."""
    poly_pct: float
    """Polyhalides at ``conversion_pct``, percent of the halogenated product (moles)."""
    max_poly_pct: float
    """The cap asked for, percent of halogenated product."""
    max_conversion_pct: float
    """Highest conversion (percent) that keeps polyhalides at or under the cap."""
    min_ratio: float
    """Smallest substrate : halogen (mol/mol) that stops at that conversion (inf when nothing can)."""
    deactivation: float
    """Factor f on a monohalide's remaining C–H rates (estimate)."""
    deactivation_source: str
    """Where f comes from."""


def plan(
    reagent: str,
    h_counts: Sequence[int],
    shares_pct: Sequence[float],
    *,
    ratio: float = DEFAULT_RATIO,
    conversion_pct: float | None = None,
    max_poly_pct: float = DEFAULT_MAX_POLY_PCT,
) -> PolyPlan:
    """Split at ``ratio`` (or at ``conversion_pct`` when given) and the limits that keep polyhalide ≤ the cap."""
    if not ratio == ratio or ratio <= 0 or ratio == float("inf"):
        raise ValueError(f"substrate : halogen ratio {ratio:g} must be a positive number")
    if conversion_pct is not None and not 0 < conversion_pct < 100:
        raise ValueError(f"conversion {conversion_pct:g} % must lie strictly between 0 and 100")
    if not 0 < max_poly_pct < 100:
        raise ValueError(f"polyhalide cap {max_poly_pct:g} % must lie strictly between 0 and 100")
    h = np.asarray(h_counts, dtype=np.float64)
    f = deactivation(reagent)
    split = Split(np.zeros(len(h), dtype=np.int64), h, np.asarray(shares_pct, float) / 100.0, f, 1)
    left = split.left_at_ratio(ratio)
    mono = split.mono(left)
    at = left if conversion_pct is None else np.array([1.0 - conversion_pct / 100.0])
    poly = split.poly_fraction(at)
    cap_left = split.left_at_cap(max_poly_pct / 100.0)
    used = split.halogen_used(cap_left)
    min_ratio = float(1.0 / used[0]) if used[0] > 0 else float("inf")
    source = P.POLY_DEACTIVATION[RADICAL_OF[reagent]].source
    return PolyPlan(
        reagent=reagent, ratio=ratio, unreacted_pct=100.0 * float(left[0]), mono_pct_of_charge=100.0 * float(mono[0]),
        poly_pct_of_charge=100.0 * float(1.0 - left[0] - mono[0]), conversion_pct=100.0 * float(1.0 - at[0]),
        mono_pct=100.0 * float(1.0 - poly[0]), poly_pct=100.0 * float(poly[0]), max_poly_pct=max_poly_pct,
        max_conversion_pct=100.0 * float(1.0 - cap_left[0]), min_ratio=min_ratio, deactivation=f,
        deactivation_source=source,
    )
