"""Mirror images are never counted as diastereomers; counts are exact or honestly bounded.

Each expected count names its source beside it: RDKit's own enumerator
(EnumerateStereoisomers, canonical SMILES, and a mirror image made by
swapping every @/@@ in the SMILES, independent of engine.stereo), the
point-group arguments of Eliel & Wilen (Stereochemistry of Organic
Compounds, Wiley 1994), or a simple counting argument, marked as such.
"""

from __future__ import annotations

from collections import defaultdict

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from rdkit import Chem
from rdkit.Chem.EnumerateStereoisomers import EnumerateStereoisomers, StereoEnumerationOptions

from halosift import engine


def product(substrate: str, chloride: str) -> engine.ProductRecord:
    """The explain() product of ``substrate`` with the constitution of ``chloride``."""
    want = Chem.CanonSmiles(chloride, useChiral=0)
    products = engine.explain(substrate).products
    for p in products:
        if Chem.CanonSmiles(p.smiles, useChiral=0) == want:
            return p
    raise AssertionError(f"{chloride} not among products of {substrate}: {[p.smiles for p in products]}")


def _mirror_smiles(smiles: str) -> str:
    """Mirror image by text: every @ swapped with @@ (reflection leaves / and \\ as they are)."""
    swapped = smiles.replace("@@", "\0").replace("@", "@@").replace("\0", "@")
    return Chem.CanonSmiles(swapped)


def _canonical(mol: Chem.Mol) -> str:
    """Canonical isomeric SMILES after fresh stereo perception (tags on non-centres dropped)."""
    m = Chem.Mol(mol)
    Chem.AssignStereochemistry(m, cleanIt=True, force=True)
    return Chem.MolToSmiles(m)


def rdkit_reference(substrate: str) -> dict[str, tuple[int, int]]:
    """Per constitution of monochloride: (stereoisomers, mirror-image classes), from RDKit alone.

    Every sp3 C–H of the substrate is replaced in turn (its own configuration,
    if any, cleared: the radical is planar), the open stereo enumerated by
    RDKit, and the isomers pooled by constitution, as one site group pools them.
    """
    mol = Chem.MolFromSmiles(substrate)
    pooled: dict[str, set[str]] = defaultdict(set)
    for atom in mol.GetAtoms():
        if atom.GetTotalNumHs() == 0 or atom.GetHybridization() != Chem.HybridizationType.SP3:
            continue
        rw = Chem.RWMol(mol)
        carbon = rw.GetAtomWithIdx(atom.GetIdx())
        carbon.SetChiralTag(Chem.ChiralType.CHI_UNSPECIFIED)
        if carbon.GetNumExplicitHs():  # [C@H]: its H is written out
            carbon.SetNumExplicitHs(carbon.GetNumExplicitHs() - 1)
        cl = rw.AddAtom(Chem.Atom(17))
        rw.AddBond(atom.GetIdx(), cl, Chem.BondType.SINGLE)
        Chem.SanitizeMol(rw)
        key = Chem.MolToSmiles(rw, isomericSmiles=False)
        options = StereoEnumerationOptions(onlyUnassigned=True, unique=True)
        for iso in EnumerateStereoisomers(rw.GetMol(), options):
            pooled[key].add(_canonical(iso))
    return {key: (len(isos), len({frozenset((s, _mirror_smiles(s))) for s in isos})) for key, isos in pooled.items()}


