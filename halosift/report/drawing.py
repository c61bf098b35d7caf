"""2D structure drawings (RDKit SVG) with each abstractable site marked and labelled with its predicted share."""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from dataclasses import dataclass
from html import escape

#: Highlight colour (RGB, 0–1) per abstractable site class. Light tints so atom labels stay legible;
#: the meaning is always also written out (site letter on the drawing, class name in legend and table).
SITE_COLOURS: dict[str, tuple[float, float, float]] = {
    "methane": (0.85, 0.85, 0.85),
    "primary": (0.67, 0.82, 0.96),
    "secondary": (0.70, 0.90, 0.70),
    "tertiary": (0.99, 0.78, 0.55),
    "cyclopropyl": (0.82, 0.76, 0.95),
    "allylic-primary": (0.98, 0.78, 0.86),
    "allylic-secondary": (0.96, 0.66, 0.78),
    "allylic-tertiary": (0.92, 0.55, 0.70),
    "benzylic-primary": (0.98, 0.93, 0.60),
    "benzylic-secondary": (0.95, 0.87, 0.45),
    "benzylic-tertiary": (0.90, 0.80, 0.35),
    "propargylic-primary": (0.62, 0.90, 0.88),
    "propargylic-secondary": (0.50, 0.83, 0.80),
    "propargylic-tertiary": (0.40, 0.76, 0.73),
}
FALLBACK_COLOUR = (0.80, 0.80, 0.80)

@dataclass(frozen=True)
class SiteMark:
    """One distinct abstractable site as it is marked on the drawing."""

    atom: int
    """Representative carbon: index in the canonical-SMILES atom order."""
    letter: str
    """Short tag shared by the drawing and its products table (a, b, c, … in the report; P1, P2, … in the app)."""
    site: str
    """Site class, e.g. secondary or benzylic-primary."""
    cl2_pct: float
    """Predicted share of this monochloride under Cl2, percent; NaN when Cl2 is ruled out."""
    br2_pct: float
    """Predicted share of this monobromide under Br2, percent; NaN when Br2 is ruled out."""


def pct_text(value: float) -> str:
    """Whole percent for the drawing; shares that round to 0 but are not zero show as <1."""
    if value != value:
        return "–"
    if 0 < value < 0.5:
        return "<1"
    if 99.5 <= value < 100:
        return ">99"
    return f"{value:.0f}"


def site_note(mark: SiteMark) -> str:
    """A site's shares in short, e.g. 'a: Cl 45 / Br 3', for the SVG's <desc>."""
    return f"{mark.letter}: Cl {pct_text(mark.cl2_pct)} / Br {pct_text(mark.br2_pct)}"


def colour_hex(site: str) -> str:
    """The site class's highlight colour as #rrggbb (for the legend swatches)."""
    r, g, b = SITE_COLOURS.get(site, FALLBACK_COLOUR)
    return f"#{round(r * 255):02x}{round(g * 255):02x}{round(b * 255):02x}"


_PROLOG = re.compile(r"<\?xml[^>]*\?>\s*")


def _drawable(canonical_smiles: str, marks: Sequence[SiteMark]):
    """The parsed molecule with notes set, highlight colours and note texts."""
    from rdkit import Chem

    mol = Chem.MolFromSmiles(canonical_smiles)
    if mol is None:
        raise ValueError(f"cannot draw {canonical_smiles!r}")
    colours: dict[int, tuple[float, float, float]] = {}
    notes: list[str] = []
    for mark in marks:
        if not 0 <= mark.atom < mol.GetNumAtoms():
            raise ValueError(f"site atom {mark.atom} is outside {canonical_smiles!r}")
        atom = mol.GetAtomWithIdx(mark.atom)
        note = site_note(mark)
        atom.SetProp("atomNote", note)
        notes.append(f"{note} ({mark.site})")
        colours[mark.atom] = SITE_COLOURS.get(mark.site, FALLBACK_COLOUR)
    return mol, colours, notes


