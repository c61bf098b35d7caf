"""The C–H site classes halosift distinguishes, and their bond enthalpies."""

from __future__ import annotations

from halosift.engine.parameters import BDE, BDE_BRIDGEHEAD, NORBORNYL7_EXTRA_BDE, Value

DEGREES = ("primary", "secondary", "tertiary")
DELOCALISED = ("allylic", "benzylic", "propargylic")
#: Norbornane-type positions by degree (a CH3 cannot sit in a ring, so no primary ones).
BICYCLIC: tuple[str, ...] = tuple(f"norbornyl-{pos}-{d}" for pos in ("2", "7") for d in ("secondary", "tertiary"))

#: Sites radical halogenation abstracts, in a fixed order (their integer codes).
ABSTRACTABLE: tuple[str, ...] = (
    "methane",
    *DEGREES,
    "cyclopropyl",
    # Bridgehead C–H of small bicycles (engine.special_sites): the radical
    # cannot planarise, so the C–H is stronger than an ordinary tertiary one.
    "bridgehead",
    *(f"{kind}-{degree}" for kind in DELOCALISED for degree in DEGREES),
    # Positions of a saturated bicyclo[2.2.1] skeleton (engine.sites): C2/C3/C5/C6 (the
    # 2-halide forms exo and endo) and the one-atom bridge C7, each by degree.
    *BICYCLIC,
    # An allylic/benzylic radical conjugated further (pentadienyl, 1-phenylallyl, diphenylmethyl). Only
    # NBS radical formation uses it (engine.nbs.radical_class); the site table names such carbons by
    # their first π neighbour, as ever.
    "conjugated",
)
#: C–H bonds on sp2/sp carbons: listed, never weighted (their radicals are σ
#: radicals with no stabilisation; BDE 110–133 kcal/mol).
NOT_ABSTRACTED: tuple[str, ...] = ("vinyl", "aryl", "alkynyl")
SITE_CLASSES: tuple[str, ...] = ABSTRACTABLE + NOT_ABSTRACTED
SITE_CODE: dict[str, int] = {name: i for i, name in enumerate(SITE_CLASSES)}


def _solvent_base(name: str) -> str:
    if name == "conjugated":
        return "primary"
    kind, _, degree = name.partition("-")
    return degree if kind in DELOCALISED else name


#: Per site code, the code whose log-selectivity a Cl2 solvent scales (engine.solvent.scale_rates): the
#: alkyl class of the same degree for a π-activated class, whose excess over it is left as measured
#: (those data come from neat alkylbenzenes, an aromatic medium already); the class itself otherwise.
SOLVENT_BASE: tuple[int, ...] = tuple(SITE_CODE[_solvent_base(n)] for n in ABSTRACTABLE) + tuple(
    SITE_CODE[n] for n in NOT_ABSTRACTED
)

_PARENT_OF_DELOCALISED = {"allylic": "allyl", "benzylic": "benzyl", "propargylic": "propargyl"}


def delocalisation_shift(kind: str) -> float:
    """How much an adjacent π system weakens a primary C–H, kcal/mol (negative)."""
    return BDE[_PARENT_OF_DELOCALISED[kind]].value - BDE["primary"].value


def site_bde(site: str) -> Value:
    """C–H bond dissociation enthalpy of a site class, kcal/mol, with its basis.

    Secondary and tertiary delocalised sites assume the π-system shift measured
    on the primary parent adds to the alkyl value (additivity: an estimate).
    """
    if site in BDE:
        return BDE[site]
    if site == "bridgehead":
        return BDE_BRIDGEHEAD
    if site == "aryl":
        return BDE["phenyl"]
    if site == "alkynyl":
        return BDE["ethynyl"]
    if site.startswith("norbornyl-"):
        _, pos, degree = site.split("-")
        if pos == "2":
            return BDE[degree]
        return Value(
            BDE[degree].value + NORBORNYL7_EXTRA_BDE.value, "estimate",
            f"{degree} alkyl C–H + {NORBORNYL7_EXTRA_BDE.value:g} kcal/mol: {NORBORNYL7_EXTRA_BDE.source}",
        )
    kind, degree = site.split("-")
    parent = BDE[_PARENT_OF_DELOCALISED[kind]]
    if degree == "primary":
        return parent
    value = BDE[degree].value + delocalisation_shift(kind)
    return Value(
        round(value, 2),
        "estimate",
        f"{degree} alkyl C–H ({BDE[degree].value}) shifted by the {kind} parent's "
        f"{delocalisation_shift(kind):+.1f} kcal/mol (additivity estimate)",
    )
