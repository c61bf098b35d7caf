"""Per-hydrogen rate constants k(T) = A·exp(−Ea/RT) for every site class.

The measured anchors live in :mod:`halosift.engine.parameters`; this module derives
the rest (documented per class) and exposes vectorised look-ups.

Three tables: Cl· in the gas phase, Cl· in the liquid (the neat hydrocarbon,
which is what a preparative chlorination is), and Br·. Every entry of every
table is Arrhenius, which :mod:`halosift.engine.contenders` relies on.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cache

import numpy as np
from halosift.engine import parameters as P
from halosift.engine.parameters import Arrhenius
from halosift.engine.site_classes import (
    ABSTRACTABLE,
    BICYCLIC,
    DEGREES,
    DELOCALISED,
    SITE_CLASSES,
    delocalisation_shift,
    site_bde,
)

RADICALS = ("cl", "br")
#: Phases of a Cl2 chlorination (Br· has one table: its ratios are liquid-phase data).
PHASES = ("gas", "liquid")
#: Every table a condition can select: (radical, phase).
TABLES: tuple[tuple[str, str], ...] = (("cl", "gas"), ("cl", "liquid"), ("br", "liquid"))
_RT = P.R_KCAL


def _k(p: Arrhenius, temp_k: float) -> float:
    return p.a_per_h * math.exp(-p.ea / (_RT * temp_k))


def _times(base: Arrhenius, factor: float, temp_k: float, basis: str, source: str) -> Arrhenius:
    """``base`` made ``factor`` times faster at ``temp_k`` through Ea alone (equal A)."""
    return Arrhenius(base.a_per_h, base.ea - _RT * temp_k * math.log(factor), basis, source)


def _a_times(base: Arrhenius, factor: float, basis: str, source: str) -> Arrhenius:
    """``base`` made ``factor`` times faster at every temperature (through A alone)."""
    return Arrhenius(base.a_per_h * factor, base.ea, basis, source)


def _through(a: float, k_t: float, temp_k: float, basis: str, source: str) -> Arrhenius:
    """Parameters with A per H ``a`` whose rate constant at ``temp_k`` is ``k_t``."""
    return Arrhenius(a, -_RT * temp_k * math.log(k_t / a), basis, source)


def _two_point(prim: Arrhenius, r1: float, t1: float, r2: float, t2: float, source: str) -> Arrhenius:
    """Arrhenius parameters whose ratio to ``prim`` is r1 at t1 and r2 at t2."""
    dea = -_RT * math.log(r1 / r2) / (1.0 / t1 - 1.0 / t2)
    a = prim.a_per_h * r2 * math.exp(dea / (_RT * t2))
    return Arrhenius(a, prim.ea + dea, "measured", source)


# --- Cl· -------------------------------------------------------------------


def _cl_gas_alkyl() -> dict[str, Arrhenius]:
    """Methane, primary, secondary, tertiary and cyclopropyl C–H toward Cl· in the gas phase."""
    ss = P.CL_ANCHORS
    prim = ss["primary"]
    out = {"primary": prim}
    for degree in ("secondary", "tertiary"):
        r_low = _k(ss[degree], P.CL_LOW_T_K) / _k(prim, P.CL_LOW_T_K)
        hot = P.CL_VAPOUR_RATIOS[degree]
        out[degree] = _two_point(
            prim, r_low, P.CL_LOW_T_K, hot.value, P.CL_VAPOUR_T_K,
            f"through {ss[degree].source} (per H {r_low:.2f} × primary at 298 K) and {hot.source}",
        )
    out["methane"] = P.CL_METHANE
    out["cyclopropyl"] = P.CL_CYCLOPROPANE
    return out


def neat_liquid_exponent() -> float:
    """Factor on gas-phase Cl· log-selectivities (vs primary) that gives the neat liquid: Russell's 2,3-dimethylbutane."""
    gas = _cl_gas_alkyl()
    t = P.RUSSELL_T_K
    return math.log(P.RUSSELL_NEAT.value) / math.log(_k(gas["tertiary"], t) / _k(gas["primary"], t))