# Products of alkenes whose E/Z is set or left open. A set double bond is its own mirror
# image, so a new centre beside it gives a racemate, never two diastereomers.
EZ_CASES = [
    # substrate, chloride, outcome, stereoisomers, classes up to mirror image; source
    ("C/C=C/CC", "CC=CC(C)Cl", "racemate", 2, 1),  # RDKit enumeration; counting: one new centre, E kept
    ("C/C=C\\CC", "CC=CC(C)Cl", "racemate", 2, 1),  # RDKit enumeration; counting: one new centre, Z kept
    ("CC=CCC", "CC=CC(C)Cl", "diastereomers", 4, 2),  # RDKit enumeration; counting: E/Z × R/S, two racemates
    ("C/C=C/CC", "ClCC=CCC", "achiral", 1, 1),  # RDKit enumeration; counting: no centre, E kept
    ("C/C=C/C(C)CC", "CC=CC(C)C(C)Cl", "diastereomers", 4, 2),  # RDKit enumeration; counting: two centres, E kept
    ("C/C=C/C(C)CC", "CC=CC(C)(Cl)CC", "racemate", 2, 1),  # RDKit enumeration
    ("C/C=C/C(C)CC", "CC=CC(CCl)CC", "racemate", 2, 1),  # RDKit enumeration; the open input centre stays racemic
    # (2E,5E)-hepta-2,5-diene at C4: two like (E)-propenyls, no centre (RDKit enumeration).
    ("C/C=C/C/C=C/C", "CC=CC(Cl)C=CC", "achiral", 1, 1),
    # (2E,5Z): the propenyls differ, C4 is a centre, both enantiomers form (RDKit enumeration).
    ("C/C=C/C/C=C\\C", "CC=CC(Cl)C=CC", "racemate", 2, 1),
    # Both open: EE and ZZ achiral, EZ as a racemate: 4 isomers in 3 classes (RDKit enumeration).
    ("CC=CCC=CC", "CC=CC(Cl)C=CC", "diastereomers", 4, 3),
    # One set, one open: EE achiral, EZ a racemate (RDKit enumeration).
    ("C/C=C/CC=CC", "CC=CC(Cl)C=CC", "diastereomers", 3, 2),
    # A fixed tetrahedral centre is mirrored: the new centre gives two diastereomers (RDKit enumeration).
    ("C/C=C/[C@H](C)CC", "CC=CC(C)C(C)Cl", "diastereomers", 2, 2),
    # E/Z set on a ring substituent: 2-chloro-1-propenylcyclohexane, cis/trans × R/S (RDKit enumeration).
    ("C/C=C/C1CCCCC1", "CC=CC1CCCCC1Cl", "diastereomers", 4, 2),
]


@pytest.mark.parametrize(("substrate", "chloride", "outcome", "n_iso", "n_classes"), EZ_CASES)
def test_set_double_bond_does_not_make_mirror_images_diastereomers(
    substrate: str, chloride: str, outcome: str, n_iso: int, n_classes: int
) -> None:
    # The table itself against RDKit's enumerator first, so a wrong expectation cannot hide.
    assert rdkit_reference(substrate)[Chem.CanonSmiles(chloride, useChiral=0)] == (n_iso, n_classes)
    p = product(substrate, chloride)
    assert (p.stereo, p.n_stereoisomers, p.n_diastereomers, p.stereo_approximate) == (outcome, n_iso, n_classes, False)


_ALKYL = ["C", "CC", "CCC", "C(C)C", "CC(C)C", "C(C)CC", "CCCC", "C(C)C(C)C", "CC(C)CC"]


@st.composite
def ez_alkenes(draw: st.DrawFn) -> str:
    """Acyclic alkyl–CH=CH–alkyl (optionally a third alkyl on the alkene) with E, Z or open geometry."""
    left, right = draw(st.sampled_from(_ALKYL)), draw(st.sampled_from(_ALKYL))
    third = draw(st.sampled_from(["", *_ALKYL[:4]]))
    mark = draw(st.sampled_from([("/", "/"), ("/", "\\"), ("", "")]))
    branch = f"({third})" if third else ""
    return f"{left}{mark[0]}C{branch}=C{mark[1]}{right}"


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(ez_alkenes())
def test_products_of_ez_alkenes_pair_mirror_images_like_rdkit(smiles: str) -> None:
    # Acyclic products: canonical SMILES tell every stereoisomer apart, so RDKit's
    # enumeration with mirror pairing is a trustworthy reference for the whole count.
    reference = rdkit_reference(smiles)
    for p in engine.explain(smiles).products:
        if not p.stereo:
            continue  # vinyl C–H: not abstracted
        n_iso, n_classes = reference[Chem.CanonSmiles(p.smiles, useChiral=0)]
        if n_iso > 1 and n_classes == 1:
            assert p.stereo == "racemate", (smiles, p.smiles, p.stereo)
        assert (p.n_stereoisomers, p.n_diastereomers) == (n_iso, n_classes), (smiles, p.smiles)


