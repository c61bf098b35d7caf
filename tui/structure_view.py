"""Structure drawings in the site detail, where the terminal can show images.

Terminals that speak an inline-image protocol (Sixel, or the Kitty graphics
protocol) get the RDKit drawing with every site labelled by its predicted
split; every other terminal gets a one-line text note instead. Detection has
to happen before Textual takes over the terminal, so :func:`detect_graphics`
is called from :func:`halosift.tui.app.run`.
"""

from __future__ import annotations

import os
import sys
from io import BytesIO

import pandas as pd
from textual.widget import Widget
from textual.widgets import Static

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


def marks_for(products: pd.DataFrame):
    """Site marks (a, b, c …) for the abstractable products of one substrate, as in the report."""
    from halosift.report.drawing import SiteMark

    shown = products[(products["cl2_pct"] > 0) | (products["br2_pct"] > 0)]
    letters = "abcdefghijklmnopqrstuvwxyz"
    return [
        SiteMark(int(p.atom), letters[i % 26] + ("" if i < 26 else str(i // 26)), str(p.site), float(p.cl2_pct), float(p.br2_pct))
        for i, p in enumerate(shown.itertuples(index=False))
    ]


def structure_picture(graphics: str | None, canonical_smiles: str, products: pd.DataFrame) -> object | str:
    """The labelled drawing as a PIL image, or the note to show instead (safe to call off the interface thread)."""
    if graphics is None or not canonical_smiles:
        return NO_IMAGES_NOTE
    try:
        from PIL import Image as PILImage

        from halosift.report.drawing import structure_png

        from halosift.engine import quiet_rdkit

        with quiet_rdkit():
            png = structure_png(canonical_smiles, marks_for(products))
        picture = PILImage.open(BytesIO(png))
        picture.load()  # decode now, in the caller's thread
        return picture
    except Exception as exc:  # noqa: BLE001 - a drawing failure must never take the detail view down
        return f"Structure drawing unavailable: {type(exc).__name__}"


def picture_widget(graphics: str | None, picture: object | str) -> Widget:
    """The widget for a :func:`structure_picture` result (cheap: the drawing is already made)."""
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


def structure_widget(graphics: str | None, canonical_smiles: str, products: pd.DataFrame) -> Widget:
    """An image widget of the labelled drawing, or the text note when images are off or unavailable."""
    return picture_widget(graphics, structure_picture(graphics, canonical_smiles, products))