def _scaled(params: dict[str, Arrhenius], s: float, source: str) -> dict[str, Arrhenius]:
    """Every log-selectivity vs primary multiplied by ``s`` (ln A and Ea differences scale alike)."""
    prim = params["primary"]
    out = {}
    for site, p in params.items():
        a = math.exp(math.log(prim.a_per_h) + s * (math.log(p.a_per_h) - math.log(prim.a_per_h)))
        ea = prim.ea + s * (p.ea - prim.ea)
        out[site] = Arrhenius(a, ea, p.basis if site == "primary" else "estimate",
                              p.source if site == "primary" else f"{p.source}; {source}")
    return out


def _cl_delocalised(table: dict[str, Arrhenius], phase: str) -> dict[str, Arrhenius]:
    """Benzylic (and, by the same factors, allylic and propargylic) C–H toward Cl·."""
    out = {}
    if phase == "gas":
        # Benzylic excess over the alkyl C–H of the same degree at 298 K: toluene fixes the primary one,
        # ethylbenzene (less its β CH3) the secondary one, which tertiary sites take too (estimate).
        t = P.CL_LOW_T_K
        tol, eb = P.CL_TOLUENE_K298, P.CL_ETHYLBENZENE_K298
        g_prim = tol.value / P.CL_TOLUENE_H / _k(table["primary"], t)
        g_sec = (eb.value - 3 * _k(table["primary"], t)) / 2 / _k(table["secondary"], t)
        excess = {"primary": (g_prim, tol.source), "secondary": (g_sec, eb.source + " less 3 primary C–H"),
                  "tertiary": (g_sec, eb.source + " less 3 primary C–H; carried over from secondary")}
        for kind in DELOCALISED:
            for degree in DEGREES:
                g, src = excess[degree]
                measured = kind == "benzylic" and degree != "tertiary"
                out[f"{kind}-{degree}"] = _a_times(
                    table[degree], g, "measured" if measured else "estimate",
                    f"{degree} alkyl × {g:.2f} in A (benzylic excess at 298 K from {src}; temperature-independent"
                    + ("" if kind == "benzylic" else ", carried over to the " + kind + " class") + ": estimate)",
                )
        return out
    t = P.CL_ETHYLBENZENE_T_K
    pct = P.CL_ETHYLBENZENE_ALPHA_PCT.value
    per_h = (pct / 2) / ((100 - pct) / 3)
    # A weaker C–H never gets a smaller A than a stronger one: every π-activated class takes the largest A of
    # the saturated classes (tertiary's), and its Ea is set so the 25 °C split is kept. The measured
    # Eα − Eβ (CL_ETHYLBENZENE_DEA) with the same split would give A(α)/A(β) = 0.07 per H, which inverts the
    # order above ≈ 150 °C (the high-temperature limit of a per-H ratio is the ratio of A factors).
    a_top = max(p.a_per_h for p in table.values())
    k_sec = _k(table["primary"], t) * per_h  # ethylbenzene α per H at 25 °C
    for kind in DELOCALISED:
        for degree in DEGREES:
            k_t = k_sec * _k(table[degree], t) / _k(table["secondary"], t)
            measured = (kind, degree) == ("benzylic", "secondary")
            out[f"{kind}-{degree}"] = _through(
                a_top, k_t, t, "measured" if measured else "estimate",
                (f"{P.CL_ETHYLBENZENE_ALPHA_PCT.source}, i.e. {per_h:.1f} × the β CH3 per H at 25 °C"
                 if measured else
                 f"benzylic-secondary (ethylbenzene α, liquid) × the liquid {degree}/secondary alkyl ratio at 25 °C"
                 + ("" if kind == "benzylic" else f", carried over to the {kind} class") + " (additivity estimate)")
                + "; A per H = the largest saturated-class A, so no stronger C–H overtakes it when hot "
                "(estimate; the measured Eα − Eβ is not used, see engine.rates)",
            )
    return out


