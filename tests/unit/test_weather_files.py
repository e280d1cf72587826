"""Weather-file parsing (server.services.weather_files): kinds, hour-ending stamps, warnings.

Files here are generated in the test with known values, so each expectation is worked by hand.
EPW layout (8 header lines; fields 1-4 year, month, day, hour 1..24 hour-ending; field 7
dry-bulb °C; 99.9 missing) and TMY3 layout (two header lines; 'Date (MM/DD/YYYY)',
'Time (HH:MM)', 'Dry-bulb (C)'; 01:00..24:00 hour-ending; -9900 missing) follow the formats'
published descriptions (EPW format documentation, weather data; TMY3 users' manual).
"""

from __future__ import annotations

import gzip
import io
import time
import zipfile
from datetime import date, datetime, timedelta

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from server.errors import InputError
from server.services.weather_files import parse_weather_file

EPW_HEADER = [
    "LOCATION,Testville,ST,USA,generated,000000,40.00,-80.00,-5.0,300.0",
    "DESIGN CONDITIONS,0",
    "TYPICAL/EXTREME PERIODS,0",
    "GROUND TEMPERATURES,0",
    "HOLIDAYS/DAYLIGHT SAVINGS,No,0,0,0",
    "COMMENTS 1,generated for a test",
    "COMMENTS 2,",
    "DATA PERIODS,1,1,Data,Sunday, 1/ 1,12/31",
]
EPW_TAIL = "0.0,50,101325,0,0,300,0,0,0,0,0,0,0,180,2.0,5,5,16.1,77777,9,999999999,0,0.0,0,88,0,0,0"


def epw_bytes(temps: list[float], start: datetime = datetime(2001, 1, 1)) -> bytes:
    """EPW rows for consecutive hours from ``start``: hour field = clock hour + 1."""
    rows = []
    for i, temp in enumerate(temps):
        t = start + timedelta(hours=i)
        rows.append(f"{t.year},{t.month},{t.day},{t.hour + 1},60,A7A7*0?9?9?9,{temp},{EPW_TAIL}")
    return ("\r\n".join(EPW_HEADER + rows) + "\r\n").encode()


def tmy3_bytes(rows: list[tuple[str, str, float]]) -> bytes:
    head = '000001,"TEST STATION",ST,-5.0,40.000,-80.000,300\n'
    head += "Date (MM/DD/YYYY),Time (HH:MM),GHI (W/m^2),Dry-bulb (C),Dry-bulb source\n"
    return (head + "".join(f"{d},{t},0,{v},A\n" for d, t, v in rows)).encode()


def csv_bytes(header: str, rows: list[str]) -> bytes:
    return ("\n".join([header, *rows]) + "\n").encode()


def hourly_rows(count: int, value=lambda i: 5.0, start=datetime(2021, 1, 1)) -> list[str]:
    return [f"{(start + timedelta(hours=i)).isoformat(sep=' ')},{value(i)}" for i in range(count)]


def warning_with(series, words: str) -> str:
    found = [w for w in series.warnings if words in w]
    assert found, f"no warning with {words!r} in {series.warnings}"
    return found[0]


# --- EPW -----------------------------------------------------------------------------------


def test_epw_full_year_hour_ending_and_field_seven():
    # 8,760 hours of 2001; each value = its row number / 1000 so field 7 is checked row by row.
    temps = [round(i / 1000, 3) for i in range(8760)]
    series = parse_weather_file(epw_bytes(temps))
    assert series.kind == "epw" and series.station == "Testville"
    assert list(series.temperatures_c) == temps
    # Hour 1 of Jan 1 is 00:00-01:00; hour 24 of Dec 31 is 23:00 of Dec 31 (not Jan 1).
    assert series.timestamps()[0] == datetime(2001, 1, 1, 0)
    assert series.timestamps()[-1] == datetime(2001, 12, 31, 23)
    assert len(set(series.dates)) == 365
    assert series.warnings == ()


def test_epw_missing_marker_is_left_out_and_counted():
    # 48 hours; two values are 99.9, the EPW missing marker -> 46 values kept.
    temps = [1.0] * 48
    temps[5] = temps[30] = 99.9
    series = parse_weather_file(epw_bytes(temps))
    assert len(series.temperatures_c) == 46
    assert "2 values were blank or marked missing" in warning_with(series, "marked missing")
    assert "2 hours are missing in 2 gaps" in warning_with(series, "gap")


