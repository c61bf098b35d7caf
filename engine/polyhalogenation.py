"""Over-halogenation planner: unreacted, mono- and polyhalide versus substrate : halogen ratio.

Model: competitive consecutive halogenation, integrated exactly (an estimate
for planning, assumptions stated in full).

* Substrate A and its monohalides B_i meet the same chain carrier at the
  same radical concentration; every step consumes one X2.
  A  → B_i   at rate h_i·k_i·[A]·r          (K = Σ h_j k_j)
  B_i → P    at rate f·(K − k_i)·[B_i]·r    (P: polyhalide)
  A monohalide keeps the substrate's other C–H; the halogen it carries slows
  them all by one factor f per radical
  (:data:`halosift.engine.parameters.POLY_DEACTIVATION`, an estimate).
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

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from halosift.engine import parameters as P
from halosift.engine.reagents import RADICAL_OF

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
#: Unit of the polyhalide figure, wherever it is shown.
POLY_UNIT = "% of the halogenated product"
#: What the figure is, in words (app, explain, report and file metadata say it the same way).
POLY_FIGURE = (
    f"polyhalide, {POLY_UNIT} (moles), at {DEFAULT_RATIO:g} : 1 substrate : halogen with all halogen consumed"
)
#: Bisection steps: 2⁻⁴⁸ in A.
_ITERATIONS = 48
#: ln A searched down to here: with κ ≥ 1e-11, A^κ ≤ e^-10 at the floor (a slow monohalide spent too).
LOG_FLOOR = -1e12
#: Bisection steps in ln A: 2⁻⁸⁰ of the range, ≈ 1e-12 in ln A (a relative 1e-12 in A).
_LOG_ITERATIONS = 80
#: Below this substrate fraction the screen's steps in A are not trusted and ln A is bisected instead.
_TINY_LEFT = 1e-9
#: Halley steps of the screen column (recomputed on every re-weighing of a whole library) before the
#: structures not yet settled fall back to bisection.
_SCREEN_STEPS = 12
#: Halogen balance |used − charged| (mol per mol substrate) at which a screen solve counts as settled,
#: and the looser one accepted after the last step; either is far below the 0.1 % shown.
_SETTLED = 1e-10
_ACCEPTED = 1e-7
#: Grid of mean κ on which the one-site stand-in that starts the screen solve is tabulated.
_STAND_IN_GRID = np.linspace(0.0, 1.0 - 1e-6, 513)


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


def _bisect_log_left(mono_log: Callable[[np.ndarray], np.ndarray], n: int, available: float) -> np.ndarray:
    """Largest ln A in [LOG_FLOOR, 0] per structure with halogen used ≥ ``available``.

    Halogen used, 2(1 − A) − ΣB_i, falls as A rises; ``mono_log`` gives ΣB_i at ln A
    for the ``n`` structures (of :class:`Split` or of a screen's block).
    """
    lo, hi = np.full(n, LOG_FLOOR), np.zeros(n)
    for _ in range(_LOG_ITERATIONS):
        mid = (lo + hi) / 2
        above = 2.0 * (1.0 - np.exp(mid)) - mono_log(mid) >= available
        lo = np.where(above, mid, lo)
        hi = np.where(above, hi, mid)
    return lo


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
        return self.mono_log(np.log(np.maximum(left, 1e-300)))

    def mono_log(self, log_left: np.ndarray) -> np.ndarray:
        """ΣB_i per structure at ln A = ``log_left``.

        With halogen in excess the substrate can be spent far below what a double holds
        (A ≪ 1e-300 while a slow monohalide's A^κ is still large), so the ratio solve works in ln A.
        """
        log_left = np.minimum(np.asarray(log_left, dtype=np.float64), 0.0)
        left = np.exp(log_left)
        powered = np.exp(self.kappa * log_left[self.struct])
        total = np.bincount(self.struct, weights=self._coef * powered, minlength=self.n)[: self.n].astype(np.float64)
        total -= left * self._coef_sum
        if self._near.any():  # κ = 1: B = −φ·A·ln A
            rows = np.flatnonzero(self._near)
            b = -self.phi[rows] * left[self.struct[rows]] * log_left[self.struct[rows]]
            total += np.bincount(self.struct[rows], weights=b, minlength=self.n)[: self.n]
        return total

    def halogen_used(self, left: np.ndarray) -> np.ndarray:
        """X(A) = 2(1 − A) − ΣB_i per structure."""
        return 2.0 * (1.0 - left) - self.mono(left)

    def poly_fraction(self, left: np.ndarray) -> np.ndarray:
        """Polyhalide, fraction of the halogenated product (0 at no conversion)."""
        left = np.clip(np.asarray(left, dtype=np.float64), 0.0, 1.0)
        return self.poly_fraction_log(np.log(np.maximum(left, 1e-300)))

    def poly_fraction_log(self, log_left: np.ndarray) -> np.ndarray:
        """:meth:`poly_fraction` at ln A = ``log_left`` (for a substrate spent below what a double holds)."""
        converted = -np.expm1(np.minimum(np.asarray(log_left, dtype=np.float64), 0.0))
        poly = np.maximum(0.0, converted - self.mono_log(log_left))
        return np.divide(poly, converted, out=np.zeros_like(converted), where=converted > 1e-15)

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


@lru_cache(maxsize=8)
def _stand_in_table(available: float) -> np.ndarray:
    """Substrate left for a one-site stand-in, 2(1 − A) − (A^κ − A)/(1 − κ) = available, at each grid κ.

    The stand-in depends on nothing but κ, so it is bisected finely once per ratio and
    interpolated: a start for the full model at the cost of one lookup per structure.
    """
    k = _STAND_IN_GRID
    lo, hi = np.zeros(len(k)), np.ones(len(k))
    for _ in range(_ITERATIONS):
        mid = (lo + hi) / 2
        used = 2.0 * (1.0 - mid) - (mid**k - mid) / (1.0 - k)
        above = used >= available  # too much halogen used: more substrate must survive
        lo = np.where(above, mid, lo)
        hi = np.where(above, hi, mid)
    out = (lo + hi) / 2
    out.flags.writeable = False  # shared by every later call with this ratio
    return out


def _stand_in_left(mean_kappa: np.ndarray, available: float) -> np.ndarray:
    """Substrate left for the one-site stand-in with exponent ``mean_kappa`` (linear between grid points)."""
    table = _stand_in_table(float(available))
    step = _STAND_IN_GRID[1] - _STAND_IN_GRID[0]
    # The grid is even, so the cell is found by one division (np.interp would search for it).
    at = np.clip(mean_kappa / step, 0.0, len(_STAND_IN_GRID) - 1.0)
    cell = np.minimum(at.astype(np.intp), len(_STAND_IN_GRID) - 2)
    at -= cell
    return table[cell] + at * (table[cell + 1] - table[cell])


class _Block:
    """Structures as columns of (terms, structures) arrays of φ and κ, with what every evaluation reuses."""

    def __init__(self, phi: np.ndarray, kappa: np.ndarray) -> None:
        """``phi``, ``kappa``: one column per structure (padding terms have φ = 0)."""
        self.kappa = kappa
        self.kappa_less_one = kappa - 1.0
        near = np.abs(self.kappa_less_one) < 1e-9
        if near.any():
            # κ = 1 terms, −φ·A·ln A, are summed apart; the others are c·(A^κ − A) with c = φ/(1 − κ).
            self.coef = np.where(near, 0.0, phi / np.where(near, -0.5, self.kappa_less_one))
            self.near_phi: np.ndarray | None = np.where(near, phi, 0.0).sum(axis=0)
        else:
            self.coef = phi / self.kappa_less_one
            self.near_phi = None
        np.negative(self.coef, out=self.coef)
        self.coef_sum = self.coef.sum(axis=0)

    def subset(self, keep: np.ndarray) -> _Block:
        """The structures (columns) where ``keep`` is set."""
        out = _Block.__new__(_Block)
        out.kappa, out.kappa_less_one, out.coef = self.kappa[:, keep], self.kappa_less_one[:, keep], self.coef[:, keep]
        out.coef_sum = self.coef_sum[keep]
        out.near_phi = None if self.near_phi is None else self.near_phi[keep]
        return out

    def evaluate(self, left: np.ndarray, derivatives: bool = True) -> tuple[np.ndarray, np.ndarray | None, np.ndarray | None]:
        """ΣB_i per structure at substrate left ``left``, with its first and second derivatives in A."""
        safe = np.maximum(left, 1e-300)  # as Split.mono: A^κ → 0 at A = 0 for κ > 0, 1 for κ = 0
        x = np.multiply(self.kappa, np.log(safe))
        np.exp(x, out=x)
        x *= self.coef  # c·A^κ
        mono = x.sum(axis=0) - safe * self.coef_sum
        slope = curv = None
        if derivatives:
            x *= self.kappa  # c·κ·A^κ
            slope = x.sum(axis=0) / safe - self.coef_sum
            x *= self.kappa_less_one  # c·κ·(κ − 1)·A^κ
            curv = x.sum(axis=0) / (safe * safe)
        if self.near_phi is not None:
            log_safe = np.log(safe)
            mono -= self.near_phi * safe * log_safe
            if derivatives:
                slope -= self.near_phi * (log_safe + 1.0)
                curv -= self.near_phi / safe
        return mono, slope, curv

    def mono_log(self, log_left: np.ndarray) -> np.ndarray:
        """ΣB_i per structure at ln A = ``log_left`` (as :meth:`Split.mono_log`: A may be below any double)."""
        left = np.exp(log_left)
        mono = (self.coef * np.exp(self.kappa * log_left)).sum(axis=0) - left * self.coef_sum
        if self.near_phi is not None:
            mono -= self.near_phi * left * log_left
        return mono

    def bisect(self, available: float) -> tuple[np.ndarray, np.ndarray]:
        """Substrate left (largest A with halogen used ≥ ``available``) and ΣB_i there, by bisection in ln A."""
        log_left = _bisect_log_left(self.mono_log, self.kappa.shape[1], available)
        return np.exp(log_left), self.mono_log(log_left)


def left_and_mono_at_ratio(
    phi: np.ndarray, kappa: np.ndarray, ratio: float = DEFAULT_RATIO
) -> tuple[np.ndarray, np.ndarray]:
    """Per structure: substrate left when halogen (1/``ratio`` mol per mol) is used up, and ΣB_i there.

    ``phi``, ``kappa``: shape (terms, structures), one column per structure (padding: φ = 0; terms of
    equal κ may also be merged by adding their φ). Bracketed Halley steps from the stand-in start;
    a structure is done once its halogen balance settles, and the others alone are evaluated
    again. Structures that do not settle, and with halogen in excess those whose substrate is
    all but spent, fall back to bisection in ln A, as :func:`_bisect_log_left`.
    """
    phi, kappa = np.asarray(phi, dtype=np.float64), np.asarray(kappa, dtype=np.float64)
    block = _Block(phi, kappa)
    n = phi.shape[1]
    available = 1.0 / ratio
    left_out, mono_out = np.ones(n), np.zeros(n)
    if n == 0:
        return left_out, mono_out
    if available >= 2.0:  # more halogen than two per substrate: none survives
        left_out[:] = 0.0
        return left_out, block.evaluate(left_out, derivatives=False)[0]
    weight = phi.sum(axis=0)
    mean_kappa = np.divide((phi * kappa).sum(axis=0), weight, out=np.zeros(n), where=weight > 0)
    # Kept off A = 0, where A^κ is too steep for Halley steps.
    left = np.clip(_stand_in_left(mean_kappa, available), 1e-3, 1.0)
    ids = np.arange(n)
    lo, hi = np.zeros(n), np.ones(n)
    live = np.ones(n, dtype=bool)
    for step in range(_SCREEN_STEPS + 1):
        mono, slope, curv = block.evaluate(left)
        assert slope is not None and curv is not None  # derivatives were asked for
        excess = 2.0 * (1.0 - left) - mono - available  # halogen used minus halogen charged; falls as A rises
        done = live & (np.abs(excess) <= (_SETTLED if step < _SCREEN_STEPS else _ACCEPTED))
        if done.any():
            left_out[ids[done]], mono_out[ids[done]] = left[done], mono[done]
            live &= ~done
        remaining = int(np.count_nonzero(live))
        if step == _SCREEN_STEPS or remaining == 0:
            break
        above = excess >= 0
        np.copyto(lo, left, where=above)
        np.copyto(hi, left, where=~above)
        d1 = -2.0 - slope
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            newton = excess / d1
            bend = 1.0 + 0.5 * newton * curv / d1
            # Halley's step where the curvature term is tame, else Newton's; bisection if either leaves the bracket.
            nxt = left - np.where(bend > 0.5, newton / bend, newton)
        inside = np.isfinite(nxt) & (nxt >= lo) & (nxt <= hi)
        left = np.where(live, np.where(inside, nxt, (lo + hi) / 2), left)
        if remaining < 0.75 * len(live):  # repacking costs about a third of an evaluation: only once many are done
            block, ids, left, lo, hi = block.subset(live), ids[live], left[live], lo[live], hi[live]
            live = np.ones(len(ids), dtype=bool)
    if live.any():
        rest = block.subset(live) if not live.all() else block
        left_out[ids[live]], mono_out[ids[live]] = rest.bisect(available)
    if available > 1.0:
        # Halogen in excess can spend the substrate below what steps in A resolve; those go by ln A.
        tiny = np.flatnonzero(left_out < _TINY_LEFT)
        if len(tiny):
            left_out[tiny], mono_out[tiny] = _Block(phi[:, tiny], kappa[:, tiny]).bisect(available)
    return left_out, mono_out


def poly_pct_of_block(phi: np.ndarray, kappa: np.ndarray, ratio: float = DEFAULT_RATIO) -> np.ndarray:
    """Per structure (columns, as for :func:`left_and_mono_at_ratio`): polyhalide, percent of halogenated product.

    The one polyhalide figure halosift shows (screen column, app, explain, report): :data:`POLY_FIGURE`.
    """
    return _poly_pct(*left_and_mono_at_ratio(phi, kappa, ratio))


def _poly_pct(left: np.ndarray, mono: np.ndarray) -> np.ndarray:
    """Polyhalide, percent of the halogenated product, from substrate left and ΣB_i (0 with nothing converted)."""
    converted = 1.0 - left
    poly = np.maximum(0.0, converted - mono)
    return 100.0 * np.divide(poly, converted, out=np.zeros_like(converted), where=converted > 1e-15)


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
    poly_pct_at_ratio: float
    """Polyhalides at ``ratio`` with all halogen used, percent of the halogenated product (moles): at 1 : 1 the
    screen's cl2_poly_pct / br2_poly_pct (:data:`POLY_FIGURE`)."""
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
    if split.reacts[0]:
        # The screen's own solve (one column), so explain, the app and the screen column give one number.
        left, mono = left_and_mono_at_ratio(split.phi[:, None], split.kappa[:, None], ratio)
    else:
        left, mono = np.ones(1), np.zeros(1)
    poly_at_ratio = _poly_pct(left, mono) / 100.0
    at = left if conversion_pct is None else np.array([1.0 - conversion_pct / 100.0])
    poly = poly_at_ratio if conversion_pct is None else split.poly_fraction(at)
    cap_left = split.left_at_cap(max_poly_pct / 100.0)
    used = split.halogen_used(cap_left)
    min_ratio = float(1.0 / used[0]) if used[0] > 0 else float("inf")
    source = P.POLY_DEACTIVATION[RADICAL_OF[reagent]].source
    return PolyPlan(
        reagent=reagent, ratio=ratio, unreacted_pct=100.0 * float(left[0]), mono_pct_of_charge=100.0 * float(mono[0]),
        poly_pct_of_charge=100.0 * float(1.0 - left[0] - mono[0]), conversion_pct=100.0 * float(1.0 - at[0]),
        mono_pct=100.0 * float(1.0 - poly[0]), poly_pct=100.0 * float(poly[0]),
        poly_pct_at_ratio=100.0 * float(poly_at_ratio[0]), max_poly_pct=max_poly_pct,
        max_conversion_pct=100.0 * float(1.0 - cap_left[0]), min_ratio=min_ratio, deactivation=f,
        deactivation_source=source,
    )
