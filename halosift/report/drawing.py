"""2D structure drawings (RDKit SVG) with each abstractable site marked and labelled with its predicted share."""

from __future__ import annotations

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

#: Drawing size in pixels (CSS may scale it down for print).
WIDTH = 340
HEIGHT = 250


@dataclass(frozen=True)
class SiteMark:
    """One distinct abstractable site as it is marked on the drawing."""

    atom: int
    """Representative carbon: index in the canonical-SMILES atom order."""
    letter: str
    """Short tag shared by the drawing and the products table (a, b, c, …)."""
    site: str
    """Site class, e.g. secondary or benzylic-primary."""
    cl2_pct: float
    """Predicted share of this monochloride under Cl2, percent."""
    br2_pct: float
    """Predicted share of this monobromide under Br2, percent."""


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
    """The note written beside a site's carbon, e.g. 'a: Cl 45 / Br 3'."""
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


def _draw(drawer, mol, colours) -> None:
    from rdkit.Chem.Draw import rdMolDraw2D

    options = drawer.drawOptions()
    options.annotationFontScale = 0.7
    options.clearBackground = True
    options.padding = 0.12  # room for notes on atoms at the edge
    rdMolDraw2D.PrepareAndDrawMolecule(
        drawer, mol, highlightAtoms=list(colours), highlightAtomColors=colours, highlightBonds=[],
    )
    drawer.FinishDrawing()


def structure_svg(canonical_smiles: str, marks: Sequence[SiteMark], *, title: str = "") -> str:
    """An inline SVG drawing of the molecule, each mark's carbon tinted by class and noted 'a: Cl 45 / Br 3'.

    ``canonical_smiles`` must be the engine's canonical SMILES: parsing it numbers
    the atoms in the same order as :attr:`SiteMark.atom`. Raises ValueError when
    it does not parse (it always should, coming from the engine).
    """
    from rdkit.Chem.Draw import rdMolDraw2D

    mol, colours, notes = _drawable(canonical_smiles, marks)
    drawer = rdMolDraw2D.MolDraw2DSVG(WIDTH, HEIGHT)
    _draw(drawer, mol, colours)
    svg = _PROLOG.sub("", drawer.GetDrawingText(), count=1).strip()
    label = escape(title or f"structure of {canonical_smiles}", quote=True)
    # RDKit draws letters as paths; a <desc> keeps the notes readable to screen readers and searches.
    desc = escape("; ".join(notes) if notes else "no abstractable C–H site", quote=False)
    svg = re.sub(r"(<svg\b[^>]*>)", lambda m: f"{m.group(1)}\n<desc>{desc}</desc>", svg, count=1)
    # Tag the root so CSS (and tests) can find structure drawings among the charts.
    return svg.replace("<svg ", f'<svg class="structure" role="img" aria-label="{label}" ', 1)


def structure_png(canonical_smiles: str, marks: Sequence[SiteMark], *, width: int = WIDTH, height: int = HEIGHT) -> bytes:
    """The same drawing as :func:`structure_svg`, as PNG bytes (for terminals that show images)."""
    from rdkit.Chem.Draw import rdMolDraw2D

    mol, colours, _ = _drawable(canonical_smiles, marks)
    drawer = rdMolDraw2D.MolDraw2DCairo(width, height)
    _draw(drawer, mol, colours)
    return drawer.GetDrawingText()
