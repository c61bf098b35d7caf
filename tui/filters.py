"""Which rows of an evaluated library the app shows, and in what order.

Pure pandas/numpy: no Textual here, so every rule can be unit-tested and runs
in a worker thread. A view is an index array of row positions into the
evaluated frame (``Library.evaluate``); nothing is ever built per row.
"""

from __future__ import annotations

import threading
from collections.abc import Hashable, Iterable, Mapping
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING

import numpy as np

if TYPE_CHECKING:
    import pandas as pd

# pandas (and with it pyarrow) is imported inside the functions that need it,
# so the app can import the filter types and paint before pandas has loaded.

#: The three lists of rows the app can show.
VIEWS: tuple[str, ...] = ("library", "shortlist", "rejected")
#: What each view holds (shown in the help screen).
VIEW_DOCS: dict[str, str] = {
    "library": "screened rows (status ok) that pass every filter",
    "shortlist": "every marked row, filters ignored",
    "rejected": "rows the engine could not model, with the reason; filters ignored",
}
# The names rows are filtered on (flags, reagents, outcomes, confidence bases, stereo outcomes)
# are the engine's own, read from it where they are used: this module is imported before the
# engine has loaded (so the app paints at once), and the rules below only run on an evaluated
# frame, by which time it has.
#: How a flag reads in the filter form where its stored id (engine.special_sites.FLAGS) is not for display.
FLAG_WORDING: dict[str, str] = {"central_bond": "central C–C bond"}
#: Duplicate filter modes: every row / first occurrence of each structure only / only rows repeating an earlier one.
DUPLICATE_MODES: dict[str, str] = {
    "all": "show every row",
    "hide": "hide repeats (keep the first row of each structure)",
    "only": "only repeats (rows whose structure appeared on an earlier row)",
}


@dataclass(frozen=True)
class FilterSpec:
    """The chemist's filters; they all must hold at once (logical AND)."""

    verdicts: frozenset[str] = frozenset()
    """Verdicts to keep; empty keeps every verdict."""
    min_br2_pct: float | None = None
    """Keep rows whose bromination major product is at least this percent."""
    max_products: int | None = None
    """Keep rows with at most this many constitutional monohalides."""
    site_types: frozenset[str] = frozenset()
    """Site classes that must be present (see ``site_match``); empty: no condition."""
    site_match: str = "any"
    """'any': at least one of ``site_types`` present; 'all': every one present."""
    no_new_stereo: bool = False
    """Keep rows whose bromination major product is achiral (no new stereocentre)."""
    text: str = ""
    """Substring looked for in the ID (any case) and SMILES (exact case) columns."""
    flags_has: frozenset[str] = frozenset()
    """Special-site flags (``flags`` column) a row must carry, every one of them."""
    flags_lacks: frozenset[str] = frozenset()
    """Special-site flags a row must not carry, none of them."""
    outcomes: frozenset[tuple[str, str]] = frozenset()
    """(reagent, outcome) pairs kept: for each reagent named, its ``<reagent>_outcome`` must be one listed."""
    confidence: frozenset[str] = frozenset()
    """Confidence values to keep; empty keeps every row (also those with no confidence)."""
    duplicates: str = "all"
    """One of :data:`DUPLICATE_MODES`: 'all', 'hide' (first of each structure) or 'only' (the repeats)."""

    @property
    def active(self) -> bool:
        """True when any filter narrows the rows."""
        return self.count > 0

    @property
    def count(self) -> int:
        """How many separate filters narrow the rows."""
        return sum((
            bool(self.verdicts), self.min_br2_pct is not None, self.max_products is not None, bool(self.site_types),
            self.no_new_stereo, bool(self.text), bool(self.flags_has), bool(self.flags_lacks),
            len({reagent for reagent, _ in self.outcomes}), bool(self.confidence), self.duplicates != "all",
        ))

    def outcomes_for(self, reagent: str) -> frozenset[str]:
        """Outcomes kept for one reagent; empty when that reagent is not filtered."""
        return frozenset(o for r, o in self.outcomes if r == reagent)

    def describe(self) -> str:
        """One line naming the active filters ('no filters' when none)."""
        parts = []
        if self.verdicts:
            parts.append("verdict " + "/".join(sorted(self.verdicts)))
        if self.min_br2_pct is not None:
            parts.append(f"Br2 major ≥ {self.min_br2_pct:g} %")
        if self.max_products is not None:
            parts.append(f"≤ {self.max_products} products")
        if self.site_types:
            joiner = " or " if self.site_match == "any" else " and "
            parts.append("sites " + joiner.join(sorted(self.site_types)))
        if self.no_new_stereo:
            parts.append("no new stereocentre")
        if self.flags_has:
            parts.append("flags " + " and ".join(sorted(self.flags_has)))
        if self.flags_lacks:
            parts.append("no " + " or ".join(sorted(self.flags_lacks)))
        if self.outcomes:
            from halosift.engine.outcomes import OUTCOME_REAGENTS, OUTCOMES

            for reagent in OUTCOME_REAGENTS:
                kept = self.outcomes_for(reagent)
                if kept:
                    parts.append(f"{reagent_label(reagent)} " + "/".join(o for o in OUTCOMES if o in kept))
        if self.confidence:
            parts.append("confidence " + "/".join(c for c in confidence_choices() if c in self.confidence))
        if self.duplicates == "hide":
            parts.append("repeats hidden")
        elif self.duplicates == "only":
            parts.append("repeats only")
        if self.text:
            parts.append(f"text “{self.text}”")
        return "; ".join(parts) if parts else "no filters"

    def without_text(self) -> FilterSpec:
        """The same filters with the text match cleared."""
        return replace(self, text="")


