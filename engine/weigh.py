"""Re-weighing: product percentages and verdicts from a perception, vectorised.

No RDKit here — this runs live in the app for every change of conditions.

:func:`summarise` reads the site table in *runs*: consecutive rows of one
structure with the same site class and H count. Every product of a run has the
same share under any conditions, so a run is weighed once: its first product
stands for it as a candidate major and for the confidence cut-off, and in the
polyhalide estimate it is one term (terms of equal κ add). Runs are laid out
in blocks of structures with equally many (:func:`halosift.engine.shares.blocks_by_length`),
so per-structure sums are whole-array passes; text is gathered only for the
structures' majors. The layout (runs, blocks, slices) is :mod:`halosift.engine.run_layout`,
the bulk text gathering :mod:`halosift.engine.text_columns`; this module keeps the
weighing rules and puts the summary together. Large libraries weigh the NBS split and the two reagents on
threads (numpy and Arrow release the GIL in their loops).

SO2Cl2 is weighed as Cl· at its own temperature (its part is read off Cl2's
when the two match). Each reagent's outcome, the reagent offered and the
verdict come from :mod:`halosift.engine.outcomes`, from the majors and the structure
flags only.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from concurrent.futures import ThreadPoolExecutor
from functools import partial, reduce
from typing import Any

import numpy as np
import pandas as pd
import pyarrow as pa
from halosift.engine.conditions import REAGENTS, Conditions
from halosift.engine.cores import usable_cores
from halosift.engine.nbs import NBS_SITES, nbs_majors, nbs_percent
from halosift.engine.outcomes import (
    FEATURES,
    OUTCOME_REAGENTS,
    OUTCOMES,
    PATHWAYS,
    REASONS,
    SITE_REAGENTS,
    VERDICTS,
    pathway_applies,
    reagent_outcomes,
)
from halosift.engine.perception import Perception
from halosift.engine.polyhalogenation import deactivation, poly_pct_of_block
from halosift.engine.rates import CONFIDENCE_BASES
from halosift.engine.run_layout import Block, chunk_bounds, run_starts, runs
from halosift.engine.shares import blocks_by_length, percent_of_structure
from halosift.engine.site_classes import ABSTRACTABLE, SITE_CLASSES, SITE_CODE
from halosift.engine.text_columns import ARROW_TEXT, TEXT_DTYPE, gather_text, labels_column, site_type_names

SUMMARY_COLUMNS = (
    "n_products", "verdict", "cl2_major", "cl2_major_pct", "br2_major", "br2_major_pct", "stereo", "site_types",
    "confidence", "nbs_major", "nbs_major_pct", "serves", "cl2_poly_pct", "br2_poly_pct",
    *(f"{r}_outcome" for r in OUTCOME_REAGENTS), *(f"{r}_reason" for r in OUTCOME_REAGENTS),
    "so2cl2_major", "so2cl2_major_pct",
)
#: Order in which ``serves`` tries the reagents: the plainest whose outcome is clean wins (program rule).
SERVES_ORDER = OUTCOME_REAGENTS
#: Reagents with a polyhalide column (so2cl2 is weighed for its outcome only).
POLY_REAGENTS = tuple(REAGENTS)
#: Weakest first: the order in which a prediction's bases are ranked (engine.rates.CONFIDENCE_BASES).
BASES = CONFIDENCE_BASES
#: A product counts towards ``confidence`` when it carries at least this share
#: of either reagent's monohalides (a definition of this program, not chemistry).
CONFIDENCE_MIN_PCT = 5.0
#: Shares this close to a structure's largest count as tied for major (the first met wins).
_TIE_PCT = 1e-9

#: Bit of each site code in a structure's site-type mask.
_CODE_BIT = np.left_shift(np.int32(1), np.arange(len(SITE_CLASSES), dtype=np.int32))

# Tuning of the fast path (program choices, no science): none of these changes a result.
#: Site tables smaller than this are weighed in one thread: sharing out would cost more than it saves.
_THREADED_MIN_ROWS = 100_000
#: Shares each reagent's weighing is cut into when threaded (two cores keep busy while one share runs late).
_TASKS_PER_REAGENT = 2
#: Site rows per pass of the run finder: its temporaries stay in cache and are reused pass to pass.
_CHUNK_ROWS = 1 << 20


def site_weights(sites: pd.DataFrame, conditions: Conditions, reagent: str) -> np.ndarray:
    """Rate of forming each product (h_count × k per H), arbitrary units."""
    k = conditions.per_h(reagent)
    return sites["h_count"].to_numpy(dtype=np.float64) * k[sites["site_code"].to_numpy()]


def basis_rank(conditions: Conditions, reagent: str) -> np.ndarray:
    """Per site code, the index in :data:`BASES` of what its rate rests on (len(BASES) when not abstracted)."""
    rank = {b: i for i, b in enumerate(BASES)}
    return np.array([rank.get(b, len(BASES)) for b in conditions.bases(reagent)], dtype=np.int8)


def ranks_at_cutoff(site_code: np.ndarray, pct: np.ndarray, rank_of_code: np.ndarray) -> np.ndarray:
    """Per product under one reagent: the index in :data:`BASES` of its rate basis, or len(BASES) below the cut-off.

    ``rank_of_code`` is :func:`basis_rank` for that reagent. A structure's
    ``confidence`` is the smallest of these over its products and the reagents.
    """
    ranks = rank_of_code[site_code]
    ranks[pct < CONFIDENCE_MIN_PCT] = len(BASES)
    return ranks


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


def _has_flags(flags: pd.Series, names: Sequence[str]) -> dict[str, np.ndarray]:
    """Per name, per row: whether the comma-joined ``flags`` include it (decided once per distinct value)."""
    codes, uniques = pd.factorize(flags)
    parts = [set(str(u).split(",")) for u in uniques]
    # A missing value (code −1) takes the trailing False.
    return {name: np.array([name in p for p in parts] + [False], dtype=bool)[codes] for name in names}


def _memo(memo: dict | None, key: tuple, compute: Callable[[], Any]) -> Any:
    """``compute()``, remembered in ``memo`` under ``key`` when a memo is given."""
    if memo is None:
        return compute()
    if key not in memo:
        memo[key] = compute()
    return memo[key]


class _Known:
    """A value already at hand, answering like a finished future."""

    def __init__(self, value: Any) -> None:
        """Hold ``value``."""
        self.value = value

    def result(self) -> Any:
        """The value."""
        return self.value


def _start(memo: dict | None, key: tuple, compute: Callable[[], Any], pool: ThreadPoolExecutor | None) -> Any:
    """A future of ``compute()``: remembered in ``memo``, else run on ``pool`` (or here, without one)."""
    if memo is not None and key in memo:
        return _Known(memo[key])
    return pool.submit(compute) if pool is not None else _Known(compute())


def _finish(memo: dict | None, key: tuple, future: Any) -> Any:
    """The future's value, remembered in ``memo`` under ``key`` when a memo is given."""
    value = future.result()
    if memo is not None:
        memo[key] = value
    return value


