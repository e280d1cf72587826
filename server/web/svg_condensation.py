"""Inline SVG of a Glaser condensation check: temperature and dew point through the layers.

Left is outside, right is the room. Each layer is a shaded band whose width is its physical
thickness when every layer has one (layers thinner than a few pixels are widened so they stay
visible), otherwise its thermal resistance; the axis label says which. The solid line is the
temperature; the dashed line is the dew point the vapour would have if none condensed, so
where the dashed line rises above the solid one the straight vapour line is above saturation.
Flagged planes carry a cross and condensation planes a numbered diamond, each explained in
text under the chart (never colour alone). No script, no external fonts, all text escaped,
same input -> same output.
"""

from __future__ import annotations

import math
import re
import textwrap
from html import escape

from server.physics.condensation import CondensationResult, Plane
from server.physics.units import UnitSystem, temp_from_c
from server.services.condensation_words import summary_words

WIDTH = 640
LEFT, RIGHT, TOP = 56.0, 20.0, 34.0
PLOT_HEIGHT = 200.0
MIN_BAND_PX = 6.0
LINE_HEIGHT = 18.0
# Our own calm palette: warm greys for layers, deep blue and rust for the two lines.
BAND_FILLS = ("#ece8e1", "#dcd6cc")
BAND_STROKE = "#8c857b"
TEMPERATURE_COLOUR = "#1d3557"
DEW_POINT_COLOUR = "#9a3412"
INK = "#222222"
LEGEND_CHARS = 88
_ID = re.compile(r"^[A-Za-z][A-Za-z0-9_-]{0,40}$")


def _band_widths(result: CondensationResult, plot_width: float) -> tuple[list[float], bool]:
    sizes = [layer.thickness_m for layer in result.layers]
    by_thickness = all(size is not None for size in sizes)
    raw = (
        [float(size or 0.0) for size in sizes]
        if by_thickness
        else [layer.thermal_resistance_m2k_w for layer in result.layers]
    )
    if sum(raw) <= 0.0:
        raw = [1.0] * len(raw)
    widths = [plot_width * size / sum(raw) for size in raw]
    for _ in range(3):  # widen thin layers, shrink the rest to keep the total
        thin = [w <= MIN_BAND_PX for w in widths]
        spare = plot_width - MIN_BAND_PX * sum(thin)
        thick_total = sum(r for r, t in zip(raw, thin, strict=True) if not t)
        if spare <= 0.0 or thick_total <= 0.0:
            widths = [plot_width / len(raw)] * len(raw)
            break
        widths = [
            MIN_BAND_PX if t else spare * r / thick_total for r, t in zip(raw, thin, strict=True)
        ]
    return widths, by_thickness


def _plane_x(
    result: CondensationResult, plane: Plane, starts: list[float], widths: list[float]
) -> float:
    k = plane.layer_index
    if plane.kind == "outside surface":
        return starts[0]
    r_start = result.outside_surface_resistance_m2k_w + sum(
        layer.thermal_resistance_m2k_w for layer in result.layers[:k]
    )
    r_layer = result.layers[k].thermal_resistance_m2k_w
    share = 1.0 if r_layer <= 0.0 else (plane.cumulative_r_m2k_w - r_start) / r_layer
    return starts[k] + min(1.0, max(0.0, share)) * widths[k]


def _step(span: float) -> float:
    for step in (1.0, 2.0, 5.0, 10.0, 20.0, 25.0, 50.0):
        if span / step <= 8.0:
            return step
    return 100.0


def _num(value: float) -> str:
    return f"{value:.1f}"