def test_epw_sub_hourly_records_are_averaged_into_hours():
    # Two records per hour (minute 30 and 60): 2 and 4 -> hourly mean 3.
    rows = []
    for hour in range(1, 25):
        rows.append(f"2001,1,1,{hour},30,src,2.0,{EPW_TAIL}")
        rows.append(f"2001,1,1,{hour},60,src,4.0,{EPW_TAIL}")
    series = parse_weather_file(("\n".join(EPW_HEADER + rows)).encode())
    assert series.temperatures_c == (3.0,) * 24
    warning_with(series, "averaged into hourly")


def test_epw_without_data_rows_is_refused():
    with pytest.raises(InputError) as caught:
        parse_weather_file("\n".join(EPW_HEADER).encode())
    assert caught.value.field == "file"


# --- TMY3 ----------------------------------------------------------------------------------


def test_tmy3_hour_24_belongs_to_the_day_it_ends():
    # Two days, 01:00..24:00 each. Grouping the raw stamps naively by date would give three
    # dates (01/03 00:00 from 24:00); read as hour-ending, 24:00 is hour 23 of its own day.
    rows = [(f"01/0{d}/1990", f"{h:02d}:00", float(d)) for d in (1, 2) for h in range(1, 25)]
    series = parse_weather_file(tmy3_bytes(rows))
    assert series.kind == "tmy3" and series.station == "TEST STATION"
    assert sorted(set(series.dates)) == [date(1990, 1, 1), date(1990, 1, 2)]
    assert series.hours[:2] == (0, 1) and series.hours[23] == 23
    assert series.temperatures_c[:24] == (1.0,) * 24  # day 1's values all stay on day 1


def test_tmy3_full_year_gives_365_days_and_mixed_years_note():
    # A typical year: January from 1988, the rest from 1980 (as TMY files do).
    rows = []
    day = date(2001, 1, 1)
    while day.year == 2001:
        year = 1988 if day.month == 1 else 1980
        rows += [
            (f"{day.month:02d}/{day.day:02d}/{year}", f"{h:02d}:00", 0.0) for h in range(1, 25)
        ]
        day += timedelta(days=1)
    series = parse_weather_file(tmy3_bytes(rows))
    assert len(series.temperatures_c) == 8760 and len(set(series.dates)) == 365
    assert "mixes years (1980–1988)" in warning_with(series, "mixes years")
    assert not any("missing" in w or "hours;" in w for w in series.warnings)  # no gaps


def test_tmy3_missing_marker():
    rows = [("01/01/1990", f"{h:02d}:00", -9900.0 if h == 3 else 2.0) for h in range(1, 25)]
    series = parse_weather_file(tmy3_bytes(rows))
    assert len(series.temperatures_c) == 23
    warning_with(series, "marked missing")


# --- plain CSV -----------------------------------------------------------------------------


def test_csv_hourly_iso_stamps():
    series = parse_weather_file(csv_bytes("timestamp,temp_c", hourly_rows(48, lambda i: i)))
    assert series.kind == "csv-hourly"
    assert series.timestamps()[0] == datetime(2021, 1, 1, 0)
    assert series.temperatures_c[47] == 47.0
    assert series.warnings == (
        "the file has 48 hours; a full year has 8,760 (8,784 in a leap year)",
    )


def test_csv_daily_with_us_dates_and_fahrenheit_hint():
    # 50 °F = (50 - 32) * 5/9 = 10 °C.
    rows = [f"{(date(2021, 1, 1) + timedelta(days=i)).strftime('%m/%d/%Y')},50" for i in range(365)]
    series = parse_weather_file(csv_bytes("Date,Mean Temp (°F)", rows))
    assert series.kind == "csv-daily" and series.hours is None
    assert series.temperatures_c == pytest.approx([10.0] * 365)
    assert series.dates[-1] == date(2021, 12, 31) and series.warnings == ()


def test_csv_daily_max_min_columns_give_mid_range_mean():
    # No mean column: (TMAX + TMIN) / 2 = (60 + 40) / 2 = 50 °F = 10 °C (common practice).
    rows = [f"2021-01-{d:02d},60,40,0.1" for d in range(1, 11)]
    series = parse_weather_file(csv_bytes("DATE,TMAX,TMIN,PRCP", rows), default_unit="F")
    assert series.temperatures_c == pytest.approx([10.0] * 10)
    warning_with(series, "(max + min) / 2")
    assert "read as °F" in warning_with(series, "names no unit")


