"""One structure, explained: every product, why it forms, and how much."""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field
from typing import TYPE_CHECKING

from halosift.engine.conditions import EXPLAIN_REAGENTS, REAGENTS, Conditions
from halosift.engine.nbs import nbs_products
from halosift.engine.outcomes import OUTCOME_REAGENTS, PATHWAYS
from halosift.engine.parameters import NBS_NOTE, SO2CL2_NOTE
from halosift.engine.perception import perceive
from halosift.engine.rates import enthalpy_of_abstraction, exo_fraction
from halosift.engine.reagents import NBS, RADICAL_OF, check_reagent
from halosift.engine.site_classes import SITE_CLASSES, SITE_CODE, site_bde
from halosift.engine.special_sites import FlagNote, flag_notes
from halosift.engine.weigh import BASES, CONFIDENCE_MIN_PCT, summarise, weigh

if TYPE_CHECKING:
    import pandas as pd

#: Notes shown whenever a reagent is part of an explanation.
REAGENT_NOTES: dict[str, str] = {"so2cl2": SO2CL2_NOTE, NBS: NBS_NOTE}
_PRIMARY = SITE_CLASSES.index("primary")


@dataclass(frozen=True)
class ProductRecord:
    """One constitutional monohalide of the substrate."""

    smiles: str
    """Canonical SMILES of the monochloride (the bromide has Br in place of Cl)."""
    site: str
    """Site class of the carbon that is substituted."""
    h_count: int
    """Hydrogens that lead to this product (statistical factor)."""
    n_carbons: int
    """Symmetry-equivalent carbons carrying those hydrogens."""
    bde: float
    """C–H bond dissociation enthalpy, kcal/mol."""
    bde_basis: str
    """measured / estimate."""
    dh: dict[str, float]
    """ΔH of H abstraction by each radical ('cl', 'br'), kcal/mol."""
    rate_basis: dict[str, str]
    """Per reagent: measured / textbook / from memory / estimate / not abstracted (what the share rests on: rate and any exo/endo or allyl-terminus split)."""
    relative_rate: dict[str, float]
    """Per reagent: rate per H relative to a primary C–H at the same temperature."""
    stereo: str
    """achiral / one-enantiomer / racemate / diastereomers / not counted (over the stereo budget; counts are then a bound)."""
    n_stereoisomers: int
    """Stereoisomers of this product formed."""
    n_diastereomers: int
    """Of those, distinct up to mirror image."""
    stereo_approximate: bool
    """True when the stereoisomer count could not be fully checked."""
    pct: dict[str, float]
    """Percent of the monohalide mixture, per reagent."""
    exo_fraction: dict[str, float] = field(default_factory=dict)
    """Per reagent, the exo share of this product (a norbornane 2-halide forms exo and endo); empty otherwise."""

    def exo_endo(self, reagent: str) -> str:
        """'exo:endo 70:30' for a norbornane 2-halide under ``reagent``; '' for other products."""
        f = self.exo_fraction.get(reagent)
        return "" if f is None else f"exo:endo {100 * f:.0f}:{100 * (1 - f):.0f}"


@dataclass(frozen=True)
class NbsProduct:
    """One monobromide under NBS (allylic/benzylic C–H only)."""

    smiles: str
    """Canonical SMILES of the monobromide."""
    site: str
    """Site class(es) of the carbon(s) whose radical gives it, joined by ', '."""
    terminus: str
    """'radical carbon' (Br where H left), 'allylic shift' (Br at the far end, C=C moved), or both ('radical carbon, allylic shift')."""
    alkene_substituents: int
    """Carbon substituents on the product's C=C (-1: no C=C, benzylic); more favours that terminus."""
    stereo: str
    """achiral / one-enantiomer / racemate / diastereomers (E/Z isomers of a new C=C count as diastereomers)."""
    n_stereoisomers: int
    """Stereoisomers of this product formed."""
    n_diastereomers: int
    """Of those, distinct up to mirror image."""
    stereo_approximate: bool
    """True when the stereoisomer count could not be fully checked."""
    e_and_z: bool
    """True when a C=C of the product forms as both E and Z (their ratio is not modelled)."""
    pct: float
    """Percent of the NBS monobromides."""
    rate_basis: str = "estimate"
    """Weakest basis of the Br· rates of the sites that give it and of the terminus split: measured / textbook / from memory / estimate."""


@dataclass(frozen=True)
class ReagentOutcome:
    """What one reagent does to the substrate (engine.outcomes): the screen's ``<reagent>_outcome`` and reason."""

    reagent: str
    """cl2, br2, so2cl2 or nbs."""
    outcome: str
    """clean / mixture / ruled-out."""
    reason: str
    """Why it is ruled out; empty when clean or mixture."""
    source: str
    """Where the rule that rules it out comes from; empty when clean or mixture."""
    major: str
    """SMILES of the major monohalide of the substitution split; '' when ruled out or without one."""
    major_pct: float
    """Its share, percent (NaN when ruled out or without one)."""
    temp_c: float
    """The reagent's temperature, °C."""