def _pool(perception: Perception) -> ThreadPoolExecutor | None:
    """Threads for the NBS split and the two reagents' parts, when there is more than one core and work to share."""
    # numpy and Arrow release the GIL inside their loops, so these parts overlap on separate cores.
    return ThreadPoolExecutor(3) if usable_cores() > 1 and len(perception.sites) >= _THREADED_MIN_ROWS else None


def _static(perception: Perception) -> dict:
    """What does not depend on conditions: runs in blocks, product counts, site types, features and ok rows."""
    structures, sites = perception.structures, perception.sites
    n = len(structures)
    struct = sites["struct"].to_numpy()
    codes = sites["site_code"].to_numpy()
    h = sites["h_count"].to_numpy()
    row_type = np.int32 if len(struct) < 2**31 else np.int64
    n_products = np.zeros(n, dtype=np.int32)
    masks = np.zeros(n, dtype=np.int32)
    pieces: dict[int, list[Block]] = {}
    bounds = chunk_bounds(struct, _CHUNK_ROWS)
    for lo, hi in zip(bounds[:-1], bounds[1:]):
        start = runs(struct[lo:hi], codes[lo:hi], h[lo:hi]) + lo
        # Every abstractable class has k > 0 at any temperature, so which runs count is the same under all conditions.
        term = codes[start] < len(ABSTRACTABLE)  # site codes number the abstractable classes first
        count = np.diff(np.append(start, hi))[term]
        first = start[term]
        run_h = h[first]
        # Narrow types (kept for every re-weighing): H counts and run lengths fit int16 in any catalogue.
        small = np.int16 if len(first) == 0 or max(int(run_h.max()), int(count.max())) < 2**15 else np.int32
        run_struct, run_code = struct[first], codes[first]
        run_h, count, first = run_h.astype(small), count.astype(small), first.astype(row_type)
        seg = run_starts(run_struct)
        for segments, index in blocks_by_length(seg, np.diff(np.append(seg, len(first)))):
            piece = Block(run_struct[seg[segments]], run_code[index], run_h[index], count[index], first[index])
            n_products[piece.struct] = piece.count.sum(axis=0)
            masks[piece.struct] = np.bitwise_or.reduce(_CODE_BIT[piece.code], axis=0)
            pieces.setdefault(index.shape[0], []).append(piece)
    blocks = [
        Block(*(np.concatenate([getattr(p, f) for p in group], axis=-1) for f in Block.__dataclass_fields__))
        if len(group) > 1 else group[0]
        for _, group in sorted(pieces.items())
    ]
    type_names, type_codes = site_type_names(masks)
    # NBS products per structure: perception numbers them from 0 within each structure.
    nbs_count = np.zeros(n, dtype=np.int32)
    allylic = perception.allylic
    if len(allylic):
        np.maximum.at(nbs_count, allylic["struct"].to_numpy(dtype=np.int64),
                      allylic["product_id"].to_numpy(dtype=np.int32) + 1)
    features = _has_flags(structures["flags"], [f for f in FEATURES if f not in ("no_ch", "no_nbs_site")])
    features |= {"no_ch": n_products == 0, "no_nbs_site": nbs_count == 0}
    return {
        "blocks": blocks, "n_products": n_products, "site_types": labels_column(type_names, type_codes),
        "features": features, "nbs_count": nbs_count, "ok": (structures["status"] == "ok").to_numpy(),
    }


