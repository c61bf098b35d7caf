"""What each reagent does to a substrate, and the verdict that follows: rules of the model, vectorised.

The rate model (:mod:`halosift.engine.rates`, :mod:`halosift.engine.weigh`) says how C–H
substitution splits among the products. It cannot say whether substitution is
what happens at all: halogens add to C=C and C≡C, Br· opens cyclopropane rings,
the central bond of a propellane or a bicyclo[1.1.0]butane adds halogens, and a
cyclopropylmethyl radical ring-opens before it is trapped. This module turns
those pathways (found as structure flags, :mod:`halosift.engine.special_sites`) into one
**outcome** per reagent:

* ``clean``     – substitution is weighed and its major monohalide reaches the threshold;
* ``mixture``   – substitution is weighed and no product reaches the threshold;
* ``ruled-out`` – the percentages do not apply, for the reason given (a :class:`Pathway`).

The ``serves`` column and the verdict are read off these outcomes only, so a
reagent whose outcome is not clean is never offered and no verdict claims what
an outcome rules out. No RDKit here: flags are perceived once, and the rules
run on every re-weighing (temperatures move the C=C rules).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
from halosift.engine import parameters as P
from halosift.engine.conditions import Conditions
from halosift.engine.reagents import RADICAL_OF

#: Every reagent with an outcome column, in the order ``serves`` tries them: the plainest that is clean wins
#: (a rule of this program). SO2Cl2 is weighed as Cl· at its own temperature.
OUTCOME_REAGENTS: tuple[str, ...] = tuple(RADICAL_OF)  # cl2, br2, so2cl2, nbs
#: Reagents weighed from the site table (the others — NBS — from the allylic table).
SITE_REAGENTS: tuple[str, ...] = ("cl2", "br2", "so2cl2")
#: Outcome words, in code order (code 0 is '' for rejected rows).
OUTCOMES: tuple[str, ...] = ("clean", "mixture", "ruled-out")
CLEAN, MIXTURE, RULED_OUT = 1, 2, 3
#: Percentages are shown, written and compared with the threshold to this many decimals (0.1 point).
PCT_DECIMALS = 1


def shown_pct(pct: np.ndarray) -> np.ndarray:
    """Shares as shown everywhere (rounded to :data:`PCT_DECIMALS`); outcomes are decided on these."""
    return np.round(np.asarray(pct, dtype=np.float64), PCT_DECIMALS)


#: Verdict words, in code order (code 0 is '' for rejected rows).
VERDICTS: tuple[str, ...] = ("by-symmetry", "selective", "mixture", "ruled-out", "inert")
#: What each verdict means ({threshold} is filled in with the threshold, percent).
VERDICT_DOCS: dict[str, str] = {
    "by-symmetry": "the substrate has only one monohalide: every abstractable C–H gives the same product, "
    "and the reagent offered (serves) makes just that one",
    "selective": "the substrate has several monohalides, but the reagent offered (serves) makes one of them at "
    "≥ {threshold} % (or, like NBS, takes only one kind of C–H)",
    "mixture": "substitution is weighed for at least one reagent, but none gives one monohalide at "
    "≥ {threshold} %",
    "ruled-out": "no reagent's substitution split applies: each takes another pathway (addition to C=C or "
    "C≡C, ring opening, addition across a strained bond), is not modelled (strained cage) or finds no C–H to "
    "substitute",
    "inert": "no abstractable C–H (only aryl, vinyl or alkynyl C–H, or none) and no other pathway under these "
    "conditions: no monohalide forms",
}
#: What each outcome word means.
OUTCOME_DOCS: dict[str, str] = {
    "clean": "substitution is weighed and one monohalide reaches the threshold ({threshold} %)",
    "mixture": "substitution is weighed; no monohalide reaches the threshold",
    "ruled-out": "the substitution percentages do not apply: the reason column says why",
}


@dataclass(frozen=True)
class Pathway:
    """One reason a reagent's substitution percentages do not apply to a substrate."""

    code: str
    """Short name of the rule."""
    reason: str
    """The text of the ``<reagent>_reason`` column."""
    feature: str
    """What triggers it: a structure flag (engine.special_sites.FLAGS), 'no_ch' or 'no_nbs_site'."""
    reagents: tuple[str, ...]
    """Reagents it rules out."""
    source: str
    """Where the rule comes from."""
    below_t_c: Mapping[str, float] | None = None
    """Per reagent, the temperature (°C) at and above which the rule no longer applies; None: always applies."""


