"""Daily mean dry-bulb temperatures of pvlib's bundled TMY3 files, and bills made on them.

pvlib ships real typical-year weather (``pvlib/data/723170TYA.CSV``, Greensboro NC; two header
lines, column ``Dry-bulb (C)``). Its stamps are hour-ending 01:00..24:00: the 24:00 value
belongs to the day it ends, so each stamp is moved back one hour before grouping by date
(grouped naively the year has 366 days).
"""

from __future__ import annotations

import functools
import pathlib
from datetime import date, timedelta

import numpy as np
import pandas as pd
import pvlib

DATA = pathlib.Path(pvlib.__file__).parent / "data"


@functools.cache
def daily_means_c(name: str = "723170TYA.CSV") -> tuple[float, ...]:
    """The 365 daily means [°C] of a bundled TMY3 file, 1 January to 31 December."""
    raw = pd.read_csv(DATA / name, skiprows=1)
    hour_ending = raw["Time (HH:MM)"].str.slice(0, 2).astype(int)
    start = pd.to_datetime(raw["Date (MM/DD/YYYY)"], format="%m/%d/%Y") + pd.to_timedelta(
        hour_ending - 1, unit="h"
    )
    means = raw["Dry-bulb (C)"].groupby(start.dt.date).mean()
    assert len(means) == 365
    return tuple(float(v) for v in means)


def to_f(values_c: tuple[float, ...] | list[float]) -> list[float]:
    """°C -> °F (exact: °F = 1.8 °C + 32)."""
    return [1.8 * v + 32.0 for v in values_c]


def synthetic_bills(
    temps: list[float],
    first: date,
    *,
    alpha: float,
    beta: float,
    base: float,
    noise: float = 0.0,
    seed: int = 0,
    lengths: tuple[int, int] = (28, 34),
    gamma: float = 0.0,
    cooling_base: float = 0.0,
) -> list[dict]:
    """Meter-read periods on ``temps`` (daily means from ``first``, any one unit).

    use = n α + β Σ max(0, base − T) + γ Σ max(0, T − cooling_base), times (1 + ε) with ε
    normal of standard deviation ``noise`` (numpy's seeded generator); period lengths drawn
    from ``lengths`` (inclusive low, exclusive high).
    """
    rng = np.random.default_rng(seed)
    temps_a = np.asarray(temps, dtype=float)
    out, start = [], 0
    while True:
        days = int(rng.integers(*lengths))
        if start + days > len(temps_a):
            return out
        chunk = temps_a[start : start + days]
        use = (
            alpha * days
            + beta * float(np.maximum(base - chunk, 0.0).sum())
            + gamma * float(np.maximum(chunk - cooling_base, 0.0).sum())
        )
        use *= 1.0 + float(rng.normal(0.0, noise)) if noise else 1.0
        out.append(
            {
                "start": (first + timedelta(days=start)).isoformat(),
                "end": (first + timedelta(days=start + days)).isoformat(),
                "use": use,
            }
        )
        start += days
