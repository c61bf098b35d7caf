"""Structure drawings in plain text, for terminals that show no inline images.

Bonds are drawn with Unicode braille (U+2800 block: 2 × 4 dots per cell, so a
dot is about square on a terminal whose cells are twice as tall as wide);
carbon is the bare skeleton, other elements are their symbol, and each site
label (P1, P2 … as in the detail's products table) sits on its carbon, or on
the nearest free cell when that one is taken. Double bonds are a second line
beside the first (inside the ring for ring bonds, so an aromatic ring reads as
its Kekulé drawing), triple bonds three lines.

Pure Python: the layout comes from :func:`halosift.engine.depiction.depict`,
and nothing here imports Textual or Rich, so the drawing is easy to test.
Also here: :func:`smiles_lines`, which wraps a long SMILES at sensible points.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING

from halosift.engine.smiles_text import break_quality, smiles_tokens

if TYPE_CHECKING:
    from halosift.engine.depiction import DepictedBond, Depiction

BRAILLE = 0x2800
#: Bit of each dot of a braille cell, by (column 0–1, row 0–3) within the cell (Unicode's dot numbering).
_DOT_BITS = {(0, 0): 0x01, (0, 1): 0x02, (0, 2): 0x04, (0, 3): 0x40,
             (1, 0): 0x08, (1, 1): 0x10, (1, 2): 0x20, (1, 3): 0x80}
#: Longest bond drawn, in cells across: small molecules are not blown up to fill a wide terminal.
MAX_BOND_CELLS = 6.0
#: Cells kept free at the left and right of the skeleton for labels that stick out.
SIDE_MARGIN = 2


@dataclass(frozen=True)
class Span:
    """A run of cells on one line that is not bond dots (for styling)."""

    line: int
    """Line number, from 0 at the top."""
    start: int
    """First cell, from 0 at the left."""
    end: int
    """One past the last cell."""
    kind: str
    """'label' for a site label, 'atom' for an element symbol."""


@dataclass(frozen=True)
class PlacedLabel:
    """Where one site label ended up."""

    atom: int
    """Atom index it labels."""
    text: str
    """The label, e.g. P2."""
    line: int
    """Line of the drawing it is on."""
    start: int
    """Cell of its first character."""
    moved: bool
    """True when it was nudged off its carbon's own cell (that cell was taken)."""


@dataclass(frozen=True)
class TextDrawing:
    """A structure drawn in text."""

    lines: tuple[str, ...]
    """The drawing, every line the same length (at most the width asked for)."""
    spans: tuple[Span, ...]
    """Labels and element symbols, for styling."""
    labels: tuple[PlacedLabel, ...]
    """Where every site label was put."""
    atom_cells: Mapping[int, tuple[int, int]]
    """(line, cell) of every atom's position in the drawing."""
    atom_dots: Mapping[int, tuple[int, int]]
    """(x, y) braille-dot position of every atom in the drawing (2 dots a cell across, 4 down)."""