DODECAHEDRANE = "C12C3C4C5C1C6C7C2C8C3C9C4C1C5C6C2C7C8C9C12"
METHYL_DODECAHEDRANE = "CC12C3C4C5C1C6C7C2C8C3C9C4C1C5C6C2C7C8C9C12"
TWISTANE = "C1CC2CC3CCC2CC13"  # tricyclo[4.4.0.0^3,8]decane

# Cages and spiranes, where the skeleton (not the count of centres) decides and RDKit's
# enumerator counts geometrically impossible isomers, so it is no reference here. Sources:
# the point groups (Eliel & Wilen 1994, ch. 11 for cage and bicycle symmetry, ch. 14 for
# spiranes) with a counting argument from them, marked as such.
CAGE_CASES = [
    # Dodecahedrane is Ih: a monohalide keeps a C3 axis and three mirror planes (C3v), one achiral isomer.
    (DODECAHEDRANE, "ClC12C3C4C5C1C6C7C2C8C3C9C4C1C5C6C2C7C8C9C12", "achiral", 1, 1),
    # Methyldodecahedrane (C3v): a neighbour of C1 lies on a mirror plane (achiral); the six carbons
    # two bonds from C1 lie on none, so each of those chlorides is chiral: one racemate (counting).
    (METHYL_DODECAHEDRANE, "CC12C3C4C5C6C7C8C5C3C3C8C5C7C7C6C4C1C7C5C32Cl", "achiral", 1, 1),
    (METHYL_DODECAHEDRANE, "CC12C3C4C5C6C7C8C5C3C3C8C5C7C7C6C4C1C7C5(Cl)C32", "racemate", 2, 1),
    (METHYL_DODECAHEDRANE, "CC12C3C4C5C6C7C(C8C9C%10C(C3C3C4C6C(Cl)(C3%10)C79)C81)C52", "achiral", 1, 1),  # antipode
    ("C12C3C4C1C5C2C3C45", "ClC12C3C4C1C5C2C3C45", "achiral", 1, 1),  # cubane Oh → C3v chlorocubane
    ("C12C3C1C1C2C31", "ClC12C3C1C1C2C31", "achiral", 1, 1),  # prismane D3h → Cs
    ("C1C2CC3CC1CC(C2)C3", "ClC12CC3CC(CC(C3)C1)C2", "achiral", 1, 1),  # 1-adamantyl: C3v
    ("C1C2CC3CC1CC(C2)C3", "ClC1C2CC3CC(C2)CC1C3", "achiral", 1, 1),  # 2-adamantyl: C2v
    ("C1CC2CCC1CC2", "ClC1CC2CCC1CC2", "racemate", 2, 1),  # 2-chlorobicyclo[2.2.2]octane: C1, one pair
    ("C1CC2CCC1CC2", "ClC12CCC(CC1)CC2", "achiral", 1, 1),  # 1-chloro: C3v
    ("C1CC2CCC1C2", "ClC1CC2CCC1C2", "diastereomers", 4, 2),  # 2-norbornyl: exo and endo, each a racemate
    # 2-methylnorbornane (exo/endo open) at C3: methyl and Cl each exo or endo, each a racemate (counting).
    ("CC1CC2CCC1C2", "CC1C(Cl)C2CCC1C2", "diastereomers", 8, 4),
    # 2-methylnorbornane at C7, syn or anti to the methyl side: 2 × 2 × enantiomers (counting).
    ("CC1CC2CCC1C2", "CC1CC2CCC1C2Cl", "diastereomers", 8, 4),
    # (R)-2-methylbicyclo[2.2.2]octane at C2: the planar radical leaves nothing chiral behind,
    # so Cl adds to either face: one racemate. At a bridgehead C2 keeps its configuration: one
    # single stereoisomer (counting).
    ("C[C@H]1CC2CCC1CC2", "CC1(Cl)CC2CCC1CC2", "racemate", 2, 1),
    ("C[C@H]1CC2CCC1CC2", "CC1CC2CCC1(Cl)CC2", "one-enantiomer", 1, 1),
    # 2-((E)-propenyl)norbornane at C7: propenyl exo or endo × Cl syn or anti, each a racemate;
    # the set E is its own mirror image, so it halves nothing (counting). Left open, E/Z doubles it.
    ("C/C=C/C1CC2CCC1C2", "CC=CC1CC2CCC1C2Cl", "diastereomers", 8, 4),
    ("CC=CC1CC2CCC1C2", "CC=CC1CC2CCC1C2Cl", "diastereomers", 16, 8),
    # Twistane is D2 and chiral. C2 sits on a C2 axis (its Hs homotopic): one racemate; C4 on none
    # (its Hs diastereotopic): two racemic diastereomers; the bridgehead: one racemate (counting).
    (TWISTANE, "ClC1C2CCC3CC2CCC31", "racemate", 2, 1),
    (TWISTANE, "ClC1CC2CC3CCC2CC13", "diastereomers", 4, 2),
    (TWISTANE, "ClC12CCC3CC1CCC3C2", "racemate", 2, 1),
    # Spiro[3.3]heptane: a 2-chloride keeps the plane of the unsubstituted ring (achiral); with a
    # 6-methyl the rings' substituents lie crossed and the spirane is axially chiral (Eliel & Wilen ch. 14).
    ("C1CC2(C1)CCC2", "ClC1CC2(C1)CCC2", "achiral", 1, 1),
    ("CC1CC2(C1)CCC2", "CC1CC2(C1)CC(Cl)C2", "racemate", 2, 1),
    ("C1CCC2(CC1)CCCCC2", "ClC1CCC2(CCCCC2)CC1", "achiral", 1, 1),  # 3-chlorospiro[5.5]undecane: Cs
    # Alkylidenecycloalkanes substituted at the far ring carbon are axially chiral, like the
    # spiranes (Eliel & Wilen ch. 14; canonical SMILES see no stereocentre here).
    ("CC=C1CCCCC1", "CC=C1CCC(Cl)CC1", "racemate", 2, 1),
    ("CC=C1CCC1", "CC=C1CC(Cl)C1", "racemate", 2, 1),
    ("C=C1CCCCC1", "C=C1CCC(Cl)CC1", "achiral", 1, 1),  # methylene: the two ends of C=C alike, a mirror plane
]