def condensation_svg(
    result: CondensationResult, *, units: UnitSystem = "si", id_prefix: str = "condensation"
) -> str:
    """Render ``result`` as an accessible inline SVG string.

    Parameters
    ----------
    result : CondensationResult
        From ``server.physics.condensation.glaser_check``.
    units : {"si", "ip"}
        Temperatures in °C or °F.
    id_prefix : str
        Prefix for the element ids (title, description), unique per page.
    """
    if units not in ("si", "ip"):
        raise ValueError("units must be 'si' or 'ip'")
    if not _ID.match(id_prefix):
        raise ValueError("id_prefix must start with a letter and use letters, digits, - or _")
    degree = "°C" if units == "si" else "°F"
    plot_width = WIDTH - LEFT - RIGHT
    widths, by_thickness = _band_widths(result, plot_width)
    starts = [LEFT + sum(widths[:k]) for k in range(len(widths))]
    planes = result.planes
    xs = [_plane_x(result, plane, starts, widths) for plane in planes]
    temps = [temp_from_c(plane.temperature_c, units) for plane in planes]
    dews = [None if p.dew_point_c is None else temp_from_c(p.dew_point_c, units) for p in planes]
    values = temps + [d for d in dews if d is not None]
    step = _step(max(values) - min(values) or 1.0)
    low, high = math.floor(min(values) / step) * step, math.ceil(max(values) / step) * step
    if high <= low:
        high = low + step

    def y_of(value: float) -> float:
        return TOP + PLOT_HEIGHT * (high - value) / (high - low)

    marks = [(n, found) for n, found in enumerate(result.condensation_planes, start=1)]
    flagged = [p for p in planes if p.flagged]
    notes = [f"× dew point above temperature at {len(flagged)} plane(s)"] if flagged else []
    for n, found in marks:
        notes.append(
            f"◆{n} water would condense at the {found.label} "
            f"({temp_from_c(found.temperature_c, units):.1f}\u00a0{degree})"
        )
    wrapped = [line for note in notes for line in textwrap.wrap(note, LEGEND_CHARS)]
    legend_lines = 2 + len(wrapped)
    height = TOP + PLOT_HEIGHT + 40.0 + LINE_HEIGHT * legend_lines + 8.0
    title = "Temperature and dew point through the assembly"
    desc = " ".join(summary_words(result, units=units))
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {WIDTH} {_num(height)}" '
        f'width="{WIDTH}" height="{_num(height)}" role="img" '
        f'aria-labelledby="{id_prefix}-title {id_prefix}-desc" '
        f'font-family="system-ui, sans-serif" font-size="12" fill="{INK}">',
        f'<title id="{id_prefix}-title">{escape(title)}</title>',
        f'<desc id="{id_prefix}-desc">{escape(desc)}</desc>',
        f'<rect x="0" y="0" width="{WIDTH}" height="{_num(height)}" fill="#ffffff"/>',
    ]
    for k, layer in enumerate(result.layers):
        name = layer.name.strip() or f"layer {k + 1}"
        out.append(
            f'<rect x="{_num(starts[k])}" y="{_num(TOP)}" width="{_num(widths[k])}" '
            f'height="{_num(PLOT_HEIGHT)}" fill="{BAND_FILLS[k % 2]}" stroke="{BAND_STROKE}" '
            f'stroke-width="0.5"><title>{escape(name)}</title></rect>'
        )
        if widths[k] >= 14.0:
            cx, cy = starts[k] + widths[k] / 2.0 + 4.0, TOP + PLOT_HEIGHT - 6.0
            short = name if len(name) <= 28 else name[:27] + "…"
            out.append(
                f'<text x="{_num(cx)}" y="{_num(cy)}" transform="rotate(-90 {_num(cx)} '
                f'{_num(cy)})" font-size="11" paint-order="stroke" stroke="#ffffff" '
                f'stroke-width="3">{escape(short)}</text>'
            )
    value = low
    while value <= high + 1e-9:
        y = y_of(value)
        out.append(
            f'<line x1="{_num(LEFT - 4)}" y1="{_num(y)}" x2="{_num(LEFT)}" y2="{_num(y)}" '
            f'stroke="{INK}"/><text x="{_num(LEFT - 7)}" y="{_num(y + 4)}" '
            f'text-anchor="end">{value:g}</text>'
        )
        value += step
    if low < 0.0 < high and units == "si" or low < 32.0 < high and units == "ip":
        y = y_of(0.0 if units == "si" else 32.0)
        out.append(
            f'<line x1="{_num(LEFT)}" y1="{_num(y)}" x2="{_num(LEFT + plot_width)}" '
            f'y2="{_num(y)}" stroke="{BAND_STROKE}" stroke-dasharray="2 3"/>'
        )
    out.append(f'<text x="8" y="{_num(TOP - 12)}">{escape(degree)}</text>')
    temp_points = " ".join(f"{_num(x)},{_num(y_of(t))}" for x, t in zip(xs, temps, strict=True))
    out.append(
        f'<polyline points="{temp_points}" fill="none" stroke="{TEMPERATURE_COLOUR}" '
        'stroke-width="2.5"/>'
    )
    runs: list[list[str]] = [[]]
    for x, dew in zip(xs, dews, strict=True):
        if dew is None:
            runs.append([])
        else:
            runs[-1].append(f"{_num(x)},{_num(y_of(dew))}")
    for run in runs:
        if len(run) >= 2:
            out.append(
                f'<polyline points="{" ".join(run)}" fill="none" stroke="{DEW_POINT_COLOUR}" '
                'stroke-width="2" stroke-dasharray="6 4"/>'
            )
    for plane in flagged:
        x, y = xs[plane.index], y_of(temps[plane.index])
        out.append(
            f'<path d="M{_num(x - 4)},{_num(y - 4)} L{_num(x + 4)},{_num(y + 4)} '
            f'M{_num(x - 4)},{_num(y + 4)} L{_num(x + 4)},{_num(y - 4)}" stroke="{INK}" '
            'stroke-width="1.5"/>'
        )
    for n, found in marks:
        x, y = xs[found.plane_index], y_of(temps[found.plane_index])
        out.append(
            f'<path d="M{_num(x)},{_num(y - 8)} L{_num(x + 7)},{_num(y)} L{_num(x)},{_num(y + 8)} '
            f'L{_num(x - 7)},{_num(y)} Z" fill="{INK}"/>'
            f'<text x="{_num(x)}" y="{_num(y - 12)}" text-anchor="middle" '
            f'font-weight="bold">{n}</text>'
        )
    base = TOP + PLOT_HEIGHT
    scale = "to thickness scale (thin layers widened)" if by_thickness else "by thermal resistance"
    out.append(
        f'<text x="{_num(LEFT)}" y="{_num(base + 16)}">outside</text>'
        f'<text x="{_num(LEFT + plot_width)}" y="{_num(base + 16)}" text-anchor="end">'
        f"inside</text>"
        f'<text x="{_num(LEFT + plot_width / 2)}" y="{_num(base + 16)}" text-anchor="middle">'
        f"{escape('Position through the assembly, ' + scale)}</text>"
    )
    y = base + 40.0
    out.append(
        f'<line x1="{_num(LEFT)}" y1="{_num(y - 4)}" x2="{_num(LEFT + 28)}" y2="{_num(y - 4)}" '
        f'stroke="{TEMPERATURE_COLOUR}" stroke-width="2.5"/>'
        f'<text x="{_num(LEFT + 34)}" y="{_num(y)}">{escape(f"temperature ({degree})")}</text>'
    )
    y += LINE_HEIGHT
    out.append(
        f'<line x1="{_num(LEFT)}" y1="{_num(y - 4)}" x2="{_num(LEFT + 28)}" y2="{_num(y - 4)}" '
        f'stroke="{DEW_POINT_COLOUR}" stroke-width="2" stroke-dasharray="6 4"/>'
        f'<text x="{_num(LEFT + 34)}" y="{_num(y)}">'
        f"{escape('dew point if no water condensed (dashed)')}</text>"
    )
    for line in wrapped:
        y += LINE_HEIGHT
        out.append(f'<text x="{_num(LEFT)}" y="{_num(y)}">{escape(line)}</text>')
    out.append("</svg>")
    return "\n".join(out)
