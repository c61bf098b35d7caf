"""A whole library: read once, perceive each unique structure once, evaluate under any conditions."""

from __future__ import annotations

import threading
import time
from collections.abc import Callable, Hashable, Sequence
from dataclasses import dataclass, field
from functools import cache
from pathlib import Path

import numpy as np
import pandas as pd
from halosift.engine.cache import PerceptionCache, take
from halosift.engine.conditions import REAGENTS, Conditions
from halosift.engine.nbs import nbs_products
from halosift.engine.outcomes import OUTCOME_REAGENTS, PATHWAYS
from halosift.engine.parallel import Cancelled, perceive_parallel
from halosift.engine.parameters import DEFAULT_MAX_HEAVY_ATOMS
from halosift.engine.perception import Perception, concat, perceive
from halosift.engine.rates import enthalpy_of_abstraction
from halosift.engine.site_classes import ABSTRACTABLE
from halosift.engine.stereo import STEREO_DOCS
from halosift.engine.weigh import SUMMARY_COLUMNS, summarise, weigh

_HOT_ALKENE = (
    "; a C=C substrate above the temperature at which substitution wins is judged on the split with each allyl "
    "radical's share divided between its two ends, as under NBS (the major and percent columns give the per-site "
    "split, each allyl radical's share at the carbon abstracted, not this terminus split)"
)
#: Columns :meth:`Library.evaluate` adds after the input's own, in order.
RESULT_COLUMNS: tuple[str, ...] = ("status", "reason", *SUMMARY_COLUMNS, "flags", "canonical_smiles", "duplicate_of")
#: What each added column means (README and file metadata quote this).
RESULT_DOCS: dict[str, str] = {
    "status": "ok, or rejected (the row could not be modelled)",
    "reason": "why a row was rejected; empty when ok",
    "n_products": "distinct constitutional monohalides from abstractable C–H",
    "verdict": (
        "by-symmetry (the substrate has only one monohalide, and the reagent offered makes it) / selective (the "
        "substrate has several; the reagent offered makes one at or above the threshold) / mixture (no reagent reaches it) / ruled-out "
        "(every reagent takes another pathway, is not modelled or finds no C–H to substitute) / inert (no "
        "abstractable C–H and no other pathway); read off the "
        "per-reagent outcomes only; empty when rejected"
    ),
    "cl2_major": "SMILES of the major monochloride under Cl2; empty when cl2_outcome is ruled-out",
    "cl2_major_pct": "its share of the monochlorides, percent; empty when cl2_outcome is ruled-out",
    "br2_major": (
        "SMILES of the major monobromide under Br2 (written on the chloride's canonical SMILES with Br for Cl; "
        "not re-canonicalised); empty when br2_outcome is ruled-out"
    ),
    "br2_major_pct": "its share of the monobromides, percent; empty when br2_outcome is ruled-out",
    # Each outcome in the words the help and the detail use (engine.stereo.STEREO_DOCS).
    "stereo": (
        "stereo outcome of the bromination major product, one of: "
        + "; ".join(f"{outcome} — {meaning}" for outcome, meaning in STEREO_DOCS.items())
        + "; empty when br2_outcome is ruled-out"
    ),
    "site_types": "abstractable site classes present, comma-separated",
    "confidence": (
        "measured / textbook / from memory / estimate: the weakest basis (estimate weakest, measured strongest) "
        "of the values behind the products that carry at least 5 % of the Cl2, Br2 or NBS monohalides — each "
        "product's rate constant and any split of it (exo/endo of a norbornane 2-halide, the two ends of an allyl "
        "radical); 'from memory' when a published value behind them was quoted from memory, not re-checked "
        "against its source; a product counts only for the reagent under which it reaches 5 %, and only reagents "
        "whose outcome is not ruled-out count (SO2Cl2, whose constants are Cl2's by assumption, only when it is "
        "the reagent offered); a Cl2 solvent, and a temperature outside the range of a reagent's rate data, make "
        "its rates estimates; empty when rejected, inert or ruled-out"
    ),
    "nbs_major": (
        "SMILES of the major monobromide under NBS (Wohl–Ziegler: allylic/benzylic C–H only, allylic "
        "transposition included); empty when nbs_outcome is ruled-out (no allylic or benzylic C–H among others)"
    ),
    "nbs_major_pct": "its share of the NBS monobromides, percent; empty when nbs_outcome is ruled-out",
    "serves": (
        "the reagent offered, as its option token (shown as Cl2, Br2, SO2Cl2, NBS): the first of cl2, br2, so2cl2, "
        "nbs whose outcome is clean (plainest first, a rule "
        "of this program); a reagent whose outcome is mixture or ruled-out is never offered; empty when none is "
        "clean, and for rejected rows"
    ),
    "cl2_poly_pct": (
        "polyhalide, percent of the chlorinated product, when substrate and Cl2 are charged 1 : 1 and all Cl2 "
        "reacts (competitive consecutive kinetics with a Cl deactivation estimate; engine.polyhalogenation); "
        "empty when cl2_outcome is ruled-out (another pathway, so no substitution split applies), inert or rejected"
    ),
    "br2_poly_pct": (
        "polyhalide, percent of the brominated product, at 1 : 1 substrate : Br2, all Br2 reacted (as "
        "cl2_poly_pct); empty when br2_outcome is ruled-out, inert or rejected"
    ),
    "flags": (
        "special-site warnings, comma-separated: cyclopropylmethyl (ring opening of the radical), bridgehead "
        "(small-bicycle bridgehead C–H, its own rate class), cage (strained cage), cyclopropane (Br· opens the "
        "ring), central_bond (halogens add across a strained central C–C bond), alkene and alkyne (halogens add "
        "to the π bond), propargylic (a C–H next to C≡C: propargyl/allenyl bromides under NBS, not modelled); "
        "see engine.special_sites; every flag but bridgehead rules some reagents out "
        "(engine.outcomes); empty when none"
    ),
    **{f"{r}_outcome": (
        f"{label}: clean (substitution weighed, one monohalide at or above the threshold) / mixture (weighed, "
        "none reaches it) / ruled-out (the substitution percentages do not apply, so "
        f"the columns read off {r}'s split are empty; see {r}_reason){extra}; empty when rejected"
    ) for r, label, extra in (
        ("cl2", "Cl2 with light", _HOT_ALKENE), ("br2", "Br2 with light", _HOT_ALKENE),
        ("so2cl2", "SO2Cl2 with initiator, weighed as Cl· at its own temperature", _HOT_ALKENE),
        ("nbs", "NBS with initiator", "; judged on nbs_major_pct"),
    )},
    **{f"{r}_reason": (
        f"why {r}_outcome is ruled-out, the first that applies of: "
        + "; ".join(p.reason + ("" if set(p.reagents) == set(OUTCOME_REAGENTS) else f" ({', '.join(p.reagents)})")
                    for p in PATHWAYS)
        + " (engine.outcomes.PATHWAYS; C=C addition applies below the temperature at which allylic substitution "
        "wins, engine.parameters); empty when clean, mixture or rejected"
    ) for r in OUTCOME_REAGENTS},
    "so2cl2_major": (
        "SMILES of the major monochloride under SO2Cl2 (Cl· at so2cl2's temperature); empty when so2cl2_outcome "
        "is ruled-out"
    ),
    "so2cl2_major_pct": "its share of the monochlorides under SO2Cl2, percent; empty when so2cl2_outcome is ruled-out",
    "canonical_smiles": "RDKit canonical SMILES of the substrate",
    "duplicate_of": "the first row with the same structure (canonical SMILES), as its 1-based number among the "
    "input's data rows (the header not counted; the app's input_row); empty on that first row and on rows with "
    "no repeat",
}


