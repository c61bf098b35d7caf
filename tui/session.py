"""Sessions: the marks, sort, filters, view and conditions of one library, kept between runs of the app.

One small JSON file per library in the user's data folder (platformdirs;
``$HALOSIFT_SESSION_DIR`` overrides it), named by a hash of the library's
absolute path and a signature of its content, so an edited file starts
afresh instead of getting marks meant for other rows. Files are written
atomically; a damaged one is ignored with a one-line note.
"""

from __future__ import annotations

import base64
import hashlib
import json
import os
import tempfile
from collections.abc import Mapping
from dataclasses import asdict, dataclass, field, fields, replace
from pathlib import Path
from typing import Any

import numpy as np
from halosift.tui.filters import DUPLICATE_MODES, VIEWS, FilterSpec, SortSpec

#: Environment variable naming the folder sessions are kept in.
SESSION_ENV = "HALOSIFT_SESSION_DIR"
#: Format version written in every file; another version is ignored, not misread.
VERSION = 1
#: Bytes read from each end of the library for its content signature.
SIGNATURE_BYTES = 1 << 20


def session_folder() -> Path:
    """``$HALOSIFT_SESSION_DIR`` or the user's data folder for halosift, plus 'sessions'."""
    env = os.environ.get(SESSION_ENV)
    if env:
        return Path(env)
    from platformdirs import user_data_dir

    return Path(user_data_dir("halosift")) / "sessions"


def library_key(path: str | os.PathLike[str]) -> str:
    """Hash of the library's absolute path and content signature (size, mtime, first and last MiB)."""
    path = Path(path).resolve()
    stat = path.stat()
    digest = hashlib.sha256()
    digest.update(str(path).encode("utf-8", "surrogateescape"))
    digest.update(f"\0{stat.st_size}\0{stat.st_mtime_ns}\0".encode())
    with path.open("rb") as handle:
        digest.update(handle.read(SIGNATURE_BYTES))
        if stat.st_size > 2 * SIGNATURE_BYTES:
            handle.seek(-SIGNATURE_BYTES, os.SEEK_END)
            digest.update(handle.read(SIGNATURE_BYTES))
    return digest.hexdigest()[:32]


@dataclass(frozen=True)
class Session:
    """What the app restores when a library is opened again."""

    n_rows: int
    """Rows of the library when saved (marks are ignored for another count)."""
    marked: np.ndarray
    """Shortlist marks, one bool per row."""
    sort: SortSpec = field(default_factory=SortSpec)
    """Row order."""
    filters: FilterSpec = field(default_factory=FilterSpec)
    """The library view's filters."""
    view: str = "library"
    """Which rows the table lists (one of tui.filters.VIEWS)."""
    conditions: dict[str, Any] = field(default_factory=dict)
    """engine.Conditions fields (checked with Conditions.validate when restored)."""
    show_input_columns: bool = False
    """The input file's own columns are shown."""
    show_more_columns: bool = False
    """The extra result columns are shown."""


@dataclass(frozen=True)
class Opened:
    """What opening a library found of its saved session."""

    session: Session | None
    """The session to restore (None: none saved, not usable for this library, or starting fresh)."""
    key: str | None
    """The library's session key (None: sessions are off for this library)."""
    note: str = ""
    """One line about a saved session that could not be used or removed ('' when there is nothing to say)."""


@dataclass(frozen=True)
class ScreenStart:
    """What a screen starts from, worked out once the library's row count is known."""

    opened: Opened
    """The saved session found for the library."""
    conditions: Any
    """engine.Conditions to evaluate under: the saved ones with the command line's options over them."""
    note: str = ""
    """Every note about the session and the conditions, in one line ('' when there is none)."""


def encode(session: Session) -> str:
    """The session as JSON text (marks packed eight to a byte)."""
    spec = session.filters
    return json.dumps({
        "version": VERSION,
        "n_rows": session.n_rows,
        "marked": base64.b64encode(np.packbits(session.marked.astype(bool)).tobytes()).decode("ascii"),
        "sort": {"column": session.sort.column if isinstance(session.sort.column, str) else None,
                 "descending": session.sort.descending},
        "filters": {
            "verdicts": sorted(spec.verdicts), "min_br2_pct": spec.min_br2_pct, "max_products": spec.max_products,
            "site_types": sorted(spec.site_types), "site_match": spec.site_match,
            "no_new_stereo": spec.no_new_stereo, "text": spec.text,
            "flags_has": sorted(spec.flags_has), "flags_lacks": sorted(spec.flags_lacks),
            "outcomes": sorted([reagent, outcome] for reagent, outcome in spec.outcomes),
            "confidence": sorted(spec.confidence), "duplicates": spec.duplicates,
        },
        "view": session.view,
        "conditions": session.conditions,
        "show_input_columns": session.show_input_columns,
        "show_more_columns": session.show_more_columns,
    }, ensure_ascii=False, indent=1)


