"""Server-rendered SVG charts: heat-loss share, annual cost, cumulative cash flow.

Accessible (role="img", <title>, <desc>), no script, escaped text, deterministic. Values are
labelled in text on the chart so nothing depends on colour alone.

Each chart comes in two layouts, both in the page: ``wide`` (640 units across, labels beside
the bars, names beside the lines) and ``narrow`` (360 across, labels above the bars, names in
a key below the lines), and static/app.css shows the narrow one on screens under 600 px. A
640-unit chart squeezed onto a phone showed its 13-unit text at about 6.6 px.
"""

from __future__ import annotations

from html import escape

from markupsafe import Markup

INK, MUTED, BAR, ALT, GRID = "#1b2730", "#4d5b66", "#245a63", "#b5651d", "#d5dadd"
SERIES = ["#245a63", "#b5651d", "#5a4a8a", "#2f7d3a", "#8a2f4a", "#3b6ea8", "#7a6a1f"]


def _money(value: float, symbol: str) -> str:
    return f"{'−' if value < 0 else ''}{symbol}{abs(value):,.0f}"


def _svg(width: int, height: int, title: str, desc: str, body: str, font: int = 13) -> str:
    return (
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {width} {height}" role="img" '
        f'font-family="system-ui, sans-serif" font-size="{font}">'
        f"<title>{escape(title)}</title><desc>{escape(desc)}</desc>{body}</svg>"
    )


def _text_room(chars: int, font: int, *, least: int) -> int:
    """Room (SVG units) right of the longest bar for a value label of ``chars`` characters at
    ``font``: 0.58 em a character (digits and lower case in a sans face are about 0.55 em; common
    practice, from memory) plus a 6-unit gap and 4 to spare, never less than ``least``."""
    return max(least, round(chars * font * 0.58) + 10)


def both_layouts(wide: str, narrow: str) -> Markup:
    """The two layouts of one chart; CSS shows one (``.chart-wide`` / ``.chart-narrow``)."""
    return Markup(f'<div class="chart-wide">{wide}</div><div class="chart-narrow">{narrow}</div>')


def bar_chart(
    rows: list[tuple[str, float, str]], *, title: str, unit: str = "", layout: str = "wide",
    label_width: int = 210,
) -> str:  # fmt: skip
    """Horizontal bars: (label, value, value text). ``layout="narrow"`` puts labels above;
    ``label_width`` (wide layout) is the room left of the bars for the labels."""
    top = max((v for _, v, _ in rows), default=0) or 1.0
    longest = max((len(text) for _, _, text in rows), default=0)
    desc = "; ".join(f"{label}: {text}" for label, _, text in rows)
    desc += f" ({unit})" if unit else ""
    parts = []
    if layout == "narrow":
        width, row_h = 360, 42
        span = width - _text_room(longest, 15, least=84)
        for i, (label, value, text) in enumerate(rows):
            y = 6 + i * row_h
            w = max(0.0, value) / top * span
            parts.append(
                f'<text x="0" y="{y + 15}" fill="{INK}">{escape(label[:44])}</text>'
                f'<rect x="0" y="{y + 21}" width="{w:.1f}" height="14" fill="{BAR}" rx="2"/>'
                f'<text x="{w + 6:.1f}" y="{y + 33}" fill="{INK}">{escape(text)}</text>'
            )
        return _svg(width, row_h * len(rows) + 8, title, desc, "".join(parts), font=15)
    width, row_h, label_w = 640, 30, label_width
    height = row_h * len(rows) + 20
    span = width - label_w - _text_room(longest, 13, least=110)
    for i, (label, value, text) in enumerate(rows):
        y = 10 + i * row_h
        w = max(0.0, value) / top * span
        parts.append(
            f'<text x="{label_w - 8}" y="{y + 19}" text-anchor="end" fill="{INK}">{escape(label[: label_w // 7 + 2])}</text>'
            f'<rect x="{label_w}" y="{y + 5}" width="{w:.1f}" height="{row_h - 10}" fill="{BAR}" rx="2"/>'
            f'<text x="{label_w + w + 6:.1f}" y="{y + 19}" fill="{INK}">{escape(text)}</text>'
        )
    return _svg(width, height, title, desc, "".join(parts))


