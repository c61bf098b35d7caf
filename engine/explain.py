"""One structure, explained: every product, why it forms, and how much."""

from __future__ import annotations

from dataclasses import asdict, dataclass, field

from engine.conditions import EXPLAIN_REAGENTS, REAGENTS, Conditions
from engine.nbs import nbs_products
from engine.parameters import NBS_NOTE, SO2CL2_NOTE
from engine.perception import perceive
from engine.reagents import NBS, check_reagent
from engine.rates import enthalpy_of_abstraction, exo_fraction
from engine.reagents import RADICAL_OF
from engine.site_classes import SITE_CLASSES, site_bde
from engine.special_sites import FlagNote, flag_notes
from engine.weigh import BASES, CONFIDENCE_MIN_PCT, summarise, weigh

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
    """Per reagent: measured / textbook / estimate / not abstracted (what the rate constant rests on)."""
    relative_rate: dict[str, float]
    """Per reagent: rate per H relative to a primary C–H at the same temperature."""
    stereo: str
    """achiral / single / racemate / diastereomers."""
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
    """Site class(es) of the carbon(s) whose radical gives it, comma-joined."""
    terminus: str
    """'radical carbon' (Br where H left), 'allylic shift' (Br at the far end, C=C moved), or both."""
    alkene_substituents: int
    """Carbon substituents on the product's C=C (-1: no C=C, benzylic); more favours that terminus."""
    stereo: str
    """achiral / single / racemate / diastereomers (E/Z isomers of a new C=C count as diastereomers)."""
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
    """single / br-selective / mixture / inert (empty when rejected)."""
    conditions: Conditions
    """The conditions weighed."""
    warnings: tuple[str, ...]
    """Extrapolations and caveats."""
    flags: tuple[FlagNote, ...] = ()
    """Special-site warnings of the substrate (engine.special_sites), empty when none."""
    nbs: tuple[NbsProduct, ...] = ()
    """Monobromides under NBS, largest first; empty without allylic or benzylic C–H."""
    serves: str = ""
    """Reagent that gives one major monohalide at ≥ threshold (engine.weigh.serves), or ''."""

    def confidence(self, reagents: tuple[str, ...] = tuple(REAGENTS)) -> str:
        """Weakest rate basis among products with ≥ 5 % under any of ``reagents``; '' when none.

        The same rule as the ``confidence`` column of a screen (engine.weigh.ranks_at_cutoff).
        """
        ranks = [
            BASES.index(p.rate_basis[r])
            for p in self.products
            for r in reagents
            if r in p.pct and p.pct[r] >= CONFIDENCE_MIN_PCT and p.rate_basis[r] in BASES
        ]
        return BASES[min(ranks)] if ranks else ""

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
            "confidence": self.confidence(site_reagents),
            "serves": self.serves,
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
    records.sort(key=lambda p: (p.pct["cl2"] == 0 and p.pct["br2"] == 0, -p.pct["cl2"], -p.pct["br2"], p.smiles))
    nbs_frame = nbs_products(perception.allylic, conditions.per_h(NBS), 1)
    nbs = sorted(
        (
            NbsProduct(
                smiles=r.product, site=r.site, terminus=r.terminus, alkene_substituents=int(r.alkene_subst),
                stereo=r.stereo, n_stereoisomers=int(r.n_stereoisomers), n_diastereomers=int(r.n_diastereomers),
                stereo_approximate=bool(r.stereo_approx), e_and_z=bool(r.ez_open), pct=float(r.nbs_pct),
            )
            for r in nbs_frame.itertuples(index=False)
        ),
        key=lambda p: (-p.pct, p.smiles),
    )
    return Explanation(
        smiles, "ok", "", "", s["canonical_smiles"], tuple(records), summary["verdict"], conditions, warnings,
        flags=flag_notes(s["flags"]), nbs=tuple(nbs), serves=str(summary["serves"]),
    )