def test_csv_date_and_time_columns_hour_ending_with_24():
    # Separate Date and Time columns, times 1:00..24:00 -> hour-ending, 2 whole days.
    rows = [f"2021-03-0{d},{h}:00,{d}" for d in (1, 2) for h in range(1, 25)]
    series = parse_weather_file(csv_bytes("Date,Time,Dry-bulb (C)", rows))
    assert sorted(set(series.dates)) == [date(2021, 3, 1), date(2021, 3, 2)]
    assert series.temperatures_c == (1.0,) * 24 + (2.0,) * 24
    warning_with(series, "hour-ending")


def test_csv_hour_ending_running_01_to_00_next_day():
    # Stamps 01:00 .. 00:00 (next day) -> each value is for the hour before: one day.
    rows = hourly_rows(24, start=datetime(2021, 1, 1, 1))
    series = parse_weather_file(csv_bytes("time,temperature (C)", rows))
    assert set(series.dates) == {date(2021, 1, 1)} and series.hours == tuple(range(24))


def test_csv_year_month_day_hour_columns_and_named_column_and_unit():
    # The caller names the column "OAT_x" and says °F: 32 °F = 0 °C; 212 is the other column.
    rows = [f"2021,6,1,{h},32,212" for h in range(24)]
    series = parse_weather_file(
        csv_bytes("year,month,day,hour,OAT_x,other", rows),
        temperature_column="oat_x",
        temperature_unit="F",
    )
    assert series.kind == "csv-hourly" and series.temperatures_c == (0.0,) * 24


def test_csv_semicolon_decimal_comma_and_day_first_dates_sub_hourly():
    # 15-minute values 1,0 / 2,0 / 3,0 / 4,0 each hour -> hourly mean 2.5 °C; 13.01.2021 is
    # day-first.
    rows = [
        f"{(datetime(2021, 1, 13) + timedelta(minutes=15 * i)).strftime('%d.%m.%Y %H:%M')};{i % 4 + 1},0"
        for i in range(96)
    ]
    series = parse_weather_file(csv_bytes("Zeit;Temp °C", rows))
    assert set(series.dates) == {date(2021, 1, 13)}
    assert series.temperatures_c == (2.5,) * 24


def test_csv_newest_first_is_put_in_time_order():
    rows = list(reversed(hourly_rows(24, lambda i: i)))
    series = parse_weather_file(csv_bytes("datetime,temp", rows))
    assert series.temperatures_c == tuple(float(i) for i in range(24))


def test_csv_time_zone_offsets_are_noted():
    rows = [f"2021-01-01T{h:02d}:00:00Z,3" for h in range(24)]
    warning_with(parse_weather_file(csv_bytes("valid,tair", rows)), "time-zone")


# --- warnings ------------------------------------------------------------------------------


def test_gap_warning_counts_missing_hours():
    # Hours 0..99 and 110..199 of 2021: hours 100..109 missing = 10 hours in 1 gap, after
    # hour 99 = 2021-01-05 03:00.
    rows = [r for i, r in enumerate(hourly_rows(200)) if not 100 <= i < 110]
    series = parse_weather_file(csv_bytes("time,temp", rows))
    text = warning_with(series, "missing in")
    assert text.startswith("10 hours are missing in 1 gap (the first after 2021-01-05 03:00)")


def test_duplicate_hours_are_kept_once_and_counted():
    # 24 hours plus hours 5 and 6 again (with other values): 2 duplicates, first value kept.
    rows = hourly_rows(24, lambda i: 1.0) + hourly_rows(24, lambda i: 9.0)[5:7]
    series = parse_weather_file(csv_bytes("time,temp", rows))
    assert series.temperatures_c == (1.0,) * 24
    assert warning_with(series, "duplicate").startswith("2 duplicate hours")


def test_daily_gap_and_non_full_year_warnings():
    # 300 days with days 100..109 removed -> 10 days missing; 290 days is not a full year.
    rows = [f"{date(2021, 1, 1) + timedelta(days=i)},{5}" for i in range(300) if not 100 <= i < 110]
    series = parse_weather_file(csv_bytes("date,temperature_c", rows))
    assert warning_with(series, "missing in").startswith("10 days are missing in 1 gap")
    warning_with(series, "the file has 290 days")


def test_more_than_a_year_is_noted():
    rows = [f"{date(2020, 1, 1) + timedelta(days=i)},{5}" for i in range(800)]
    warning_with(parse_weather_file(csv_bytes("date,temp_c", rows)), "more than a year")


