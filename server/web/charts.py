"""Server-rendered SVG charts: heat-loss share, annual cost, cumulative cash flow.

Accessible (role="img", <title>, <desc>), no script, escaped text, deterministic. Values are
labelled in text on the chart so nothing depends on colour alone.
"""

from __future__ import annotations

from html import escape

INK, MUTED, BAR, ALT, GRID = "#1b2730", "#4d5b66", "#245a63", "#b5651d", "#d5dadd"
SERIES = ["#245a63", "#b5651d", "#5a4a8a", "#2f7d3a", "#8a2f4a", "#3b6ea8", "#7a6a1f"]


def _money(value: float, symbol: str) -> str:
    return f"{'−' if value < 0 else ''}{symbol}{abs(value):,.0f}"


def _svg(width: int, height: int, title: str, desc: str, body: str) -> str:
    return (
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {width} {height}" role="img" '
        f'aria-labelledby="t d" font-family="system-ui, sans-serif" font-size="13">'
        f"<title>{escape(title)}</title><desc>{escape(desc)}</desc>{body}</svg>"
    )


def bar_chart(rows: list[tuple[str, float, str]], *, title: str, unit: str = "") -> str:
    """Horizontal bars: (label, value, value text)."""
    width, row_h, label_w = 640, 30, 210
    height = row_h * len(rows) + 20
    top = max((v for _, v, _ in rows), default=0) or 1.0
    parts = []
    for i, (label, value, text) in enumerate(rows):
        y = 10 + i * row_h
        w = max(0.0, value) / top * (width - label_w - 110)
        parts.append(
            f'<text x="{label_w - 8}" y="{y + 19}" text-anchor="end" fill="{INK}">{escape(label[:32])}</text>'
            f'<rect x="{label_w}" y="{y + 5}" width="{w:.1f}" height="{row_h - 10}" fill="{BAR}" rx="2"/>'
            f'<text x="{label_w + w + 6:.1f}" y="{y + 19}" fill="{INK}">{escape(text)}</text>'
        )
    desc = "; ".join(f"{label}: {text}" for label, _, text in rows)
    return _svg(width, height, title, desc + (f" ({unit})" if unit else ""), "".join(parts))


def cash_flow_chart(series: list[tuple[str, list[float]]], *, title: str, money: str = "$") -> str:
    """Cumulative discounted cash flow by year, one line per package; zero line marked."""
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
        parts.append(
            f'<text x="{width - right + 6}" y="{y(end) + 4 + 14 * (i % 2):.1f}" fill="{colour}">{escape(label[:18])}</text>'
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
    return _svg(width, height, title, "; ".join(desc), "".join(parts))
