"""The cost/benefit frontier: net cost across, the objective up; one dot per frontier set,
the saved packages and the best set marked, the budget drawn (SVG, no script).

Each frontier dot is a ``<circle class="frontier-point">`` with its own ``<title>`` (its
upgrades and figures), so the chart reads without colour and a test can count the points.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from html import escape

from server.web.charts import ALT, BAR, INK, MUTED, _svg


@dataclass(frozen=True, slots=True)
class Mark:
    """A point on the chart: net cost, objective value, words."""

    label: str
    net_cost: float
    value: float
    words: str


def frontier_chart(
    points: list[Mark],
    *,
    saved: list[Mark],
    best: Mark | None,
    budget: float | None,
    title: str,
    value_axis: str,
    value_text: Callable[[float], str],
    money_text: Callable[[float], str],
    layout: str = "wide",
) -> str:
    """The frontier as a step line through its dots, saved packages as diamonds numbered in a
    key, the best set ringed and the budget as a dashed line."""
    narrow = layout == "narrow"
    if narrow:
        width, height, left, right, top, bottom = 360, 260, 64, 14, 16, 46
    else:
        width, height, left, right, top, bottom = 640, 320, 84, 24, 20, 48
    xs = [m.net_cost for m in [*points, *saved]] + ([budget] if budget is not None else [])
    ys = [m.value for m in [*points, *saved]]
    x_lo, x_hi = min([0.0, *xs]), max([0.0, *xs]) or 1.0
    y_lo, y_hi = min([0.0, *ys]), max([0.0, *ys]) or 1.0
    x_hi, y_hi = x_hi + (x_hi - x_lo) * 0.04, y_hi + (y_hi - y_lo) * 0.06

    def x(value: float) -> float:
        return left + (value - x_lo) / (x_hi - x_lo) * (width - left - right)

    def y(value: float) -> float:
        return top + (y_hi - value) / (y_hi - y_lo) * (height - top - bottom)

    parts = [
        f'<line x1="{left}" y1="{y(0):.1f}" x2="{width - right}" y2="{y(0):.1f}" stroke="{INK}"/>',
        f'<line x1="{x(0):.1f}" y1="{top}" x2="{x(0):.1f}" y2="{height - bottom}" stroke="{INK}"/>',
        f'<text x="{left - 6}" y="{y(0) + 4:.1f}" text-anchor="end" fill="{INK}">0</text>',
        f'<text x="{left - 6}" y="{y(y_hi) + 10:.1f}" text-anchor="end" fill="{MUTED}">'
        f"{escape(value_text(y_hi))}</text>",
        f'<text x="{x(0):.1f}" y="{height - bottom + 18}" text-anchor="middle" fill="{MUTED}">'
        f"{escape(money_text(0))}</text>",
        f'<text x="{width - right}" y="{height - bottom + 18}" text-anchor="end" fill="{MUTED}">'
        f"{escape(money_text(x_hi))}</text>",
        f'<text x="{(left + width - right) / 2:.0f}" y="{height - 8}" text-anchor="middle" '
        f'fill="{MUTED}">net cost after rebates</text>',
        f'<text x="{left + 6}" y="{top + 4}" fill="{MUTED}">↑ {escape(value_axis)}</text>',
    ]
    if budget is not None:
        parts.append(
            f'<line class="budget" x1="{x(budget):.1f}" y1="{top}" x2="{x(budget):.1f}" '
            f'y2="{height - bottom}" stroke="{ALT}" stroke-width="2" stroke-dasharray="6 4"/>'
            f'<text x="{x(budget) - 4:.1f}" y="{height - bottom - 6}" text-anchor="end" '
            f'fill="{ALT}">budget</text>'
        )
    ordered = sorted(points, key=lambda m: m.net_cost)
    if ordered:  # the best one can do for each budget: a step up at each frontier set
        path = [f"{x(ordered[0].net_cost):.1f},{y(ordered[0].value):.1f}"]
        for before, after in zip(ordered, ordered[1:], strict=False):
            path.append(f"{x(after.net_cost):.1f},{y(before.value):.1f}")
            path.append(f"{x(after.net_cost):.1f},{y(after.value):.1f}")
        path.append(f"{x(x_hi):.1f},{y(ordered[-1].value):.1f}")
        parts.append(
            f'<polyline points="{" ".join(path)}" fill="none" stroke="{BAR}" stroke-width="2"/>'
        )
    for mark in points:
        parts.append(
            f'<circle class="frontier-point" cx="{x(mark.net_cost):.1f}" cy="{y(mark.value):.1f}" '
            f'r="{4 if narrow else 4.5}" fill="{BAR}"><title>{escape(mark.words)}</title></circle>'
        )
    if best is not None:
        bx, by = x(best.net_cost), y(best.value)
        parts.append(
            f'<circle class="best" cx="{bx:.1f}" cy="{by:.1f}" r="10" fill="none" '
            f'stroke="{ALT}" stroke-width="3"><title>{escape(best.words)}</title></circle>'
            f'<text x="{bx - 14:.1f}" y="{by - 14:.1f}" text-anchor="end" fill="{ALT}" '
            f'font-weight="600">best</text>'
        )
    for number, mark in enumerate(saved, start=1):
        cx, cy = x(mark.net_cost), y(mark.value)
        parts.append(
            f'<g class="saved-package"><title>{escape(mark.words)}</title>'
            f'<rect x="{cx - 6:.1f}" y="{cy - 6:.1f}" width="12" height="12" fill="#fff" '
            f'stroke="{INK}" stroke-width="2" transform="rotate(45 {cx:.1f} {cy:.1f})"/>'
            f'<text x="{cx + 10:.1f}" y="{cy + 18:.1f}" fill="{INK}" font-weight="600">'
            f"{number}</text></g>"
        )
    key = [f"{n}: {m.label}" for n, m in enumerate(saved, start=1)]
    key_h = 22
    for i, line in enumerate(["● frontier set  ◯ best  ◇ saved package", *key]):
        parts.append(
            f'<text x="{4 if narrow else left}" y="{height + 12 + key_h * i}" fill="{INK}">'
            f"{escape(line[: 44 if narrow else 80])}</text>"
        )
    desc = "; ".join(m.words for m in points)
    if saved:
        desc += "; saved packages: " + "; ".join(m.words for m in saved)
    return _svg(width, height + 20 + key_h * (len(key) + 1), title, desc, "".join(parts),
                font=14 if narrow else 13)  # fmt: skip