def test_implausible_values_are_left_out_and_flagged():
    # -80 °C and 75 °C are outside -70..60 °C: left out, two values flagged.
    values = {3: -80.0, 7: 75.0}
    rows = hourly_rows(24, lambda i: values.get(i, 4.0))
    series = parse_weather_file(csv_bytes("time,temp_c", rows))
    assert series.temperatures_c == (4.0,) * 22
    assert warning_with(series, "implausible").startswith("2 values outside")


def test_unreadable_rows_are_skipped_and_counted():
    rows = hourly_rows(24) + ["not a date,5", "2021-13-45 00:00,5"]
    series = parse_weather_file(csv_bytes("time,temp_c", rows))
    assert warning_with(series, "could not be read").startswith("2 rows")


def test_leap_year_8784_hours_has_no_length_warning():
    series = parse_weather_file(epw_bytes([0.0] * 8784, start=datetime(2020, 1, 1)))
    assert len(set(series.dates)) == 366 and series.warnings == ()


# --- bad files -----------------------------------------------------------------------------


def _zip() -> bytes:
    buffer = io.BytesIO()
    with zipfile.ZipFile(buffer, "w") as archive:
        archive.writestr("a.epw", "x")
    return buffer.getvalue()


@pytest.mark.parametrize(
    ("data", "words"),
    [
        (b"", "empty"),
        (b"  \n\r\n ", "empty"),
        (b"\x00\x01\x02\x03binary\x00garbage" * 20, "binary"),
        (bytes(range(1, 32)) * 40, "binary"),
        (_zip(), "ZIP"),
        (gzip.compress(b"timestamp,temp\n", mtime=0), "gzip"),
        (b"Dear reader,\nthis is a letter, not weather.\n", "no temperature column"),
        (b"just some words\nand more words\n", "not a weather file"),
        (b"time,pressure,wind\n2021-01-01 00:00,1013,3\n", "no temperature column"),
        (b"name,temp\nalice,5\nbob,6\n", "could not be read"),
        (b"time,temp\n", "no data rows"),
        (b"time,temp\n2021-01-01 00:00,warm\n", "holds no numbers"),
        (b"time,temp\n2021-01-01 00:00,-999\n", "no usable temperatures"),
    ],
)
def test_bad_files_raise_input_error_on_file(data, words):
    with pytest.raises(InputError) as caught:
        parse_weather_file(data)
    assert caught.value.field == "file"
    assert words in caught.value.message


def test_named_column_not_found_names_the_field():
    with pytest.raises(InputError) as caught:
        parse_weather_file(csv_bytes("time,temp", hourly_rows(3)), temperature_column="t_out")
    assert caught.value.field == "temperature_column"
    assert "'time', 'temp'" in caught.value.message


def test_bad_unit_is_refused():
    with pytest.raises(InputError) as caught:
        parse_weather_file(b"time,temp\n", temperature_unit="K")
    assert caught.value.field == "temperature_unit"


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.binary(max_size=2000))
def test_any_bytes_give_a_series_or_an_input_error(data):
    # Invariant: never an unexpected exception (that would be a 500).
    try:
        parse_weather_file(data)
    except InputError as error:
        assert error.field == "file" and error.message


@settings(max_examples=200, deadline=None)
@given(
    st.lists(
        st.one_of(
            st.sampled_from(["time,temp", "2021-01-01 00:00,5", ",", "LOCATION,", "24:00"]),
            st.text(alphabet="0123456789-:/.,; TZtemp\t", max_size=30),
        ),
        max_size=30,
    )
)
def test_any_text_lines_give_a_series_or_an_input_error(lines):
    try:
        series = parse_weather_file("\n".join(lines).encode())
    except InputError as error:
        assert error.message
    else:
        assert len(series.dates) == len(series.temperatures_c) > 0


@settings(max_examples=100, deadline=None)
@given(st.lists(st.integers(-300, 400), min_size=1, max_size=200))
def test_csv_round_trip_of_tenths(tenths):
    # Values written with one decimal are read back exactly, in order.
    values = [t / 10 for t in tenths]
    series = parse_weather_file(
        csv_bytes("time,temp_c", hourly_rows(len(values), values.__getitem__))
    )
    assert list(series.temperatures_c) == values


def test_an_8760_hour_epw_parses_quickly():
    # Guard against a slow parser (the bench script measures it properly): best of 5 well
    # under 100 ms on a loaded test machine; it is a few ms when the machine is idle.
    data = epw_bytes([float(i % 30) for i in range(8760)])
    best = min(_timed(parse_weather_file, data) for _ in range(5))
    assert best < 0.1


def _timed(function, data) -> float:
    start = time.perf_counter()
    function(data)
    return time.perf_counter() - start