@dataclass(frozen=True)
class Explanation:
    """The full prediction for one input."""

    input: str
    """The SMILES as given."""
    status: str
    """ok or rejected."""
    reason_code: str
    """Empty when ok, else the rejection code."""
    reason: str
    """Empty when ok, else why."""
    canonical_smiles: str
    """RDKit canonical SMILES of the substrate."""
    products: tuple[ProductRecord, ...]
    """Every monohalide, abstractable sites first, largest chlorination share first."""
    verdict: str
    """by-symmetry / selective / mixture / ruled-out / inert (engine.outcomes.VERDICTS; empty when rejected)."""
    conditions: Conditions
    """The conditions weighed."""
    warnings: tuple[str, ...]
    """Extrapolations and caveats."""
    flags: tuple[FlagNote, ...] = ()
    """Special-site warnings of the substrate (engine.special_sites), empty when none."""
    nbs: tuple[NbsProduct, ...] = ()
    """Monobromides under NBS, largest first; empty without allylic or benzylic C–H."""
    serves: str = ""
    """The reagent offered: the first of cl2, br2, so2cl2, nbs whose outcome is clean, or ''."""
    outcomes: tuple[ReagentOutcome, ...] = ()
    """Per reagent of engine.outcomes.OUTCOME_REAGENTS, what it does; empty when rejected."""

    def outcome(self, reagent: str) -> ReagentOutcome | None:
        """The outcome of one reagent, or None (rejected input)."""
        return next((o for o in self.outcomes if o.reagent == reagent), None)

    def _weighed(self, reagent: str) -> bool:
        o = self.outcome(reagent)
        return o is not None and o.outcome != "ruled-out"

    def confidence(self, reagents: tuple[str, ...] | None = None) -> str:
        """Weakest rate basis among products with ≥ 5 % under the reagents that count; '' when none.

        Without ``reagents``: the rule of the screen's ``confidence`` column — cl2, br2
        and nbs whose outcome is not ruled-out, and so2cl2 only when it is the reagent
        offered. With ``reagents``: those of them whose outcome is not ruled-out.
        """
        if reagents is None:
            reagents = tuple(r for r in ("cl2", "br2", "nbs") if self._weighed(r))
            reagents += ("so2cl2",) if self.serves == "so2cl2" else ()
        else:
            reagents = tuple(r for r in reagents if self._weighed(r))
        ranks = [
            BASES.index(p.rate_basis[r])
            for p in self.products
            for r in reagents
            if r in p.pct and p.pct[r] >= CONFIDENCE_MIN_PCT and p.rate_basis[r] in BASES
        ]
        if NBS in reagents:
            ranks += [BASES.index(p.rate_basis) for p in self.nbs if p.pct >= CONFIDENCE_MIN_PCT]
        return BASES[min(ranks)] if ranks else ""

    def counted_reagents(self, reagents: tuple[str, ...] = tuple(REAGENTS)) -> tuple[str, ...]:
        """The reagents whose bases the confidence shown for ``reagents`` rests on.

        The default pair (cl2, br2) stands for the whole prediction, so it gets the
        screen's rule (see :meth:`confidence`); reagents asked for by name get theirs.
        """
        if tuple(reagents) == tuple(REAGENTS):
            out = tuple(r for r in ("cl2", "br2", "nbs") if self._weighed(r))
            return out + (("so2cl2",) if self.serves == "so2cl2" else ())
        return tuple(r for r in reagents if self._weighed(r))

    def shown_confidence(self, reagents: tuple[str, ...] = tuple(REAGENTS)) -> str:
        """The confidence explain prints and writes for ``reagents`` (see :meth:`counted_reagents`)."""
        return self.confidence(self.counted_reagents(reagents))

    def to_dict(self, reagents: tuple[str, ...] = tuple(REAGENTS)) -> dict:
        """Plain JSON-ready dict; percentages limited to ``reagents`` (f2/i2 raise UnsupportedReagent)."""
        reagents = tuple(check_reagent(r) for r in reagents)
        if self.status != "ok":
            return {"input": self.input, "status": "rejected", "reason_code": self.reason_code, "reason": self.reason}
        site_reagents = tuple(r for r in reagents if r in EXPLAIN_REAGENTS)
        products = []
        for p in self.products:
            d = asdict(p)
            d["pct"] = {r: round(p.pct[r], 2) for r in site_reagents}
            d["relative_rate"] = {r: p.relative_rate[r] for r in site_reagents}
            d["rate_basis"] = {r: p.rate_basis[r] for r in site_reagents}
            d["exo_fraction"] = {r: p.exo_fraction[r] for r in site_reagents if r in p.exo_fraction}
            products.append(d)
        extra: dict = {}
        if NBS in reagents:
            extra["nbs"] = {
                "products": [{**asdict(p), "pct": round(p.pct, 2)} for p in self.nbs],
                "note": NBS_NOTE if self.nbs else NBS_NOTE + "; this substrate has no allylic or benzylic C–H",
            }
        return {
            "input": self.input,
            "status": "ok",
            "canonical_smiles": self.canonical_smiles,
            "verdict": self.verdict,
            "confidence": self.shown_confidence(reagents),
            "serves": self.serves,
            "outcomes": {
                o.reagent: {"outcome": o.outcome, "reason": o.reason, "source": o.source, "major": o.major,
                            "major_pct": None if math.isnan(o.major_pct) else round(o.major_pct, 2),
                            "temp_c": o.temp_c}
                for o in self.outcomes
            },
            "conditions": asdict(self.conditions),
            "products": products,
            "flags": [asdict(f) for f in self.flags],
            "reagent_notes": {r: REAGENT_NOTES[r] for r in reagents if r in REAGENT_NOTES},
            "warnings": list(self.warnings),
            **extra,
        }


