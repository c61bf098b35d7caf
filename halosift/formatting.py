"""Plain-text rendering of engine results for the terminal (no UI library)."""

from __future__ import annotations

from collections.abc import Sequence

from halosift.engine.conditions import REAGENT_LABELS
from halosift.engine.explain import REAGENT_NOTES, Explanation
from halosift.engine.polyhalogenation import POLY_UNIT, PolyPlan
from halosift.engine.reagents import EXPLAIN_REAGENTS, NBS, reagent_name
from halosift.engine.safety import CAUTION
from halosift.engine.stereo import count_text


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
        solvent = ""
        if r == "cl2":
            solvent = (f" in {cond.cl2_solvent_molar:g} M {cond.cl2_solvent}" if cond.cl2_solvent != "none"
                       else " (gas phase)" if cond.cl2_phase == "gas" else " (neat liquid)")
        return f"{REAGENT_LABELS[r]} at {cond.temp_c(r):g} °C{solvent}"

    lines.append("conditions " + "; ".join(label(r) for r in reagents))
    nbs = NBS in reagents
    reagents = [r for r in reagents if r in EXPLAIN_REAGENTS]  # the site table's reagents
    names = [reagent_name(r) for r in reagents]
    headers = ["product (chloride)", "site", "H", "BDE", "ΔH Cl·", "ΔH Br·", "stereo", *(f"% {n}" for n in names),
               *(f"basis {n}" for n in names)]
    rows = []
    for p in result.products:
        stereo = " ".join(filter(None, [p.stereo, count_text(p.stereo, p.n_stereoisomers, p.stereo_approximate)]))
        # A norbornane 2-halide: its exo/endo split, per reagent shown (a rate-model property).
        splits = [f"{p.exo_endo(r).removeprefix('exo:endo ')} {reagent_name(r)}" for r in reagents if p.exo_endo(r)]
        if splits:
            stereo += "; exo:endo " + ", ".join(splits)
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
    if reagents:
        lines += _table(headers, rows, right={2, 3, 4, 5, *range(7, 7 + len(reagents))})
    if nbs:
        lines += [""] if reagents else []
        lines += _nbs_lines(result)
    lines.append("")
    lines += outcome_lines(result)
    asked = tuple(dict.fromkeys([*reagents, *([NBS] if nbs else [])]))
    confidence = result.shown_confidence(asked)
    if confidence:
        counted = result.counted_reagents(asked)
        lines.append(
            f"confidence {confidence}  (weakest basis of the rates and product splits among products with ≥ 5 % "
            f"under {', '.join(reagent_name(r) for r in counted)}; ruled-out reagents do not count)"
        )
    lines.append("units      BDE and ΔH in kcal/mol; * marks an estimated bond enthalpy")
    lines.append("basis      what each product share rests on: measured / textbook / from memory / estimate (engine/parameters.py)")
    lines.extend(f"flag       {f.flag}: {f.note} [{f.source}]" for f in result.flags)
    lines.extend(f"note       {reagent_name(r)}: {REAGENT_NOTES[r]}" for r in [*reagents, *([NBS] if nbs else [])]
                 if r in REAGENT_NOTES)
    for plan in plans:
        lines.extend(poly_lines(plan))
    lines.extend(f"warning    {w}" for w in warnings)
    lines.append("")
    lines.append(CAUTION)
    return "\n".join(lines)