def _bicyclic(table: dict[str, Arrhenius], radical: str) -> dict[str, Arrhenius]:
    """Bridgehead and the norbornane positions (C2-type, C7) toward one radical."""
    out = {}
    src = P.NORBORNANE_CL2
    h = P.NORBORNANE_H
    per_h_c2 = src["norbornyl-2"].value / h["norbornyl-2"]
    for degree in ("secondary", "tertiary"):
        out[f"norbornyl-2-{degree}"] = Arrhenius(
            table[degree].a_per_h, table[degree].ea, table[degree].basis,
            f"as an open-chain {degree} C–H (assumption: the 2-norbornyl radical is unstrained); "
            f"the exo/endo split is engine.rates.exo_fraction",
        )
    if radical == "cl":
        t = P.NORBORNANE_T_K
        f7 = (src["norbornyl-7"].value / h["norbornyl-7"]) / per_h_c2
        fb = (src["bridgehead"].value / h["bridgehead"]) / per_h_c2
        # A stronger C–H never gets a larger A than a weaker one: C7 (secondary) and the bridgehead are stronger
        # than a primary C–H (site_bde), so they take primary's A, with Ea set by the 25 °C factor.
        a_prim = table["primary"].a_per_h
        out["norbornyl-7-secondary"] = _through(
            a_prim, f7 * _k(table["secondary"], t), t, "estimate",
            f"{f7:.3f} × an open-chain secondary C–H per H at 25 °C, from {src['norbornyl-7'].source} "
            "(the 2-position taken as ordinary; A per H = primary's, the C7–H being the stronger: estimate)",
        )
        # The open-chain tertiary × f7 would fall below a primary C–H at 25 °C although the C–H is estimated
        # weaker (site_bde); its rate is put at the floor that bond strength allows, a primary C–H's.
        prim = table["primary"]
        out["norbornyl-7-tertiary"] = Arrhenius(
            prim.a_per_h, prim.ea, "estimate",
            "as a primary C–H: tertiary × the C7 factor of norbornane would be slower than a primary C–H, "
            "which this C–H (estimated weaker) must not be (estimate)",
        )
        out["bridgehead"] = _through(
            a_prim, fb * _k(table["secondary"], t), t, "estimate",
            f"{fb:.3f} × a secondary C–H per H at 25 °C, from {src['bridgehead'].source} (A per H = primary's, "
            "the bridgehead C–H being the stronger: estimate; one factor for every small bicycle)",
        )
        return out
    for site in ("norbornyl-7-secondary", "norbornyl-7-tertiary", "bridgehead"):
        out[site] = _br_bep(table, site)
    return out


def _br_bep(table: dict[str, Arrhenius], site: str) -> Arrhenius:
    """A saturated C–H without data of its own toward Br·, by Evans–Polanyi from the nearest weaker alkyl class.

    The anchor is the alkyl class (methane, primary, secondary, tertiary) whose C–H is the strongest not
    stronger than the site's: with its A and a higher Ea the site is never faster than any weaker class,
    and never slower than a stronger one (the alkyl classes are in bond order by construction).
    """
    alpha = P.BEP_ALPHA_SATURATED_BR.value
    bde = site_bde(site)
    anchor = max((c for c in ("methane", *DEGREES) if site_bde(c).value <= bde.value),
                 key=lambda c: site_bde(c).value)
    gap = bde.value - site_bde(anchor).value
    b = table[anchor]
    return Arrhenius(
        b.a_per_h, b.ea + alpha * gap, "estimate",
        f"BEP from {anchor} (the nearest weaker alkyl C–H) with ΔBDE {gap:+.1f} kcal/mol ({bde.source}), "
        f"α = {alpha} ({P.BEP_ALPHA_SATURATED_BR.source})",
    )


# --- Br· -------------------------------------------------------------------


def br_activation_energy(site: str) -> float:
    """Ea of Br· + R–H, kcal/mol, for methane/primary/secondary/tertiary: ΔH + Ea(R· + HBr)."""
    return site_bde(site).value - P.BDE_HX["br"].value + P.BR_REVERSE_EA[site].value