def cash_flow_chart(
    series: list[tuple[str, list[float]]], *, title: str, money: str = "$", layout: str = "wide"
) -> str:
    """Cumulative discounted cash flow by year, one line per package; zero line marked.
    ``layout="narrow"`` names the lines in a key below the plot instead of beside it."""
    narrow = layout == "narrow"
    if narrow:
        width, height, left, right, top, bottom = 360, 230, 74, 12, 14, 40
    else:
        width, height, left, right, top, bottom = 640, 300, 70, 150, 20, 40
    values = [v for _, ys in series for v in ys] or [0.0]
    lo, hi = min(min(values), 0.0), max(max(values), 0.0)
    if hi == lo:
        hi = lo + 1
    years = max((len(ys) - 1 for _, ys in series), default=1) or 1

    def x(year: float) -> float:
        return left + year / years * (width - left - right)

    def y(value: float) -> float:
        return top + (hi - value) / (hi - lo) * (height - top - bottom)

    parts = [
        f'<line x1="{left}" y1="{y(0):.1f}" x2="{width - right}" y2="{y(0):.1f}" stroke="{INK}" stroke-width="1.5"/>',
        f'<text x="{left - 6}" y="{y(0) + 4:.1f}" text-anchor="end" fill="{INK}">0</text>',
        f'<text x="{left - 6}" y="{y(hi) + 4:.1f}" text-anchor="end" fill="{MUTED}">{_money(hi, money)}</text>',
        f'<text x="{left - 6}" y="{y(lo) + 4:.1f}" text-anchor="end" fill="{MUTED}">{_money(lo, money)}</text>',
        f'<text x="{(left + width - right) / 2:.0f}" y="{height - 8}" text-anchor="middle" fill="{MUTED}">years after the work</text>',
    ]
    for tick in range(0, years + 1, max(1, years // 5)):
        parts.append(
            f'<text x="{x(tick):.1f}" y="{height - bottom + 16}" text-anchor="middle" fill="{MUTED}">{tick}</text>'
        )
    desc = []
    for i, (label, ys) in enumerate(series):
        colour = SERIES[i % len(SERIES)]
        dash = "" if i % 2 == 0 else ' stroke-dasharray="6 4"'
        points = " ".join(f"{x(t):.1f},{y(v):.1f}" for t, v in enumerate(ys))
        parts.append(
            f'<polyline points="{points}" fill="none" stroke="{colour}" stroke-width="2.5"{dash}/>'
        )
        crossing = next((t for t, v in enumerate(ys) if v >= 0 and t > 0), None)
        if crossing is not None:
            parts.append(
                f'<circle cx="{x(crossing):.1f}" cy="{y(ys[crossing]):.1f}" r="4" fill="{colour}"/>'
            )
        end = ys[-1] if ys else 0.0
        if narrow:  # a key below the plot: a short line in the series' colour and dash
            ky = height + 10 + 22 * i
            parts.append(
                f'<line x1="0" y1="{ky - 5}" x2="28" y2="{ky - 5}" stroke="{colour}" '
                f'stroke-width="2.5"{dash}/><text x="36" y="{ky}" fill="{INK}">'
                f"{escape(label[:36])}: ends at {_money(end, money)}</text>"
            )
        else:
            parts.append(
                f'<text x="{width - right + 6}" y="{y(end) + 4 + 14 * (i % 2):.1f}" fill="{colour}">{escape(label[:20])}</text>'
            )
        desc.append(
            f"{label}: starts at {_money(ys[0], money)}, "
            + (
                f"turns positive in year {crossing}"
                if crossing is not None
                else "does not pay back in the period"
            )
            + f", ends at {_money(end, money)}"
        )
    if narrow:
        return _svg(width, height + 22 * len(series) + 4, title, "; ".join(desc),
                    "".join(parts), font=14)  # fmt: skip
    return _svg(width, height, title, "; ".join(desc), "".join(parts))