@pytest.mark.parametrize(("substrate", "chloride", "outcome", "n_iso", "n_classes"), CAGE_CASES)
def test_skeleton_decides_cage_and_spirane_counts(
    substrate: str, chloride: str, outcome: str, n_iso: int, n_classes: int
) -> None:
    p = product(substrate, chloride)
    assert (p.stereo, p.n_stereoisomers, p.n_diastereomers, p.stereo_approximate) == (outcome, n_iso, n_classes, False)


@pytest.mark.parametrize("substrate", [DODECAHEDRANE, "C12C3C4C1C5C2C3C45", "C12C3C1C1C2C31"])
def test_closed_polyhedral_cage_pins_every_atom(substrate: str) -> None:
    # Counting argument: a rigid closed cage allows one configuration and its mirror image,
    # so every cage atom's configuration is fixed by the skeleton.
    from halosift.engine.stereo import geometry_atoms

    mol = Chem.MolFromSmiles(substrate)
    assert geometry_atoms(mol) == frozenset(range(mol.GetNumAtoms()))


@pytest.mark.parametrize("substrate", ["C1CCC2CCCCC2C1", "C1CC2CCC3CCCC4CCC(C1)C2C34"])
def test_open_fused_rings_are_not_pinned(substrate: str) -> None:
    # Decalin and perhydropyrene exist with cis and trans ring fusions (Eliel & Wilen ch. 11):
    # the cage rule must not pin their fusion atoms.
    from halosift.engine.stereo import geometry_atoms

    assert geometry_atoms(Chem.MolFromSmiles(substrate)) == frozenset()