#: Temperatures above which substitution of a C=C substrate wins, per reagent (SO2Cl2 follows Cl·).
_ALKENE_T = {"cl2": P.ALKENE_SUBSTITUTION_T_C.value, "so2cl2": P.ALKENE_SUBSTITUTION_T_C.value,
             "br2": P.BR_ALKENE_SUBSTITUTION_T_C.value}

#: The rules, most specific first: a reagent ruled out by several shows the first one's reason.
PATHWAYS: tuple[Pathway, ...] = (
    Pathway("central_bond", "adds across the strained central C–C bond", "central_bond", OUTCOME_REAGENTS,
            P.CENTRAL_BOND_NOTE),
    Pathway("cage", "strained cage: not modelled", "cage", OUTCOME_REAGENTS, P.CAGE_NOTE),
    Pathway("ring_opening", "opens the cyclopropane ring (1,3-addition)", "cyclopropane", ("br2", "nbs"),
            P.CYCLOPROPANE_BR2_NOTE),
    Pathway("cyclopropylmethyl", "cyclopropylmethyl radical ring-opens", "cyclopropylmethyl", OUTCOME_REAGENTS,
            P.CYCLOPROPYLMETHYL_NOTE + "; " + P.K_CYCLOPROPYLMETHYL_OPENING.source),
    Pathway("alkene_addition", "adds to C=C at this temperature", "alkene",
            ("cl2", "br2", "so2cl2"),
            P.ALKENE_SUBSTITUTION_T_C.source + "; Br2: " + P.BR_ALKENE_SUBSTITUTION_T_C.source, _ALKENE_T),
    Pathway("alkyne_addition", "adds to C≡C", "alkyne", ("cl2", "br2", "so2cl2"), P.ALKYNE_ADDITION_NOTE),
    Pathway("propargyl_split", "propargyl/allenyl bromides: not modelled", "propargylic", ("nbs",),
            P.PROPARGYL_NBS_NOTE),
    # "Nothing to do" comes after every rule that says what does happen, so cyclopropylbenzene (its benzylic
    # C–H is a cyclopropyl C–H) shows NBS opening the ring rather than "no allylic or benzylic C–H".
    Pathway("no_nbs_site", "no allylic or benzylic C–H", "no_nbs_site", ("nbs",), P.NBS_NOTE),
    # Last: ethene or acetylene has no C–H to abstract, but what the halogen does is add, which the
    # rules above name; "no abstractable C–H" is the reason only where nothing else happens.
    Pathway("no_ch", "no abstractable C–H", "no_ch", OUTCOME_REAGENTS,
            "only C–H on sp3 carbons are abstracted (engine.site_classes; common practice)"),
)
#: Reasons that mean "nothing for this reagent to do" rather than "it does something else".
_NOTHING_TO_DO = ("no_ch", "no_nbs_site")
#: Reason texts in code order (code 0 is '': clean, mixture or rejected).
REASONS: tuple[str, ...] = tuple(p.reason for p in PATHWAYS)
#: Features a caller must supply (per structure, bool) to :func:`reagent_outcomes`.
FEATURES: tuple[str, ...] = tuple(dict.fromkeys(p.feature for p in PATHWAYS))


def pathway_applies(pathway: Pathway, reagent: str, conditions: Conditions) -> bool:
    """Whether ``pathway`` rules ``reagent`` out under ``conditions`` (for a substrate that has its feature)."""
    if reagent not in pathway.reagents:
        return False
    if pathway.below_t_c is None:
        return True
    return conditions.temp_c(reagent) < pathway.below_t_c[reagent]


@dataclass(frozen=True)
class Outcomes:
    """Per-structure outcome and reason codes of every reagent, the offered reagent and the verdict."""

    outcome: dict[str, np.ndarray]
    """Reagent → int8 index into ``("", *OUTCOMES)``."""
    reason: dict[str, np.ndarray]
    """Reagent → int8 index into ``("", *REASONS)``."""
    serves: np.ndarray
    """int8 index into ``("", *OUTCOME_REAGENTS)``: the first clean reagent, 0 when none."""
    verdict: np.ndarray
    """int8 index into ``("", *VERDICTS)``."""


