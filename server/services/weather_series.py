"""What the weather-file readers make: the raw stamps and values of one file, then the series.

Each value is stored against the hour its interval *starts* (an hour-ending 24:00 value is
hour 23 of the same day), so grouping by date gives whole days.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from datetime import date, datetime


@dataclass(frozen=True, slots=True)
class WeatherSeries:
    """Outdoor dry-bulb values [°C], in the file's order (chronological unless a typical year).

    ``hours`` holds the hour (0..23) each value's interval starts, or is ``None`` for daily
    data.
    """

    kind: str  # "epw" | "tmy3" | "csv-hourly" | "csv-daily"
    dates: tuple[date, ...]
    hours: tuple[int, ...] | None
    temperatures_c: tuple[float, ...]
    warnings: tuple[str, ...] = ()
    station: str | None = None

    @property
    def is_hourly(self) -> bool:
        return self.hours is not None

    def timestamps(self) -> list[datetime]:
        """Start of each value's interval (local clock time, naive)."""
        if self.hours is None:
            return [datetime(d.year, d.month, d.day) for d in self.dates]
        return [
            datetime(d.year, d.month, d.day, h) for d, h in zip(self.dates, self.hours, strict=True)
        ]


@dataclass
class RawSeries:
    kind: str
    stamps: list[int]  # minutes since day 1 of year 1 (hourly) or date ordinals (daily)
    values: Sequence[float]  # °C, NaN = missing or unreadable
    hourly: bool
    notes: list[str] = field(default_factory=list)
    station: str | None = None
    skipped: int = 0  # rows that could not be read at all
    markers: int = 0  # values equal to the format's missing-value marker
    sub_hourly: bool = False  # some stamps fall between whole hours