def explain(smiles: str, conditions: Conditions | None = None) -> Explanation:
    """Predict the monohalogenation products of one SMILES (never raises on bad input)."""
    conditions = conditions or Conditions()
    perception = perceive([smiles])
    s = perception.structures.iloc[0]
    warnings = tuple(conditions.warnings())
    if s["status"] != "ok":
        return Explanation(smiles, "rejected", s["reason_code"], s["reason"], "", (), "", conditions, warnings)
    summary = summarise(perception, conditions).iloc[0]
    reagents = tuple(EXPLAIN_REAGENTS)
    weighed = weigh(perception.sites, conditions, 1, reagents)
    k = {r: conditions.per_h(r) for r in reagents}
    bases = {r: conditions.bases(r) for r in reagents}
    records = []
    for row in weighed.itertuples(index=False):
        records.append(
            ProductRecord(
                smiles=row.product,
                site=row.site,
                h_count=int(row.h_count),
                n_carbons=int(row.n_carbons),
                bde=float(row.bde),
                bde_basis=site_bde(row.site).basis,
                dh={rad: round(enthalpy_of_abstraction(row.site, rad), 2) for rad in ("cl", "br")},
                rate_basis={r: str(bases[r][row.site_code]) for r in reagents},
                relative_rate={r: round(k[r][row.site_code] / k[r][_PRIMARY], 4) for r in reagents},
                stereo=row.stereo,
                n_stereoisomers=int(row.n_stereoisomers),
                n_diastereomers=int(row.n_diastereomers),
                stereo_approximate=bool(row.stereo_approx),
                pct={r: float(getattr(row, f"{r}_pct")) for r in reagents},
                exo_fraction={
                    r: f for r in reagents if (f := exo_fraction(row.site, RADICAL_OF[r])) is not None
                },
            )
        )
    # Ties keep the site-table order (a stable sort), the order in which a screen picks its major, so
    # the first product listed is the one the outcome names (n-hexane: 2- and 3-chloride tie at 40.2 %).
    records.sort(key=lambda p: (p.pct["cl2"] == 0 and p.pct["br2"] == 0, -round(p.pct["cl2"], 9),
                                -round(p.pct["br2"], 9)))
    nbs_frame = nbs_products(perception.allylic, conditions.per_h(NBS), 1)
    nbs_bases = conditions.bases(NBS)
    nbs = sorted(
        (
            NbsProduct(
                smiles=r.product, site=r.site, terminus=r.terminus, alkene_substituents=int(r.alkene_subst),
                stereo=r.stereo, n_stereoisomers=int(r.n_stereoisomers), n_diastereomers=int(r.n_diastereomers),
                stereo_approximate=bool(r.stereo_approx), e_and_z=bool(r.ez_open), pct=float(r.nbs_pct),
                rate_basis=BASES[min(BASES.index(nbs_bases[SITE_CODE[x]]) for x in str(r.site).split(", "))],
            )
            for r in nbs_frame.itertuples(index=False)
        ),
        # Ties (within float noise) by SMILES, the rule engine.nbs.nbs_majors names the major by.
        key=lambda p: (-round(p.pct, 9), p.smiles),
    )
    return Explanation(
        smiles, "ok", "", "", s["canonical_smiles"], tuple(records), summary["verdict"], conditions, warnings,
        flags=flag_notes(s["flags"]), nbs=tuple(nbs), serves=str(summary["serves"]),
        outcomes=tuple(_outcome(summary, r, conditions) for r in OUTCOME_REAGENTS),
    )


_SOURCE_OF_REASON = {p.reason: p.source for p in PATHWAYS}


def _outcome(summary: pd.Series, reagent: str, conditions: Conditions) -> ReagentOutcome:
    """One reagent's outcome from a summary row (engine.weigh.summarise)."""
    reason = str(summary[f"{reagent}_reason"])
    pct = summary[f"{reagent}_major_pct"]
    return ReagentOutcome(
        reagent=reagent, outcome=str(summary[f"{reagent}_outcome"]), reason=reason,
        source=_SOURCE_OF_REASON.get(reason, ""), major=str(summary[f"{reagent}_major"]),
        major_pct=float("nan") if pct is None or pct != pct else float(pct), temp_c=conditions.temp_c(reagent),
    )