def _br_table() -> dict[str, Arrhenius]:
    t_ref = P.BR_REFERENCE_T_K
    ea = {d: br_activation_energy(d) for d in ("methane", *DEGREES)}
    a_p = P.BR_A_PER_H.value
    out: dict[str, Arrhenius] = {}
    for d in DEGREES:
        ratio = P.BR_RATIOS[d].value
        a = a_p * ratio * math.exp((ea[d] - ea["primary"]) / (_RT * t_ref))
        out[d] = Arrhenius(
            a, ea[d], "textbook",
            f"Ea = ΔH + Ea(R· + HBr) = {ea[d]:.2f} kcal/mol ({P.BR_REVERSE_EA[d].source}); "
            f"A per H set so the per-H ratio is {P.BR_RATIOS[d].source}",
        )
    out["methane"] = Arrhenius(
        a_p, ea["methane"], "estimate",
        f"Ea = ΔH + Ea(CH3 + HBr) = {ea['methane']:.2f} kcal/mol ({P.BR_REVERSE_EA['methane'].source}); "
        "A per H taken as the primary one (estimate)",
    )
    out["cyclopropyl"] = _br_bep(out, "cyclopropyl")
    alpha_d = P.BEP_ALPHA_DELOCALISED_BR.value
    t_b = P.BR_BENZYLIC_T_K
    prim = out["primary"]
    # A weaker C–H never gets a smaller A than a stronger one: the π-activated classes take the largest alkyl
    # A per H (tertiary's), so no alkyl C–H overtakes them when hot; Ea is the BEP value from primary.
    a_top = max(out[d].a_per_h for d in DEGREES)
    for kind in DELOCALISED:
        shift = delocalisation_shift(kind)
        first = Arrhenius(
            a_top, prim.ea + alpha_d * shift, "estimate",
            f"BEP from primary with ΔBDE {shift:+.1f} kcal/mol, α = {alpha_d} ({P.BEP_ALPHA_DELOCALISED_BR.source}); "
            "A per H the largest alkyl one (tertiary's; estimate)",
        )
        for degree in DEGREES:
            factor = P.BR_BENZYLIC_RATIOS[degree]
            out[f"{kind}-{degree}"] = first if degree == "primary" else _times(
                first, factor.value, t_b, "estimate",
                f"{kind}-primary × {factor.value:g} per H at {t_b - P.KELVIN:.0f} °C ({factor.source}"
                + ("" if kind == "benzylic" else f"; carried over to the {kind} class") + "; equal A: estimate)",
            )
    shift = site_bde("conjugated").value - P.BDE["primary"].value
    out["conjugated"] = Arrhenius(
        a_top, prim.ea + alpha_d * shift, "estimate",
        f"BEP from primary with ΔBDE {shift:+.1f} kcal/mol ({site_bde('conjugated').source}), α = {alpha_d}",
    )
    return out


@dataclass(frozen=True)
class RateTable:
    """Arrhenius parameters of every site class toward one radical in one phase."""

    radical: str
    """'cl' or 'br'."""
    phase: str
    """'gas' or 'liquid' (Br·: 'liquid', its only table)."""
    params: dict[str, Arrhenius]
    """Site class → per-H Arrhenius parameters (abstractable classes only)."""
    valid_k: tuple[float, float]
    """Temperature range (K) the underlying data cover."""

    def per_h(self, temp_k: float) -> np.ndarray:
        """k per H at ``temp_k`` for every class, indexed by site code (0 when not abstracted)."""
        out = np.zeros(len(SITE_CLASSES))
        for i, site in enumerate(ABSTRACTABLE):
            out[i] = _k(self.params[site], temp_k)
        return out


def _derive(radical: str, phase: str) -> RateTable:
    if radical == "br":
        params = _br_table()
        params |= _bicyclic(params, "br")
        return RateTable("br", "liquid", params, P.BR_RANGE_K)
    params = _cl_gas_alkyl()
    valid = P.CL_RANGE_K
    if phase == "liquid":
        s = neat_liquid_exponent()
        params = _scaled(params, s, f"× {s:.3f} on log-selectivities for the neat liquid ({P.RUSSELL_NEAT.source})")
        lo, hi = P.CL_LIQUID_BENZYLIC_RANGE_K
        valid = (max(lo, valid[0]), hi)
    params |= _cl_delocalised(params, phase)
    params |= _bicyclic(params, "cl")
    b = params["benzylic-tertiary"]  # the fastest π-activated class: a weaker C–H is never slower
    params["conjugated"] = Arrhenius(b.a_per_h, b.ea, "estimate",
                                     "as a tertiary benzylic C–H, the fastest π-activated class (estimate; "
                                     "Cl· barely tells radicals apart)")
    missing = set(ABSTRACTABLE) - set(params)
    assert not missing, missing  # every class has a rate: a new class must be derived here
    return RateTable("cl", phase, params, valid)


