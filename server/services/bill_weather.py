"""Weather for the bills' dates, and the typical year the bills are normalised to.

Three ways to give the weather of the billing months (the bills fit needs one):

* a daily or hourly CSV upload, for example a weather service's daily station export: a date
  column and a daily mean column, or daily maximum and minimum columns, whose mean
  (max + min) / 2 is then used (:attr:`BillWeather.basis` says which); hourly values are
  averaged by day;
* an EPW (or TMY3) file of the actual year (not a typical year: its months come from other
  years);

  both read by the bounded reader of :mod:`server.services.weather_files` (one year of hourly
  rows a file at most; give several files for several years: :func:`weather_from_files`);

* degree-days typed per period at a stated base (:func:`degree_days_weather`): each period's
  ``hdd`` with the bills' ``degree_day_base``. The base then cannot be searched: the fit takes
  it as given (:func:`server.physics.bills.fit_degree_days`).

The typical year for normalising is the house's weather file: :func:`normal_daily_means`
gives its 365 daily means (1 January to 31 December; 29 February left out), and
:func:`climate_normals` the part of the house's stored ``climate.weather`` that keeps them
(``normal_daily_means_c``), read back by :func:`house_normal_daily_means`.

Every function returns values for a page: per-period coverage with a message, warnings in
plain words; an unreadable file raises :class:`server.errors.InputError` (HTTP 422).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from datetime import date, timedelta
from typing import Any, BinaryIO, Literal

from server.errors import InputError
from server.physics import bill_model
from server.physics import degree_days as dd
from server.physics.units import UnitSystem, temp_from_c, temp_to_c
from server.services.number_text import NumberTextError, read_decimal
from server.services.weather_files import parse_weather_file
from server.services.weather_series import WeatherSeries

WeatherSource = Literal["daily_csv", "hourly_csv", "epw", "tmy3", "degree_days"]
#: A day of hourly data with fewer values than this is left out as missing (common practice:
#: a mean of less than half the day's hours is biased toward the hours it has).
MIN_HOURS_PER_DAY = 12
#: Digits kept for stored normal daily means [°C] (0.01 K is far below any weather file's
#: resolution of 0.1 K).
NORMAL_DIGITS = 2
_MAX_MIN_NOTE = "no mean temperature column"  # the weather reader's note for (max + min) / 2
_SYMBOL = {"ip": "°F", "si": "°C"}


@dataclass(frozen=True, slots=True)
class PeriodCoverage:
    """Whether the weather covers one billing period (for the page's row)."""

    index: int
    start: date
    end: date
    missing_days: int
    first_missing: date | None
    message: str

    @property
    def covered(self) -> bool:
        return self.missing_days == 0


@dataclass(frozen=True, slots=True)
class BillWeather:
    """Daily mean temperatures [°C] from ``start``, consecutive (None = no value that day).

    ``source`` is the kind of input, ``basis`` how each daily mean was made, in words;
    ``files`` the file names read. For typed degree-days (``source="degree_days"``) there
    are no temperatures, only ``degree_day_base`` (in ``units``).
    """

    source: WeatherSource
    basis: str
    start: date | None
    daily_mean_c: tuple[float | None, ...]
    warnings: tuple[str, ...] = ()
    files: tuple[str, ...] = ()
    degree_day_base: float | None = None
    units: UnitSystem | None = None

    @property
    def end(self) -> date | None:
        """The day after the last one with a value."""
        if self.start is None or not self.daily_mean_c:
            return None
        return self.start + timedelta(days=len(self.daily_mean_c))

    @property
    def description(self) -> str:
        """Where the temperatures came from, in words (kept with the bills as their source)."""
        if self.source == "degree_days":
            return self.basis
        names = ", ".join(self.files) if self.files else "an upload"
        kind = {
            "daily_csv": "daily CSV",
            "hourly_csv": "hourly CSV",
            "epw": "EPW file",
            "tmy3": "TMY3 file",
        }[self.source]
        return f"{kind} {names}: {self.basis}"[:300]

    def daily_temperatures(
        self, units: UnitSystem, periods: Sequence[dict[str, Any]] | None = None
    ) -> dict[str, Any] | None:
        """The bills document's ``daily_temperatures`` in ``units``.

        With ``periods`` (the bills' periods, ISO dates) only the span from their first start
        to their last end is given; the days outside the data are ``None``.
        """
        if self.source == "degree_days" or self.start is None:
            return None
        first, values = self.start, list(self.daily_mean_c)
        if periods:
            lo = min(date.fromisoformat(str(p["start"])) for p in periods)
            hi = max(date.fromisoformat(str(p["end"])) for p in periods)
            first = lo
            values = [self.value_on(lo + timedelta(days=k)) for k in range((hi - lo).days)]
        return {
            "start": first.isoformat(),
            "values": [None if v is None else round(temp_from_c(v, units), 4) for v in values],
            "source": self.description,
        }

    def value_on(self, day: date) -> float | None:
        """The daily mean of ``day`` [°C], or None."""
        if self.start is None:
            return None
        at = (day - self.start).days
        return self.daily_mean_c[at] if 0 <= at < len(self.daily_mean_c) else None

    def coverage(self, periods: Sequence[dict[str, Any]]) -> list[PeriodCoverage]:
        """For each period (ISO ``start``/``end``), the days the weather has no value for."""
        out = []
        for index, period in enumerate(periods):
            start = date.fromisoformat(str(period["start"]))
            end = date.fromisoformat(str(period["end"]))
            if self.source == "degree_days":
                given = period.get("hdd") is not None
                out.append(
                    PeriodCoverage(
                        index,
                        start,
                        end,
                        0 if given else (end - start).days,
                        None if given else start,
                        "" if given else "type this period's heating degree-days",
                    )
                )
                continue
            missing = [
                start + timedelta(days=k)
                for k in range((end - start).days)
                if self.value_on(start + timedelta(days=k)) is None
            ]
            message = ""
            if missing:
                message = (
                    f"no temperature for {len(missing)} of its {(end - start).days} days (the "
                    f"first {missing[0].isoformat()}): add weather covering these dates"
                )
            out.append(
                PeriodCoverage(
                    index, start, end, len(missing), missing[0] if missing else None, message
                )
            )
        return out


def _source(series: WeatherSeries) -> WeatherSource:
    return {"epw": "epw", "tmy3": "tmy3", "csv-hourly": "hourly_csv"}.get(series.kind, "daily_csv")  # type: ignore[return-value]


def _basis(series: WeatherSeries) -> str:
    if series.is_hourly:
        return "each day's mean of its hourly dry-bulb values"
    if any(note.startswith(_MAX_MIN_NOTE) for note in series.warnings):
        return "(max + min) / 2 of each day's maximum and minimum (no mean column)"
    return "the file's daily mean temperature column"


def _mixes_years(days: Sequence[date]) -> bool:
    """A typical-year file: a change of year that is not 31 December to 1 January."""
    return any(
        a.year != b.year and not (a.month == 12 and b.month == 1)
        for a, b in zip(days, days[1:], strict=False)
    )


def _means(series: WeatherSeries, name: str) -> tuple[dict[date, float], list[str]]:
    notes = []
    try:
        days = dd.daily_means(series.dates, series.temperatures_c)
    except ValueError as exc:
        raise InputError("file", f"{name}: {exc}") from None
    keep = {d.day: d.mean_c for d in days if not series.is_hourly or d.values >= MIN_HOURS_PER_DAY}
    short = len(days) - len(keep)
    if short:
        notes.append(
            f"{name}: {short} days have fewer than {MIN_HOURS_PER_DAY} hourly values and were "
            "left out"
        )
    return keep, notes


def weather_from_files(
    files: Iterable[tuple[str, bytes | BinaryIO]],
    *,
    units: UnitSystem,
    temperature_column: str | None = None,
    temperature_unit: str | None = None,
) -> BillWeather:
    """Daily means of the billing months from one or more weather files (CSV, EPW, TMY3).

    Parameters
    ----------
    files : iterable of (name, data)
        Each file's name (for messages) and bytes or seekable binary file, read by
        :func:`server.services.weather_files.parse_weather_file` (bounded: a year of hourly
        rows per file).
    units : {"ip", "si"}
        The house's units: a CSV column that names no unit is read in °F for ``ip``, °C for
        ``si`` (a warning says so).
    temperature_column, temperature_unit : str, optional
        As for the weather reader (plain CSV only).

    Raises
    ------
    InputError
        ``field="file"``: an unreadable file, or a typical-year file (its months come from
        different years, so it is not the weather of the bills' dates). A day given by two
        files keeps the first file's value (a warning says how many).
    """
    merged: dict[date, float] = {}
    notes: list[str] = []
    names: list[str] = []
    sources: set[WeatherSource] = set()
    bases: list[str] = []
    for name, data in files:
        label = (name or "the file")[:80]
        try:
            series = parse_weather_file(
                data,
                temperature_column=temperature_column,
                temperature_unit=temperature_unit,
                default_unit="F" if units == "ip" else "C",
            )
        except InputError as exc:
            raise InputError(exc.field, f"{label}: {exc.message}") from None
        ordered_days = list(dict.fromkeys(series.dates))
        if _mixes_years(ordered_days):
            raise InputError(
                "file",
                f"{label} is a typical-year file (its months come from different years): the "
                "bills need the weather of their own dates; use it as the house's weather file "
                "(the normal year) instead",
            )
        means, more = _means(series, label)
        notes.extend(more)
        notes.extend(f"{label}: {note}" for note in series.warnings)
        repeated = sum(1 for day in means if day in merged)
        if repeated:
            notes.append(
                f"{label}: {repeated} days were already given by another file; those were kept"
            )
        for day, value in means.items():
            merged.setdefault(day, value)
        names.append(label)
        sources.add(_source(series))
        bases.append(_basis(series))
    if not merged:
        raise InputError("file", "upload a weather file: a daily or hourly CSV, or an EPW file")
    first, last = min(merged), max(merged)
    values = tuple(merged.get(first + timedelta(days=k)) for k in range((last - first).days + 1))
    source = sources.pop() if len(sources) == 1 else "daily_csv"
    basis = bases[0] if len(set(bases)) == 1 else "; ".join(dict.fromkeys(bases))
    return BillWeather(
        source=source,
        basis=basis,
        start=first,
        daily_mean_c=values,
        warnings=tuple(notes),
        files=tuple(names),
        units=units,
    )


def read_degree_day_base(text: object, *, units: UnitSystem) -> float:
    """The base typed degree-days were counted at, in ``units`` (40–75 °F, 4.4–23.9 °C).

    Raises
    ------
    InputError
        ``field="degree_day_base"``: not a number, or outside the bills fit's range.
    """
    try:
        value = read_decimal(text, decimal_comma=units == "si")
    except NumberTextError as exc:
        raise InputError("degree_day_base", str(exc)) from None
    low, high = bill_model.HEATING_BASE_RANGE_C
    if not low - 1e-9 <= temp_to_c(value, units) <= high + 1e-9:
        raise InputError(
            "degree_day_base",
            f"must be between {temp_from_c(low, units):.1f} and {temp_from_c(high, units):.1f} "
            f"{_SYMBOL[units]}",
        )
    return value


def degree_days_weather(base: object, *, units: UnitSystem) -> BillWeather:
    """Weather given as each period's typed heating degree-days at ``base`` (in ``units``).

    The bills' periods then carry ``hdd`` and the bills ``degree_day_base``; the fit takes
    the base as given (it cannot search one).
    """
    value = read_degree_day_base(base, units=units)
    symbol = _SYMBOL[units]
    return BillWeather(
        source="degree_days",
        basis=f"heating degree-days typed per period at a base of {value:g} {symbol}",
        start=None,
        daily_mean_c=(),
        warnings=(
            f"with typed degree-days the base is fixed at {value:g} {symbol}: the fit cannot "
            "search the house's own balance point",
        ),
        degree_day_base=value,
        units=units,
    )


def normal_daily_means(
    data: bytes | BinaryIO,
    *,
    temperature_column: str | None = None,
    temperature_unit: str | None = None,
    default_unit: str = "C",
) -> tuple[float, ...]:
    """The 365 normal daily means [°C] of a house's weather file, 1 January to 31 December.

    A typical-year file (EPW, TMY3) gives each calendar day once; a file of several actual
    years gives each calendar day's mean over the years (a normal of those years). 29 February
    is left out, so the year has 365 days as the bills fit's normalisation expects [1 of
    :mod:`server.physics.bills`].

    Raises
    ------
    InputError
        ``field="file"``: unreadable, or a calendar day without any value.
    """
    series = parse_weather_file(
        data,
        temperature_column=temperature_column,
        temperature_unit=temperature_unit,
        default_unit=default_unit,
    )
    means, _notes = _means(series, "the weather file")
    by_day: dict[tuple[int, int], list[float]] = {}
    for day, value in means.items():
        if (day.month, day.day) != (2, 29):
            by_day.setdefault((day.month, day.day), []).append(value)
    calendar = [date(2001, 1, 1) + timedelta(days=k) for k in range(365)]
    missing = [d for d in calendar if (d.month, d.day) not in by_day]
    if missing:
        raise InputError(
            "file",
            f"the weather file has no values for {len(missing)} days of the year (the first "
            f"{missing[0].strftime('%B %d').replace(' 0', ' ')}); the normal year needs all 365",
        )
    return tuple(
        math.fsum(by_day[(d.month, d.day)]) / len(by_day[(d.month, d.day)]) for d in calendar
    )


def climate_normals(normal_c: Sequence[float]) -> dict[str, list[float]]:
    """The part of a house's stored ``climate.weather`` that keeps its normal year [°C]."""
    if len(normal_c) != 365 or not all(math.isfinite(v) for v in normal_c):
        raise InputError("file", "the normal year needs 365 finite daily means")
    return {"normal_daily_means_c": [round(float(v), NORMAL_DIGITS) for v in normal_c]}


def house_normal_daily_means(climate: dict[str, Any] | None) -> tuple[float, ...] | None:
    """The house's normal daily means [°C] kept with its weather file, or None."""
    stored = ((climate or {}).get("weather") or {}).get("normal_daily_means_c")
    if not isinstance(stored, list) or len(stored) != 365:
        return None
    try:
        values = tuple(float(v) for v in stored)
    except (TypeError, ValueError):
        return None
    return values if all(math.isfinite(v) for v in values) else None


def normal_temperatures(normal_c: Sequence[float], units: UnitSystem) -> dict[str, list[float]]:
    """The bills document's ``normal_temperatures`` in ``units``."""
    return {"values": [round(temp_from_c(v, units), 4) for v in normal_c]}