def reagent_outcomes(
    features: Mapping[str, np.ndarray],
    major_pct: Mapping[str, np.ndarray],
    ok: np.ndarray,
    one_product: Mapping[str, np.ndarray],
    conditions: Conditions,
    n_monohalides: np.ndarray,
) -> Outcomes:
    """Outcomes, ``serves`` and verdicts of every structure (vectorised; no RDKit).

    ``features``: every name of :data:`FEATURES` → bool per structure. ``major_pct``:
    reagent → share of its major product (NaN without one). ``one_product``:
    reagent → True where the reagent can form only one monohalide.
    ``n_monohalides``: constitutional monohalides of the substrate's abstractable C–H (the
    ``n_products`` column).
    ``ok``: rows that were perceived (others get code 0 everywhere).

    The verdict is **by-symmetry** only where the substrate itself has one monohalide
    (``n_monohalides == 1``) and the reagent offered forms only it; a reagent that is clean
    because it takes one kind of C–H among several (NBS on a benzylic alkane or on
    cyclohexene, Br2 on isobutane) is **selective**: the one product is the reagent's doing,
    not the structure's.
    """
    n = len(ok)
    threshold = conditions.threshold_pct
    outcome, reason = {}, {}
    for reagent in OUTCOME_REAGENTS:
        why = np.zeros(n, dtype=np.int8)
        for code, pathway in enumerate(PATHWAYS, start=1):
            if pathway_applies(pathway, reagent, conditions):
                hit = features[pathway.feature] & (why == 0)
                why[hit] = code
        why[~ok] = 0
        pct = np.nan_to_num(np.asarray(major_pct[reagent], dtype=np.float64), nan=0.0)
        # Decided on the share as every screen, file and report shows it (0.1 point), so a row never reads
        # "90.0 mixture" at a 90 % threshold; float noise (a fitted 90 : 10 split computed as 89.99999999999999)
        # cannot flip an outcome either.
        out = np.where(shown_pct(pct) >= threshold, CLEAN, MIXTURE).astype(np.int8)
        out[why > 0] = RULED_OUT
        out[~ok] = 0
        outcome[reagent], reason[reagent] = out, why
    serves = np.zeros(n, dtype=np.int8)
    for code, reagent in enumerate(OUTCOME_REAGENTS, start=1):
        serves[(serves == 0) & (outcome[reagent] == CLEAN)] = code
    verdict = np.zeros(n, dtype=np.int8)
    v = {word: i for i, word in enumerate(VERDICTS, start=1)}
    weighed = np.zeros(n, dtype=bool)
    for reagent in OUTCOME_REAGENTS:
        weighed |= (outcome[reagent] == CLEAN) | (outcome[reagent] == MIXTURE)
    verdict[ok] = v["ruled-out"]
    verdict[ok & weighed] = v["mixture"]
    verdict[serves > 0] = v["selective"]
    single = np.asarray(n_monohalides) == 1
    for code, reagent in enumerate(OUTCOME_REAGENTS, start=1):
        verdict[(serves == code) & single & np.asarray(one_product[reagent], dtype=bool)] = v["by-symmetry"]
    # Inert only when no reagent does anything else: ethene has no C–H to abstract, but Cl2 adds to it.
    idle = np.ones(n, dtype=bool)
    idle_codes = [code for code, p in enumerate(PATHWAYS, start=1) if p.code in _NOTHING_TO_DO]
    for reagent in OUTCOME_REAGENTS:
        idle &= np.isin(reason[reagent], idle_codes)
    verdict[ok & features["no_ch"] & idle] = v["inert"]
    return Outcomes(outcome, reason, serves, verdict)


def _with_threshold(docs: Mapping[str, str], threshold_pct: float | None) -> dict[str, str]:
    """``docs`` with ``{threshold}`` filled in ('the threshold' when None)."""
    shown = "the threshold" if threshold_pct is None else f"{threshold_pct:g}"
    return {k: t.format(threshold=shown) for k, t in docs.items()}


def outcome_docs(threshold_pct: float | None = None) -> dict[str, str]:
    """:data:`OUTCOME_DOCS` with the threshold filled in ('the threshold' when None)."""
    return _with_threshold(OUTCOME_DOCS, threshold_pct)


def verdict_docs(threshold_pct: float | None = None) -> dict[str, str]:
    """:data:`VERDICT_DOCS` with the threshold filled in ('the threshold' when None)."""
    return _with_threshold(VERDICT_DOCS, threshold_pct)