@cache
def rate_table(radical: str, phase: str = "gas") -> RateTable:
    """The (cached) rate table for 'cl' or 'br'; ``phase`` 'gas' or 'liquid' selects the Cl· table."""
    if radical not in RADICALS:
        raise ValueError(f"unknown radical {radical!r}; expected one of {', '.join(RADICALS)}")
    if phase not in PHASES:
        raise ValueError(f"unknown phase {phase!r}; expected one of {', '.join(PHASES)}")
    return _derive(radical, "liquid" if radical == "br" else phase)


#: What a prediction can rest on, weakest first (the ``confidence`` ranking): an ``estimate`` (derived or assumed
#: here), a published value quoted ``from memory`` (not re-checked against its source; the project marks every
#: such value so in its source text), a ``textbook`` value, a ``measured`` value checked against its publication.
CONFIDENCE_BASES: tuple[str, ...] = ("estimate", "from memory", "textbook", "measured")
#: The marker engine.parameters puts in the source of every value quoted from memory (a project rule).
FROM_MEMORY = "from memory"


def stated_basis(basis: str, source: str) -> str:
    """A value's basis for ``confidence``: 'from memory' when a published value's source says it was recalled."""
    if basis != "estimate" and FROM_MEMORY in source:
        return FROM_MEMORY
    return basis


def weakest(*bases: str) -> str:
    """The weakest of ``bases`` in :data:`CONFIDENCE_BASES` order."""
    return CONFIDENCE_BASES[min(CONFIDENCE_BASES.index(b) for b in bases)]


def _product_values(site: str, radical: str) -> tuple[P.Value, ...]:
    """Values besides the site's rate that the share of its product rests on.

    A norbornane C2-type site's product is split exo/endo (:data:`P.EXO_FRACTION`); an allylic radical
    (an allylic site, or a ``conjugated`` one) puts the halogen on either terminus, weighed by
    :data:`P.NBS_SUBSTITUENT_FACTOR` — under NBS, and under Cl2/Br2/SO2Cl2 above the temperature at which
    a C=C substrate substitutes (below it those reagents are ruled out for any substrate with allylic C–H).
    """
    if site.startswith("norbornyl-2-"):
        return (P.EXO_FRACTION[radical],)
    if site == "conjugated":  # a terminus C=C conjugated further counts one substituent more
        return (P.NBS_SUBSTITUENT_FACTOR, P.NBS_CONJUGATION_SUBSTITUENTS)
    if site.startswith("allylic-"):
        return (P.NBS_SUBSTITUENT_FACTOR,)
    return ()


def product_basis(table: RateTable, site: str) -> str:
    """What the share of a site's product rests on: its rate's basis and that of any split of the product."""
    p = table.params[site]
    own = stated_basis(p.basis, p.source)
    return weakest(own, *(stated_basis(v.basis, v.source) for v in _product_values(site, table.radical)))


def exo_fraction(site: str, radical: str) -> float | None:
    """Share of the exo 2-halide among the 2-halides of a norbornane C2-type site; None for other sites."""
    if not site.startswith("norbornyl-2-"):
        return None
    return P.EXO_FRACTION[radical].value


def enthalpy_of_abstraction(site: str, radical: str) -> float:
    """ΔH of R–H + X· → R· + H–X, kcal/mol (negative = exothermic)."""
    return site_bde(site).value - P.BDE_HX[radical].value


__all__ = ["BICYCLIC", "CONFIDENCE_BASES", "PHASES", "RADICALS", "RateTable", "TABLES", "exo_fraction", "product_basis",
           "rate_table", "stated_basis", "weakest"]
