"""Structure drawings in the site detail, where the terminal can show images.

Terminals that speak an inline-image protocol (Sixel, or the Kitty graphics
protocol) get the RDKit drawing; every other terminal (and --no-images /
HALOSIFT_IMAGES=off) gets a text drawing in braille dots
(:mod:`halosift.tui.text_structure`). Both label the sites P1, P2 … exactly as
the products table names them (:func:`product_label`). Detection has to happen
before Textual takes over the terminal, so :func:`detect_graphics` is called
from :func:`halosift.tui.app.run`.
"""

from __future__ import annotations

import os
import sys
from collections.abc import Mapping
from dataclasses import dataclass
from io import BytesIO
from typing import TYPE_CHECKING

import pandas as pd
from rich.text import Text
from textual.geometry import Size
from textual.widget import Widget
from textual.widgets import Static

if TYPE_CHECKING:
    from halosift.engine.depiction import Depiction
    from halosift.tui.text_structure import TextDrawing

#: Set to "off" to never draw, or "unicode" to force a coarse character drawing
#: (useful on terminals that misreport their abilities, and in tests).
IMAGES_ENV = "HALOSIFT_IMAGES"
MODES = ("sixel", "tgp", "unicode")

NO_IMAGES_NOTE = (
    "Structure drawing: this terminal shows no inline images (Sixel or Kitty graphics); "
    "`halosift report` draws every structure."
)


def detect_graphics(enabled: bool = True) -> str | None:
    """'sixel' or 'tgp' when the terminal can show images, 'unicode' when forced, else None."""
    wish = os.environ.get(IMAGES_ENV, "").strip().lower()
    if not enabled or wish in ("off", "0", "no", "none"):
        return None
    if wish == "unicode":
        return "unicode"
    stdout = sys.__stdout__
    if stdout is None or not stdout.isatty():
        return None
    try:
        # Importing the renderables queries the terminal; it must happen before Textual starts.
        from textual_image import renderable
    except Exception:  # noqa: BLE001 - no image support is a normal outcome, never an error
        return None
    if renderable.Image is renderable.SixelImage:
        mode = "sixel"
    elif renderable.Image is renderable.TGPImage:
        mode = "tgp"
    else:
        return None
    import textual_image.widget  # noqa: F401  (measures the cell size now, while the terminal still answers)

    return mode


def product_label(position: int) -> str:
    """The app's name for the product in row ``position`` (1-based) of a products table: P1, P2 …

    The one place the name is made: the products table, the bars, the text
    drawing and the image drawing all use it, so they always agree.
    """
    return f"P{position}"


def site_labels(products: pd.DataFrame) -> dict[int, str]:
    """Label of each product's carbon, exactly as the detail's products table names the product (P1, P2 …)."""
    return {int(p.atom): product_label(i) for i, p in enumerate(products.itertuples(index=False), start=1)}


def marks_for(products: pd.DataFrame):
    """Site marks for the image drawing: one per product row, labelled as the products table (:func:`product_label`)."""
    from halosift.report.drawing import SiteMark

    return [
        SiteMark(int(p.atom), product_label(i), str(p.site), float(p.cl2_pct), float(p.br2_pct))
        for i, p in enumerate(products.itertuples(index=False), start=1)
    ]


@dataclass(frozen=True)
class TextPicture:
    """What the text drawing needs, worked out off the interface thread (drawn for the width it gets)."""

    depiction: Depiction
    """The 2D layout of the canonical SMILES (engine.depiction.depict)."""
    labels: Mapping[int, str]
    """Site label per atom index (:func:`site_labels`)."""


def text_picture(canonical_smiles: str, products: pd.DataFrame) -> TextPicture | str:
    """The layout for the text drawing, or a one-line note if it cannot be made (never raises)."""
    if not canonical_smiles:
        return NO_IMAGES_NOTE
    try:
        from halosift.engine.depiction import depict

        return TextPicture(depict(canonical_smiles), site_labels(products))
    except Exception as exc:  # noqa: BLE001 - a drawing failure must never take the detail view down
        return f"Structure drawing unavailable: {type(exc).__name__}"