#: The column type pandas infers for text results (``str`` from pandas 3 on, else object).
_TEXT_DTYPE = pd.Series(["text"]).dtype
#: Columns every screen writes: an input holding all of them is an earlier screen's result.
RESULT_MARKERS: tuple[str, ...] = ("status", "reason", "duplicate_of")


def output_name(column: str) -> str:
    """Name of an input column in results: prefixed with ``input_`` when it clashes with a result column."""
    return f"input_{column}" if column in RESULT_COLUMNS else column


def output_names(columns: Sequence[Hashable]) -> list[Hashable]:
    """Names of input columns in results, all distinct: :func:`output_name`, numbered when that is taken too.

    An input already holding ``input_status`` and ``status`` gives ``input_status`` and ``input_status_2``.
    """
    taken = set(RESULT_COLUMNS) | {c for c in columns if c not in RESULT_COLUMNS}
    names: list[Hashable] = []
    for column in columns:
        if column not in RESULT_COLUMNS:
            names.append(column)
            continue
        name, n = output_name(str(column)), 1
        while name in taken:
            n += 1
            name = f"{output_name(str(column))}_{n}"
        taken.add(name)
        names.append(name)
    return names


def earlier_results(columns: Sequence[Hashable], keep: Sequence[Hashable] = ()) -> list[Hashable]:
    """Input columns that hold an earlier screen's results, to be replaced by this screen's.

    Only when the input holds every one of :data:`RESULT_MARKERS` (as every screen's output
    does): then each column named like a result column, except those in ``keep`` (the SMILES
    and ID columns, which stay as input). Otherwise none: a supplier's own ``status`` column
    is kept, as ``input_status``. Columns an earlier version wrote and this one does not
    know stay as input columns.
    """
    if not set(RESULT_MARKERS) <= set(columns):
        return []
    return [c for c in columns if c in RESULT_COLUMNS and c not in keep]


