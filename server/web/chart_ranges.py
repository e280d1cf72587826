"""Range bars: each package's first-year savings from P10 to P90 with the P50 marked, and the
chance it pays back within the analysis years (SVG, no script; see :mod:`server.web.charts`)."""

from __future__ import annotations

from dataclasses import dataclass
from html import escape

from server.web.charts import BAR, GRID, INK, MUTED, _money, _svg


@dataclass(frozen=True, slots=True)
class RangeRow:
    """One package's range of first-year savings (money a year) and its chance to pay back."""

    label: str
    p10: float
    p50: float
    p90: float
    pays_back: float


def range_words(row: RangeRow, money: str = "$") -> str:
    """What one bar says, in words (also the chart's description)."""
    return (
        f"{row.label}: 8 in 10 chance of {_money(row.p10, money)} to {_money(row.p90, money)} "
        f"a year, middle {_money(row.p50, money)}; {row.pays_back:.0%} chance it pays back"
    )


def range_chart(
    rows: list[RangeRow], *, title: str, years: int, money: str = "$", layout: str = "wide"
) -> str:
    """One bar per row on a common axis from 0 (or the lowest P10) to the highest P90."""
    narrow = layout == "narrow"
    width, left, right = (360, 6, 12) if narrow else (640, 200, 24)
    row_h = 80 if narrow else 50
    lo = min([0.0, *(r.p10 for r in rows)])
    hi = max([0.0, *(r.p90 for r in rows)]) or 1.0

    def x(value: float) -> float:
        return left + (value - lo) / (hi - lo) * (width - left - right)

    parts = []
    for i, row in enumerate(rows):
        y = 8 + i * row_h
        bar_y = y + (22 if narrow else 6)
        if narrow:
            parts.append(
                f'<text x="{left}" y="{y + 14}" fill="{INK}">{escape(row.label[:40])}</text>'
            )
        else:
            parts.append(
                f'<text x="{left - 10}" y="{bar_y + 13}" text-anchor="end" fill="{INK}">'
                f"{escape(row.label[:28])}</text>"
            )
        parts.append(
            f'<line x1="{x(lo):.1f}" y1="{bar_y + 9}" x2="{x(hi):.1f}" y2="{bar_y + 9}" '
            f'stroke="{GRID}" stroke-width="2"/>'
            f'<rect class="range-bar" x="{x(row.p10):.1f}" y="{bar_y}" '
            f'width="{max(x(row.p90) - x(row.p10), 2):.1f}" height="18" fill="{BAR}" rx="3"/>'
            f'<rect class="range-mid" x="{x(row.p50) - 2:.1f}" y="{bar_y - 4}" width="4" '
            f'height="26" fill="{INK}"/>'
        )
        spread = (
            f"{escape(_money(row.p10, money))}–{escape(_money(row.p90, money))}, middle "
            f"{escape(_money(row.p50, money))}"
        )
        payback = f"pays back in {years} yr: {row.pays_back:.0%}"
        if narrow:  # two lines from the left edge: one line ran past the right edge at 360
            parts.append(
                f'<text x="{left}" y="{bar_y + 36}" fill="{MUTED}" font-size="13">{spread}'
                f'<tspan x="{left}" dy="16">{payback}</tspan></text>'
            )
        else:
            parts.append(
                f'<text x="{left}" y="{bar_y + 36}" fill="{MUTED}" font-size="12">'
                f"{spread} · {payback}</text>"
            )
    desc = "; ".join(range_words(r, money) for r in rows)
    return _svg(width, 12 + row_h * len(rows), title, desc, "".join(parts),
                font=15 if narrow else 13)  # fmt: skip
