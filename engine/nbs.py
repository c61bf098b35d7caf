"""NBS (Wohl–Ziegler) products: allylic and benzylic bromides, allylic transposition included.

Perception side (RDKit, once per structure): for every allylic or benzylic
site group, the bromide at the radical carbon and, for an allylic carbon
a–b=c, the transposed bromide (Br on c, double bond moved to a=b). Each
terminus gets a weight within its radical from the substitution of the
product's C=C (:data:`halosift.engine.parameters.NBS_SUBSTITUENT_FACTOR`), stored as
``share``. Longer conjugation (pentadienyl ends beyond the first C=C) is not
followed: only termini one bond away from the radical carbon's neighbours.
The graph arithmetic (radical classes, allyl partners, the substitution and
conjugation of each C=C) comes from the batch kernels of
:mod:`halosift.engine.nbs_kernels`; the walks here (:func:`radical_class`,
:func:`_termini`) are the reference path they are tested against.

Weighing side (numpy/pandas, any conditions): rate of each radical = H count ×
Br· rate per H of the *radical's* class at the NBS temperature
(:func:`radical_class`: an allyl radical is weighed by the alkyl substituents
on both its termini, so the CH3 of 2-butene and C3 of 1-butene, which give
the same 1-methylallyl radical, weigh alike; a radical conjugated further,
with an arene or a second C=C, is ``conjugated``); product share = radical
rate × terminus share, normalised per structure over these rows only (every
other C–H gets no share under NBS).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd
import pyarrow as pa
from halosift.engine import parameters as P
from halosift.engine.nbs_kernels import AllylPartner, MolNbsFacts
from halosift.engine.shares import cast_checked, percent_of_structure
from halosift.engine.site_classes import SITE_CODE
from halosift.engine.sites import substitute
from halosift.engine.stereo import NOT_ANALYSED, Skeleton, StereoOutcome, canonical, potential_stereo, stereo_outcome
from rdkit import Chem

_SINGLE = Chem.BondType.SINGLE
_DOUBLE = Chem.BondType.DOUBLE
_BR = 35
#: Site classes NBS brominates (doubly activated sites are labelled allylic by engine.sites).
NBS_SITES: tuple[str, ...] = tuple(
    f"{kind}-{degree}" for kind in ("allylic", "benzylic") for degree in ("primary", "secondary", "tertiary")
)
TERMINI = ("radical carbon", "allylic shift")

#: Column types of :attr:`halosift.engine.perception.Perception.allylic` (one row per site group × NBS product).
ALLYLIC_SCHEMA = pa.schema(
    [
        pa.field("struct", pa.int32(), metadata={"doc": "row of the structures table"}),
        pa.field("product", pa.string(), metadata={"doc": "canonical SMILES of the monobromide"}),
        pa.field("product_id", pa.int32(), metadata={"doc": "number of that product within its structure, from 0"}),
        pa.field("site", pa.string(), metadata={"doc": "site class of the carbon that loses H"}),
        pa.field("site_code", pa.int8(), metadata={"doc": "index of site in engine.SITE_CLASSES"}),
        pa.field("radical_code", pa.int8(), metadata={"doc": "index in engine.SITE_CLASSES of the radical's class "
                                                                "(engine.nbs.radical_class), which sets its rate"}),
        pa.field("h_count", pa.int32(), metadata={"doc": "hydrogens of that site group"}),
        pa.field("terminus", pa.string(), metadata={"doc": "radical carbon / allylic shift (comma-joined when both)"}),
        pa.field("alkene_subst", pa.int32(), metadata={"doc": "carbon substituents on the product's C=C (-1: none)"}),
        pa.field("share", pa.float64(), metadata={"doc": "fraction of this group's radical that gives this product"}),
        pa.field("stereo", pa.string(), metadata={"doc": "achiral / one-enantiomer / racemate / diastereomers / not counted (see the site table)"}),
        pa.field("n_stereoisomers", pa.int64(), metadata={"doc": "stereoisomers of this product formed (E/Z counted); capped as in the site table"}),
        pa.field("n_diastereomers", pa.int64(), metadata={"doc": "of those, distinct up to mirror image"}),
        pa.field("stereo_approx", pa.bool_(), metadata={"doc": "counts not exact (see the site table's stereo_approx)"}),
        pa.field("ez_open", pa.bool_(), metadata={"doc": "the product has a C=C formed as both E and Z"}),
    ]
)


def empty_frame() -> pd.DataFrame:
    """An allylic table with no rows and the right dtypes."""
    return frame_from_rows([])


def frame_from_rows(rows: list[tuple]) -> pd.DataFrame:
    """Rows (in :data:`ALLYLIC_SCHEMA` order, ``site_code`` included) as a typed frame."""
    df = pd.DataFrame(rows, columns=ALLYLIC_SCHEMA.names)
    return cast_checked(
        df,
        {"struct": "int32", "product": object, "product_id": "int32", "site": object, "site_code": "int8",
         "radical_code": "int8", "h_count": "int32",
         "terminus": object, "alkene_subst": "int32", "share": "float64", "stereo": object,
         "n_stereoisomers": "int64", "n_diastereomers": "int64", "stereo_approx": "bool", "ez_open": "bool"}
    )


def _alkene_substituents(mol: Chem.Mol, i: int, j: int) -> int:
    """Heavy-atom substituents on the double bond i=j (each other excluded)."""
    return sum(1 for n in mol.GetAtomWithIdx(i).GetNeighbors() if n.GetIdx() != j) + sum(
        1 for n in mol.GetAtomWithIdx(j).GetNeighbors() if n.GetIdx() != i
    )


def _sp3_carbon(atom: Chem.Atom) -> bool:
    return atom.GetAtomicNum() == 6 and not atom.GetIsAromatic() and all(
        b.GetBondType() == _SINGLE for b in atom.GetBonds())


def _pi_bonds(atom: Chem.Atom, skip: int) -> bool:
    """True when ``atom`` is aromatic or carries a double or triple bond to an atom other than ``skip``."""
    return atom.GetIsAromatic() or any(
        b.GetBondType() != _SINGLE and b.GetOtherAtomIdx(atom.GetIdx()) != skip for b in atom.GetBonds())


def radical_class(mol: Chem.Mol, a: int, site: str) -> str:
    """Class whose Br· rate forms the radical at atom ``a`` (an allylic or benzylic site of class ``site``).

    The degree is the number of alkyl (sp3 carbon) substituents on the radical's termini: on ``a`` itself
    and, for an allyl radical a–b=c, on c (b's substituents barely touch the spin). 0, 1, ≥ 2 give the
    ``-primary``, ``-secondary``, ``-tertiary`` class of the site's kind. A radical delocalised further — a
    second π neighbour of ``a`` (1-phenylallyl from allylbenzene, pentadienyl, diphenylmethyl) or an arene
    or C=C on the far terminus c — is ``conjugated``.
    """
    kind = site.split("-")[0]
    atom = mol.GetAtomWithIdx(a)
    pi_neighbours = [n for n in atom.GetNeighbors() if _pi_bonds(n, a)]
    alkyl = sum(1 for n in atom.GetNeighbors() if _sp3_carbon(n))
    conjugated = len(pi_neighbours) > 1
    if kind == "allylic" and not conjugated:
        b_atom = pi_neighbours[0]
        b = b_atom.GetIdx()
        for bond in b_atom.GetBonds():
            c = bond.GetOtherAtomIdx(b)
            if c == a or bond.GetBondType() != _DOUBLE:
                continue
            c_atom = mol.GetAtomWithIdx(c)
            alkyl += sum(1 for n in c_atom.GetNeighbors() if n.GetIdx() != b and _sp3_carbon(n))
            conjugated = conjugated or any(n.GetIdx() != b and _pi_bonds(n, c) for n in c_atom.GetNeighbors())
    if conjugated:
        return "conjugated"
    return f"{kind}-{('primary', 'secondary', 'tertiary')[min(alkyl, 2)]}"


def _conjugation(mol: Chem.Mol, i: int, j: int) -> int:
    """1 when the C=C i=j is conjugated with an arene or another multiple bond, else 0."""
    for x, y in ((i, j), (j, i)):
        if any(n.GetIdx() != y and _pi_bonds(n, x) for n in mol.GetAtomWithIdx(x).GetNeighbors()):
            return 1
    return 0


def _drop_h(atom: Chem.Atom) -> None:
    if atom.GetNumExplicitHs():
        atom.SetNumExplicitHs(atom.GetNumExplicitHs() - 1)


def _refresh(rw: Chem.RWMol) -> None:
    """Hydrogen counts after an edit; a full sanitisation is not needed.

    The edits never touch an aromatic bond and keep every carbon's valence,
    so aromaticity and kekulisation stand; only implicit H counts change.
    (Full sanitisation gave identical NBS tables on the sample catalogue and
    a generated library, at several times the cost.)
    """
    rw.UpdatePropertyCache(strict=False)


def _shifted_bromide(mol: Chem.Mol, a: int, b: int, c: int) -> Chem.Mol:
    """a–b=c → a=b–c(Br): the allylic transposition product (atom indices kept, Br appended)."""
    rw = Chem.RWMol(mol)
    for idx in (a, b, c):
        rw.GetAtomWithIdx(idx).SetChiralTag(Chem.ChiralType.CHI_UNSPECIFIED)
    _drop_h(rw.GetAtomWithIdx(a))
    old = rw.GetBondBetweenAtoms(b, c)
    old.SetBondType(_SINGLE)
    old.SetStereo(Chem.BondStereo.STEREONONE)
    rw.GetBondBetweenAtoms(a, b).SetBondType(_DOUBLE)
    # Directions that described the old C=C's geometry would mislabel the new one: both are open now.
    for idx in (a, b, c):
        for bond in rw.GetAtomWithIdx(idx).GetBonds():
            if bond.GetBondType() == _SINGLE:
                bond.SetBondDir(Chem.BondDir.NONE)
    new = rw.AddAtom(Chem.Atom(_BR))
    rw.AddBond(c, new, _SINGLE)
    _refresh(rw)
    return rw.GetMol()


@dataclass(frozen=True)
class Terminus:
    """One NBS product of a radical: where Br goes, the molecule, and its C=C's weight inputs."""

    name: str
    """One of :data:`TERMINI`."""
    product: Chem.Mol | None
    """The bromide (None: the caller knows its SMILES)."""
    alkene_subst: int
    """Carbon substituents on the product's C=C (-1: none)."""
    conjugated: int
    """1 when that C=C is conjugated with an arene or another multiple bond, else 0."""


def _termini(mol: Chem.Mol, a: int, build_radical_carbon: bool = True) -> list[Terminus]:
    """The products of the radical at ``a``, by walking its atoms (the reference path).

    ``build_radical_carbon=False`` leaves the bromide at the radical carbon
    itself as None, for a caller that knows its SMILES already.
    """
    atom = mol.GetAtomWithIdx(a)
    shifted = []
    kept_subst = -1
    kept_conj = 0
    for b_atom in atom.GetNeighbors():
        b = b_atom.GetIdx()
        for bond in b_atom.GetBonds():
            c = bond.GetOtherAtomIdx(b)
            if c == a or bond.GetBondType() != _DOUBLE or bond.GetIsAromatic():
                continue
            if mol.GetAtomWithIdx(c).GetAtomicNum() != 6:
                continue
            if _alkene_substituents(mol, b, c) > kept_subst:
                kept_subst, kept_conj = _alkene_substituents(mol, b, c), _conjugation(mol, b, c)
            product = _shifted_bromide(mol, a, b, c)
            shifted.append(Terminus("allylic shift", product, _alkene_substituents(product, a, b),
                                    _conjugation(product, a, b)))
    # At the radical carbon the existing C=C stays (benzylic: none, -1).
    # The bromide at the radical carbon is the substitution product (planar radical: its configuration is lost).
    radical_carbon = substitute(mol, a, _BR) if build_radical_carbon else None
    return [Terminus("radical carbon", radical_carbon, kept_subst, kept_conj), *shifted]


def _built_termini(
    mol: Chem.Mol, a: int, partners: list[AllylPartner], build_radical_carbon: bool = True
) -> list[Terminus]:
    """:func:`_termini` from the batch kernels' allyl partners of ``a``: only the bromides are built here."""
    shifted = []
    kept_subst = -1
    kept_conj = 0
    for p in partners:
        if p.substrate_subst > kept_subst:  # the first most substituted C=C, as the walk keeps it
            kept_subst, kept_conj = p.substrate_subst, p.substrate_conj
        shifted.append(Terminus("allylic shift", _shifted_bromide(mol, a, p.b, p.c), p.product_subst, p.product_conj))
    radical_carbon = substitute(mol, a, _BR) if build_radical_carbon else None
    return [Terminus("radical carbon", radical_carbon, kept_subst, kept_conj), *shifted]


def _ez_open(product: Chem.Mol) -> bool:
    """True when the product has a double bond whose E/Z geometry nothing fixes (both form)."""
    return any(
        e.type == Chem.StereoType.Bond_Double and e.specified == Chem.StereoSpecified.Unspecified
        for e in potential_stereo(Chem.Mol(product))
    )


def allylic_rows(
    mol: Chem.Mol,
    groups: list,
    specified: bool,
    skeleton: Skeleton,
    outcomes: list[StereoOutcome] | None = None,
    stereo: bool = True,
    facts: MolNbsFacts | None = None,
) -> list[tuple]:
    """NBS product rows of one structure (without ``struct``): see :data:`ALLYLIC_SCHEMA`.

    ``groups`` are the structure's :class:`halosift.engine.sites.SiteGroup` list. With
    input stereo every carbon of a group is followed (they may give different
    stereoisomers); otherwise the first stands for all. ``outcomes`` (per
    group, the site table's stereo) is reused for a bromide formed only at the
    radical carbon of one group: it is that group's monochloride with Br for
    Cl, so its stereo is the same and need not be worked out again.
    ``stereo=False`` leaves the stereo columns empty (a library screen's rows).
    ``facts`` (the batch kernels' radical classes and allyl partners of this molecule) replace
    the atom walks of :func:`radical_class` and :func:`_termini`; None walks (the reference path).
    """
    factor = P.NBS_SUBSTITUENT_FACTOR.value
    conj_weight = P.NBS_CONJUGATION_SUBSTITUENTS.value
    # A screen's rows of a stereo-free input need only each product's constitution, and the
    # bromide at the radical carbon is the group's monochloride with Br for Cl: the halogen is
    # the one terminal heteroatom, so canonical order is the same (the tests check this).
    constitution_only = not stereo and not specified
    # product constitution → {group index: [share, termini, subst]}, plus every product molecule formed
    per_product: dict[str, dict[int, list]] = {}
    mols: dict[str, list[Chem.Mol]] = {}
    radical_code: dict[int, int] = {}
    for g, group in enumerate(groups):
        if group.site not in NBS_SITES:
            continue
        # Equivalent carbons give equivalent radicals: the first names the class.
        if facts is None:
            radical_code[g] = SITE_CODE[radical_class(mol, group.atoms[0], group.site)]
        else:
            radical_code[g] = facts.radical_code(group.atoms[0])
        atoms = group.atoms if specified else group.atoms[:1]
        for a in atoms:
            if facts is None:
                termini = _termini(mol, a, build_radical_carbon=not constitution_only)
            else:
                termini = _built_termini(mol, a, facts.partners(a), build_radical_carbon=not constitution_only)
            weights = [factor ** (max(t.alkene_subst, 0) + conj_weight * t.conjugated) for t in termini]
            total = sum(weights) * len(atoms)
            for t, w in zip(termini, weights):
                terminus, product, n = t.name, t.product, t.alkene_subst
                if product is None:
                    key = group.product_smiles.replace("Cl", "Br")
                else:
                    key = Chem.MolToSmiles(product, isomericSmiles=False)
                    mols.setdefault(key, []).append(product)
                entry = per_product.setdefault(key, {}).setdefault(g, [0.0, set(), n])
                entry[0] += w / total
                entry[1].add(terminus)
    rows = []
    for product_id, (key, by_group) in enumerate(per_product.items()):
        products = mols.get(key, [])
        (only, (_, termini_only, _)), *others = by_group.items()
        if not stereo:
            st = NOT_ANALYSED
        elif outcomes is not None and not others and termini_only == {"radical carbon"}:
            st = outcomes[only]
        else:
            st = stereo_outcome(products, skeleton)
        # With input stereo the product's equivalent sources can give several stereoisomers (the two
        # enantiomers of a meso substrate's mirror-related carbons): the smallest SMILES stands for them,
        # the convention engine.sites.SiteGroup.product follows, whatever the input's atom order.
        smiles = min(canonical(p) for p in products) if specified else key  # without stereo, the key is the SMILES
        for g, (share, termini, n) in by_group.items():
            site = groups[g].site
            rows.append(
                (smiles, product_id, site, SITE_CODE[site], radical_code[g], groups[g].h_count,
                 ",".join(t for t in TERMINI if t in termini), n, share,
                 st.outcome, st.n_stereoisomers, st.n_diastereomers, st.approximate, stereo and _ez_open(products[0]))
            )
    return rows


def nbs_percent(allylic: pd.DataFrame, per_h: np.ndarray, n_struct: int) -> np.ndarray:
    """Percent of each row's product among the structure's NBS monobromides (rows of one product add up)."""
    struct = allylic["struct"].to_numpy()
    weights = (
        allylic["h_count"].to_numpy(dtype=np.float64) * per_h[allylic["radical_code"].to_numpy()]
        * allylic["share"].to_numpy(dtype=np.float64)
    )
    return percent_of_structure(weights, struct, n_struct)


def nbs_products(allylic: pd.DataFrame, per_h: np.ndarray, n_struct: int) -> pd.DataFrame:
    """One row per (struct, product): summed ``nbs_pct``, site classes and termini joined, stereo."""
    if allylic.empty:
        return pd.DataFrame(columns=["struct", "product", "site", "terminus", "alkene_subst", "stereo",
                                     "n_stereoisomers", "n_diastereomers", "stereo_approx", "ez_open", "nbs_pct"])
    df = allylic.assign(nbs_pct=nbs_percent(allylic, per_h, n_struct))

    def joined(values: pd.Series) -> str:  # as a chemist reads it: "radical carbon, allylic shift"
        seen: list[str] = []
        for v in values:
            for part in str(v).split(","):
                part = part.strip()
                if part and part not in seen:
                    seen.append(part)
        return ", ".join(seen)

    out = df.groupby(["struct", "product"], sort=False, as_index=False).agg(
        site=("site", joined), terminus=("terminus", joined), alkene_subst=("alkene_subst", "max"),
        stereo=("stereo", "first"), n_stereoisomers=("n_stereoisomers", "first"),
        n_diastereomers=("n_diastereomers", "first"), stereo_approx=("stereo_approx", "first"),
        ez_open=("ez_open", "first"), nbs_pct=("nbs_pct", "sum"),
    )
    return out


def nbs_majors(allylic: pd.DataFrame, per_h: np.ndarray, n_struct: int) -> tuple[np.ndarray, np.ndarray]:
    """Per structure: SMILES and percent of the NBS major product ('' and NaN without allylic/benzylic C–H).

    Integer keys (struct, product_id) instead of a string group-by: this runs for every re-weighing.
    Ties go to the smallest product SMILES: the order products are met in follows the input's atom
    numbering, which must not decide the major (explain lists NBS products in this order too).
    """
    major = np.full(n_struct, "", dtype=object)
    pct = np.full(n_struct, np.nan)
    if allylic.empty:
        return major, pct
    row_pct = nbs_percent(allylic, per_h, n_struct)
    struct = allylic["struct"].to_numpy(dtype=np.int64)
    pid = allylic["product_id"].to_numpy(dtype=np.int64)
    width = int(pid.max()) + 1
    key = struct * width + pid
    if len(key) > 1 and (np.diff(key) < 0).any():
        # Perception writes rows in (struct, product_id) order; anything else gets sorted once here.
        order = np.argsort(key, kind="stable")
        key, row_pct = key[order], row_pct[order]
        rows = order
    else:
        rows = np.arange(len(key))
    starts = np.flatnonzero(np.r_[True, key[1:] != key[:-1]])  # one run per (struct, product)
    summed = np.add.reduceat(row_pct, starts)
    key_struct = key[starts] // width
    # Per structure, the first product with the largest share (products are in perception order).
    seg = np.flatnonzero(np.r_[True, key_struct[1:] != key_struct[:-1]])
    seg_max = np.maximum.reduceat(summed, seg)
    seg_of = np.repeat(np.arange(len(seg)), np.diff(np.r_[seg, len(summed)]))
    # A tie within float noise (the same weights summed in another order) is a tie.
    hits = np.flatnonzero(summed >= seg_max[seg_of] * (1 - 1e-12))
    first_hit = np.r_[True, seg_of[hits][1:] != seg_of[hits][:-1]]
    best = hits[first_hit]
    products = allylic["product"].to_numpy(dtype=object)
    tied = np.flatnonzero(~first_hit)
    if len(tied):  # rare: pick the smallest SMILES among each structure's tied products
        run_of = np.cumsum(first_hit) - 1
        for t in tied:
            run = run_of[t]
            if products[rows[starts[hits[t]]]] < products[rows[starts[best[run]]]]:
                best[run] = hits[t]
    best = best[summed[best] > 0]
    idx = key_struct[best]
    major[idx] = products[rows[starts[best]]]
    pct[idx] = summed[best]
    return major, pct