@dataclass(frozen=True)
class Library:
    """An input table and the perception of its structures."""

    input: pd.DataFrame
    """The input columns, one row per input row, in input order (an earlier screen's result columns
    left out: see :func:`earlier_results`)."""
    smiles_column: str
    """Name of the input column holding SMILES."""
    id_column: str | None
    """Name of the identifier column, when one was found or given."""
    row_struct: np.ndarray
    """Per input row, the row of ``perception.structures`` (int32)."""
    perception: Perception
    """Perception of every distinct input string."""
    read_errors: np.ndarray
    """Per input row, '' or why the row could not be read (object array)."""
    source: Path | None = None
    """The file read, when the library came from a file."""
    replaced: tuple[Hashable, ...] = ()
    """Columns of the input that held an earlier screen's results, replaced by this screen's."""
    partial: bool = False
    """True while structures are still being perceived: their rows have status :data:`PENDING`
    (only the libraries :func:`load_library` hands to its ``partial`` callback)."""
    _summaries: dict = field(default_factory=dict, repr=False, compare=False)
    """Memo of per-structure summaries by conditions (small: the app revisits few)."""
    _parts: dict = field(default_factory=dict, repr=False, compare=False)
    """Memo of summary parts that depend on one reagent's settings (see engine.weigh.summarise)."""
    _details: dict = field(default_factory=dict, repr=False, compare=False)
    """Memo of full single-structure perceptions made for :meth:`products` and :meth:`nbs_products`."""

    def __len__(self) -> int:
        return len(self.input)

    def result_names(self) -> dict[Hashable, Hashable]:
        """Each input column's name in :meth:`evaluate`'s frame (see :func:`output_names`)."""
        return dict(zip(self.input.columns, output_names(list(self.input.columns))))

    def _summary(self, conditions: Conditions) -> pd.DataFrame:
        # A screen's perception names only the products that can win under valid conditions, the only
        # kind a Conditions can hold (it checks itself when made).
        if conditions not in self._summaries:
            if len(self._summaries) > 8:
                self._summaries.clear()
            if len(self._parts) > 8:  # ~70 MB per reagent setting at 1M structures; the static part is re-derived
                self._parts.clear()
            self._summaries[conditions] = summarise(self.perception, conditions, self._parts)
        return self._summaries[conditions]

    def evaluate(self, conditions: Conditions | None = None) -> pd.DataFrame:
        """One row per input row, in input order: the input columns, then :data:`RESULT_COLUMNS`."""
        conditions = conditions or Conditions()
        summary = self._summary(conditions)
        structs = self.perception.structures
        rows = self.row_struct
        status = structs["status"].to_numpy(dtype=object)[rows]
        reason = structs["reason"].to_numpy(dtype=object)[rows]
        unreadable = self.read_errors != ""
        status = np.where(unreadable, "rejected", status)
        reason = np.where(unreadable, self.read_errors, reason)
        added: dict[str, object] = {"status": status, "reason": reason}
        for col in SUMMARY_COLUMNS:
            values = summary[col].to_numpy()[rows]
            if col == "n_products":
                values = pd.array(values, dtype="Int32")
                values[status != "ok"] = pd.NA
            elif col.endswith("_pct"):
                values = np.where(status == "ok", values, np.nan)
            else:
                values = np.where(status == "ok", values, "")
            added[col] = values
        flags = structs["flags"].to_numpy(dtype=object)[rows]
        added["flags"] = np.where(status == "ok", flags, "")
        canonical = structs["canonical_smiles"].to_numpy(dtype=object)[rows]
        added["canonical_smiles"] = np.where(status == "ok", canonical, "")
        added["duplicate_of"] = self._duplicates(np.asarray(added["canonical_smiles"]), status)
        result = pd.DataFrame(added, index=self.input.index)
        if not len(result):  # nothing to infer text from: give the columns the type rows would give them
            result = result.astype({c: _TEXT_DTYPE for c in result.columns if result[c].dtype == object})
        inputs = self.input.set_axis(output_names(list(self.input.columns)), axis=1)
        out = pd.concat([inputs, result[list(RESULT_COLUMNS)]], axis=1)
        out.attrs["conditions"] = conditions
        return out

    @staticmethod
    def _duplicates(canonical: np.ndarray, status: np.ndarray) -> pd.arrays.IntegerArray:
        """1-based row of the first row with the same structure; NA for first occurrences and rejects."""
        codes, uniques = pd.factorize(pd.Series(canonical).where(status == "ok"))
        valid = codes >= 0
        rows = np.arange(len(codes))
        first = np.full(len(uniques), len(codes), dtype=np.int64)
        np.minimum.at(first, codes[valid], rows[valid])
        # Indexed only where valid: with no ok row there are no uniques to look up at all.
        first_of_row = np.full(len(codes), -1, dtype=np.int64)
        first_of_row[valid] = first[codes[valid]]
        dup = pd.array(first_of_row + 1, dtype="Int64")
        dup[~valid | (first_of_row == rows)] = pd.NA
        return dup

    def _detail(self, struct: int) -> Perception:
        """Perception of one structure with every product worked out (struct numbered 0).

        A screen perceives only the products that can be major; the rest are
        worked out here, from the canonical SMILES, when a chemist looks.
        """
        if struct not in self._details:
            sites = self.perception.sites
            mine = sites[sites["struct"] == struct]
            allylic = self.perception.allylic
            nbs = allylic[allylic["struct"] == struct]
            unnamed = (mine["product"] == "") | ((mine["stereo"] == "") & (mine["site_code"] < len(ABSTRACTABLE)))
            complete = not unnamed.any() and not (nbs["stereo"] == "").any()
            if complete:
                detail = Perception(self.perception.structures.iloc[[struct]].reset_index(drop=True),
                                    mine.assign(struct=0).reset_index(drop=True), nbs.assign(struct=0).reset_index(drop=True))
            else:
                row = self.perception.structures.iloc[struct]
                detail = perceive([row["canonical_smiles"]], max_heavy_atoms=max(int(row["n_heavy"]), 1))
            if len(self._details) > 64:
                self._details.clear()
            self._details[struct] = detail
        return self._details[struct]

    def products(self, row: int, conditions: Conditions | None = None) -> pd.DataFrame:
        """Site detail for one input row (0-based): every monohalide with its split."""
        conditions = conditions or Conditions()
        struct = int(self.row_struct[row])
        weighed = weigh(self._detail(struct).sites, conditions, 1)
        weighed["dh_cl"] = [enthalpy_of_abstraction(s, "cl") for s in weighed["site"]]
        weighed["dh_br"] = [enthalpy_of_abstraction(s, "br") for s in weighed["site"]]
        codes = weighed["site_code"].to_numpy()
        for reagent in REAGENTS:
            weighed[f"{reagent}_basis"] = conditions.bases(reagent)[codes]
        cols = ["product", "site", "h_count", "n_carbons", "bde", "dh_cl", "dh_br", "stereo",
                "n_stereoisomers", "n_diastereomers", "cl2_pct", "br2_pct", "atom", "cl2_basis", "br2_basis"]
        return weighed[cols].sort_values(["cl2_pct", "br2_pct"], ascending=False, kind="stable").reset_index(drop=True)

    def nbs_products(self, row: int, conditions: Conditions | None = None) -> pd.DataFrame:
        """NBS monobromides of one input row (0-based), largest share first; empty without allylic/benzylic C–H."""
        conditions = conditions or Conditions()
        struct = int(self.row_struct[row])
        out = nbs_products(self._detail(struct).allylic, conditions.per_h("nbs"), 1)
        return out.drop(columns="struct").sort_values("nbs_pct", ascending=False, kind="stable").reset_index(drop=True)