def _chain(n_centres: int) -> str:
    """CH3CH2–[CH(CH3)]n–CH2CH2CH3: n stereocentres no symmetry relates (the ends differ)."""
    return "CC" + "C(C)" * n_centres + "CCC"


@pytest.mark.parametrize("k", [31, 45])
def test_long_chain_counts_are_exact_not_wrapped(k: int) -> None:
    # Counting argument: k centres no symmetry can touch give 2^k stereoisomers in 2^(k-1)
    # mirror pairs. Chlorine on the far methyl adds no centre. 2^31 wrapped an int32 to
    # −2147483648, and 2^45 to 0.
    p = product(_chain(k), "CC" + "C(C)" * k + "CCCCl")
    assert (p.stereo, p.n_stereoisomers, p.n_diastereomers, p.stereo_approximate) == (
        "diastereomers", 2**k, 2 ** (k - 1), False,
    )


def test_symmetric_chain_count_is_exact_with_its_meso_forms() -> None:
    # CH3CH2–[CH(CH3)]22–CHCl–[CH(CH3)]22–CH2CH3: 45 centres, the middle one pseudo-asymmetric.
    # Counting argument (end-for-end symmetry, Burnside): for an odd number k = 2m + 1 of
    # centres there are 2^(k-1) stereoisomers, 2^m of them meso, so (2^(k-1) + 2^m)/2 classes.
    m = 22
    p = product("CC" + "C(C)" * m + "C" + "C(C)" * m + "CC", "CC" + "C(C)" * m + "C(Cl)" + "C(C)" * m + "CC")
    assert (p.n_stereoisomers, p.n_diastereomers, p.stereo_approximate) == (2**44, (2**44 + 2**m) // 2, False)


def test_count_beyond_the_cap_is_capped_and_marked() -> None:
    # 60 centres: 2^60 stereoisomers, more than the columns carry exactly; stored as the
    # documented cap with the approximate flag ("at least"), never a wrapped number.
    from halosift.engine.stereo import COUNT_CAP

    p = product(_chain(60), "CC" + "C(C)" * 60 + "CCCCl")
    assert (p.n_stereoisomers, p.n_diastereomers, p.stereo_approximate) == (COUNT_CAP, COUNT_CAP, True)


def test_count_columns_are_int64_and_never_negative() -> None:
    import pyarrow as pa
    from halosift.engine.perception import SITE_SCHEMA

    perception = engine.perceive([_chain(k) for k in (31, 45, 60)])
    sites = perception.sites
    for column in ("n_stereoisomers", "n_diastereomers"):
        assert str(sites[column].dtype) == "int64"
        assert (sites[column] >= 0).all()
        assert SITE_SCHEMA.field(column).type == pa.int64()
    assert sites["n_stereoisomers"].max() > 2**45
    pa.Table.from_pandas(sites, schema=SITE_SCHEMA, preserve_index=False)  # the Arrow schema carries them


# One set centre and 45 open ones on an end-for-end symmetric skeleton: no symmetry-free shortcut
# applies, so this took minutes of enumeration before each product had a share of a budget.
BUDGET_SUBSTRATE = "CC[C@H](C)" + "C(C)" * 44 + "C(C)CC"
BUDGET_CHLORIDE = "ClCCC(C)" + "C(C)" * 44 + "C(C)CC"  # Cl on a terminal methyl: no new centre


def test_too_many_open_elements_gives_the_fallback_with_its_bound() -> None:
    # Counting argument for the bound: the two terminal methyls are one site group; each
    # chloride keeps the set centre and leaves 45 elements open, 2^45 configurations each,
    # so at most 2 × 2^45 stereoisomers form. Not counted, and said so.
    from halosift.engine.stereo import NOT_COUNTED

    p = product(BUDGET_SUBSTRATE, BUDGET_CHLORIDE)
    assert (p.stereo, p.n_stereoisomers, p.n_diastereomers, p.stereo_approximate) == (
        NOT_COUNTED, 2**46, 2**46, True,
    )


def test_budget_is_the_same_in_screen_explain_and_detail() -> None:
    # The share depends only on the structure, so a screen (stereo for possible Br2 majors),
    # explain, and the detail the app and the report ask the library for agree row by row.
    import pandas as pd
    from halosift.engine.stereo import NOT_COUNTED

    lean = engine.perceive([BUDGET_SUBSTRATE], detail=False).sites
    full = engine.perceive([BUDGET_SUBSTRATE], detail=True).sites
    shown = lean["stereo"] != ""
    assert shown.any() and (lean.loc[shown, "stereo"] == NOT_COUNTED).all()
    columns = ["stereo", "n_stereoisomers", "n_diastereomers", "stereo_approx"]
    pd.testing.assert_frame_equal(lean.loc[shown, columns], full.loc[shown, columns])
    library = engine.load_library(pd.DataFrame({"smiles": [BUDGET_SUBSTRATE]}), use_cache=False)
    detail = library.products(0)
    explained = engine.explain(BUDGET_SUBSTRATE).products
    assert sorted(detail["stereo"]) == sorted(p.stereo for p in explained)
    assert set(detail["stereo"]) == {NOT_COUNTED}


def test_within_the_budget_the_same_kind_of_input_is_still_counted() -> None:
    # The fallback is for size, not for kind: one set centre and five open ones on the same
    # symmetric skeleton are enumerated, and the counts agree with RDKit's enumeration pooled
    # over both terminal methyls (acyclic: canonical SMILES are a trustworthy reference).
    substrate = "CC[C@H](C)" + "C(C)" * 4 + "C(C)CC"
    chloride = "ClCCC(C)" + "C(C)" * 4 + "C(C)CC"
    p = product(substrate, chloride)
    reference = rdkit_reference(substrate)[Chem.CanonSmiles(chloride)]
    assert (p.stereo, p.n_stereoisomers, p.n_diastereomers, p.stereo_approximate) == ("diastereomers", *reference, False)


def test_shown_counts_say_when_they_are_bounds() -> None:
    # What explain and the report print after a stereo outcome: a count, or the bound it is.
    from halosift.engine.stereo import COUNT_CAP, NOT_COUNTED, count_text

    assert count_text("racemate", 2) == "(2)"
    assert count_text("achiral", 1) == ""
    assert count_text(NOT_COUNTED, 2**46, True) == "(at most 2^46)"
    assert count_text(NOT_COUNTED, 3 * 2**45, True) == f"(at most {3 * 2**45})"
    assert count_text("diastereomers", COUNT_CAP, True) == "(at least 2^53)"
    assert count_text("diastereomers", 128, True) == "(at most 128)"  # a cage that would not embed


def test_explain_text_shows_the_fallback_bound() -> None:
    from halosift.formatting import explanation_table

    assert "not counted (at most 2^46)" in explanation_table(engine.explain(BUDGET_SUBSTRATE), ["cl2", "br2"], [])
    assert "racemate (2)" in explanation_table(engine.explain("C/C=C/CC"), ["cl2", "br2"], [])
