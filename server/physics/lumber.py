"""Actual sizes of dimension lumber and typical framing fractions (common practice).

Dressed (surfaced, dry) softwood lumber is smaller than its nominal name: a 2x4 is
1-1/2 x 3-1/2 in. Houses framed before about the 1950s often used rough-sawn lumber whose actual
size is close to the nominal one. Sources: American Softwood Lumber Standard PS 20 (dressed
sizes, from memory); framing fractions are common practice (about 25 % for 2x4 walls at 16 in
on centre, 22 % at 24 in; 10–15 % for ceiling joists, from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

from server.physics.units import INCH_M

#: nominal depth [in] -> dressed actual depth [in] (PS 20, from memory)
_DRESSED_DEPTH_IN = {2: 1.5, 3: 2.5, 4: 3.5, 6: 5.5, 8: 7.25, 10: 9.25, 12: 11.25}
_DRESSED_WIDTH_IN = {1: 0.75, 2: 1.5, 3: 2.5, 4: 3.5}


@dataclass(frozen=True, slots=True)
class Lumber:
    """A piece of dimension lumber: actual width and depth [m]."""

    label: str
    width_m: float
    depth_m: float
    rough_sawn: bool


def lumber_size(label: str) -> Lumber:
    """Actual size of nominal lumber such as ``"2x4"``, ``"2x6"`` or ``"2x4 rough"``.

    Parameters
    ----------
    label : str
        ``"<width>x<depth>"`` in nominal inches, optionally followed by ``rough`` for full-size
        rough-sawn lumber (older houses).

    Returns
    -------
    Lumber
        Actual width and depth [m].

    Examples
    --------
    >>> round(lumber_size("2x4").depth_m / INCH_M, 3)
    3.5
    >>> round(lumber_size("2x6").depth_m / INCH_M, 3)
    5.5
    >>> round(lumber_size("2x4 rough").depth_m / INCH_M, 3)
    4.0
    """
    text = label.strip().lower().replace("×", "x")
    rough = text.endswith("rough")
    text = text.removesuffix("rough").strip().rstrip("-").strip()
    try:
        width_s, depth_s = text.split("x")
        width, depth = int(width_s), int(depth_s)
    except ValueError:
        raise ValueError(f"'{label}' is not a lumber size like 2x4 or 2x6") from None
    if width <= 0 or depth <= 0:
        raise ValueError(f"'{label}' has a zero size; write it like 2x4 or 2x6")
    if rough:
        return Lumber(label, width * INCH_M, depth * INCH_M, True)
    if width not in _DRESSED_WIDTH_IN or depth not in _DRESSED_DEPTH_IN:
        raise ValueError(f"no dressed size known for {width}x{depth}")
    return Lumber(
        label, _DRESSED_WIDTH_IN[width] * INCH_M, _DRESSED_DEPTH_IN[depth] * INCH_M, False
    )


def framing_fraction(width_m: float, spacing_m: float, extra_fraction: float = 0.0) -> float:
    """Share of the area taken by framing members [-].

    fraction = member width / spacing + extra, where ``extra`` accounts for plates, headers,
    blocking and corners (common practice: about 0.16 for a 2x4 wall at 16 in on centre, which
    gives the usual 25 %).

    Examples
    --------
    >>> round(framing_fraction(1.5 * INCH_M, 16 * INCH_M, 0.156), 3)
    0.25
    """
    if width_m <= 0 or spacing_m <= width_m:
        raise ValueError("framing spacing must be greater than the member width")
    fraction = width_m / spacing_m + extra_fraction
    if not 0 <= fraction < 1:
        raise ValueError("framing fraction must be between 0 and 1")
    return fraction


#: typical framing fractions (common practice, from memory) by use and spacing in inches
TYPICAL_FRAMING_FRACTION = {
    ("wall", 16): 0.25,
    ("wall", 24): 0.22,
    ("ceiling", 16): 0.14,
    ("ceiling", 24): 0.10,
    ("floor", 16): 0.13,
    ("floor", 24): 0.10,
}
