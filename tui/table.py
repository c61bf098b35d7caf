"""The library table: a virtual, keyboard-driven view of an evaluated frame.

Nothing is created per row. The widget holds the frame, an index array of the
rows to show (computed elsewhere, in pandas/numpy) and a list of columns; each
paint formats only the rows in the window (one ``iloc`` per column) and draws
lines with the Line API.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, ClassVar

import numpy as np
from halosift.engine.reagents import REAGENT_NAMES
from halosift.tui.messages import CursorMoved, DetailRequested, MarkRequested, SortRequested
from rich.segment import Segment
from rich.style import Style
from textual import events
from textual.binding import Binding, BindingType
from textual.geometry import Region, Size
from textual.reactive import reactive
from textual.scroll_view import ScrollView
from textual.strip import Strip

if TYPE_CHECKING:
    import pandas as pd

#: Column key meaning "the input row number" (1-based on screen).
ROW_KEY = "\x00row"
#: Cell kinds: how a column's values are shown.
KINDS = ("text", "pct", "count", "verdict", "row", "number", "reagent")
#: Table width (cells) up to which every column keeps its own width: the 80×24 layout never changes.
GROW_FROM = 80
_SEP = 1  # blank cells between columns
_GUTTER = 2  # cursor pointer + shortlist mark
POINTER = "▸"
MARK = "✓"


@dataclass(frozen=True)
class Column:
    """One column of the table."""

    key: Hashable
    """Frame column name, or :data:`ROW_KEY`."""
    label: str
    """Header text."""
    width: int
    """Cells wide (the header's sort arrow included)."""
    kind: str = "text"
    """One of :data:`KINDS`."""
    grow_to: int = 0
    """Widest it may grow to on a table wider than :data:`GROW_FROM` cells (0: always ``width``)."""

    @property
    def right(self) -> bool:
        """Numbers are right-aligned."""
        return self.number

    @property
    def number(self) -> bool:
        """A number: shown whole or not at all, never cut ('number': an input column's own numbers, as given)."""
        return self.kind in ("pct", "count", "row", "number")


#: Beside the verdict: the reagent offered.
SERVES_COLUMN = Column("serves", "Serves", 8, "reagent")
#: After the majors: each reagent's outcome (engine.outcomes), the grounds of the verdict and of Serves.
OUTCOME_COLUMNS: tuple[Column, ...] = (
    Column("cl2_outcome", "Cl2 outcome", 13),
    Column("br2_outcome", "Br2 outcome", 13),
    Column("so2cl2_outcome", "SO2Cl2 outcome", 16),
    Column("nbs_outcome", "NBS outcome", 13),
)
#: Why a reagent is ruled out, and the SO2Cl2 split: shown with the other extra columns (o).
REASON_COLUMNS: tuple[Column, ...] = (
    Column("cl2_reason", "Cl2 why", 24),
    Column("br2_reason", "Br2 why", 24),
    Column("so2cl2_reason", "SO2Cl2 why", 24),
    Column("nbs_reason", "NBS why", 24),
    Column("so2cl2_major", "SO2Cl2 major", 18),
    Column("so2cl2_major_pct", "SO2Cl2 %", 9, "pct"),
)


def _whole_end(columns: Sequence[Column], table_width: int, numbers_only: bool) -> int:
    """Where the last column shown whole at scroll position 0 ends (if asked, of the number and growing columns only)."""
    pinned = [c for i, c in enumerate(columns) if i == 0 or c.kind == "verdict"]
    x = _GUTTER + sum(c.width + _SEP for c in pinned)
    end = x - _SEP
    for c in (c for i, c in enumerate(columns) if not (i == 0 or c.kind == "verdict")):
        x += c.width + _SEP
        if x - _SEP > table_width:
            break
        if c.number or c.grow_to > c.width or not numbers_only:
            end = x - _SEP
    return end


def _share(columns: list[Column], growing: list[int], spare: int) -> None:
    """Widen the growing columns by ``spare`` cells in equal shares; one that reaches its ``grow_to`` passes the rest on."""
    open_ = [i for i in growing if columns[i].width < columns[i].grow_to]
    while spare > 0 and open_:
        share = max(1, spare // len(open_))
        for i in list(open_):
            c = columns[i]
            add = min(share, c.grow_to - c.width, spare)
            columns[i] = replace(c, width=c.width + add)
            spare -= add
            if columns[i].width >= c.grow_to:
                open_.remove(i)
            if not spare:
                break


def grown(columns: Sequence[Column], table_width: int) -> list[Column]:
    """The columns with the growing ones widened into the cells the table has to spare.

    Spare cells are those beyond :data:`GROW_FROM` and beyond the last number
    (or growing) column shown whole at the columns' own widths: the growing
    columns take what their values need of them, so every number in view stays
    in view.
    Then the cells after the last column shown whole (which would hold only a
    stub of the next column, "di…") go to them too while they need more. A
    growing column is never wider than its ``grow_to`` (its longest value) nor narrower than ``width``.
    """
    growing = [i for i, c in enumerate(columns) if c.grow_to > c.width]
    out = list(columns)
    if not growing or table_width <= GROW_FROM:
        return out
    _share(out, growing, table_width - max(GROW_FROM, _whole_end(out, table_width, numbers_only=True)))
    _share(out, growing, table_width - max(GROW_FROM, _whole_end(out, table_width, numbers_only=False)))
    return out


#: A cut falls back to a word boundary only when that keeps at least this share of the room.
_WORD_CUT_SHARE = 0.5


def clip(text: str, width: int) -> str:
    """``text`` cut to at most ``width`` cells, ending in '…' (at a word boundary when one is near)."""
    if len(text) <= width:
        return text
    if width <= 0:
        return ""
    room = width - 1
    head = text[:room]
    if text[room] != " ":
        # Prose (a reason, a flag list) is cut between words; a SMILES has no spaces and is cut anywhere.
        space = head.rfind(" ")
        if space >= room * _WORD_CUT_SHARE:
            head = head[:space]
    return head.rstrip(" ,;:") + "…"


def fit(text: str, width: int, right: bool = False) -> str:
    """Pad or cut ``text`` to exactly ``width`` cells (cut text ends in '…')."""
    text = clip(text, width)
    return text.rjust(width) if right else text.ljust(width)


def cut(text: str, width: int, right: bool, number: bool) -> str:
    """A cell partly scrolled out of view: ``width`` cells of it; a number is blanked, text ends in '…'."""
    if width <= 0:
        return ""
    if number:
        return " " * width
    return fit(text.strip(), width, right)


def format_values(kind: str, values: np.ndarray | None, rows: np.ndarray) -> list[str]:
    """Cell text for a window of values of one column (``rows``: their frame positions)."""
    if kind == "row":
        return [str(int(r) + 1) for r in rows]
    import pandas as pd  # loaded long before: a frame is being shown

    missing = pd.isna(values)
    out = []
    for v, gap in zip(values, missing):
        if kind == "verdict":
            out.append("rejected" if gap or v == "" else str(v))
        elif gap:
            out.append("")
        elif kind == "pct":
            out.append(f"{float(v):.1f}")
        elif kind == "count":
            out.append(str(int(v)))
        elif kind == "reagent":  # a reagent token (cl2) shown as chemists write it (Cl2)
            out.append(REAGENT_NAMES.get(v, str(v)))
        else:
            out.append(str(v))
    return out


class LibraryTable(ScrollView, can_focus=True):
    """Rows of an evaluated library; only the visible ones are ever formatted."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("up", "move(-1)", "Row up", show=False),
        Binding("down", "move(1)", "Row down", show=False),
        Binding("pageup", "page(-1)", "Page up", show=False),
        Binding("pagedown", "page(1)", "Page down", show=False),
        Binding("home", "first", "First row", show=False),
        Binding("end", "last", "Last row", show=False),
        Binding("left", "pick(-1)", "Column left", show=False),
        Binding("right", "pick(1)", "Column right", show=False),
        Binding("s", "sort", "Sort"),
        Binding("space", "mark", "Mark"),
        Binding("enter", "open", "Detail"),
    ]

    COMPONENT_CLASSES: ClassVar[set[str]] = {
        "library-table--header",
        "library-table--picked",
        "library-table--cursor",
        "library-table--marked",
        "library-table--verdict-by-symmetry",
        "library-table--verdict-selective",
        "library-table--verdict-mixture",
        "library-table--verdict-ruled-out",
        "library-table--verdict-inert",
        "library-table--verdict-rejected",
    }

    cursor: reactive[int] = reactive(0, always_update=True, repaint=False)
    """Position of the highlighted row within the shown rows."""
    picked: reactive[int] = reactive(0, repaint=False)
    """Index of the column that the sort key acts on."""

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._frame: pd.DataFrame | None = None
        self._rows: np.ndarray = np.zeros(0, dtype=np.int64)
        self._columns: list[Column] = []
        self._given_columns: list[Column] = []
        self._pinned: list[int] = []
        self._scrolling: list[int] = []
        self._marked: np.ndarray = np.zeros(0, dtype=bool)
        self._sort: tuple[Hashable | None, bool] = (None, False)
        self._version = 0
        self._window_key: tuple | None = None
        self._window: dict[int, list[str]] = {}
        self._window_verdict: dict[int, str] = {}
        self.formatted_rows = 0
        """Rows formatted since the widget was made (stays near the screen height; tests read it)."""

    # ------------------------------------------------------------------ data in

    @property
    def rows(self) -> np.ndarray:
        """Frame row positions shown, in display order."""
        return self._rows

    @property
    def columns(self) -> list[Column]:
        """The columns shown."""
        return list(self._columns)

    @property
    def cursor_row(self) -> int:
        """Frame row position under the cursor, or -1 when nothing is shown."""
        if 0 <= self.cursor < len(self._rows):
            return int(self._rows[self.cursor])
        return -1

    def show(
        self,
        frame: pd.DataFrame,
        rows: np.ndarray,
        columns: Sequence[Column],
        *,
        sort: tuple[Hashable | None, bool] = (None, False),
        marked: np.ndarray | None = None,
        top: bool = False,
    ) -> None:
        """Show ``rows`` of ``frame``; the cursor stays on the same frame row when it is still shown.

        ``top`` puts the cursor on the first row and scrolls there instead (after a new sort order).
        """
        before = self.cursor_row
        picked_key = self._columns[self.picked].key if self._columns and self.picked < len(self._columns) else None
        first_show = self._frame is None
        self._frame = frame
        self._rows = np.asarray(rows, dtype=np.int64)
        self._given_columns = list(columns)
        self._columns = grown(self._given_columns, self.view_width)
        self._layout()
        self._sort = sort
        if marked is not None:
            self._marked = marked
        self._version += 1
        self._window_key = None
        keys = [c.key for c in self._columns]
        self.set_reactive(LibraryTable.picked, keys.index(picked_key) if picked_key in keys else 0)
        self._set_virtual_size()
        position = 0
        if top:
            self.scroll_to(y=0, animate=False, force=True)
        elif before >= 0 and len(self._rows):
            hits = np.flatnonzero(self._rows == before)
            position = int(hits[0]) if len(hits) else min(self.cursor, len(self._rows) - 1)
        self.cursor = max(0, position)
        self.refresh()
        if first_show:
            self.refresh_bindings()

    def go_to_row(self, row: int) -> bool:
        """Put the cursor on frame row ``row`` if it is shown; True if it is."""
        hits = np.flatnonzero(self._rows == row)
        if len(hits):
            self.cursor = int(hits[0])
        return bool(len(hits))

    def set_marked(self, marked: np.ndarray) -> None:
        """Redraw with a new shortlist mark array (one bool per frame row)."""
        self._marked = marked
        self.refresh()

    # ------------------------------------------------------------------ geometry

    def _layout(self) -> None:
        """Split the columns into the pinned key columns (the first, and the verdict) and the scrolling rest."""
        self._pinned = [i for i, c in enumerate(self._columns) if i == 0 or c.kind == "verdict"]
        self._scrolling = [i for i in range(len(self._columns)) if i not in self._pinned]

    @property
    def display_order(self) -> list[int]:
        """Column indices left to right as drawn: pinned key columns first."""
        return self._pinned + self._scrolling

    @property
    def view_width(self) -> int:
        """Cells a line has on screen: the content width less a vertical scrollbar.

        Lines are fitted to this, not to ``size.width``: the scrollbar is drawn over
        the last cells, which would hide a cut cell's '…' or a number's last digits.
        """
        return self.scrollable_content_region.width

    @property
    def page_height(self) -> int:
        """Data rows that fit on screen below the header."""
        return max(1, self.scrollable_content_region.height - 1)

    def _fixed_width(self) -> int:
        return _GUTTER + sum(self._columns[i].width + _SEP for i in self._pinned)

    def _column_span(self, index: int) -> tuple[int, int]:
        """(start, end) of a scrolling column in scrolling-part cells."""
        x = 0
        for i in self._scrolling:
            if i == index:
                break
            x += self._columns[i].width + _SEP
        return x, x + self._columns[index].width

    def watch_cursor(self, cursor: int) -> None:
        top = int(self.scroll_offset.y)
        if cursor < top:
            self.scroll_to(y=cursor, animate=False, force=True)
        elif cursor >= top + self.page_height:
            self.scroll_to(y=cursor - self.page_height + 1, animate=False, force=True)
        self.refresh()
        self.post_message(CursorMoved(self.cursor_row))

    def watch_picked(self, picked: int) -> None:
        if picked in self._scrolling:
            start, end = self._column_span(picked)
            visible = max(1, self.scrollable_content_region.width - self._fixed_width())
            left = int(self.scroll_offset.x)
            if start < left:
                self.scroll_to(x=start, animate=False, force=True)
            elif end > left + visible:
                # Scroll by whole columns, so no column is shown cut at the left edge.
                target = start
                for i in self._scrolling[: self._scrolling.index(picked) + 1]:
                    first, _ = self._column_span(i)
                    if end - first <= visible:
                        target = first
                        break
                self.scroll_to(x=target, animate=False, force=True)
        self.refresh()

    def _set_virtual_size(self) -> None:
        width = _GUTTER + sum(c.width + _SEP for c in self._columns)
        self.virtual_size = Size(width, len(self._rows) + 1)

    def on_resize(self, event: events.Resize) -> None:
        self._window_key = None
        columns = grown(self._given_columns, self.view_width)
        if columns != self._columns:  # a growing column (SMILES) follows the terminal's width
            self._columns = columns
            self._set_virtual_size()
            self.refresh()

    # ------------------------------------------------------------------ actions

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        # Before a library is shown the keys have nothing to act on: hide them.
        if action in ("move", "page", "first", "last", "pick", "sort", "mark", "open"):
            return self._frame is not None
        return True

    def action_move(self, delta: int) -> None:
        """Move the cursor by ``delta`` rows."""
        if len(self._rows):
            self.cursor = min(max(0, self.cursor + delta), len(self._rows) - 1)

    def action_page(self, direction: int) -> None:
        """Move the cursor a screenful up or down."""
        if len(self._rows):
            self.scroll_to(y=max(0, self.scroll_offset.y + direction * self.page_height), animate=False, force=True)
            self.action_move(direction * self.page_height)

    def action_first(self) -> None:
        """Cursor to the first row."""
        if len(self._rows):
            self.cursor = 0

    def action_last(self) -> None:
        """Cursor to the last row."""
        if len(self._rows):
            self.cursor = len(self._rows) - 1

    def action_pick(self, delta: int) -> None:
        """Choose the column the sort key acts on (left to right as drawn)."""
        if self._columns:
            order = self.display_order
            at = order.index(self.picked) if self.picked in order else 0
            self.picked = order[min(max(0, at + delta), len(order) - 1)]

    def action_sort(self) -> None:
        """Sort by the picked column; again on the same column reverses."""
        if not self._columns:
            return
        key = self._columns[self.picked].key
        column, descending = self._sort
        self.post_message(SortRequested(key, not descending if column == key else False))

    def action_mark(self) -> None:
        """Mark or unmark the row under the cursor, then step down."""
        row = self.cursor_row
        if row >= 0:
            self.post_message(MarkRequested(row))
            self.action_move(1)

    def action_open(self) -> None:
        """Open the site detail of the row under the cursor."""
        row = self.cursor_row
        if row >= 0:
            self.post_message(DetailRequested(row))

    def on_click(self, event: events.Click) -> None:
        offset = event.get_content_offset(self)
        if offset is None:
            return
        if offset.y == 0:
            index = self._column_at(offset.x)
            if index is not None:
                self.picked = index
            return
        position = int(self.scroll_offset.y) + offset.y - 1
        if 0 <= position < len(self._rows):
            self.cursor = position
            if event.chain >= 2:
                self.action_open()

    def _column_at(self, x: int) -> int | None:
        if not self._columns or x < _GUTTER:
            return None
        fixed = self._fixed_width()
        if x < fixed:
            left = _GUTTER
            for i in self._pinned:
                if x < left + self._columns[i].width + _SEP:
                    return i
                left += self._columns[i].width + _SEP
            return None
        x = x - fixed + int(self.scroll_offset.x)
        for i in self._scrolling:
            start, end = self._column_span(i)
            if start <= x < end + _SEP:
                return i
        return None

    # ------------------------------------------------------------------ drawing

    def _fill_window(self) -> None:
        """Format the cells of the rows now on screen (one pandas take per column)."""
        top = int(self.scroll_offset.y)
        height = self.page_height
        key = (self._version, top, height)
        if key == self._window_key:
            return
        self._window_key = key
        self._window = {}
        self._window_verdict = {}
        if self._frame is None or not len(self._rows):
            return
        positions = np.arange(top, min(top + height, len(self._rows)))
        rows = self._rows[positions]
        self.formatted_rows += len(rows)
        columns = []
        for col in self._columns:
            values = None if col.kind == "row" else self._frame[col.key].iloc[rows].to_numpy(dtype=object)
            columns.append(format_values(col.kind, values, rows))
        verdicts = (
            self._frame["verdict"].iloc[rows].to_numpy(dtype=object)
            if "verdict" in self._frame
            else np.full(len(rows), "", dtype=object)
        )
        for i, p in enumerate(positions):
            self._window[int(p)] = [cells[i] for cells in columns]
            v = verdicts[i]
            self._window_verdict[int(p)] = v if isinstance(v, str) and v else "rejected"

    def _header_cells(self) -> list[str]:
        column, descending = self._sort
        cells = []
        for col in self._columns:
            label = col.label
            if col.key == column:
                label = f"{label} {'▼' if descending else '▲'}"
            cells.append(label)
        return cells

    def _line(self, cells: list[str], styles: list[Style], gutter: str, base: Style) -> Strip:
        """One line: gutter, pinned key columns, then the scrolling columns in view.

        Cells come unfitted. A scrolling column only partly in view is cut by
        :func:`cut` (text ends in '…', a number is left out), so no number is
        ever shown with digits missing.
        """
        width = self.view_width
        fixed: list[Segment] = [Segment(gutter, base)]
        for i in self._pinned:
            col = self._columns[i]
            fixed.append(Segment(fit(cells[i], col.width, col.right), styles[i]))
            fixed.append(Segment(" " * _SEP, base))
        fixed_strip = Strip(fixed)
        visible = max(0, width - fixed_strip.cell_length)
        left = int(self.scroll_offset.x)
        right = left + visible
        scroll: list[Segment] = []
        x = 0
        for i in self._scrolling:
            col = self._columns[i]
            start, end, stop = x, x + col.width, x + col.width + _SEP
            x = stop
            if stop <= left:
                continue
            if start >= right:
                break
            shown_from, shown_to = max(start, left), min(end, right)
            if shown_from == start and shown_to == end:
                scroll.append(Segment(fit(cells[i], col.width, col.right), styles[i]))
            elif shown_to > shown_from:
                scroll.append(Segment(cut(cells[i], shown_to - shown_from, col.right, col.number), styles[i]))
            gap = min(stop, right) - max(end, left)
            if gap > 0:
                scroll.append(Segment(" " * gap, base))
        scroll_strip = Strip(scroll).adjust_cell_length(visible, base)
        return Strip.join([fixed_strip, scroll_strip]).adjust_cell_length(width, base).simplify()

    def render_lines(self, crop: Region) -> list[Strip]:
        self._fill_window()
        return super().render_lines(crop)

    def render_line(self, y: int) -> Strip:
        base = self.rich_style
        if not self._columns:
            return Strip.blank(self.view_width, base)
        if y == 0:
            header = self.get_component_rich_style("library-table--header")
            picked = self.get_component_rich_style("library-table--picked")
            styles = [header + picked if i == self.picked else header for i in range(len(self._columns))]
            return self._line(self._header_cells(), styles, " " * _GUTTER, base + header)
        position = int(self.scroll_offset.y) + y - 1
        if not 0 <= position < len(self._rows):
            return Strip.blank(self.view_width, base)
        cells = self._window.get(position)
        if cells is None:  # scrolled since the window was filled
            self._fill_window()
            cells = self._window.get(position)
        if cells is None:
            return Strip.blank(self.view_width, base)
        row = int(self._rows[position])
        marked = bool(self._marked[row]) if row < len(self._marked) else False
        line = base
        if marked:
            line = line + self.get_component_rich_style("library-table--marked")
        at_cursor = position == self.cursor
        if at_cursor:
            line = line + self.get_component_rich_style("library-table--cursor")
        verdict_style = self.get_component_rich_style(
            f"library-table--verdict-{self._window_verdict.get(position, 'rejected')}", default=Style()
        )
        styles = []
        for col in self._columns[: len(cells)]:
            style = line + verdict_style if col.kind == "verdict" and not at_cursor else line
            styles.append(style)
        gutter = (POINTER if at_cursor else " ") + (MARK if marked else " ")
        return self._line(cells, styles, gutter, line)