#: Bond length of report drawings in SVG user units (CSS px at natural size): every molecule is drawn at this
#: scale, so site letters keep one print size whatever the molecule's size (the canvas grows instead).
BOND_PX = 32.0
#: RDKit's 2D depictions have bonds 1.5 coordinate units long.
DEPICTION_BOND = 1.5
#: Site-letter font size, user units: 13 px ≈ 9.75 pt at natural size, legible in print.
LABEL_FONT_PX = 13.0
#: Room around the molecule for letters on its outermost atoms, in bond lengths.
MARGIN_BONDS = 1.7
#: Farther rings of candidate spots, in bond lengths, for crowded drawings (a thin leader line joins them).
LEADER_RADII = (1.8, 2.1, 2.5)
#: Widest drawing shown unshrunk: the printed column (A4 less margins, about 178 mm). A wider molecule is scaled
#: down to it on the page, so its letters are drawn larger by the same factor and still print at one size.
COLUMN_PX = 672
#: Smallest canvas, so a tiny molecule still gets a usable figure.
MIN_WIDTH, MIN_HEIGHT = 200, 140
#: Half-width of the band around a bond line that letters keep out of, in bond lengths (covers the second line
#: of a double bond, drawn 0.15 bond lengths off, and stereo wedges).
BOND_CLEARANCE = 0.24
#: Letters keep this far from every atom centre (where atom symbols and highlight centres sit), in bond lengths.
ATOM_CLEARANCE = 0.28


@dataclass(frozen=True)
class Box:
    """An axis-aligned rectangle in drawing coordinates."""

    x0: float
    """Left edge."""
    y0: float
    """Top edge."""
    x1: float
    """Right edge."""
    y1: float
    """Bottom edge."""

    def overlaps(self, other: Box, pad: float = 0.0) -> bool:
        """True when the boxes intersect once each is grown by ``pad``."""
        return not (self.x1 + pad <= other.x0 or other.x1 + pad <= self.x0
                    or self.y1 + pad <= other.y0 or other.y1 + pad <= self.y0)

    def near_segment(self, a: tuple[float, float], b: tuple[float, float], clearance: float) -> bool:
        """True when the segment a–b passes within ``clearance`` of the box (Liang–Barsky clip of the grown box)."""
        x0, y0, x1, y1 = self.x0 - clearance, self.y0 - clearance, self.x1 + clearance, self.y1 + clearance
        dx, dy = b[0] - a[0], b[1] - a[1]
        lo, hi = 0.0, 1.0
        for p, q in ((-dx, a[0] - x0), (dx, x1 - a[0]), (-dy, a[1] - y0), (dy, y1 - a[1])):
            if p == 0:
                if q < 0:
                    return False
            else:
                t = q / p
                if p < 0:
                    lo = max(lo, t)
                else:
                    hi = min(hi, t)
                if lo > hi:
                    return False
        return True

    def near_point(self, point: tuple[float, float], clearance: float) -> bool:
        """True when ``point`` lies within ``clearance`` of the box."""
        dx = max(self.x0 - point[0], 0.0, point[0] - self.x1)
        dy = max(self.y0 - point[1], 0.0, point[1] - self.y1)
        return dx * dx + dy * dy < clearance * clearance


@dataclass(frozen=True)
class LabelSpot:
    """Where one site letter is written on the drawing."""

    letter: str
    """The site's letter."""
    x: float
    """Centre of the letter, drawing units."""
    y: float
    """Centre of the letter, drawing units."""
    box: Box
    """The room reserved for the letter (a little larger than its glyphs)."""
    clear: bool
    """False when no spot free of bonds and other letters was found (the letter is then placed nearest)."""
    leader: bool = False
    """True when the letter sits far from its atom (a crowded drawing) and a thin line joins them."""


def segments_cross(p: tuple[float, float], q: tuple[float, float],
                   a: tuple[float, float], b: tuple[float, float]) -> bool:
    """True when segments p–q and a–b properly intersect (touching at an end point does not count)."""
    def side(u: tuple[float, float], v: tuple[float, float], w: tuple[float, float]) -> float:
        return (v[0] - u[0]) * (w[1] - u[1]) - (v[1] - u[1]) * (w[0] - u[0])

    d1, d2, d3, d4 = side(a, b, p), side(a, b, q), side(p, q, a), side(p, q, b)
    return d1 * d2 < 0 and d3 * d4 < 0


def label_box(x: float, y: float, text: str, font_px: float = LABEL_FONT_PX) -> Box:
    """The room a letter centred at (x, y) takes: generous, so the glyphs' real extent always lies inside."""
    half_w = (0.64 * font_px * len(text) + 3.0) / 2
    half_h = 0.68 * font_px
    return Box(x - half_w, y - half_h, x + half_w, y + half_h)