ProgressFn = Callable[[int, int], None]
#: Status of a row whose structure is not perceived yet (partial libraries only).
PENDING = "pending"
#: Seconds between the partial libraries :func:`load_library` hands on (the first goes at once).
PARTIAL_INTERVAL = 0.5
#: Called with the indices (into the distinct strings) of structures just perceived, and their perception.
PartFn = Callable[[np.ndarray, Perception], None]


@cache
def _pending_structure() -> Perception:
    """One structure standing for every structure not perceived yet: no sites, status :data:`PENDING`."""
    empty = perceive([""])  # no RDKit call: an empty string is rejected at once; gives every column its type
    structures = empty.structures.assign(status=PENDING, reason_code=PENDING, reason="not perceived yet")
    return Perception(structures, empty.sites, empty.allylic)


class _Assembler:
    """Collects perceived structures as they arrive and builds the partial libraries from them.

    Each partial library extends the one before: its perception is the earlier
    one with the new chunks appended (the pending structure is structure 0), and
    every summary the caller had it work out is carried over with only the new
    chunks weighed (summaries are per structure), so a delivery costs little
    more than the new rows.
    """

    def __init__(self, n_keys: int, make: Callable[[np.ndarray, Perception], Library], deliver: Callable[[Library], None],
                 interval: float) -> None:
        self.n_keys = n_keys
        """Distinct strings in the library."""
        self.make = make
        """(struct per distinct string, perception) → a Library."""
        self.deliver = deliver
        """The caller's ``partial`` callback."""
        self.interval = interval
        """Least seconds between two deliveries."""
        self.struct = np.zeros(n_keys, dtype=np.int32)  # 0: the pending structure
        self.new: list[tuple[np.ndarray, Perception]] = []  # arrived since the last delivery
        self.previous: Library | None = None
        self.next_at = -float("inf")

    def add(self, indices: np.ndarray, part: Perception) -> None:
        """Take perceived structures; hand on a partial library when the interval has passed (the first at once)."""
        self.new.append((np.asarray(indices, dtype=np.int64), part))
        start = time.monotonic()
        if start >= self.next_at:
            self.deliver(self.build())
            # Delivering (building, and the caller's evaluation) takes at most a third of the time;
            # an interval of 0 hands on every chunk.
            cost = time.monotonic() - start
            self.next_at = start + max(self.interval, 3 * cost) if self.interval > 0 else start

    def build(self) -> Library:
        """The library so far: one pending structure for every string not yet done, then the rest in arrival order."""
        before = self.previous.perception if self.previous is not None else _pending_structure()
        offset = len(before)
        for indices, part in self.new:
            self.struct[indices] = offset + np.arange(len(part), dtype=np.int32)
            offset += len(part)
        fresh = concat([p for _, p in self.new])
        library = self.make(self.struct.copy(), concat([before, fresh]))
        if self.previous is not None:
            for conditions, summary in self.previous._summaries.items():
                library._summaries[conditions] = pd.concat([summary, summarise(fresh, conditions)], ignore_index=True)
        self.previous, self.new = library, []
        return library


