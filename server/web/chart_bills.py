"""Modelled vs bills: each meter-read period's use from the bills (bars) and from the as-found
model at the same weather (a line), in fuel units per day so periods of 28 and 34 days
compare (SVG, no script; the figures from :mod:`server.services.bill_comparison`)."""

from __future__ import annotations

from datetime import date
from html import escape

from server.services.bill_comparison import PeriodUse
from server.web.charts import ALT, BAR, INK, MUTED, _svg

MONTHS = "Jan Feb Mar Apr May Jun Jul Aug Sep Oct Nov Dec".split()


def _label(period: PeriodUse) -> str:
    middle = period.start.toordinal() + period.days // 2
    when = date.fromordinal(middle)
    return MONTHS[when.month - 1] + (f" {when.year % 100:02d}" if when.month == 1 else "")


def bills_chart(periods: list[PeriodUse], *, unit: str, title: str, layout: str = "wide") -> str:
    """Bars: the bills' use per day of each period (hatched when estimated); line and dots:
    the model's use per day at that period's weather."""
    narrow = layout == "narrow"
    if narrow:
        width, height, left, right, top, bottom = 360, 250, 46, 8, 34, 40
    else:
        width, height, left, right, top, bottom = 640, 280, 58, 16, 34, 40
    bills = [p.bills / p.days for p in periods]
    model = [p.model / p.days for p in periods]
    hi = max([*bills, *model, 0.0]) * 1.08 or 1.0
    n = max(len(periods), 1)
    step = (width - left - right) / n

    def y(value: float) -> float:
        return top + (hi - value) / hi * (height - top - bottom)

    parts = [
        f'<line x1="{left}" y1="{y(0):.1f}" x2="{width - right}" y2="{y(0):.1f}" stroke="{INK}"/>',
        f'<text x="{left - 4}" y="{y(0) + 4:.1f}" text-anchor="end" fill="{MUTED}">0</text>',
        f'<text x="{left - 4}" y="{y(hi) + 10:.1f}" text-anchor="end" fill="{MUTED}">'
        f"{hi:,.1f}</text>",
        f'<text x="{left}" y="14" fill="{MUTED}">{escape(unit)} per day</text>',
        f'<rect x="{width - right - 190}" y="4" width="14" height="12" fill="{BAR}"/>'
        f'<text x="{width - right - 172}" y="15" fill="{INK}">bills</text>'
        f'<line x1="{width - right - 120}" y1="10" x2="{width - right - 96}" y2="10" '
        f'stroke="{ALT}" stroke-width="3"/><circle cx="{width - right - 108}" cy="10" r="4" '
        f'fill="{ALT}"/><text x="{width - right - 90}" y="15" fill="{INK}">model</text>',
    ]
    every = max(1, round(n / (6 if narrow else 12)))
    points = []
    for i, period in enumerate(periods):
        cx = left + step * (i + 0.5)
        bar_w = max(step * 0.62, 2)
        fill = "#8fb3b8" if period.estimated else BAR
        parts.append(
            f'<rect class="bill-bar" x="{cx - bar_w / 2:.1f}" y="{y(bills[i]):.1f}" '
            f'width="{bar_w:.1f}" height="{y(0) - y(bills[i]):.1f}" fill="{fill}">'
            f"<title>{period.start:%Y-%m-%d} to {period.end:%Y-%m-%d}: bills "
            f"{period.bills:,.0f}, model {period.model:,.0f} {escape(unit)}"
            f"{' (estimated read)' if period.estimated else ''}</title></rect>"
        )
        points.append(f"{cx:.1f},{y(model[i]):.1f}")
        if i % every == 0:
            parts.append(
                f'<text x="{cx:.1f}" y="{height - bottom + 16}" text-anchor="middle" '
                f'fill="{MUTED}">{escape(_label(period))}</text>'
            )
    parts.append(
        f'<polyline class="model-line" points="{" ".join(points)}" fill="none" stroke="{ALT}" '
        'stroke-width="2.5"/>'
    )
    parts.extend(
        f'<circle cx="{pt.split(",")[0]}" cy="{pt.split(",")[1]}" r="3" fill="{ALT}"/>'
        for pt in points
    )
    total_bills = sum(p.bills for p in periods)
    total_model = sum(p.model for p in periods)
    desc = (
        f"{len(periods)} meter-read periods: the bills used {total_bills:,.0f} {unit} in all, "
        f"the model {total_model:,.0f} {unit} at the same weather"
    )
    return _svg(width, height, title, desc, "".join(parts), font=14 if narrow else 13)