def place_labels(
    atoms: Sequence[tuple[float, float]],
    bonds: Sequence[tuple[int, int]],
    sites: Sequence[tuple[int, str]],
    size: tuple[float, float],
    bond_px: float = BOND_PX,
    font_px: float = LABEL_FONT_PX,
) -> list[LabelSpot]:
    """A spot for each (atom, letter) of ``sites`` clear of every bond band, atom centre, other letter and the edge.

    Candidates ring each atom at growing distances, nearest first, starting from
    the direction that points away from the atom's bonds; the first clear one is
    taken; a far one (joined by a leader line) only if its leader crosses no
    other bond and no other leader, unless no far spot avoids that. Greedy,
    the most crowded atoms (most bonds) first.
    """
    segments = [(atoms[i], atoms[j]) for i, j in bonds]
    leaders: list[tuple[tuple[float, float], tuple[float, float]]] = []
    neighbours: dict[int, list[int]] = {i: [] for i in range(len(atoms))}
    for i, j in bonds:
        neighbours[i].append(j)
        neighbours[j].append(i)
    width, height = size
    placed: list[Box] = []

    def free(box: Box) -> bool:
        if box.x0 < 1 or box.y0 < 1 or box.x1 > width - 1 or box.y1 > height - 1:
            return False
        if any(box.overlaps(other, pad=2.0) for other in placed):
            return False
        if any(box.near_point(p, ATOM_CLEARANCE * bond_px) for p in atoms):
            return False
        if any(box.near_segment(a, b, 2.0) for a, b in leaders):
            return False
        return not any(box.near_segment(a, b, BOND_CLEARANCE * bond_px) for a, b in segments)

    def candidates(atom: int, letter: str) -> list[tuple[float, float]]:
        ax, ay = atoms[atom]
        ox = oy = 0.0
        for n in neighbours[atom]:
            dx, dy = ax - atoms[n][0], ay - atoms[n][1]
            d = math.hypot(dx, dy) or 1.0
            ox, oy = ox + dx / d, oy + dy / d
        outward = math.atan2(oy, ox) if (ox or oy) else -math.pi / 2
        out = []
        for radius in (0.5, 0.62, 0.75, 0.9, 1.05, 1.25, 1.5, *LEADER_RADII):
            steps = sorted(range(24), key=lambda k: min(k, 24 - k))  # outward first, then alternately each side
            for k in steps:
                angle = outward + k * math.pi / 12
                out.append((ax + radius * bond_px * math.cos(angle), ay + radius * bond_px * math.sin(angle)))
        return out

    def leader_crosses(start: tuple[float, float], end: tuple[float, float], in_the_way: list) -> bool:
        """The leader from ``start`` to ``end`` crosses one of ``in_the_way`` or another leader."""
        return any(segments_cross(start, end, a, b) for a, b in (*in_the_way, *leaders))

    spots: dict[int, LabelSpot] = {}
    # Crowded atoms (more bonds) choose first, while the most room is left around them.
    order = sorted(range(len(sites)), key=lambda k: -len(neighbours[sites[k][0]]))
    for k in order:
        atom, letter = sites[k]
        spot = None
        crossing: LabelSpot | None = None  # a clear far spot whose leader crosses a bond: the last resort
        # The atom's own bonds meet its leader at the atom; only the others can be crossed.
        in_the_way = [seg for (i, j), seg in zip(bonds, segments) if atom not in (i, j)]
        for x, y in candidates(atom, letter):
            box = label_box(x, y, letter, font_px)
            if free(box):
                far = math.dist((x, y), atoms[atom]) > 1.6 * bond_px
                found = LabelSpot(letter, x, y, box, True, leader=far)
                if far and leader_crosses(atoms[atom], (x, y), in_the_way):
                    crossing = crossing or found
                    continue
                spot = found
                break
        spot = spot or crossing
        if spot is None:  # nothing clear: the nearest spot off the bonds' own atom
            x, y = candidates(atom, letter)[0]
            spot = LabelSpot(letter, x, y, label_box(x, y, letter, font_px), False)
        placed.append(spot.box)
        if spot.leader:
            leaders.append((atoms[atom], (spot.x, spot.y)))
        spots[k] = spot
    return [spots[k] for k in range(len(sites))]