def _nbs_part(perception: Perception, conditions: Conditions) -> tuple[object, np.ndarray, np.ndarray]:
    """NBS major (as a text column, so a live re-weighing need not convert it again), its percent, and the
    confidence rank under NBS (weakest basis among NBS products at or above the cut-off)."""
    n = len(perception.structures)
    major, pct = nbs_majors(perception.allylic, conditions.per_h("nbs"), n)
    if ARROW_TEXT:
        major = pd.array(pa.array(major, type=pa.large_string()), dtype=TEXT_DTYPE)
    return major, pct, _nbs_worst(perception.allylic, conditions, n)


def _nbs_worst(allylic: pd.DataFrame, conditions: Conditions, n: int) -> np.ndarray:
    """Per structure, the index in :data:`BASES` of the weakest rate basis among NBS products with ≥ the cut-off.

    A product's share sums its rows (one per radical giving it); each row's basis is its site class's Br· rate.
    """
    worst = np.full(n, len(BASES), dtype=np.int8)
    if allylic.empty:
        return worst
    row_pct = nbs_percent(allylic, conditions.per_h("nbs"), n)
    struct = allylic["struct"].to_numpy(dtype=np.int64)
    pid = allylic["product_id"].to_numpy(dtype=np.int64)
    _, product = np.unique(struct * (int(pid.max()) + 1) + pid, return_inverse=True)
    summed = np.bincount(product, weights=row_pct)
    keep = summed[product] >= CONFIDENCE_MIN_PCT
    rank = basis_rank(conditions, "nbs")[allylic["site_code"].to_numpy()]
    np.minimum.at(worst, struct[keep], rank[keep])
    return worst


