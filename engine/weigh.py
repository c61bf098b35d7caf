"""Re-weighing: product percentages and verdicts from a perception, vectorised.

No RDKit here — this runs live in the app for every change of conditions.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.compute as pc

from engine.conditions import REAGENTS, Conditions
from engine.nbs import nbs_majors
from engine.polyhalogenation import poly_pct_at_ratio
from engine.perception import Perception
from engine.shares import percent_of_structure
from engine.site_classes import ABSTRACTABLE, SITE_CLASSES

VERDICTS = ("single", "br-selective", "mixture", "inert")
SUMMARY_COLUMNS = (
    "n_products", "verdict", "cl2_major", "cl2_major_pct", "br2_major", "br2_major_pct", "stereo", "site_types",
    "confidence", "nbs_major", "nbs_major_pct", "serves", "cl2_poly_pct", "br2_poly_pct",
)
#: Order in which ``serves`` tries the reagents: the plainest that reaches the threshold wins (program rule).
SERVES_ORDER = ("cl2", "br2", "nbs")
#: Weakest first: the order in which a prediction's bases are ranked.
BASES = ("estimate", "textbook", "measured")
#: A product counts towards ``confidence`` when it carries at least this share
#: of either reagent's monohalides (a definition of this program, not chemistry).
CONFIDENCE_MIN_PCT = 5.0


def site_weights(sites: pd.DataFrame, conditions: Conditions, reagent: str) -> np.ndarray:
    """Rate of forming each product (h_count × k per H), arbitrary units."""
    k = conditions.per_h(reagent)
    return sites["h_count"].to_numpy(dtype=np.float64) * k[sites["site_code"].to_numpy()]


def basis_rank(conditions: Conditions, reagent: str) -> np.ndarray:
    """Per site code, the index in :data:`BASES` of what its rate rests on (len(BASES) when not abstracted)."""
    rank = {b: i for i, b in enumerate(BASES)}
    return np.array([rank.get(b, len(BASES)) for b in conditions.bases(reagent)], dtype=np.int8)


def confidence_labels(
    site_code: np.ndarray,
    pct: dict[str, np.ndarray],
    struct: np.ndarray,
    n_struct: int,
    conditions: Conditions,
    starts: np.ndarray | None = None,
) -> np.ndarray:
    """Per structure, the weakest basis among products with ≥ CONFIDENCE_MIN_PCT % under any reagent in ``pct``.

    A product's basis under a reagent is that of the rate constant of its site
    class toward that reagent's radical; a product counts only for the
    reagents under which it reaches the cut-off. Empty when no product does.
    """
    none = np.int8(len(BASES))
    row_rank = np.full(len(site_code), none, dtype=np.int8)
    for reagent, p in pct.items():
        ranks = basis_rank(conditions, reagent)[site_code]
        counted = p >= CONFIDENCE_MIN_PCT
        np.minimum(row_rank, np.where(counted, ranks, none), out=row_rank)
    worst = np.full(n_struct, none, dtype=np.int8)
    if len(struct):
        if starts is None:
            starts = _segments(struct)  # sites come grouped by structure, so a segment reduction serves
        worst[struct[starts]] = np.minimum.reduceat(row_rank, starts)
    labels = np.array([*BASES, ""], dtype=object)
    return labels[worst]


def weigh(
    sites: pd.DataFrame, conditions: Conditions, n_struct: int | None = None, reagents: tuple[str, ...] = tuple(REAGENTS)
) -> pd.DataFrame:
    """The sites table plus ``<reagent>_pct`` (percent per structure) for ``reagents`` (default cl2, br2)."""
    struct = sites["struct"].to_numpy()
    if n_struct is None:
        n_struct = int(struct.max()) + 1 if len(struct) else 0
    out = sites.copy()
    for reagent in reagents:
        out[f"{reagent}_pct"] = percent_of_structure(site_weights(sites, conditions, reagent), struct, n_struct)
    return out


def _segments(struct: np.ndarray) -> np.ndarray:
    """Start index of each run of equal ``struct`` (sites are grouped by structure)."""
    if len(struct) == 0:
        return np.zeros(0, dtype=np.int64)
    return np.flatnonzero(np.r_[True, struct[1:] != struct[:-1]])


def _first_max(values: np.ndarray, struct: np.ndarray, starts: np.ndarray) -> np.ndarray:
    """Row index of the first maximum of ``values`` within each segment."""
    seg_max = np.maximum.reduceat(values, starts)
    seg_of_row = np.repeat(np.arange(len(starts)), np.diff(np.r_[starts, len(values)]))
    hits = np.flatnonzero(values >= seg_max[seg_of_row] - 1e-9)
    hit_seg = seg_of_row[hits]
    first = np.r_[True, hit_seg[1:] != hit_seg[:-1]]
    return hits[first]


def _site_type_names(masks: np.ndarray) -> np.ndarray:
    names = np.empty(len(masks), dtype=object)
    for mask in np.unique(masks):
        label = ",".join(sorted(SITE_CLASSES[i] for i in range(len(SITE_CLASSES)) if int(mask) >> i & 1))
        names[masks == mask] = label
    return names


def serves(
    columns: dict, alkene: np.ndarray, ok: np.ndarray, n_products: np.ndarray, threshold_pct: float
) -> np.ndarray:
    """Per structure, the reagent that gives one major monohalide at ≥ threshold, or ''.

    Tried in :data:`SERVES_ORDER` (cl2, br2, nbs): the first whose major share
    reaches the threshold. A substrate with C=C (``alkene``: its flag, per structure) is offered
    only nbs, because Cl2 and Br2 add to the double bond. Empty for rejected
    and inert rows, and when no reagent reaches the threshold.
    """
    out = np.full(len(ok), "", dtype=object)
    open_ = ok & (n_products > 0)
    for reagent in SERVES_ORDER:
        pct = np.nan_to_num(np.asarray(columns[f"{reagent}_major_pct"], dtype=np.float64), nan=0.0)
        allowed = open_ if reagent == "nbs" else open_ & ~alkene
        hit = allowed & (out == "") & (pct >= threshold_pct)
        out[hit] = reagent
    return out


def _memo(memo: dict | None, key: tuple, compute):
    """``compute()``, remembered in ``memo`` under ``key`` when a memo is given."""
    if memo is None:
        return compute()
    if key not in memo:
        memo[key] = compute()
    return memo[key]


def _static(perception: Perception) -> dict:
    """What does not depend on conditions: segments, product counts, site types, alkene rows."""
    structures, sites = perception.structures, perception.sites
    n = len(structures)
    struct = sites["struct"].to_numpy()
    starts = _segments(struct)
    seg_struct = struct[starts] if len(starts) else np.zeros(0, dtype=np.int64)
    codes = sites["site_code"].to_numpy()
    # Every abstractable class has k > 0 at any temperature, so this is the same under all conditions.
    abstractable = codes < len(ABSTRACTABLE)  # site codes number the abstractable classes first
    n_products = np.bincount(struct, weights=abstractable, minlength=n)[:n].astype(np.int32)
    bits = np.where(abstractable, np.left_shift(1, codes.astype(np.int64)), 0)
    masks = np.zeros(n, dtype=np.int64)
    if len(starts):
        masks[seg_struct] = np.bitwise_or.reduceat(bits, starts)
    flags = structures["flags"].to_numpy(dtype=object)
    alkene = np.array(["alkene" in str(f).split(",") for f in flags], dtype=bool) if n else np.zeros(0, bool)
    return {
        "struct": struct, "starts": starts, "seg_struct": seg_struct, "codes": codes, "n_products": n_products,
        "site_types": _site_type_names(masks), "alkene": alkene, "ok": (structures["status"] == "ok").to_numpy(),
        "h": sites["h_count"].to_numpy(),
    }


def _reagent_part(perception: Perception, static: dict, conditions: Conditions, reagent: str) -> dict:
    """One reagent's shares, major product and percent (and, for br2, the major's stereo), and polyhalide."""
    sites = perception.sites
    struct, starts, seg_struct = static["struct"], static["starts"], static["seg_struct"]
    n = len(perception.structures)
    pct = percent_of_structure(site_weights(sites, conditions, reagent), struct, n)
    major_smiles = np.full(n, "", dtype=object)
    major_pct = np.full(n, np.nan)
    major_stereo = np.full(n, "", dtype=object)
    if len(starts):
        rows = _first_max(pct, struct, starts)
        has = static["n_products"][seg_struct] > 0
        chosen = rows[has]
        # Gather strings for the majors only: converting every site's string costs more than the weighing.
        major_smiles[seg_struct[has]] = sites["product"].take(chosen).to_numpy(dtype=object)
        major_pct[seg_struct[has]] = pct[chosen]
        if reagent == "br2":
            major_stereo[seg_struct[has]] = sites["stereo"].take(chosen).to_numpy(dtype=object)
    if reagent == "br2":
        major_smiles = np.asarray(
            pc.replace_substring(pa.array(major_smiles, type=pa.string()), "Cl", "Br").to_pylist(), dtype=object
        )
    poly = poly_pct_at_ratio(struct, static["h"], pct, reagent, n)
    return {"pct": pct, "major": major_smiles, "major_pct": major_pct, "stereo": major_stereo, "poly": poly}


def summarise(perception: Perception, conditions: Conditions, memo: dict | None = None) -> pd.DataFrame:
    """One row per structure: product count, verdict, majors, stereo, site types, confidence.

    ``memo`` (a dict the caller keeps per perception) remembers the parts that
    depend on only one reagent's settings, so a live change of one temperature
    or of the threshold recomputes only what it affects.
    """
    structures = perception.structures
    n = len(structures)
    static = _memo(memo, ("static",), lambda: _static(perception))
    parts = {
        r: _memo(memo, conditions.reagent_key(r), lambda r=r: _reagent_part(perception, static, conditions, r))
        for r in REAGENTS
    }
    out: dict[str, object] = {"n_products": static["n_products"]}
    for reagent in REAGENTS:
        out[f"{reagent}_major"] = parts[reagent]["major"]
        out[f"{reagent}_major_pct"] = parts[reagent]["major_pct"]
    out["stereo"] = parts["br2"]["stereo"]
    out["site_types"] = static["site_types"]
    pcts = {r: parts[r]["pct"] for r in REAGENTS}
    confidence_key = ("confidence", *(conditions.reagent_key(r) for r in REAGENTS))
    out["confidence"] = _memo(memo, confidence_key, lambda: confidence_labels(
        static["codes"], pcts, static["struct"], n, conditions, static["starts"]))
    out["nbs_major"], out["nbs_major_pct"] = _memo(
        memo, conditions.reagent_key("nbs"), lambda: nbs_majors(perception.allylic, conditions.per_h("nbs"), n))
    for reagent in REAGENTS:
        out[f"{reagent}_poly_pct"] = parts[reagent]["poly"]

    ok, n_products = static["ok"], static["n_products"]
    verdict = np.full(n, "", dtype=object)
    br_pct = np.nan_to_num(out["br2_major_pct"], nan=0.0)
    verdict[ok] = "mixture"
    verdict[ok & (br_pct >= conditions.threshold_pct)] = "br-selective"
    verdict[ok & (n_products == 1)] = "single"
    verdict[ok & (n_products == 0)] = "inert"
    out["verdict"] = verdict
    out["serves"] = serves(out, static["alkene"], ok, n_products, conditions.threshold_pct)
    frame = pd.DataFrame(out, index=structures.index)
    return frame[list(SUMMARY_COLUMNS)]