@dataclass(frozen=True)
class TextColumns:
    """The columns of the evaluated frame the find text looks in."""

    ids: tuple[Hashable, ...] = ()
    """ID columns, matched ignoring case."""
    smiles: tuple[Hashable, ...] = ()
    """SMILES columns, matched with case kept (in SMILES, c is aromatic and C is not)."""


@dataclass(frozen=True)
class SortSpec:
    """Row order of a view."""

    column: Hashable | None = None
    """Column of the evaluated frame to sort by; None keeps input order."""
    descending: bool = False
    """Largest (or last) first."""


def flag_label(flag: str) -> str:
    """What the chemist reads for a special-site flag."""
    return FLAG_WORDING.get(flag, flag)


def reagent_label(reagent: str) -> str:
    """How the app names a reagent: the engine's running-text name ('cl2' → 'Cl2')."""
    from halosift.engine.reagents import REAGENT_NAMES

    return REAGENT_NAMES[reagent]


def confidence_choices() -> tuple[str, ...]:
    """Confidence values of the ``confidence`` column, strongest basis first (engine.rates.CONFIDENCE_BASES reversed)."""
    from halosift.engine.rates import CONFIDENCE_BASES

    return tuple(reversed(CONFIDENCE_BASES))


def parse_optional_float(text: str, *, lo: float, hi: float, what: str) -> float | None:
    """'' → None, else a float in [lo, hi]; raises ValueError with a one-line message."""
    text = text.strip()
    if not text:
        return None
    try:
        value = float(text)
    except ValueError:
        raise ValueError(f"{what}: “{text}” is not a number") from None
    if not lo <= value <= hi or value != value:
        raise ValueError(f"{what} must be between {lo:g} and {hi:g}")
    return value


def parse_optional_int(text: str, *, lo: int, what: str) -> int | None:
    """'' → None, else an int ≥ lo; raises ValueError with a one-line message."""
    text = text.strip()
    if not text:
        return None
    try:
        value = int(text)
    except ValueError:
        raise ValueError(f"{what}: “{text}” is not a whole number") from None
    if value < lo:
        raise ValueError(f"{what} must be at least {lo}")
    return value


def _by_unique(series: pd.Series, test) -> np.ndarray:
    """Evaluate ``test(value) -> bool`` once per distinct value, broadcast to rows (missing values: False).

    The text columns here (verdict, outcomes, flags, site_types) hold few
    distinct values, so this is much faster than a string operation per row;
    unique + isin rather than factorize, which is several times slower on
    Arrow-backed text (bench_filters.py).
    """
    import pandas as pd

    keep = [u for u in pd.unique(series) if not pd.isna(u) and bool(test(u))]
    return series.isin(keep).to_numpy(dtype=bool, na_value=False)