def test_daily_duplicate_day_is_counted_and_stays_daily():
    rows = [f"{date(2021, 1, 1) + timedelta(days=i)},{i}" for i in range(5)] + ["2021-01-03,9"]
    series = parse_weather_file(csv_bytes("date,temp_c", rows))
    assert series.kind == "csv-daily" and series.temperatures_c == (0.0, 1.0, 2.0, 3.0, 4.0)
    assert warning_with(series, "duplicate").startswith("1 duplicate days")


def test_chronological_gap_over_new_year_is_a_gap_not_a_typical_year():
    # Dec 1-10 2020 then Jan 21-31 2021: 41 - 11... worked: Dec 11 .. Jan 20 = 21 + 20 = 41
    # days missing; the month number goes down (12 -> 1), so this is not a typical year.
    days = [date(2020, 12, d) for d in range(1, 11)] + [date(2021, 1, d) for d in range(21, 32)]
    series = parse_weather_file(csv_bytes("date,temp_c", [f"{d},1" for d in days]))
    assert not any("mixes years" in w for w in series.warnings)
    assert warning_with(series, "missing in").startswith("41 days are missing in 1 gap")


# --- bounded reading -----------------------------------------------------------------------


def _hourly_csv(count: int) -> bytes:
    # One row per hour from 1900 on: "1900-01-01 00:00:00,5.0\n" is 24 bytes.
    return csv_bytes("timestamp,temp_c", hourly_rows(count, start=datetime(1900, 1, 1)))


def test_a_file_longer_than_a_weather_year_is_refused_after_a_bounded_read():
    # 100,000 hourly rows (11 years). The bound is a leap year (366 x 24 = 8,784 rows) plus
    # 64 lines of margin = 8,848 lines; the read stops at line 8,849, i.e. after about
    # 8,849 x 24 bytes = 212 kB of the 2.4 MB file (plus at most two 8 kB read-ahead chunks).
    data = _hourly_csv(100_000)
    stream = io.BytesIO(data)
    with pytest.raises(InputError) as caught:
        parse_weather_file(stream)
    assert caught.value.field == "file"
    assert "more than 8,848 lines" in caught.value.message
    assert "8,784 hourly rows" in caught.value.message
    assert stream.tell() < 8_849 * 24 + 2 * 8192 < len(data) // 10
    assert not stream.closed  # the caller's file is left open


def test_a_leap_year_with_the_margin_is_still_read():
    # 8,784 hours of 2020 plus a header and 63 repeated hours = 8,848 non-blank lines: the
    # most allowed; the 63 repeats are counted as duplicates.
    rows = hourly_rows(8784, start=datetime(2020, 1, 1))
    series = parse_weather_file(csv_bytes("timestamp,temp_c", rows + rows[:63]))
    assert len(series.temperatures_c) == 8784
    assert warning_with(series, "duplicate").startswith("63 duplicate hours")


def test_blank_lines_do_not_count_as_rows():
    # Double-spaced rows ("\r\r\n" reads as two line ends): 8,760 rows and 8,760 blank lines.
    rows = hourly_rows(8760)
    series = parse_weather_file(("timestamp,temp_c\r\r\n" + "\r\r\n".join(rows)).encode())
    assert len(series.temperatures_c) == 8760 and series.warnings == ()


def test_a_20_mb_line_is_not_read_whole():
    stream = io.BytesIO(b"timestamp,temp_c\n" + b"1" * (20 * 1024 * 1024))
    with pytest.raises(InputError) as caught:
        parse_weather_file(stream)
    assert caught.value.message.startswith("line 2 is longer than 4,096 characters")
    assert stream.tell() < 64 * 1024


def test_latin1_bytes_and_old_mac_line_ends_are_read():
    # A Latin-1 header ("°" is the single byte 0xB0) and lines ended by a lone CR.
    # 50 °F = (50 - 32) x 5/9 = 10 °C.
    rows = [f"2021-01-{d:02d},50" for d in range(1, 11)]
    data = "\r".join(["Date,Mean Temp (°F)", *rows]).encode("latin-1")
    series = parse_weather_file(data)
    assert series.kind == "csv-daily" and series.temperatures_c == pytest.approx([10.0] * 10)
    assert series.warnings[0].startswith("the file has 10 days")


def test_utf16_file_with_its_byte_order_mark():
    rows = [f"2021-01-{d:02d},4" for d in range(1, 4)]
    series = parse_weather_file(csv_bytes("date,temp_c", rows).decode().encode("utf-16"))
    assert series.temperatures_c == (4.0, 4.0, 4.0)