def structure_picture(graphics: str | None, canonical_smiles: str, products: pd.DataFrame) -> object | str:
    """The labelled drawing as a PIL image, the text drawing's layout, or a note (safe off the interface thread)."""
    if graphics is None or not canonical_smiles:
        return text_picture(canonical_smiles, products)
    try:
        from halosift.engine import quiet_rdkit
        from PIL import Image as PILImage

        from halosift.report.drawing import structure_png

        with quiet_rdkit():
            png = structure_png(canonical_smiles, marks_for(products))
        picture = PILImage.open(BytesIO(png))
        picture.load()  # decode now, in the caller's thread
        return picture
    except Exception as exc:  # noqa: BLE001 - a drawing failure must never take the detail view down
        return f"Structure drawing unavailable: {type(exc).__name__}"


def picture_widget(graphics: str | None, picture: object | str) -> Widget:
    """The widget for a :func:`structure_picture` result (cheap: the drawing is already made)."""
    if isinstance(picture, TextPicture):
        return TextStructure(picture)
    if isinstance(picture, str) or graphics is None:
        return Static(picture if isinstance(picture, str) else NO_IMAGES_NOTE, classes="structure-note")
    try:
        from textual_image import widget as image_widgets

        widget_class = {
            "sixel": image_widgets.SixelImage,
            "tgp": image_widgets.TGPImage,
            "unicode": image_widgets.UnicodeImage,
        }[graphics]
        return widget_class(picture, classes="structure-image")
    except Exception as exc:  # noqa: BLE001 - as above
        return Static(f"Structure drawing unavailable: {type(exc).__name__}", classes="structure-note")


#: Caption above the text drawing.
TEXT_CAPTION = "Structure (sites P1 … as in the table; `halosift report` draws it in full)"
#: Rows the text drawing may use at most, and the rows of the screen it leaves to the rest of the detail.
MAX_DRAWING_ROWS = 16
SCREEN_ROWS_KEPT = 12
MIN_DRAWING_ROWS = 6
#: Style of each kind of span of a text drawing (swapped foreground and background read without colour too).
SPAN_STYLES = {"label": "bold reverse", "atom": "bold"}


class TextStructure(Widget):
    """The structure drawn in braille dots, sized to the width it is given and to the screen's height."""

    DEFAULT_CSS = """
    TextStructure {
        height: auto;
        padding: 1 0 0 0;
    }
    """

    def __init__(self, picture: TextPicture) -> None:
        super().__init__(classes="structure-text")
        self.picture = picture
        """The layout and labels drawn."""
        self._drawn: dict[tuple[int, int], TextDrawing | str] = {}

    def _rows(self) -> int:
        screen_rows = self.app.size.height if self.is_attached else 24
        return max(MIN_DRAWING_ROWS, min(MAX_DRAWING_ROWS, screen_rows - SCREEN_ROWS_KEPT))

    def drawing(self, width: int) -> TextDrawing | str:
        """The drawing for ``width`` cells (cached per size), or a one-line note if it cannot be drawn."""
        key = (max(1, width), self._rows())
        if key not in self._drawn:
            from halosift.tui.text_structure import draw_structure

            try:
                self._drawn[key] = draw_structure(self.picture.depiction, self.picture.labels, *key)
            except Exception as exc:  # noqa: BLE001 - as above
                self._drawn[key] = f"Structure drawing unavailable: {type(exc).__name__}"
        return self._drawn[key]

    def get_content_height(self, container: Size, viewport: Size, width: int) -> int:
        drawing = self.drawing(width)
        return 1 + (len(drawing.lines) if not isinstance(drawing, str) else 1)

    def render(self) -> Text:
        drawing = self.drawing(self.content_region.width)
        text = Text(no_wrap=True, overflow="ellipsis")
        text.append(TEXT_CAPTION, style="bold")
        if isinstance(drawing, str):
            text.append("\n" + drawing)
            return text
        for i, line in enumerate(drawing.lines):
            row = Text(line)
            for span in drawing.spans:
                if span.line == i:
                    row.stylize(SPAN_STYLES.get(span.kind, ""), span.start, span.end)
            text.append("\n")
            text.append_text(row)
        return text


def structure_widget(graphics: str | None, canonical_smiles: str, products: pd.DataFrame) -> Widget:
    """An image widget of the labelled drawing, or the text note when images are off or unavailable."""
    return picture_widget(graphics, structure_picture(graphics, canonical_smiles, products))