def outcome_lines(result: Explanation) -> list[str]:
    """Per reagent what it does (clean / mixture / ruled-out, with the reason), then the verdict and offer."""
    from halosift.engine.outcomes import verdict_docs

    cond = result.conditions
    rows = []
    for o in result.outcomes:
        pct = "" if o.major_pct != o.major_pct else f"{o.major_pct:.1f}"
        rows.append([reagent_name(o.reagent), f"{o.temp_c:g}", o.outcome, o.major or "-", pct, o.reason])
    lines = [f"outcomes   per reagent (clean: one monohalide at ≥ {cond.threshold_pct:g} %; ruled-out: the "
             "substitution split does not apply)"]
    lines += ["  " + line for line in _table(["reagent", "°C", "outcome", "major (substitution split)", "%", "why"],
                                              rows, right={1, 4})]
    # A rule's source is printed once: not again where a flag line or a reagent note already gives it.
    shown = " ".join([*(f.source for f in result.flags), *REAGENT_NOTES.values()])
    sources = dict.fromkeys(o.source for o in result.outcomes if o.source and o.source not in shown)
    lines.extend(f"rule       {src}" for src in sources)
    if any(f.flag == "alkene" for f in result.flags) and any(
        o.outcome != "ruled-out" for o in result.outcomes if o.reagent != NBS
    ):
        lines.append("note       hot enough to substitute a C=C substrate: the outcome splits each allylic radical's "
                     "share between its two termini (as under NBS); the products and majors shown are per site")
    meaning = verdict_docs(cond.threshold_pct).get(result.verdict, "")
    lines.append(f"verdict    {result.verdict}  ({meaning})")
    served = reagent_name(result.serves) or "none"
    lines.append(f"serves     {served}  (first of Cl2, Br2, SO2Cl2, NBS whose outcome is clean; never one that is "
                 "mixture or ruled-out)")
    return lines


def _nbs_lines(result: Explanation) -> list[str]:
    """The NBS monobromides: allylic/benzylic only, both allyl termini."""
    cond = result.conditions
    out = [f"NBS at {cond.temp_c(NBS):g} °C (allylic/benzylic C–H only; every other C–H gets no share)"]
    if not result.nbs:
        return out + ["  no allylic or benzylic C–H: NBS gives no substitution product"]
    rows = []
    for p in result.nbs:
        stereo = " ".join(filter(None, [p.stereo, count_text(p.stereo, p.n_stereoisomers, p.stereo_approximate)]))
        if p.e_and_z:
            stereo += ", E+Z"
        rows.append([p.smiles, p.terminus, p.site, str(p.alkene_substituents) if p.alkene_substituents >= 0 else "-",
                     stereo, f"{p.pct:.1f}"])
    out += _table(["product (bromide)", "Br at", "from site", "C=C subst.", "stereo", "% NBS"], rows, right={3, 5})
    out.append("Br at      radical carbon: where H was taken; allylic shift: far end of the allyl radical, C=C moved; "
               "termini weighed by C=C substitution (engine.parameters.NBS_SUBSTITUENT_FACTOR); E/Z ratio not modelled")
    return out


def poly_lines(plan: PolyPlan) -> list[str]:
    """The polyhalogenation plan of one reagent in words (also used by the app)."""
    at = f"at {plan.ratio:g} : 1 substrate : halogen (all halogen used)"
    # One figure everywhere: percent of the halogenated product, as the screen's <reagent>_poly_pct column.
    lines = [
        f"polyhalide {reagent_name(plan.reagent)} {at}: {plan.poly_pct_at_ratio:.1f} {POLY_UNIT} "
        f"({100.0 - plan.unreacted_pct:.1f} % of the substrate converted)",
    ]
    if abs(plan.conversion_pct - (100.0 - plan.unreacted_pct)) > 1e-6:
        lines.append(f"           at {plan.conversion_pct:g} % conversion ≈ {plan.poly_pct:.1f} % of the halogenated "
                     "product is polyhalide")
    excess = "no excess suffices" if plan.min_ratio == float("inf") else f"substrate : halogen ≥ {plan.min_ratio:.2g} : 1"
    lines.append(
        f"           polyhalide ≤ {plan.max_poly_pct:g} {POLY_UNIT} needs conversion ≤ {plan.max_conversion_pct:.1f} %, "
        f"i.e. {excess}; deactivation by the first halogen f = {plan.deactivation:g} (estimate)"
    )
    return lines