def _weigh_slices(part: dict, slices: list[Block], conditions: Conditions, reagent: str) -> None:
    """Fill ``part`` (see :func:`_reagent_tasks`) for the structures of ``slices``, and no others.

    ``part["poly"]`` is None for a reagent without a polyhalide column (so2cl2): that solve is skipped.
    """
    k_of_code = conditions.per_h(reagent)
    rank_of_code = basis_rank(conditions, reagent)
    f = deactivation(reagent)
    for piece in slices:
        k = k_of_code[piece.code]
        weight = piece.h * k  # rate of forming each product of the run
        total = (weight * piece.count).sum(axis=0)
        pct = weight / total  # divided first, as in shares.percent_of_structure
        pct *= 100.0
        # The major: the first run (in site-table order) within a hair of the largest share.
        win = np.argmax(pct >= pct.max(axis=0) - _TIE_PCT, axis=0)
        cols = np.arange(len(piece.struct))
        part["major_pct"][piece.struct] = pct[win, cols]
        part["rows"][piece.struct] = piece.first[win, cols]
        # Confidence: the weakest basis among products at or above the cut-off under this reagent.
        part["worst"][piece.struct] = ranks_at_cutoff(piece.code, pct, rank_of_code).min(axis=0)
        if part["poly"] is None:
            continue
        per_h = np.divide(k, total, out=k)  # share per H of the structure's monohalides
        # H of the whole run: in float, since int16 H times int16 count need not fit int16.
        share = np.multiply(piece.h, piece.count, dtype=np.float64)
        share *= per_h
        part["poly"][piece.struct] = poly_pct_of_block(share, f * (1.0 - per_h))


def _reagent_tasks(
    perception: Perception, static: dict, conditions: Conditions, reagent: str, tasks: int
) -> tuple[dict, list[Callable[[], None]]]:
    """One reagent's arrays, and ``tasks`` calls that fill them between them (any order, or at once).

    Arrays: ``major_pct``, ``poly`` (NaN without products; None for so2cl2), ``rows`` (site row of the
    major, −1 without) and ``worst`` (confidence rank under this reagent). Each call
    weighs its own structures, so the calls can run on separate threads.
    """
    n = len(perception.structures)
    part = {
        "major_pct": np.full(n, np.nan), "poly": np.full(n, np.nan) if reagent in POLY_REAGENTS else None,
        "rows": np.full(n, -1, dtype=np.int64 if len(perception.sites) >= 2**31 else np.int32),
        "worst": np.full(n, len(BASES), dtype=np.int8),
    }
    slices = sorted((piece for block in static["blocks"] for piece in block.slices()), key=lambda p: -p.code.size)
    shares = [slices[i::tasks] for i in range(tasks)]  # largest first, dealt round: about even work
    jobs: list[Callable[[], None]] = [partial(_weigh_slices, part, share, conditions, reagent) for share in shares if share]
    return part, jobs


def _reagent_text(perception: Perception, part: dict, reagent: str) -> dict:
    """A reagent's part with its text: the major product (and, for br2, the major's stereo)."""
    sites = perception.sites
    # The site table holds monochlorides; a monobromide is the same SMILES with Br for Cl.
    major = gather_text(sites["product"], part["rows"], ("Cl", "Br") if reagent == "br2" else None)
    stereo = gather_text(sites["stereo"], part["rows"]) if reagent == "br2" else None
    return {"major": major, "major_pct": part["major_pct"], "stereo": stereo, "poly": part["poly"],
            "worst": part["worst"]}


