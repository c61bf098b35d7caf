"""Small inline SVG charts (bars and histograms), drawn by hand: axes, ticks and labels in plain SVG."""

from __future__ import annotations

import math
from collections.abc import Sequence
from html import escape

#: Chart canvas, in SVG user units (scaled to the page width by CSS).
WIDTH = 400
HEIGHT = 260
#: Plot margins: left leaves room for tick labels, bottom for category labels and the axis title.
MARGIN_LEFT, MARGIN_RIGHT, MARGIN_TOP, MARGIN_BOTTOM = 52, 10, 36, 66
BAR_FILL = "#4f6d8f"
AXIS = "#333333"
GRID = "#d9d9d9"


def _text(value: object) -> str:
    return escape(str(value), quote=True)


def nice_ticks(top: float, most: int = 5) -> list[float]:
    """Tick values from 0 to at least ``top`` with a 1, 2 or 5 × 10^k step, at most ``most`` + 1 ticks."""
    if top <= 0:
        return [0.0, 1.0]
    raw = top / most
    power = 10 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1, 2, 5, 10) if m * power >= raw)
    step = max(step, 1.0)  # counts: no fractional ticks
    n = math.ceil(top / step)
    return [i * step for i in range(n + 1)]


def _tick_label(value: float) -> str:
    return f"{value:,.0f}"


def _open(title: str, width: int, height: int) -> list[str]:
    return [
        f'<svg class="chart" xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {width} {height}" '
        f'width="{width}" height="{height}" font-family="DejaVu Sans, Helvetica, Arial, sans-serif" role="img" aria-label="{_text(title)}">',
        f"<title>{_text(title)}</title>",
        f'<text x="{width / 2:.1f}" y="18" text-anchor="middle" font-size="15" font-weight="bold">{_text(title)}</text>',
    ]


def bar_chart(
    labels: Sequence[str], values: Sequence[int], *, title: str, x_label: str, y_label: str = "rows"
) -> str:
    """A vertical bar chart: one bar per label, its count written above it; y axis from 0 with gridlines."""
    parts = _open(title, WIDTH, HEIGHT)
    left, right = MARGIN_LEFT, WIDTH - MARGIN_RIGHT
    top, bottom = MARGIN_TOP, HEIGHT - MARGIN_BOTTOM
    ticks = nice_ticks(max(values, default=0))
    y_max = ticks[-1]

    def y_of(v: float) -> float:
        return bottom - (bottom - top) * (v / y_max)

    for t in ticks:
        y = y_of(t)
        parts.append(f'<line x1="{left}" y1="{y:.1f}" x2="{right}" y2="{y:.1f}" stroke="{GRID}" stroke-width="1"/>')
        parts.append(
            f'<text x="{left - 6}" y="{y + 4:.1f}" text-anchor="end" font-size="12">{_tick_label(t)}</text>'
        )
    n = max(len(labels), 1)
    slot = (right - left) / n
    bar_w = slot * 0.7
    # Long category names are turned so neighbours never overlap.
    turn = max((len(s) for s in labels), default=0) * 7 > slot
    for i, (label, value) in enumerate(zip(labels, values)):
        x = left + i * slot + (slot - bar_w) / 2
        y = y_of(value)
        parts.append(
            f'<rect x="{x:.1f}" y="{y:.1f}" width="{bar_w:.1f}" height="{bottom - y:.1f}" fill="{BAR_FILL}">'
            f"<title>{_text(label)}: {value:,}</title></rect>"
        )
        parts.append(
            f'<text x="{x + bar_w / 2:.1f}" y="{y - 4:.1f}" text-anchor="middle" font-size="12">{value:,}</text>'
        )
        cx = x + bar_w / 2
        if turn:
            parts.append(
                f'<text x="{cx:.1f}" y="{bottom + 12}" text-anchor="end" font-size="11" '
                f'transform="rotate(-35 {cx:.1f} {bottom + 12})">{_text(label)}</text>'
            )
        else:
            parts.append(f'<text x="{cx:.1f}" y="{bottom + 16}" text-anchor="middle" font-size="12">{_text(label)}</text>')
    parts.append(f'<line x1="{left}" y1="{bottom}" x2="{right}" y2="{bottom}" stroke="{AXIS}" stroke-width="1.2"/>')
    parts.append(f'<line x1="{left}" y1="{top}" x2="{left}" y2="{bottom}" stroke="{AXIS}" stroke-width="1.2"/>')
    parts.append(
        f'<text x="{(left + right) / 2:.1f}" y="{HEIGHT - 8}" text-anchor="middle" font-size="13">{_text(x_label)}</text>'
    )
    cy = (top + bottom) / 2
    parts.append(
        f'<text x="14" y="{cy:.1f}" text-anchor="middle" font-size="13" '
        f'transform="rotate(-90 14 {cy:.1f})">{_text(y_label)}</text>'
    )
    parts.append("</svg>")
    return "\n".join(parts)