def site_set(value: object) -> frozenset[str]:
    """The names in one comma-joined cell (``site_types`` or ``flags``)."""
    if not isinstance(value, str) or not value:
        return frozenset()
    return frozenset(v.strip() for v in value.split(",") if v.strip())


def site_choices(frame: pd.DataFrame) -> list[str]:
    """Every site class that occurs in the frame's ``site_types`` column, sorted."""
    import pandas as pd

    if "site_types" not in frame or frame.empty:
        return []
    found: set[str] = set()
    for value in pd.unique(frame["site_types"]):
        found |= site_set(value)
    return sorted(found)


def text_mask(frame: pd.DataFrame, text: str, columns: Iterable[Hashable], *, ignore_case: bool = True) -> np.ndarray:
    """Rows where any of ``columns`` contains ``text`` literally (case-insensitive unless told otherwise)."""
    mask = np.zeros(len(frame), dtype=bool)
    needle = text.casefold() if ignore_case else text
    for column in columns:
        if column is None or column not in frame:
            continue
        cells = frame[column].astype("string").fillna("")
        if ignore_case:
            cells = cells.str.casefold()
        mask |= cells.str.contains(needle, regex=False).to_numpy(dtype=bool, na_value=False)
    return mask


def filter_mask(
    frame: pd.DataFrame,
    spec: FilterSpec,
    id_columns: Iterable[Hashable] = (),
    smiles_columns: Iterable[Hashable] = (),
) -> np.ndarray:
    """Boolean array over ``frame``: screened rows (status ok) passing every filter in ``spec``.

    The text filter looks in ``id_columns`` ignoring case, and in
    ``smiles_columns`` with case kept (in SMILES, c is aromatic and C is not).
    """
    mask = (frame["status"] == "ok").to_numpy(dtype=bool, copy=True)
    if spec.verdicts:
        mask &= _by_unique(frame["verdict"], lambda v: v in spec.verdicts)
    if spec.min_br2_pct is not None:
        pct = frame["br2_major_pct"].to_numpy(dtype=np.float64, na_value=np.nan)
        # A tiny tolerance so a shown "90.0 %" passes a 90 % filter.
        mask &= np.nan_to_num(pct, nan=-1.0) >= spec.min_br2_pct - 1e-9
    if spec.max_products is not None:
        n = frame["n_products"].to_numpy(dtype=np.float64, na_value=np.nan)
        mask &= np.nan_to_num(n, nan=np.inf) <= spec.max_products
    if spec.site_types:
        wanted = spec.site_types
        if spec.site_match == "all":
            mask &= _by_unique(frame["site_types"], lambda v: wanted <= site_set(v))
        else:
            mask &= _by_unique(frame["site_types"], lambda v: bool(wanted & site_set(v)))
    if spec.no_new_stereo:
        from halosift.engine.stereo import ACHIRAL

        mask &= _by_unique(frame["stereo"], lambda v: v == ACHIRAL)
    if spec.flags_has or spec.flags_lacks:
        has, lacks = spec.flags_has, spec.flags_lacks
        mask &= _by_unique(frame["flags"].fillna(""),
                           lambda v: has <= site_set(v) and not lacks & site_set(v))
    from halosift.engine.outcomes import OUTCOME_REAGENTS

    for reagent in OUTCOME_REAGENTS:
        kept = spec.outcomes_for(reagent)
        if kept:
            mask &= _by_unique(frame[f"{reagent}_outcome"], lambda v, kept=kept: v in kept)
    if spec.confidence:
        mask &= _by_unique(frame["confidence"], lambda v: v in spec.confidence)
    if spec.duplicates != "all":
        repeat = frame["duplicate_of"].notna().to_numpy(dtype=bool)
        mask &= repeat if spec.duplicates == "only" else ~repeat
    if spec.text:
        found = text_mask(frame, spec.text, id_columns)
        found |= text_mask(frame, spec.text, smiles_columns, ignore_case=False)
        mask &= found
    return mask


