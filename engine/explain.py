"""One structure, explained: every product, why it forms, and how much."""

from __future__ import annotations

from dataclasses import asdict, dataclass

from engine.conditions import REAGENTS, Conditions
from engine.perception import perceive
from engine.rates import enthalpy_of_abstraction, rate_table
from engine.site_classes import site_bde
from engine.weigh import summarise, weigh


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
    """Per reagent: measured / textbook / estimate (what the rate constant rests on)."""
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

    def to_dict(self, reagents: tuple[str, ...] = tuple(REAGENTS)) -> dict:
        """Plain JSON-ready dict; percentages limited to ``reagents``."""
        if self.status != "ok":
            return {"input": self.input, "status": "rejected", "reason_code": self.reason_code, "reason": self.reason}
        products = []
        for p in self.products:
            d = asdict(p)
            d["pct"] = {r: round(p.pct[r], 2) for r in reagents}
            d["relative_rate"] = {r: p.relative_rate[r] for r in reagents}
            d["rate_basis"] = {r: p.rate_basis[r] for r in reagents}
            products.append(d)
        return {
            "input": self.input,
            "status": "ok",
            "canonical_smiles": self.canonical_smiles,
            "verdict": self.verdict,
            "conditions": asdict(self.conditions),
            "products": products,
            "warnings": list(self.warnings),
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
    weighed = weigh(perception.sites, conditions, 1)
    tables = {r: rate_table(rad) for r, rad in REAGENTS.items()}
    primary_k = {r: tables[r].per_h(conditions.temp_k(r))[1] for r in REAGENTS}
    records = []
    for row in weighed.itertuples(index=False):
        per_h = {r: tables[r].per_h(conditions.temp_k(r))[row.site_code] for r in REAGENTS}
        params = {r: tables[r].params.get(row.site) for r in REAGENTS}
        records.append(
            ProductRecord(
                smiles=row.product,
                site=row.site,
                h_count=int(row.h_count),
                n_carbons=int(row.n_carbons),
                bde=float(row.bde),
                bde_basis=site_bde(row.site).basis,
                dh={rad: round(enthalpy_of_abstraction(row.site, rad), 2) for rad in ("cl", "br")},
                rate_basis={r: (p.basis if p else "not abstracted") for r, p in params.items()},
                relative_rate={r: round(per_h[r] / primary_k[r], 4) for r in REAGENTS},
                stereo=row.stereo,
                n_stereoisomers=int(row.n_stereoisomers),
                n_diastereomers=int(row.n_diastereomers),
                stereo_approximate=bool(row.stereo_approx),
                pct={r: float(getattr(row, f"{r}_pct")) for r in REAGENTS},
            )
        )
    records.sort(key=lambda p: (p.pct["cl2"] == 0 and p.pct["br2"] == 0, -p.pct["cl2"], -p.pct["br2"], p.smiles))
    return Explanation(
        smiles, "ok", "", "", s["canonical_smiles"], tuple(records), summary["verdict"], conditions, warnings
    )
