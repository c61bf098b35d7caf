"""The name of a product by its row in a products table: P1, P2 … (the report and the app use the same)."""

from __future__ import annotations


def product_label(position: int) -> str:
    """Label of the product in row ``position`` (1-based) of a products table: P1, P2 …

    The report's drawing and products table use it; the app's detail (tui.structure_view.product_label)
    makes the same names, and tests/test_report.py checks that the two agree.
    """
    if position < 1:
        raise ValueError(f"product rows are numbered from 1, not {position}")
    return f"P{position}"