def _canvas(mol) -> tuple[int, int]:
    """Canvas size for ``mol`` (with 2D coordinates) at :data:`BOND_PX` per bond length, margins included."""
    conf = mol.GetConformer()
    xs = [conf.GetAtomPosition(i).x for i in range(mol.GetNumAtoms())]
    ys = [conf.GetAtomPosition(i).y for i in range(mol.GetNumAtoms())]
    margin = 2 * MARGIN_BONDS * BOND_PX
    scale = BOND_PX / DEPICTION_BOND
    width = max(MIN_WIDTH, round((max(xs) - min(xs)) * scale + margin))
    height = max(MIN_HEIGHT, round((max(ys) - min(ys)) * scale + margin))
    return width, height


@dataclass(frozen=True)
class _Placed:
    """A molecule drawn at the report's scale, with its label spots (shared by the SVG and the PNG)."""

    drawing: str | bytes
    """RDKit's drawing text (SVG) or bytes (PNG), without labels."""
    size: tuple[int, int]
    """Width and height, pixels."""
    points: list[tuple[float, float]]
    """Each atom's centre as drawn, pixels."""
    spots: tuple[LabelSpot, ...]
    """Where each mark's label goes, in marks order."""
    font_px: float
    """Label font size, pixels."""
    notes: list[str]
    """The marks' notes, for the SVG's description."""


