"""The heating load as a function of UA: linear pieces and their convexity (proof, 3 and 4).

The numbered references are those of :mod:`.optimize` (its docstring holds the proof).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from server.physics import house_model as model


@dataclass(frozen=True, slots=True)
class Piece:
    """L / 86 400 = slope · UA + offset [W/K · K·day] for UA in [start, end] [W/K]."""

    start: float
    end: float
    slope: float
    offset: float


def load_pieces(climate: model.Climate, ua_low: float, ua_high: float) -> list[Piece]:
    """The heating load L(UA)/86 400 as linear pieces covering [ua_low, ua_high] (proof, 4).

    Fixed base: one piece, slope HDD. Variable base with gains G > 0: breakpoints
    UA_i = G / (T_set − b_i) for the table bases below the setpoint; slope h_i + s_i (T_set −
    b_i) and offset −s_i G on table segment i; slope h_0 (or h_n) where the balance point is
    clamped to the table's lowest (highest) base.
    """
    vb = climate.variable_base
    if vb is None:
        return [Piece(ua_low, ua_high, climate.hdd_k_day, 0.0)]
    bases, hdd = vb.bases_c, vb.hdd_k_day
    setpoint, gains = vb.setpoint_c, vb.internal_gains_w
    if gains == 0:
        base = min(max(setpoint, bases[0]), bases[-1])
        value = float(np.interp(base, np.array(bases), np.array(hdd)))
        return [Piece(ua_low, ua_high, value, 0.0)]
    pieces: list[Piece] = []

    def at(base: float) -> float:  # UA at which the balance point is ``base``
        return gains / (setpoint - base) if base < setpoint else math.inf

    pieces.append(Piece(0.0, at(bases[0]), hdd[0], 0.0))
    for i in range(len(bases) - 1):
        slope_t = (hdd[i + 1] - hdd[i]) / (bases[i + 1] - bases[i])
        pieces.append(
            Piece(
                at(bases[i]),
                at(bases[i + 1]),
                hdd[i] + slope_t * (setpoint - bases[i]),
                -slope_t * gains,
            )
        )
    pieces.append(Piece(at(bases[-1]), math.inf, hdd[-1], 0.0))
    kept = [
        Piece(max(p.start, ua_low), min(p.end, ua_high), p.slope, p.offset)
        for p in pieces
        if p.start < p.end and p.end >= ua_low and p.start <= ua_high
    ]
    # pieces of zero length at a shared breakpoint add nothing
    useful = [p for p in kept if p.end > p.start]
    return useful or kept[:1]


def convex_on_range(pieces: list[Piece]) -> bool:
    """Are the pieces' slopes nondecreasing in UA (L convex on their interval; proof, 3)?"""
    slopes = [p.slope for p in pieces]
    scale = max((abs(s) for s in slopes), default=1.0) or 1.0
    return all(b >= a - 1e-12 * scale for a, b in zip(slopes, slopes[1:], strict=False))