def histogram(
    values: Sequence[float], *, title: str, x_label: str, lo: float = 0.0, hi: float = 100.0, bins: int = 10,
    y_label: str = "rows",
) -> str:
    """Counts of ``values`` in ``bins`` equal bins from lo to hi (the last bin includes hi), as a bar chart."""
    width = (hi - lo) / bins
    counts = [0] * bins
    for v in values:
        if v != v:  # NaN: no value to place
            continue
        i = min(int((v - lo) // width), bins - 1)
        counts[max(i, 0)] += 1
    labels = [f"{lo + i * width:g}–{lo + (i + 1) * width:g}" for i in range(bins)]
    return bar_chart(labels, counts, title=title, x_label=x_label, y_label=y_label)


def hbar_chart(labels: Sequence[str], values: Sequence[int], *, title: str, x_label: str = "rows") -> str:
    """A horizontal bar chart for long category names (e.g. rejection reasons), count at each bar's end."""
    row_h = 24
    label_w = 140
    height = MARGIN_TOP + row_h * max(len(labels), 1) + 44
    parts = _open(title, WIDTH, height)
    left, right = label_w, WIDTH - 40
    top, bottom = MARGIN_TOP, MARGIN_TOP + row_h * max(len(labels), 1)
    ticks = nice_ticks(max(values, default=0), most=4)
    x_max = ticks[-1]

    def x_of(v: float) -> float:
        return left + (right - left) * (v / x_max)

    for t in ticks:
        x = x_of(t)
        parts.append(f'<line x1="{x:.1f}" y1="{top}" x2="{x:.1f}" y2="{bottom}" stroke="{GRID}" stroke-width="1"/>')
        parts.append(f'<text x="{x:.1f}" y="{bottom + 14}" text-anchor="middle" font-size="12">{_tick_label(t)}</text>')
    for i, (label, value) in enumerate(zip(labels, values)):
        y = top + i * row_h + 4
        w = x_of(value) - left
        parts.append(
            f'<rect x="{left}" y="{y}" width="{w:.1f}" height="{row_h - 8}" fill="{BAR_FILL}">'
            f"<title>{_text(label)}: {value:,}</title></rect>"
        )
        shown = label if len(label) <= 20 else label[:19] + "…"
        parts.append(
            f'<text x="{left - 6}" y="{y + row_h / 2}" text-anchor="end" font-size="12">{_text(shown)}</text>'
        )
        parts.append(f'<text x="{left + w + 4:.1f}" y="{y + row_h / 2}" font-size="12">{value:,}</text>')
    parts.append(f'<line x1="{left}" y1="{top}" x2="{left}" y2="{bottom}" stroke="{AXIS}" stroke-width="1.2"/>')
    parts.append(f'<line x1="{left}" y1="{bottom}" x2="{right}" y2="{bottom}" stroke="{AXIS}" stroke-width="1.2"/>')
    parts.append(
        f'<text x="{(left + right) / 2:.1f}" y="{height - 8}" text-anchor="middle" font-size="13">{_text(x_label)}</text>'
    )
    parts.append("</svg>")
    return "\n".join(parts)