def _perceive_with_cache(
    keys: list[str],
    *,
    workers: int | None,
    use_cache: bool,
    cache_folder: Path | None,
    max_heavy_atoms: int,
    progress: ProgressFn | None,
    cancel: threading.Event | None,
    caller_helps: bool,
    dask_client: object | None = None,
    on_part: PartFn | None = None,
    background: bool = False,
) -> Perception:
    """Perceive ``keys`` in order, cached ones from the cache.

    ``on_part`` receives the cached structures first, then each chunk as it is
    perceived. On :class:`Cancelled` the chunks perceived so far are stored
    before it propagates, so the next screen of the library resumes.
    """
    store = PerceptionCache(cache_folder) if use_cache and max_heavy_atoms == DEFAULT_MAX_HEAVY_ATOMS else None
    if store is None:
        hit, cached = np.zeros(len(keys), dtype=bool), None
    else:
        hit, cached = store.lookup(keys)
    miss_idx = np.flatnonzero(~hit)
    missing = [keys[i] for i in miss_idx]
    n_hit = int(hit.sum())
    if on_part is not None and cached is not None and n_hit:
        on_part(np.flatnonzero(hit), cached)
    received: list[tuple[int, Perception]] = []

    def part_done(start: int, part: Perception) -> None:
        received.append((start, part))
        if on_part is not None:
            on_part(miss_idx[start:start + len(part)], part)

    def shifted(done: int, total: int) -> None:
        if progress:
            progress(n_hit + done, n_hit + total)

    try:
        if dask_client is not None:  # the cluster perceives; cache, order and weighing stay here
            from halosift.engine.distributed import perceive_on_cluster

            fresh = perceive_on_cluster(missing, client=dask_client, max_heavy_atoms=max_heavy_atoms,
                                        progress=shifted, cancel=cancel)
        else:
            fresh = perceive_parallel(
                missing, workers=workers, max_heavy_atoms=max_heavy_atoms, progress=shifted, cancel=cancel,
                detail=False, caller_helps=caller_helps,
                on_part=part_done if (store is not None or on_part is not None) else None,
                background=background,
            )
    except Cancelled:
        if store is not None and received:  # keep what is done: the next screen perceives only the rest
            store.store([missing[i] for start, part in received for i in range(start, start + len(part))],
                        concat([part for _, part in received]))
        raise
    if store is not None:
        store.store(missing, fresh)
    if cached is None:
        return fresh
    # Interleave cached and fresh results back into key order.
    joined = concat([cached, fresh])
    order = np.empty(len(keys), dtype=np.int64)
    order[np.flatnonzero(hit)] = np.arange(n_hit)
    order[miss_idx] = n_hit + np.arange(len(missing))
    return take(joined, order)


