"""Plain-text rendering of engine results for the terminal (no UI library)."""

from __future__ import annotations

from collections.abc import Sequence

from engine.conditions import REAGENT_LABELS
from engine.explain import REAGENT_NOTES, Explanation
from engine.polyhalogenation import PolyPlan
from engine.safety import CAUTION


def _table(headers: Sequence[str], rows: Sequence[Sequence[str]], right: set[int]) -> list[str]:
    widths = [max(len(h), *(len(r[i]) for r in rows)) if rows else len(h) for i, h in enumerate(headers)]

    def fmt(cells: Sequence[str]) -> str:
        return "  ".join(c.rjust(w) if i in right else c.ljust(w) for i, (c, w) in enumerate(zip(cells, widths))).rstrip()

    return [fmt(headers), fmt(["-" * w for w in widths]), *(fmt(r) for r in rows)]


def explanation_table(
    result: Explanation, reagents: Sequence[str], warnings: Sequence[str], plans: Sequence[PolyPlan] = ()
) -> str:
    """A readable multi-line report of one explanation."""
    cond = result.conditions
    lines = [f"substrate  {result.canonical_smiles}"]
    def label(r: str) -> str:
        solvent = f" in {cond.cl2_solvent_molar:g} M {cond.cl2_solvent}" if r == "cl2" and cond.cl2_solvent != "none" else ""
        return f"{REAGENT_LABELS[r]} at {cond.temp_c(r):g} °C{solvent}"

    lines.append("conditions " + "; ".join(label(r) for r in reagents))
    headers = ["product (chloride)", "site", "H", "BDE", "ΔH Cl·", "ΔH Br·", "stereo", *(f"% {r}" for r in reagents),
               *(f"basis {r}" for r in reagents)]
    rows = []
    for p in result.products:
        stereo = p.stereo if p.n_stereoisomers == 1 else f"{p.stereo} ({p.n_stereoisomers})"
        rows.append(
            [
                p.smiles,
                p.site,
                str(p.h_count),
                f"{p.bde:.1f}" + ("*" if p.bde_basis == "estimate" else ""),
                f"{p.dh['cl']:+.1f}",
                f"{p.dh['br']:+.1f}",
                stereo,
                *(f"{p.pct[r]:.1f}" for r in reagents),
                *(p.rate_basis[r] if p.rate_basis[r] != "not abstracted" else "-" for r in reagents),
            ]
        )
    lines += _table(headers, rows, right={2, 3, 4, 5, *range(7, 7 + len(reagents))})
    lines.append("")
    lines.append(f"verdict    {result.verdict}  (threshold {cond.threshold_pct:g} % for br-selective)")
    confidence = result.confidence(tuple(reagents))
    if confidence:
        lines.append(
            f"confidence {confidence}  (weakest rate basis among products with ≥ 5 % under {', '.join(reagents)})"
        )
    lines.append("units      BDE and ΔH in kcal/mol; * marks an estimated bond enthalpy")
    lines.append("basis      what each rate constant rests on: measured / textbook / estimate (engine/parameters.py)")
    lines.extend(f"flag       {f.flag}: {f.note} [{f.source}]" for f in result.flags)
    lines.extend(f"note       {r}: {REAGENT_NOTES[r]}" for r in reagents if r in REAGENT_NOTES)
    for plan in plans:
        lines.append(
            f"polyhalide {plan.reagent}: at {plan.conversion_pct:g} % conversion ≈ {plan.poly_pct:.1f} % of the "
            f"halogenated product is polyhalide; ≤ {plan.max_poly_pct:g} % needs conversion ≤ "
            f"{plan.max_conversion_pct:.1f} % (estimate: halogen substituent effects ignored)"
        )
    lines.extend(f"warning    {w}" for w in warnings)
    lines.append("")
    lines.append(CAUTION)
    return "\n".join(lines)
