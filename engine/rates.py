"""Per-hydrogen rate constants k(T) = A·exp(−Ea/RT) for every site class.

The measured anchors live in :mod:`engine.parameters`; this module derives
the rest (documented per class) and exposes vectorised look-ups.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cache

import numpy as np

from engine import parameters as P
from engine.parameters import Arrhenius
from engine.site_classes import (
    ABSTRACTABLE,
    DEGREES,
    DELOCALISED,
    SITE_CLASSES,
    delocalisation_shift,
    site_bde,
)

RADICALS = ("cl", "br")


def _fit_alpha(anchors: dict[str, Arrhenius]) -> float:
    """Least-squares slope of Ea against C–H BDE over the alkyl anchors."""
    xs = [P.BDE[d].value for d in DEGREES]
    ys = [anchors[d].ea for d in DEGREES]
    mx, my = sum(xs) / 3, sum(ys) / 3
    return sum((x - mx) * (y - my) for x, y in zip(xs, ys)) / sum((x - mx) ** 2 for x in xs)


def _br_anchors() -> dict[str, Arrhenius]:
    rt = P.R_KCAL * P.BR_REFERENCE_T_K
    return {
        d: Arrhenius(
            P.BR_A_PER_H.value,
            P.BR_EA_PRIMARY.value - rt * math.log(P.BR_RATIOS[d].value),
            "textbook",
            P.BR_RATIOS[d].source + "; equal A per H assumed, so ΔEa = −RT·ln(ratio) at 400 K",
        )
        for d in DEGREES
    }


def _cl_benzylic_alpha() -> float:
    """α for π-delocalised sites toward Cl·, from the ethylbenzene α/β split."""
    t = P.CL_ETHYLBENZENE_T_K
    alpha_pct = P.CL_ETHYLBENZENE_ALPHA_PCT.value
    per_h_ratio = (alpha_pct / 2) / ((100 - alpha_pct) / 3)
    prim, sec = P.CL_ANCHORS["primary"], P.CL_ANCHORS["secondary"]
    k_benzylic = per_h_ratio * prim.a_per_h * math.exp(-prim.ea / (P.R_KCAL * t))
    ea_benzylic = -P.R_KCAL * t * math.log(k_benzylic / sec.a_per_h)
    return (ea_benzylic - sec.ea) / delocalisation_shift("benzylic")


def _cl_cyclopropyl() -> Arrhenius:
    """Cl· + ring C–H of cyclopropane: the measured k(298 K) per H, with the secondary A per H (Ea derived)."""
    k = P.CL_CYCLOPROPANE_K298
    a = P.CL_ANCHORS["secondary"].a_per_h
    k_per_h = k.value / P.CL_CYCLOPROPANE_H
    ea = P.R_KCAL * P.CL_CYCLOPROPANE_T_K * math.log(a / k_per_h)
    return Arrhenius(
        a, ea, "measured",
        f"{k.source}; per H {k_per_h:.2e}; A per H taken from the secondary anchor, so Ea = {ea:.2f} kcal/mol "
        "(the temperature dependence is an estimate)",
    )


@dataclass(frozen=True)
class RateTable:
    """Arrhenius parameters of every site class toward one radical."""

    radical: str
    """'cl' or 'br'."""
    params: dict[str, Arrhenius]
    """Site class → per-H Arrhenius parameters (abstractable classes only)."""
    alpha_alkyl: float
    """BEP slope fitted on the alkyl anchors, used for bridgehead (and methane, cyclopropyl toward Br·)."""
    alpha_delocalised: float
    """BEP slope used for allylic, benzylic and propargylic sites."""
    valid_k: tuple[float, float]
    """Temperature range (K) the underlying data cover."""

    def per_h(self, temp_k: float) -> np.ndarray:
        """k per H at ``temp_k`` for every class, indexed by site code (0 when not abstracted)."""
        out = np.zeros(len(SITE_CLASSES))
        for i, site in enumerate(ABSTRACTABLE):
            p = self.params[site]
            out[i] = p.a_per_h * math.exp(-p.ea / (P.R_KCAL * temp_k))
        return out


def _derive(radical: str) -> RateTable:
    if radical == "cl":
        anchors = dict(P.CL_ANCHORS)
        alpha_deloc = _cl_benzylic_alpha()
        deloc_note = (
            f"α = {alpha_deloc:.3f} from the ethylbenzene α/β split with the secondary A factor "
            "(estimate; benzylic-secondary reproduces it by construction)"
        )
        valid = P.CL_RANGE_K
    else:
        anchors = _br_anchors()
        alpha_deloc = P.BEP_ALPHA_DELOCALISED_BR.value
        deloc_note = f"α = {alpha_deloc} ({P.BEP_ALPHA_DELOCALISED_BR.source})"
        valid = P.BR_RANGE_K
    alpha_alkyl = _fit_alpha(anchors)
    params: dict[str, Arrhenius] = dict(anchors)

    def shifted(base: str, bde_gap: float, alpha: float, note: str) -> Arrhenius:
        b = anchors[base]
        return Arrhenius(b.a_per_h, b.ea + alpha * bde_gap, "estimate", note)

    if radical == "cl":
        params["methane"] = P.CL_METHANE
    else:
        gap = P.BDE["methane"].value - P.BDE["primary"].value
        params["methane"] = shifted(
            "primary", gap, alpha_alkyl, f"BEP from primary, α = {alpha_alkyl:.2f}: {P.BEP_NOTE_ALKYL}"
        )
    if radical == "cl":
        params["cyclopropyl"] = _cl_cyclopropyl()
    else:
        gap = P.BDE["cyclopropyl"].value - P.BDE["secondary"].value
        params["cyclopropyl"] = shifted(
            "secondary", gap, alpha_alkyl, f"BEP from secondary, α = {alpha_alkyl:.2f}: {P.BEP_NOTE_ALKYL}"
        )
    gap = P.BDE_BRIDGEHEAD.value - P.BDE["tertiary"].value
    params["bridgehead"] = shifted(
        "tertiary", gap, alpha_alkyl,
        f"BEP from tertiary with ΔBDE {gap:+.1f} kcal/mol (bridgehead bond enthalpy is an estimate), "
        f"α = {alpha_alkyl:.2f}: {P.BEP_NOTE_ALKYL}",
    )
    for kind in DELOCALISED:
        for degree in DEGREES:
            gap = site_bde(f"{kind}-{degree}").value - P.BDE[degree].value
            params[f"{kind}-{degree}"] = shifted(
                degree, gap, alpha_deloc, f"BEP from {degree} with ΔBDE {gap:+.1f} kcal/mol, {deloc_note}"
            )
    return RateTable(radical, params, alpha_alkyl, alpha_deloc, valid)


@cache
def rate_table(radical: str) -> RateTable:
    """The (cached) rate table for 'cl' or 'br'."""
    if radical not in RADICALS:
        raise ValueError(f"unknown radical {radical!r}; expected one of {', '.join(RADICALS)}")
    return _derive(radical)


def enthalpy_of_abstraction(site: str, radical: str) -> float:
    """ΔH of R–H + X· → R· + H–X, kcal/mol (negative = exothermic)."""
    return site_bde(site).value - P.BDE_HX[radical].value