def _draw_and_place(canonical_smiles: str, marks: Sequence[SiteMark], *, vector: bool) -> _Placed:
    """Draw the molecule tinted by site class at a fixed bond length, then place each mark's label."""
    from rdkit.Chem import rdDepictor
    from rdkit.Chem.Draw import rdMolDraw2D

    mol, colours, notes = _drawable(canonical_smiles, marks)
    for atom in mol.GetAtoms():
        atom.ClearProp("atomNote")  # labels are written afterwards, on spots clear of the bonds
    rdDepictor.Compute2DCoords(mol)
    width, height = _canvas(mol)
    drawer = rdMolDraw2D.MolDraw2DSVG(width, height) if vector else rdMolDraw2D.MolDraw2DCairo(width, height)
    options = drawer.drawOptions()
    options.clearBackground = True
    options.fixedBondLength = BOND_PX / DEPICTION_BOND  # pixels per coordinate unit
    options.padding = 0.0
    rdMolDraw2D.PrepareAndDrawMolecule(
        drawer, mol, highlightAtoms=list(colours), highlightAtomColors=colours, highlightBonds=[],
    )
    drawer.FinishDrawing()
    points = [(drawer.GetDrawCoords(i).x, drawer.GetDrawCoords(i).y) for i in range(mol.GetNumAtoms())]
    bonds = [(b.GetBeginAtomIdx(), b.GetEndAtomIdx()) for b in mol.GetBonds()]
    lengths = sorted(math.dist(points[i], points[j]) for i, j in bonds)
    bond_px = lengths[len(lengths) // 2] if lengths else BOND_PX  # as drawn (RDKit shrinks what does not fit)
    font_px = LABEL_FONT_PX * max(1.0, width / COLUMN_PX)
    spots = place_labels(points, bonds, [(m.atom, m.letter) for m in marks], (width, height), bond_px, font_px)
    return _Placed(drawer.GetDrawingText(), (width, height), points, tuple(spots), font_px, list(notes))


def structure_svg(canonical_smiles: str, marks: Sequence[SiteMark], *, title: str = "") -> str:
    """An inline SVG drawing of the molecule, each mark's carbon tinted by class and labelled (P1, P2 …).

    The letters match the products table, where the percentages are; each is
    placed clear of bonds, atoms and the other letters (:func:`place_labels`)
    and written as SVG text at a fixed size, the canvas growing with the molecule.
    ``canonical_smiles`` must be the engine's canonical SMILES: parsing it numbers
    the atoms in the same order as :attr:`SiteMark.atom`. Raises ValueError when
    it does not parse (it always should, coming from the engine).
    """
    drawn = _draw_and_place(canonical_smiles, marks, vector=True)
    points, spots, font_px, notes = drawn.points, drawn.spots, drawn.font_px, drawn.notes
    leaders = "".join(
        f'<line class="label-leader" x1="{points[m.atom][0]:.1f}" y1="{points[m.atom][1]:.1f}" '
        f'x2="{s.x:.1f}" y2="{s.y:.1f}" stroke="#777" stroke-width="0.8" stroke-dasharray="2 2"/>'
        for m, s in zip(marks, spots) if s.leader
    )
    texts = leaders + "".join(
        f'<text class="site-label" data-atom="{m.atom}" x="{s.x:.1f}" y="{s.y:.1f}" text-anchor="middle" '
        f'dominant-baseline="central" font-size="{font_px:.3g}" font-weight="bold" '
        f'font-family="DejaVu Sans, Helvetica, Arial, sans-serif" fill="#111" stroke="#fff" stroke-width="3" '
        f'paint-order="stroke">{escape(m.letter)}</text>'
        for m, s in zip(marks, spots)
    )
    svg = _PROLOG.sub("", str(drawn.drawing), count=1).strip()
    svg = svg.replace("</svg>", f"{texts}</svg>", 1) if texts else svg
    label = escape(title or f"structure of {canonical_smiles}", quote=True)
    # RDKit draws atom symbols as paths; a <desc> keeps the notes readable to screen readers and searches.
    desc = escape("; ".join(notes) if notes else "no abstractable C–H site", quote=False)
    svg = re.sub(r"(<svg\b[^>]*>)", lambda m: f"{m.group(1)}\n<desc>{desc}</desc>", svg, count=1)
    # Tag the root so CSS (and tests) can find structure drawings among the charts.
    return svg.replace("<svg ", f'<svg class="structure" role="img" aria-label="{label}" ', 1)


@dataclass(frozen=True)
class PngLayout:
    """The app's image drawing before its labels are written: the molecule, and where each label goes."""

    png: bytes
    """The molecule drawn with its sites tinted, no labels yet (PNG)."""
    size: tuple[int, int]
    """Width and height of the drawing, pixels."""
    spots: tuple[LabelSpot, ...]
    """Where each mark's label goes, in marks order (:func:`place_labels`), pixels."""
    anchors: tuple[tuple[float, float], ...]
    """Centre of each mark's carbon, in marks order, pixels (where a leader line starts)."""
    font_px: float
    """Label font size, pixels."""


def png_layout(canonical_smiles: str, marks: Sequence[SiteMark]) -> PngLayout:
    """The molecule as a PNG at the report's scale, with a spot for each mark's label clear of bonds and other labels.

    Placement is the report's (:func:`place_labels`), so labels never overlap
    each other; the labels are each mark's :attr:`SiteMark.letter` (the app
    passes its products table's names). Raises ValueError as :func:`structure_svg`.
    """
    drawn = _draw_and_place(canonical_smiles, marks, vector=False)
    return PngLayout(bytes(drawn.drawing), drawn.size, drawn.spots,
                     tuple(drawn.points[m.atom] for m in marks), drawn.font_px)


def _label_font(font_px: float):
    """A bold sans font at ``font_px`` (DejaVu Sans Bold, whose glyphs fit :func:`label_box`; else Pillow's own)."""
    from PIL import ImageFont

    try:
        return ImageFont.truetype("DejaVuSans-Bold.ttf", round(font_px))
    except OSError:
        return ImageFont.load_default(size=round(font_px))


def structure_png(canonical_smiles: str, marks: Sequence[SiteMark]) -> bytes:
    """The app's drawing as PNG bytes: :func:`png_layout` with each label written on its spot (for image terminals)."""
    from io import BytesIO

    from PIL import Image, ImageDraw

    layout = png_layout(canonical_smiles, marks)
    picture = Image.open(BytesIO(layout.png)).convert("RGB")
    pen = ImageDraw.Draw(picture)
    font = _label_font(layout.font_px)
    for spot, anchor in zip(layout.spots, layout.anchors):
        if spot.leader:
            pen.line([anchor, (spot.x, spot.y)], fill=(119, 119, 119), width=1)
    for spot in layout.spots:
        pen.text((spot.x, spot.y), spot.letter, font=font, anchor="mm", fill=(17, 17, 17),
                 stroke_width=2, stroke_fill=(255, 255, 255))
    out = BytesIO()
    picture.save(out, format="PNG")
    return out.getvalue()