def view_mask(
    frame: pd.DataFrame,
    view: str,
    spec: FilterSpec,
    marked: np.ndarray,
    id_columns: Iterable[Hashable] = (),
    smiles_columns: Iterable[Hashable] = (),
) -> np.ndarray:
    """Boolean array over ``frame`` of the rows one view shows (see :data:`VIEW_DOCS`)."""
    if view == "library":
        return filter_mask(frame, spec, id_columns, smiles_columns)
    if view == "shortlist":
        return np.asarray(marked, dtype=bool).copy()
    if view == "rejected":
        return (frame["status"] != "ok").to_numpy(dtype=bool)
    raise ValueError(f"unknown view {view!r}")


def sort_key(series: pd.Series, categories: Mapping[str, int] | None = None) -> tuple[np.ndarray, np.ndarray]:
    """(numeric key, missing mask) for sorting a column.

    Numbers sort by value; text sorts by its rank in sorted order (computed
    once per distinct value), or by ``categories`` rank when given (values not
    listed come after those listed). Empty text counts as missing.
    """
    import pandas as pd

    if pd.api.types.is_bool_dtype(series.dtype):
        values = series.to_numpy(dtype=np.float64)
        return values, np.zeros(len(values), dtype=bool)
    if pd.api.types.is_numeric_dtype(series.dtype):
        values = series.to_numpy(dtype=np.float64, na_value=np.nan)
        return values, np.isnan(values)
    text = series.astype(object)
    missing = (text.isna() | (text == "")).to_numpy(dtype=bool)
    present = text.where(~missing)
    try:
        codes, uniques = pd.factorize(present, sort=categories is None)
    except TypeError:  # mixed types (numbers and text in one column): compare as text
        codes, uniques = pd.factorize(present.map(str, na_action="ignore"), sort=categories is None)
    if categories is not None:
        names = [str(u) for u in uniques]
        # Listed values by their rank, unlisted ones after them alphabetically.
        ranked = sorted(range(len(names)), key=lambda i: (categories.get(names[i], len(categories)), names[i]))
        rank = np.empty(len(names), dtype=np.float64)
        rank[np.asarray(ranked, dtype=np.int64)] = np.arange(len(names))
    else:
        rank = np.arange(len(uniques), dtype=np.float64)
    key = np.full(len(codes), np.nan)
    valid = codes >= 0
    key[valid] = rank[codes[valid]]
    return key, missing


def full_order(key: np.ndarray, missing: np.ndarray, descending: bool) -> np.ndarray:
    """Stable permutation of all rows by ``key``; missing values always last."""
    filled = np.where(missing, 0.0, key)
    order = np.argsort(-filled if descending else filled, kind="stable")
    # Stable partition: present rows (in key order) first, then missing rows in input order.
    return np.concatenate([order[~missing[order]], np.flatnonzero(missing)])


@dataclass
class OrderCache:
    """Full-frame sort permutations, memoised per (frame token, column, direction).

    Sorting a million text cells takes a moment; a view change only needs
    ``order[mask[order]]``, which is instant once the permutation is known.
    """

    max_entries: int = 12
    """Permutations kept (each is 8 bytes per row)."""
    _store: dict = field(default_factory=dict)
    """(token, column, descending) → permutation."""
    _lock: threading.Lock = field(default_factory=threading.Lock)
    """Several view workers may share the cache."""

    def order(
        self,
        frame: pd.DataFrame,
        token: object,
        column: Hashable,
        descending: bool,
        categories: Mapping[str, int] | None = None,
    ) -> np.ndarray:
        """Permutation of ``frame`` rows by ``column`` (cached under ``token``)."""
        key = (token, column, descending)
        with self._lock:
            found = self._store.get(key)
        if found is None or len(found) != len(frame):
            values, missing = sort_key(frame[column], categories)  # the slow part, outside the lock
            found = full_order(values, missing, descending)
            with self._lock:
                while len(self._store) >= self.max_entries:
                    self._store.pop(next(iter(self._store)))
                self._store[key] = found
        return found


def ordered_rows(mask: np.ndarray, order: np.ndarray | None) -> np.ndarray:
    """Row positions where ``mask`` holds, in ``order`` (input order when None)."""
    if order is None:
        return np.flatnonzero(mask)
    return order[mask[order]]