def decode(text: str) -> Session:
    """A session from :func:`encode`'s JSON; ValueError (one line) for anything else."""
    try:
        data = json.loads(text)
    except json.JSONDecodeError as exc:
        raise ValueError(f"damaged (not JSON: {exc.msg} at line {exc.lineno})") from None
    if not isinstance(data, dict) or data.get("version") != VERSION:
        raise ValueError("not a halosift session of this version")
    try:
        n_rows = int(data["n_rows"])
        packed = np.frombuffer(base64.b64decode(data["marked"], validate=True), dtype=np.uint8)
        if n_rows < 0 or len(packed) != (n_rows + 7) // 8:
            raise ValueError("marks do not match the row count")
        marked = np.unpackbits(packed, count=n_rows).astype(bool)
        sort = SortSpec(_optional(data["sort"]["column"], str), bool(data["sort"]["descending"]))
        f = data["filters"]
        filters = FilterSpec(
            verdicts=frozenset(map(str, f["verdicts"])),
            min_br2_pct=_optional(f["min_br2_pct"], float),
            max_products=_optional(f["max_products"], int),
            site_types=frozenset(map(str, f["site_types"])),
            site_match=str(f["site_match"]) if f["site_match"] in ("any", "all") else "any",
            no_new_stereo=bool(f["no_new_stereo"]),
            text=str(f["text"]),
            # Added later: files saved before these filters existed load with them off.
            flags_has=frozenset(map(str, f.get("flags_has", ()))),
            flags_lacks=frozenset(map(str, f.get("flags_lacks", ()))),
            outcomes=frozenset((str(r), str(o)) for r, o in f.get("outcomes", ())),
            confidence=frozenset(map(str, f.get("confidence", ()))),
            duplicates=str(f.get("duplicates", "all")) if f.get("duplicates", "all") in DUPLICATE_MODES else "all",
        )
        view = str(data["view"]) if data["view"] in VIEWS else "library"
        conditions = data["conditions"]
        if not isinstance(conditions, dict):
            raise ValueError("conditions are not a record")
        return Session(n_rows, marked, sort, filters, view, dict(conditions),
                       bool(data["show_input_columns"]), bool(data["show_more_columns"]))
    except (KeyError, TypeError, ValueError) as exc:  # binascii.Error is a ValueError
        reason = f"missing {exc}" if isinstance(exc, KeyError) else " ".join(str(exc).split()) or type(exc).__name__
        raise ValueError(f"damaged ({reason})") from None


def _optional(value: Any, kind: type) -> Any:
    return None if value is None else kind(value)


def conditions_record(conditions: Any) -> dict[str, Any]:
    """An engine.Conditions as a plain record for :attr:`Session.conditions`."""
    return asdict(conditions)


def restore_conditions(record: dict[str, Any]) -> Any:
    """engine.Conditions from a saved record (checked as it is made); ValueError (one line) when unusable."""
    from halosift.engine import Conditions

    names = {f.name for f in fields(Conditions)}
    unknown = set(record) - names
    if unknown:
        raise ValueError(f"unknown condition {sorted(unknown)[0]!r}")
    try:
        conditions = Conditions(**record)
    except (TypeError, ValueError) as exc:
        raise ValueError(" ".join(str(exc).split())) from None
    return conditions


@dataclass(frozen=True)
class OpeningConditions:
    """The conditions a library opens with, and why they are not the ones asked for (if so)."""

    conditions: Any
    """engine.Conditions to screen with."""
    note: str
    """One line for the chemist when the saved or explicit conditions could not be used as given; '' if none."""


def initial_conditions(saved: dict[str, Any] | None, explicit: Mapping[str, Any]) -> OpeningConditions:
    """The engine.Conditions the app opens a library with, and a one-line note (or '').

    The saved session's conditions (when usable), with every field given
    explicitly on the command line (``explicit``) taking precedence. When the
    explicit fields do not combine with the saved set (e.g. ``--phase gas``
    over a saved Cl2 solvent), the explicit fields over the defaults are used
    and the note says so. ``explicit`` alone must be valid (ValueError if not).
    """
    from halosift.engine import Conditions

    note = ""
    base = Conditions()
    if saved:
        try:
            base = restore_conditions(saved)
        except ValueError as exc:
            note = f"The saved conditions are not usable ({exc}); default conditions are used."
    if not explicit:
        return OpeningConditions(base, note)
    try:
        conditions = replace(base, **explicit)
        return OpeningConditions(conditions, note)
    except ValueError as exc:
        conditions = Conditions(**explicit)
        reason = " ".join(str(exc).split())
        return OpeningConditions(conditions, (f"The saved conditions do not combine with the options given ({reason}); "
                                              "the options over default conditions are used."))


def path_for(key: str, folder: Path | None = None) -> Path:
    """The session file of a library key."""
    return (folder or session_folder()) / f"{key}.json"


@dataclass(frozen=True)
class Loaded:
    """What reading a library's session file gave."""

    session: Session | None
    """The saved session; None when none was saved or it could not be used."""
    note: str
    """One line saying why a saved session is ignored (damaged, unreadable); '' otherwise."""


def load(key: str, folder: Path | None = None) -> Loaded:
    """The session saved for a library key: none (no note) when there is none, none with a note when it is damaged."""
    path = path_for(key, folder)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        return Loaded(None, "")
    except (OSError, UnicodeDecodeError) as exc:
        return Loaded(None, f"The saved session could not be read and is ignored ({type(exc).__name__}).")
    try:
        return Loaded(decode(text), "")
    except ValueError as exc:
        return Loaded(None, f"The saved session is {exc} and is ignored; this one starts fresh.")


def save(key: str, session: Session, folder: Path | None = None) -> Path:
    """Write the session atomically (temp file in the same folder, then replace)."""
    path = path_for(key, folder)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.stem}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as handle:
            handle.write(encode(session))
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def forget(key: str, folder: Path | None = None) -> None:
    """Delete a library's saved session (starting fresh)."""
    path_for(key, folder).unlink(missing_ok=True)
