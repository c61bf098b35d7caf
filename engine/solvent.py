"""Solvent effect on Cl· selectivity: complexing solvents make chlorine atoms choosier.

Data: Russell's 2,3-dimethylbutane series (:data:`halosift.engine.parameters.RUSSELL_POINTS`),
per-H tertiary : primary at 25 °C.

Model (an estimate; the assumptions are the whole of it):

1. Interpolation. ln(ratio) is taken as piecewise linear in solvent molarity
   through the measured points, starting from the neat liquid (0 M, ratio ≈ 4);
   beyond the last measured point the last segment is extended, up to the
   molarity of the pure solvent (a warning says so).
2. Scaling. A solvent multiplies every Cl· log-selectivity by one factor ``s``:
   k'(site) = k(primary) · (k(site) / k(primary))^s, i.e. the effective
   activation difference ΔEa(site) = −RT·ln(k(site)/k(primary)) is scaled by
   ``s``. ``s`` is fixed so that the neat-liquid table's tertiary : primary
   ratio at 25 °C (Russell's neat point, ≈ 4, by construction of
   :func:`halosift.engine.rates.neat_liquid_exponent`) becomes the interpolated measured
   ratio; the same ``s`` is applied at every temperature and to every alkyl
   site class (secondary, bicyclic …), which Russell's data do not test; no per-class
   solvent data with numbers were found (README, *Solvent*), so none are entered.
   Benzylic, allylic and propargylic classes keep their excess over the alkyl
   class of the same degree unscaled: the liquid benzylic data were measured
   on neat alkylbenzenes, which are an aromatic medium already (an estimate;
   without it ethylbenzene in 8 M benzene came out 99.7 % α).
3. ``none`` leaves the table of the chosen phase as it is (engine.conditions:
   the neat liquid by default, or the gas phase); ``benzene``/``cs2`` at 0 M is
   the neat liquid too, so s = 1 there.
"""

from __future__ import annotations

import math
from functools import cache

import numpy as np
from halosift.engine import parameters as P
from halosift.engine.site_classes import SITE_CLASSES, SOLVENT_BASE

SOLVENTS: tuple[str, ...] = ("none", "benzene", "cs2")
_PRIMARY = SITE_CLASSES.index("primary")
_TERTIARY = SITE_CLASSES.index("tertiary")


def check_solvent(solvent: str, molar: float) -> None:
    """Raise ValueError (one line) for an unknown solvent or an impossible concentration."""
    if solvent not in SOLVENTS:
        raise ValueError(f"unknown solvent {solvent!r}; expected one of {', '.join(SOLVENTS)}")
    if not molar == molar:
        raise ValueError("solvent concentration is not a number")
    if solvent == "none":
        if molar != 0:
            raise ValueError("a solvent concentration needs a solvent (benzene or cs2)")
        return
    top = P.SOLVENT_MAX_MOLAR[solvent]
    if not 0 <= molar <= top:
        raise ValueError(f"{solvent} concentration {molar:g} M is outside 0–{top:g} M (the pure solvent)")


def _points(solvent: str) -> list[tuple[float, float]]:
    return [(0.0, P.RUSSELL_NEAT.value)] + [(c, v.value) for c, v in P.RUSSELL_POINTS[solvent]]


def measured_ratio(solvent: str, molar: float) -> float:
    """Per-H tertiary : primary of 2,3-dimethylbutane at 25 °C, interpolated log-linearly in molarity."""
    pts = _points(solvent)
    for (c0, r0), (c1, r1) in zip(pts, pts[1:]):  # noqa: B007 - the segment found is used after the loop
        if molar <= c1:
            break
    # (c0, r0)–(c1, r1) is now the segment holding molar, or the last one (extrapolation)
    t = (molar - c0) / (c1 - c0)
    return math.exp(math.log(r0) + t * (math.log(r1) - math.log(r0)))


def extrapolated(solvent: str, molar: float) -> bool:
    """True when ``molar`` lies beyond the last measured point of ``solvent``."""
    return solvent != "none" and molar > P.RUSSELL_POINTS[solvent][-1][0]


@cache
def _model_ratio_25c() -> float:
    from halosift.engine.rates import rate_table

    k = rate_table("cl", "liquid").per_h(P.RUSSELL_T_K)
    return float(k[_TERTIARY] / k[_PRIMARY])


def selectivity_exponent(solvent: str, molar: float) -> float:
    """The factor ``s`` on Cl· log-selectivities (1 for no solvent)."""
    if solvent == "none":
        return 1.0
    return math.log(measured_ratio(solvent, molar)) / math.log(_model_ratio_25c())


_BASE = np.array(SOLVENT_BASE)


def scale_rates(k: np.ndarray, s: float) -> np.ndarray:
    """Per-H rates by site code with each class's alkyl log-selectivity vs primary multiplied by ``s``.

    A π-activated class keeps its excess over the alkyl class of the same degree
    (:data:`halosift.engine.site_classes.SOLVENT_BASE`): k' = k_p · (k_base / k_p)^s · k / k_base.
    """
    if s == 1.0:
        return k
    prim = k[_PRIMARY]
    out = np.zeros_like(k)
    pos = k > 0
    base = k[_BASE]
    out[pos] = prim * (base[pos] / prim) ** s * (k[pos] / base[pos])
    return out