_ALKENE_RULE = next(p for p in PATHWAYS if p.feature == "alkene")
_NBS_CODES = np.array([SITE_CODE[s] for s in NBS_SITES], dtype=np.int8)


def _transposed_split(
    perception: Perception, conditions: Conditions, reagent: str, rows: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """For structures ``rows`` (bool per structure): the share of the largest product, and how many form, when
    each allylic radical takes the halogen at either terminus; NaN and 0 elsewhere.

    Used where a C=C substrate substitutes (Cl2/Br2/SO2Cl2 above the temperature at which
    addition gives way, engine.outcomes): an allylic radical's share is split between the
    allylic table's products (their terminus shares, engine.nbs), as under NBS; every
    other C–H keeps its own product. Numbers only: the outcome needs no product name,
    and a screen names only the products that can lead the per-site split.
    """
    n = len(perception.structures)
    sites, allylic = perception.sites, perception.allylic
    k = conditions.per_h(reagent)
    struct = sites["struct"].to_numpy(dtype=np.int64)
    code = sites["site_code"].to_numpy()
    inside = rows[struct] & (code < len(ABSTRACTABLE))
    w = np.where(inside, sites["h_count"].to_numpy(dtype=np.float64) * k[code], 0.0)
    total = np.bincount(struct, weights=w, minlength=n)
    plain = inside & ~np.isin(code, _NBS_CODES)  # sites whose radical has one terminus only
    best = np.zeros(n)
    count = np.bincount(struct[plain], minlength=n).astype(np.int64)
    order = np.flatnonzero(plain)
    if len(order):
        np.maximum.at(best, struct[order], 100.0 * w[order] / total[struct[order]])
    a_struct = allylic["struct"].to_numpy(dtype=np.int64) if len(allylic) else np.zeros(0, dtype=np.int64)
    a_in = np.flatnonzero(rows[a_struct]) if len(a_struct) else a_struct
    if len(a_in):
        pid = allylic["product_id"].to_numpy(dtype=np.int64)[a_in]
        aw = (allylic["h_count"].to_numpy(dtype=np.float64)[a_in] * k[allylic["site_code"].to_numpy()[a_in]]
              * allylic["share"].to_numpy(dtype=np.float64)[a_in])
        _, first_row, inverse = np.unique(a_struct[a_in] * (int(pid.max()) + 1) + pid, return_index=True,
                                          return_inverse=True)
        p_struct = a_struct[a_in][first_row]
        count += np.bincount(p_struct, minlength=n)
        np.maximum.at(best, p_struct, 100.0 * np.bincount(inverse, weights=aw) / total[p_struct])
    return np.where(rows & (total > 0), best, np.nan), count


def _so2cl2_weighs_as_cl2(conditions: Conditions) -> bool:
    """Whether SO2Cl2's per-H rates are Cl2's under these conditions (then its shares are Cl2's too).

    Decided on the rates themselves, so every condition that sets them (temperature,
    phase, solvent) counts, including any added later.
    """
    return bool(np.array_equal(conditions.per_h("so2cl2"), conditions.per_h("cl2")))


def _borrowed_so2cl2(conditions: Conditions, cl2: dict) -> dict | None:
    """The so2cl2 part read off Cl2's, when both weigh Cl· alike (:func:`_so2cl2_weighs_as_cl2`); else None.

    SO2Cl2 borrows the Cl· constants, so its shares are Cl2's; only its bases differ
    (every one an estimate), and with one basis for every site the weakest among the
    products at or above the cut-off is that basis wherever the major reaches it.
    """
    if not _so2cl2_weighs_as_cl2(conditions):
        return None
    rank = basis_rank(conditions, "so2cl2")[: len(ABSTRACTABLE)]
    if len(set(rank.tolist())) != 1:
        return None
    pct = cl2["major_pct"]
    worst = np.where(np.nan_to_num(pct, nan=0.0) >= CONFIDENCE_MIN_PCT, rank[0], len(BASES)).astype(np.int8)
    return {"major": cl2["major"], "major_pct": pct, "stereo": None, "poly": None, "worst": worst}


def summarise(perception: Perception, conditions: Conditions, memo: dict | None = None) -> pd.DataFrame:
    """One row per structure: product count, verdict, outcomes per reagent, majors, stereo, site types, confidence.

    ``memo`` (a dict the caller keeps per perception) remembers the parts that
    depend on only one reagent's settings, so a live change of one temperature
    or of the threshold recomputes only what it affects.
    """
    structures = perception.structures
    keys = {r: conditions.reagent_key(r) for r in ("nbs", *SITE_REAGENTS)}
    pool = _pool(perception)
    try:
        # NBS first (without threads its temporaries, the largest, are then reused by what follows).
        nbs = _start(memo, keys["nbs"], lambda: _nbs_part(perception, conditions), pool)
        static = _memo(memo, ("static",), lambda: _static(perception))
        parts = {r: memo[keys[r]] for r in SITE_REAGENTS if memo is not None and keys[r] in memo}
        # so2cl2 with Cl2's rates is Cl2's weighing: never weighed twice.
        wanted = set(SITE_REAGENTS) - set(parts) - ({"so2cl2"} if _so2cl2_weighs_as_cl2(conditions) else set())
        # Each missing reagent is weighed in _TASKS_PER_REAGENT shares, br2 (the longer) first, then its text.
        filling = {}
        for r in sorted(wanted, key=lambda r: (r != "br2", r)):
            part, calls = _reagent_tasks(perception, static, conditions, r, _TASKS_PER_REAGENT if pool else 1)
            filling[r] = part, [pool.submit(c) if pool else _Known(c()) for c in calls]
        texts = {}
        for r, (part, futures) in filling.items():
            for future in futures:
                future.result()
            text = partial(_reagent_text, perception, part, r)
            texts[r] = pool.submit(text) if pool else _Known(text())
        parts |= {r: _finish(memo, keys[r], texts[r]) for r in texts}
        nbs_major, nbs_major_pct, nbs_worst = _finish(memo, keys["nbs"], nbs)
    finally:
        if pool is not None:
            pool.shutdown()
    if "so2cl2" not in parts:
        borrowed = _borrowed_so2cl2(conditions, parts["cl2"])
        if borrowed is None:  # bases not uniform: weigh it after all
            part, calls = _reagent_tasks(perception, static, conditions, "so2cl2", 1)
            for call in calls:
                call()
            borrowed = _reagent_text(perception, part, "so2cl2")
        parts["so2cl2"] = borrowed
    if memo is None:
        del static["blocks"]  # done with: the text columns below can reuse its memory

    ok, n_products = static["ok"], static["n_products"]
    one_product = {r: n_products == 1 for r in SITE_REAGENTS} | {"nbs": static["nbs_count"] == 1}
    alkene = static["features"]["alkene"]
    majors = {r: parts[r]["major_pct"] for r in SITE_REAGENTS} | {"nbs": nbs_major_pct}
    for r in SITE_REAGENTS:
        if alkene.any() and not pathway_applies(_ALKENE_RULE, r, conditions):
            # Hot enough that a C=C substrate substitutes: its allylic radicals give both termini, so its
            # outcome is judged on that split (the major and percent columns give the per-site split).
            pct, count = _transposed_split(perception, conditions, r, alkene & ok)
            majors[r] = np.where(alkene & ok, pct, majors[r])
            one_product[r] = np.where(alkene, count == 1, one_product[r])
    result = reagent_outcomes(static["features"], majors, ok, one_product, conditions, n_products)
    # Confidence: the weakest basis of each reagent whose percentages apply (not ruled out); so2cl2 only when it
    # is the reagent offered, since its constants are Cl2's by assumption and would mark every row an estimate.
    worst = {r: parts[r]["worst"] for r in SITE_REAGENTS} | {"nbs": nbs_worst}
    ruled = len(OUTCOMES)  # code of "ruled-out"
    ranks = []
    for code, r in enumerate(OUTCOME_REAGENTS, start=1):
        counts = result.outcome[r] != ruled if r != "so2cl2" else result.serves == code
        ranks.append(np.where(counts, worst[r], len(BASES)).astype(np.int8))
    confidence = labels_column((*BASES, ""), reduce(np.minimum, ranks))
    out = {
        "n_products": n_products,
        "verdict": labels_column(("", *VERDICTS), result.verdict),
        "cl2_major": parts["cl2"]["major"], "cl2_major_pct": parts["cl2"]["major_pct"],
        "br2_major": parts["br2"]["major"], "br2_major_pct": parts["br2"]["major_pct"],
        "stereo": parts["br2"]["stereo"],
        "site_types": static["site_types"],
        "confidence": confidence,
        "nbs_major": nbs_major, "nbs_major_pct": nbs_major_pct,
        "serves": labels_column(("", *SERVES_ORDER), result.serves),
        "cl2_poly_pct": parts["cl2"]["poly"], "br2_poly_pct": parts["br2"]["poly"],
        "so2cl2_major": parts["so2cl2"]["major"], "so2cl2_major_pct": parts["so2cl2"]["major_pct"],
    }
    for r in OUTCOME_REAGENTS:
        out[f"{r}_outcome"] = labels_column(("", *OUTCOMES), result.outcome[r])
        out[f"{r}_reason"] = labels_column(("", *REASONS), result.reason[r])
    if memo is not None:  # the frame must not share arrays with what the memo hands to later frames
        out = {c: v.copy() if isinstance(v, np.ndarray) else v for c, v in out.items()}
    # so2cl2 borrowed from cl2 shares its arrays: the frame gets its own.
    if out["so2cl2_major_pct"] is out["cl2_major_pct"]:
        out["so2cl2_major_pct"] = out["so2cl2_major_pct"].copy()
        out["so2cl2_major"] = out["so2cl2_major"].copy()
    _blank_ruled_out(out, result.outcome, ruled)
    # Not copied again (nor consolidated into 2-D blocks): every array above is this frame's own.
    return pd.DataFrame({c: out[c] for c in SUMMARY_COLUMNS}, index=structures.index, copy=False)


#: Per reagent, the summary columns read off its substitution split: blank where its outcome is ruled-out.
SPLIT_COLUMNS: dict[str, tuple[str, ...]] = {
    "cl2": ("cl2_major", "cl2_major_pct", "cl2_poly_pct"),
    "br2": ("br2_major", "br2_major_pct", "stereo", "br2_poly_pct"),
    "so2cl2": ("so2cl2_major", "so2cl2_major_pct"),
    "nbs": ("nbs_major", "nbs_major_pct"),
}


def _blank_ruled_out(out: dict, outcome: dict[str, np.ndarray], ruled: int) -> None:
    """Empty every column of ``SPLIT_COLUMNS`` (NaN, or '' for text) where that reagent's outcome is ruled-out.

    A ruled-out reagent takes another pathway, so no number of its substitution split
    applies; blanking here, once, keeps every consumer (files, app, report, explain) from
    showing one. New arrays are made, so nothing shared with the memo is changed.
    """
    for r, columns in SPLIT_COLUMNS.items():
        off = outcome[r] == ruled
        if not off.any():
            continue
        for c in columns:
            v = out[c]
            if isinstance(v, np.ndarray) and v.dtype.kind == "f":
                out[c] = np.where(off, np.nan, v)
            else:
                text = pd.Series(v, copy=True)
                text[off] = ""
                out[c] = text.array