def load_library(
    source: str | Path | pd.DataFrame,
    *,
    smiles_column: str | None = None,
    id_column: str | None = None,
    workers: int | None = None,
    use_cache: bool = True,
    cache_folder: Path | None = None,
    max_heavy_atoms: int = DEFAULT_MAX_HEAVY_ATOMS,
    progress: ProgressFn | None = None,
    cancel: threading.Event | None = None,
    caller_helps: bool = False,
    dask: object | None = None,
    partial: Callable[[Library], None] | None = None,
    partial_interval: float = PARTIAL_INTERVAL,
    background: bool = False,
) -> Library:
    """Read a library file (or DataFrame) and perceive it.

    ``caller_helps``: this thread perceives too, alongside one worker process
    fewer (batch runs; see :func:`halosift.engine.parallel.perceive_parallel`).
    ``partial``: called from this thread with the library perceived so far
    (:attr:`Library.partial` set; rows not perceived yet have status
    :data:`PENDING`), at once when anything is cached or the first chunk is
    done, then at most every ``partial_interval`` seconds (and spaced so that
    handing them on takes at most a third of the time; 0: after every chunk); the complete library
    is returned as usual. A cancel keeps what was perceived in the cache.
    ``background``: local worker processes run at a lower priority, so that an interactive
    caller's interface never waits for a CPU they hold (the app sets it).

    Raises :class:`halosift.engine.io.LibraryError` for whole-file problems and
    :class:`halosift.engine.parallel.Cancelled` when ``cancel`` is set. ``progress``
    receives (rows done, rows in all), rows done being estimated from the
    share of distinct structures perceived; it is called from this thread.

    ``dask``: perceive on a Dask cluster instead of local processes: a
    ``distributed.Client``, a scheduler address or ``local:N``
    (see :mod:`halosift.engine.distributed`). ``source`` may then also be a Dask
    DataFrame; given one without ``dask``, the client it already uses perceives.
    """
    from halosift.engine.distributed import dask_for

    with dask_for(source, dask) as (source, client):
        return _load_library(
            source, smiles_column=smiles_column, id_column=id_column, workers=workers, use_cache=use_cache,
            cache_folder=cache_folder, max_heavy_atoms=max_heavy_atoms, progress=progress, cancel=cancel,
            caller_helps=caller_helps, dask_client=client, partial=partial, partial_interval=partial_interval,
            background=background,
        )