def draw_structure(
    molecule: Depiction | str, labels: Mapping[int, str], width: int, height: int
) -> TextDrawing:
    """Draw ``molecule`` (a Depiction, or a SMILES to lay out) in at most ``width`` × ``height`` cells.

    ``labels`` maps atom indices (SMILES atom order) to the text put on them.
    The skeleton is scaled to fit the box with its aspect kept; the result is
    cropped to the cells used. Deterministic: the same input gives the same lines.
    """
    if isinstance(molecule, str):
        from halosift.engine.depiction import depict

        molecule = depict(molecule)
    width, height = max(1, int(width)), max(1, int(height))
    canvas = _Canvas(width, height)
    if not molecule.atoms:
        return TextDrawing((), (), (), {}, {})
    dots = _atom_dots(molecule, width, height)
    cells = {i: (y // 4, x // 2) for i, (x, y) in dots.items()}
    # Element symbols first: bonds stop at them, labels go round them.
    bonded = {b.begin for b in molecule.bonds} | {b.end for b in molecule.bonds}
    for atom in molecule.atoms:
        if atom.symbol != "C" or (atom.index not in bonded and atom.index not in labels):
            row, col = cells[atom.index]
            canvas.put_text(row, min(col, max(0, width - len(atom.symbol))), atom.symbol, "atom")
    for bond in molecule.bonds:
        _draw_bond(canvas, molecule, bond, dots)
    placed = []
    vertices = set(cells.values())
    for atom, text in sorted(labels.items(), key=lambda item: (cells.get(item[0], (0, 0)), item[0])):
        if atom not in cells:
            raise ValueError(f"label {text!r} is on atom {atom}, which {molecule.smiles!r} does not have")
        placed.append(_place_label(canvas, atom, text[:width], cells[atom], vertices - {cells[atom]}))
    return canvas.cropped(placed, cells, dots)


class _Canvas:
    """Braille dots and text cells on a fixed grid."""

    def __init__(self, width: int, height: int) -> None:
        self.width = width
        self.height = height
        self.bits = [[0] * width for _ in range(height)]
        self.text: dict[tuple[int, int], tuple[str, str]] = {}

    def dot(self, x: int, y: int) -> None:
        """Set the braille dot at (x, y) (dots outside the canvas are dropped)."""
        if 0 <= x < 2 * self.width and 0 <= y < 4 * self.height:
            self.bits[y // 4][x // 2] |= _DOT_BITS[(x % 2, y % 4)]

    def put_text(self, row: int, col: int, text: str, kind: str) -> None:
        """Write ``text`` from (row, col) over whatever dots are there."""
        for k, ch in enumerate(text):
            if 0 <= col + k < self.width and 0 <= row < self.height:
                self.text[(row, col + k)] = (ch, kind)

    def free(self, row: int, col: int, length: int) -> bool:
        """Whether ``length`` cells from (row, col) are inside and hold no text, with no label right beside them."""
        if not (0 <= row < self.height and col >= 0 and col + length <= self.width):
            return False
        if any((row, col + k) in self.text for k in range(length)):
            return False
        # Two labels side by side would read as one (P1P2): keep a cell between them.
        return all(self.text.get((row, c), ("", ""))[1] != "label" for c in (col - 1, col + length))

    def cropped(
        self, placed: list[PlacedLabel], cells: Mapping[int, tuple[int, int]], dots: Mapping[int, tuple[int, int]]
    ) -> TextDrawing:
        """The used part of the canvas as a drawing (positions shifted to match)."""
        used = {(r, c) for r in range(self.height) for c in range(self.width) if self.bits[r][c]} | set(self.text)
        if not used:
            return TextDrawing((), (), tuple(placed), dict(cells), dict(dots))
        top, bottom = min(r for r, _ in used), max(r for r, _ in used)
        left, right = min(c for _, c in used), max(c for _, c in used)
        lines = []
        spans = []
        for r in range(top, bottom + 1):
            chars = []
            for c in range(left, right + 1):
                if (r, c) in self.text:
                    chars.append(self.text[(r, c)][0])
                elif self.bits[r][c]:
                    chars.append(chr(BRAILLE + self.bits[r][c]))
                else:
                    chars.append(" ")
            lines.append("".join(chars))
            c = left
            while c <= right:  # runs of text cells of one kind become one span
                if (r, c) in self.text:
                    kind = self.text[(r, c)][1]
                    start = c
                    while c <= right and self.text.get((r, c), ("", ""))[1] == kind:
                        c += 1
                    spans.append(Span(r - top, start - left, c - left, kind))
                else:
                    c += 1
        moved = tuple(PlacedLabel(p.atom, p.text, p.line - top, p.start - left, p.moved) for p in placed)
        shifted = {i: (r - top, c - left) for i, (r, c) in cells.items()}
        shifted_dots = {i: (x - 2 * left, y - 4 * top) for i, (x, y) in dots.items()}
        return TextDrawing(tuple(lines), tuple(spans), moved, shifted, shifted_dots)


def _atom_dots(molecule: Depiction, width: int, height: int) -> dict[int, tuple[int, int]]:
    """Dot position of every atom: the layout scaled to fit the box (dots are square, so one scale for x and y)."""
    xs = [a.x for a in molecule.atoms]
    ys = [a.y for a in molecule.atoms]
    lengths = [
        math.dist((molecule.atoms[b.begin].x, molecule.atoms[b.begin].y), (molecule.atoms[b.end].x, molecule.atoms[b.end].y))
        for b in molecule.bonds
    ]
    bond = sorted(lengths)[len(lengths) // 2] if lengths else 1.5
    margin = min(SIDE_MARGIN, max(0, (width - 1) // 4))
    room_x = max(1, 2 * (width - 2 * margin) - 1)
    room_y = max(1, 4 * height - 1)
    span_x, span_y = max(xs) - min(xs), max(ys) - min(ys)
    scale = 2 * MAX_BOND_CELLS / bond
    if span_x > 0:
        scale = min(scale, room_x / span_x)
    if span_y > 0:
        scale = min(scale, room_y / span_y)
    # Centre the skeleton in the box (cropping removes what is left over).
    off_x = 2 * margin + (room_x - span_x * scale) / 2
    off_y = (room_y - span_y * scale) / 2
    return {
        a.index: (round(off_x + (a.x - min(xs)) * scale), round(off_y + (max(ys) - a.y) * scale))
        for a in molecule.atoms
    }


def _line(canvas: _Canvas, start: tuple[float, float], end: tuple[float, float]) -> None:
    """Dots from start to end with no gaps (Bresenham), so every cell the bond crosses gets a dot."""
    x0, y0 = round(start[0]), round(start[1])
    x1, y1 = round(end[0]), round(end[1])
    dx, dy = abs(x1 - x0), -abs(y1 - y0)
    sx, sy = (1 if x0 < x1 else -1), (1 if y0 < y1 else -1)
    err = dx + dy
    while True:
        canvas.dot(x0, y0)
        if x0 == x1 and y0 == y1:
            return
        e2 = 2 * err
        if e2 >= dy:
            err += dy
            x0 += sx
        if e2 <= dx:
            err += dx
            y0 += sy


def _draw_bond(canvas: _Canvas, molecule: Depiction, bond: DepictedBond, dots: Mapping[int, tuple[int, int]]) -> None:
    """One bond: one line, plus a parallel one for a double bond and two for a triple bond."""
    (x0, y0), (x1, y1) = dots[bond.begin], dots[bond.end]
    _line(canvas, (x0, y0), (x1, y1))
    length = math.hypot(x1 - x0, y1 - y0)
    if bond.order == 1 or length < 4:
        return
    nx, ny = -(y1 - y0) / length, (x1 - x0) / length  # unit normal
    gap = 2.0 if length < 9 else 3.0
    if bond.order == 2 and bond.ring is not None:
        # Inner line, shortened, on the side of the ring's centre (as a ring is usually drawn).
        ring = molecule.rings[bond.ring]
        cx = sum(dots[i][0] for i in ring) / len(ring)
        cy = sum(dots[i][1] for i in ring) / len(ring)
        side = 1.0 if (cx - x0) * nx + (cy - y0) * ny > 0 else -1.0
        trim = 0.22
        a = (x0 + (x1 - x0) * trim + side * gap * nx, y0 + (y1 - y0) * trim + side * gap * ny)
        b = (x1 - (x1 - x0) * trim + side * gap * nx, y1 - (y1 - y0) * trim + side * gap * ny)
        _line(canvas, a, b)
        return
    trim = 0.2
    offsets = (gap,) if bond.order == 2 else (gap, -gap)
    for off in offsets:
        a = (x0 + (x1 - x0) * trim + off * nx, y0 + (y1 - y0) * trim + off * ny)
        b = (x1 - (x1 - x0) * trim + off * nx, y1 - (y1 - y0) * trim + off * ny)
        _line(canvas, a, b)


def _place_label(
    canvas: _Canvas, atom: int, text: str, cell: tuple[int, int], others: set[tuple[int, int]]
) -> PlacedLabel:
    """Put ``text`` on its atom's cell, or on the nearest free cells (never on another label or symbol)."""
    row0, col0 = cell
    n = len(text)
    # Search near the carbon first: every place outside this window costs at least _WINDOW, so a
    # cheaper one inside it is the best anywhere; only a crowded window needs the full search.
    best = _best_place(canvas, text, cell, others, range(row0 - 4, row0 + 5), range(col0 - n - 8, col0 + 9))
    if best is None or best[0] >= _WINDOW:
        best = _best_place(canvas, text, cell, others, range(canvas.height), range(canvas.width - n + 1))
    if best is None:
        raise ValueError(f"no room for label {text!r} in a {canvas.width} × {canvas.height} drawing")
    _, row, col = best
    canvas.put_text(row, col, text, "label")
    return PlacedLabel(atom, text, row, col, not (row == row0 and col <= col0 < col + n))


#: Least cost of a place outside the near window of :func:`_place_label` (5 rows or 9 cells away).
_WINDOW = 9.0


def _best_place(
    canvas: _Canvas, text: str, cell: tuple[int, int], others: set[tuple[int, int]], rows: range, cols: range
) -> tuple[float, int, int] | None:
    """(cost, row, first cell) of the cheapest free place for ``text`` among ``rows`` × ``cols``, or None."""
    row0, col0 = cell
    n = len(text)
    best: tuple[float, int, int] | None = None
    for row in rows:
        for col in cols:
            if not canvas.free(row, col, n):
                continue
            span = range(col, col + n)
            # Distance from the carbon's cell to the label's nearest cell; a row is about two cells tall.
            dc = 0 if col0 in span else min(abs(col0 - col), abs(col0 - (col + n - 1)))
            cost = math.hypot(dc, 2 * (row - row0)) + 0.01 * abs(col - (col0 - (n - 1) // 2))
            cost += 4.0 * sum((row, c) in others for c in span)  # hiding another carbon misleads
            cost += 0.3 * sum(bool(canvas.bits[row][c]) for c in span) * (dc > 0 or row != row0)
            if best is None or cost < best[0] - 1e-9:
                best = (cost, row, col)
    return best


# ---------------------------------------------------------------------- SMILES wrapping

def smiles_lines(smiles: str, width: int, first_width: int | None = None) -> list[str]:
    """``smiles`` cut into lines of at most ``width`` characters (the first at most ``first_width``).

    Breaks go after a ring-closure digit, after a branch closes, before a branch
    opens or after a '.', and otherwise between atoms; never inside an atom
    symbol or bracket atom, nor between an atom and its ring-closure digits
    (only a token longer than a whole line is cut).
    """
    tokens = smiles_tokens(smiles)
    lines: list[str] = []
    start = 0
    while start < len(tokens):
        room = max(1, first_width if (first_width is not None and not lines) else width)
        total = 0
        good = ok = hard = None
        k = start
        while k < len(tokens) and total + len(tokens[k]) <= room:
            total += len(tokens[k])
            quality = break_quality(tokens, k) if k + 1 < len(tokens) else 2
            if quality == 2:
                good = (k, total)
            elif quality == 1:
                ok = (k, total)
            hard = (k, total)
            k += 1
        if k == len(tokens):
            lines.append("".join(tokens[start:]))
            break
        if hard is None:  # one token wider than the line: cut it
            token = tokens[start]
            lines.append(token[:room])
            tokens[start] = token[room:]
            continue
        choice = good if good is not None and (ok is None or good[1] >= room / 2 or good[1] >= ok[1]) else ok
        if choice is None:
            choice = good or hard
        lines.append("".join(tokens[start:choice[0] + 1]))
        start = choice[0] + 1
    return lines or [""]


def smiles_block(label: str, smiles: str, width: int) -> str:
    """``label`` and ``smiles`` wrapped by :func:`smiles_lines` to ``width`` cells, continuation lines indented under it."""
    indent = len(label)
    room = max(8, width - indent)
    lines = smiles_lines(smiles, room)
    return "\n".join([label + lines[0], *(" " * indent + line for line in lines[1:])])
