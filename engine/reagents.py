"""Which halogenating reagents halosift models, and why it declines the others.

Two sets, kept apart on purpose:

* :data:`REAGENTS` — the pair every screen weighs (``cl2``, ``br2``); the
  library columns ``cl2_*`` / ``br2_*`` are built from it and stay fixed.
* :data:`EXPLAIN_REAGENTS` — also ``so2cl2``, whose product table
  :func:`halosift.engine.explain` lists (``halosift explain --reagent so2cl2``); it is
  treated as Cl· (see :data:`halosift.engine.parameters.SO2CL2_NOTE`), so a screen
  gives it only its major, share and outcome (``so2cl2_*``, engine.outcomes),
  weighed at its own temperature.

* :data:`NBS` — N-bromosuccinimide (Wohl–Ziegler): Br· at low Br2
  concentration, allylic/benzylic C–H only, with allylic transposition. Its
  products are not the site table's monohalides, so it is weighed from the
  perception's ``allylic`` table (:mod:`halosift.engine.nbs`): screens get
  ``nbs_major``/``nbs_major_pct``, explain lists every NBS product.

F2 and I2 are asked for often enough that they get a reasoned refusal
(:func:`check_reagent`) rather than "unknown reagent".
"""

from __future__ import annotations

from dataclasses import dataclass

from halosift.engine import parameters as P

#: Screened reagent → chain-carrying radical (fixed: the app reads cl2_*/br2_* columns).
REAGENTS: dict[str, str] = {"cl2": "cl", "br2": "br"}
#: Every reagent :func:`halosift.engine.explain` predicts → chain-carrying radical.
EXPLAIN_REAGENTS: dict[str, str] = {**REAGENTS, "so2cl2": "cl"}
#: N-bromosuccinimide: weighed from the allylic table, never from the site table.
NBS = "nbs"
#: Every reagent with a chain-carrying radical, NBS included (temperatures, rate tables, warnings).
RADICAL_OF: dict[str, str] = {**EXPLAIN_REAGENTS, NBS: "br"}
#: What :func:`halosift.engine.explain` and ``halosift explain --reagent`` accept.
ACCEPTED_REAGENTS: dict[str, str] = RADICAL_OF
#: How a chemist writes each reagent in running text (messages, headers): Cl2, Br2, SO2Cl2, NBS.
REAGENT_NAMES: dict[str, str] = {"cl2": "Cl2", "br2": "Br2", "so2cl2": "SO2Cl2", NBS: "NBS"}


def reagent_name(token: object) -> str:
    """How a chemist writes the reagent an option token or a ``serves`` value names (cl2 → Cl2);
    other text as it is, and a missing value as ''."""
    return REAGENT_NAMES.get(token, token) if isinstance(token, str) else ""


REAGENT_LABELS: dict[str, str] = {
    "cl2": "Cl2, light", "br2": "Br2, light", "so2cl2": "SO2Cl2, initiator", NBS: "NBS, initiator",
}


@dataclass(frozen=True)
class Refusal:
    """Why one reagent is not predicted."""

    reagent: str
    """The reagent name as halosift spells it (f2, i2)."""
    reason: str
    """One line for the chemist, numbers included."""
    sources: tuple[str, ...]
    """Where the numbers in ``reason`` come from."""


class UnsupportedReagent(ValueError):
    """A reagent halosift knows of but declines to predict (message: one line)."""

    def __init__(self, refusal: Refusal) -> None:
        super().__init__(refusal.reason)
        self.refusal = refusal


def _fluorine() -> Refusal:
    dh_abstraction = P.BDE["methane"].value - P.BDE_HX["f"].value
    # R–H + F2 → R–F + HF: bonds broken C–H, F–F; bonds made H–F, C–F.
    dh_overall = P.BDE["methane"].value + P.BDE_FF.value - P.BDE_HX["f"].value - P.BDE_CF.value
    r = P.F_RATIOS
    reason = (
        "F2 is not predicted: direct fluorination is explosive and uncontrolled — "
        f"H abstraction by F· is exothermic by {-dh_abstraction:.1f} kcal/mol for methane "
        f"(C–H {P.BDE['methane'].value:.1f}, H–F {P.BDE_HX['f'].value:.1f}) and each R–H + F2 → R–F + HF "
        f"step by about {-dh_overall:.0f} kcal/mol, enough to break C–C bonds; and it is barely selective "
        f"(per H about {r['primary'].value:g} : {r['secondary'].value:g} : {r['tertiary'].value:g} "
        "primary : secondary : tertiary), so every C–H reacts"
    )
    sources = (P.BDE["methane"].source, P.BDE_HX["f"].source, P.BDE_FF.source, P.BDE_CF.source, r["primary"].source)
    return Refusal("f2", reason, sources)


def _iodine() -> Refusal:
    dh = P.BDE["methane"].value - P.BDE_HX["i"].value
    reason = (
        "I2 is not predicted: H abstraction by I· is endothermic by about "
        f"{dh:.0f} kcal/mol for methane (C–H {P.BDE['methane'].value:.1f} − H–I {P.BDE_HX['i'].value:.1f}), "
        "so no chain runs at useful rates, and the reaction is reversible: the HI formed reduces "
        "alkyl iodides back to the alkane"
    )
    return Refusal("i2", reason, (P.BDE["methane"].source, P.BDE_HX["i"].source, "HI reduction of alkyl iodides (textbook, from memory)"))


#: Reagents declined with a reason, built from the parameters (never hard-coded text numbers).
NOT_PREDICTED: dict[str, Refusal] = {"f2": _fluorine(), "i2": _iodine()}


def check_reagent(name: str, allowed: dict[str, str] = ACCEPTED_REAGENTS) -> str:
    """The normalised reagent name; raises :class:`UnsupportedReagent` for f2/i2 and ValueError otherwise."""
    key = str(name).strip().lower()
    if key in allowed:
        return key
    if key in NOT_PREDICTED:
        raise UnsupportedReagent(NOT_PREDICTED[key])
    raise ValueError(f"unknown reagent {name!r}; expected one of {', '.join(allowed)}")