def _load_library(
    source: str | Path | pd.DataFrame,
    *,
    smiles_column: str | None,
    id_column: str | None,
    workers: int | None,
    use_cache: bool,
    cache_folder: Path | None,
    max_heavy_atoms: int,
    progress: ProgressFn | None,
    cancel: threading.Event | None,
    caller_helps: bool,
    dask_client: object | None,
    partial: Callable[[Library], None] | None = None,
    partial_interval: float = PARTIAL_INTERVAL,
    background: bool = False,
) -> Library:
    """:func:`load_library` with the Dask client (or None) settled."""
    from halosift.engine.io import open_frame, open_library

    if isinstance(source, pd.DataFrame):
        src = open_frame(source, smiles_column=smiles_column, id_column=id_column)
        path = None
    else:
        src = open_library(source, smiles_column=smiles_column, id_column=id_column)
        path = Path(source)
    frames, smiles, errors = [], [], []
    for batch in src.iter_batches():
        if cancel is not None and cancel.is_set():
            from halosift.engine.parallel import Cancelled

            raise Cancelled()
        frames.append(batch.frame)
        smiles.extend(batch.smiles)
        errors.extend(batch.row_errors)
    frame = pd.concat(frames, ignore_index=True) if frames else pd.DataFrame(columns=list(src.columns))
    frame = src.settle_types(frame)  # text formats: numeric columns become numbers, judged on the whole file
    # A screen's result screened again: its old result columns give way to the new ones, so the
    # column set stays the same however often a result is re-screened.
    replaced = earlier_results(list(frame.columns), keep=[c for c in (src.smiles_column, src.id_column) if c is not None])
    if replaced:
        frame = frame.drop(columns=replaced)
    # Perceive each distinct string once; unreadable rows map to an empty string (rejected as empty).
    texts = pd.Series([s if s is not None else "" for s in smiles], dtype=object)
    codes, uniques = pd.factorize(texts)
    keys = [str(u) for u in uniques]
    n_rows = len(codes)

    def row_progress(done: int, total: int) -> None:
        if progress is not None:
            progress(n_rows if done >= total else int(n_rows * done / max(total, 1)), n_rows)

    read_errors = np.array(errors, dtype=object)

    def make(struct_of_key: np.ndarray, perception: Perception, partial: bool = False) -> Library:
        return Library(
            input=frame,
            smiles_column=src.smiles_column,
            id_column=src.id_column,
            row_struct=struct_of_key[codes].astype(np.int32),
            perception=perception,
            read_errors=read_errors,
            source=path,
            replaced=tuple(replaced),
            partial=partial,
        )

    on_part = None
    if partial is not None:
        on_part = _Assembler(len(keys), lambda s, p: make(s, p, True), partial, partial_interval).add
    perception = _perceive_with_cache(
        keys, workers=workers, use_cache=use_cache, cache_folder=cache_folder,
        max_heavy_atoms=max_heavy_atoms, progress=row_progress, cancel=cancel, caller_helps=caller_helps,
        dask_client=dask_client,
        on_part=on_part,
        background=background,
    )
    return make(np.arange(len(keys), dtype=np.int32), perception)


def screen(
    source: str | Path | pd.DataFrame, conditions: Conditions | None = None, **options: object
) -> pd.DataFrame:
    """Screen a library file or DataFrame: one result row per input row (see :data:`RESULT_COLUMNS`)."""
    return load_library(source, **options).evaluate(conditions)  # type: ignore[arg-type]
