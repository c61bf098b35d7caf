"""Mark rows from a file of IDs: reading the list, matching it, and the small dialog that asks for the file."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, ClassVar

import numpy as np
from halosift.tui.inputs import OrderedInput
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Footer, Input, Static

if TYPE_CHECKING:
    import pandas as pd

#: Suffixes read as tables (the ID column is found by name); anything else is one ID a line.
TABLE_SUFFIXES = {".csv": ",", ".tsv": "\t"}


@dataclass(frozen=True)
class IdMatch:
    """Which rows of a library an ID list names."""

    rows: np.ndarray
    """Frame row positions whose ID is listed (input order; every row of a duplicated ID)."""
    n_ids: int
    """Distinct IDs in the list."""
    missing: tuple[str, ...]
    """Listed IDs that no row has, in list order."""


def read_ids(path: Path, id_column: str) -> list[str]:
    """Distinct IDs of a list file, in file order; ValueError (one line) when it has none or cannot be read.

    A .csv or .tsv file is read as a table and its column named like the
    library's ID column is used (or its only column); any other file lists one
    ID a line, blank lines and lines starting with '#' skipped.
    """
    path = Path(path).expanduser()
    if not path.is_file():
        raise ValueError(f"no such file: {path}")
    sep = TABLE_SUFFIXES.get(path.suffix.lower())
    if sep is not None:
        import pandas as pd

        try:
            table = pd.read_csv(path, sep=sep, dtype=str, keep_default_na=False)
        except (pd.errors.ParserError, UnicodeDecodeError, pd.errors.EmptyDataError) as exc:
            raise ValueError(f"not a readable {path.suffix} table ({type(exc).__name__})") from None
        if id_column in table.columns:
            values = table[id_column]
        elif len(table.columns) == 1:
            values = table.iloc[:, 0]
        else:
            raise ValueError(f"no column named {id_column!r} (the library's ID column) among {len(table.columns)} columns")
        raw = [str(v).strip() for v in values]
    else:
        try:
            text = path.read_text(encoding="utf-8-sig")
        except UnicodeDecodeError:
            raise ValueError("not a UTF-8 text file (expected one ID a line)") from None
        raw = [line.strip() for line in text.splitlines() if not line.lstrip().startswith("#")]
    ids = list(dict.fromkeys(v for v in raw if v))
    if not ids:
        raise ValueError("the file lists no IDs")
    return ids


def match_ids(library_ids: pd.Series, ids: list[str]) -> IdMatch:
    """The rows whose ID (compared as text, spaces trimmed) is in ``ids`` (vectorised)."""
    import pandas as pd

    if pd.api.types.is_float_dtype(library_ids) and (library_ids.dropna() % 1 == 0).all():
        library_ids = library_ids.astype("Int64")  # whole-number IDs read as floats (a gap makes them so): 101, not 101.0
    values = library_ids.astype("string").fillna("").str.strip()
    wanted = set(ids)
    rows = np.flatnonzero(values.isin(wanted).to_numpy(dtype=bool))
    present = set(values.iloc[rows])
    return IdMatch(rows, len(ids), tuple(i for i in ids if i not in present))


class IdListScreen(ModalScreen[Path | None]):
    """Ask for the file of IDs to mark; Enter reads it, Esc cancels."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Cancel"),
    ]

    def __init__(self, folder: Path) -> None:
        super().__init__()
        self.folder = folder
        """Folder relative paths are taken from."""

    def compose(self) -> ComposeResult:
        with Vertical(id="ids-box"):
            yield Static("Mark the rows listed in a file", id="ids-title")
            yield Static("File: one ID a line, or a .csv/.tsv with the library's ID column")
            yield OrderedInput(str(self.folder) + "/", id="ids-path", compact=True, select_on_focus=False)
            yield Static("", id="ids-check")
            yield Static("Listed rows are added to the shortlist; z undoes it. Enter reads · Esc cancels",
                         id="ids-note")
        yield Footer(compact=True)  # the dialog's own keys, not the table's behind it

    def on_mount(self) -> None:
        box = self.query_one("#ids-path", Input)
        box.focus()
        box.cursor_position = len(box.value)
        self._check()

    def _path(self) -> Path:
        path = Path(self.query_one("#ids-path", Input).value.strip()).expanduser()
        return path if path.is_absolute() else self.folder / path

    def _check(self) -> bool:
        path = self._path()
        ok = path.is_file()
        self.query_one("#ids-check", Static).update(f"✓ {path}" if ok else "✗ not a file yet")
        return ok

    @on(Input.Changed, "#ids-path")
    def _changed(self) -> None:
        self._check()

    @on(Input.Submitted, "#ids-path")
    def _submitted(self) -> None:
        if self._check():
            self.dismiss(self._path())

    def action_cancel(self) -> None:
        """Close without marking."""
        self.dismiss(None)
