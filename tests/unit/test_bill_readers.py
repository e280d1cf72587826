"""Bills as the auditor has them: pasted rows, CSV uploads, Green Button files.

Values are hand-worked in the comments; the Green Button files are our own (an invented
house, tests/utils/green_button.py), built as NAESB REQ.21 (ESPI) lays the format out: value ×
10^powerOfTenMultiplier in the ReadingType's uom (72 Wh, 169 therm, 132 Btu), cost in
hundred-thousandths of the currency, quality 8 = estimated.
"""

from __future__ import annotations

import io
from datetime import date, timedelta

import pytest

from server.errors import InputError
from server.services import green_button, green_button_feed
from server.services.bill_csv import read_bill_csv
from server.services.bill_dates import DateTextError, read_date
from server.services.bill_table import MAX_ROWS, read_bill_text
from server.services.green_button import read_green_button
from tests.utils.green_button import Meter, Reading, feed, hourly, local

JAN6 = date(2025, 1, 6)


# --- dates ---------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "text",
    [
        "1/6/2025",
        "01/06/2025",
        "1/6/25",
        "1-6-2025",
        "Jan 6 2025",
        "Jan 6, 2025",
        "jan. 6, 2025",
        "January 6th 2025",
        "6-Jan-2025",
        "6 Jan 2025",
        "2025-01-06",
        "2025/01/06",
        "1/6/2025 0:00",
        "1/6/2025 12:00 AM",
    ],
)
def test_every_date_form_reads_as_6_january_2025(text: str) -> None:
    assert read_date(text) == JAN6


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("13/01/2025", "month/day/year"),  # a day/month date is refused, never guessed
        ("2/30/2025", "not a calendar date"),
        ("Janvier 6 2025", "not a month"),
        ("1/6/1850", "not a billing year"),
        ("next week", "not a date"),
        ("", "enter a date"),
    ],
)
def test_dates_that_are_refused_say_why(text: str, words: str) -> None:
    with pytest.raises(DateTextError, match=words):
        read_date(text)


def test_a_day_month_date_suggests_the_iso_form() -> None:
    with pytest.raises(DateTextError, match="write 2025-01-13 if you mean 13 January"):
        read_date("13/01/2025")


# --- pasted rows ---------------------------------------------------------------------------------

TAB_WITH_HEADER = (
    "Start\tEnd\tTherms\tCost\tRead type\n"
    "1/6/2025\t2/4/2025\t182\t$210.50\tA\n"
    "2/4/2025\t3/6/2025\t1,234\t$1,210.50\tE\n"
    "3/6/2025\t4/4/2025\t96.5\t\tActual\n"
)


def test_tab_separated_paste_with_header() -> None:
    read = read_bill_text(TAB_WITH_HEADER)
    assert read.header and read.columns == ("start", "end", "use", "cost", "estimated")
    assert read.unit == "therm" and read.fuel == "natural_gas"
    assert [r.status for r in read.rows] == ["ok", "ok", "ok"]
    first, second, third = read.rows
    assert (first.start, first.end, first.use, first.cost) == (JAN6, date(2025, 2, 4), 182.0, 210.5)
    assert first.days == 29  # 6 January to 4 February, end exclusive: 25 + 4 days
    assert second.use == 1234.0 and second.cost == 1210.5 and second.estimated
    assert third.cost is None and not third.estimated
    assert read.message == "3 periods read"
    assert read.periods()[1] == {
        "start": "2025-02-04",
        "end": "2025-03-06",
        "use": 1234.0,
        "estimated": True,
        "source": "pasted",
        "cost": 1210.5,
    }


def test_the_same_bills_without_a_header_are_read_from_their_contents() -> None:
    read = read_bill_text("\n".join(TAB_WITH_HEADER.splitlines()[1:]))
    assert not read.header
    assert read.columns == ("start", "end", "use", "cost", "estimated")
    assert [(r.use, r.cost, r.estimated) for r in read.rows] == [
        (182.0, 210.5, False),
        (1234.0, 1210.5, True),
        (96.5, None, False),
    ]


def test_comma_separated_paste_follows_quoting_rules() -> None:
    text = (
        "from,to,usage,amount\n"
        '01/06/2025,02/04/2025,"1,234","$1,210.50"\n'
        "02/04/2025,03/06/2025,1,234,$99.00\n"  # unquoted grouping comma: one cell too many
        "03/06/2025,04/04/2025,1234,99\n"
    )
    read = read_bill_text(text)
    ok, split, plain = read.rows
    assert ok.status == "ok" and ok.use == 1234.0 and ok.cost == 1210.5
    assert split.status == "error" and split.field == "row"
    assert "5 cells where 4 were expected" in split.message and '"1,234"' in split.message
    assert plain.use == 1234.0 and plain.cost == 99.0
    assert split.text == "02/04/2025,03/06/2025,1,234,$99.00"  # kept as typed


def test_bad_rows_are_kept_with_their_messages_and_the_good_rows_are_used() -> None:
    text = (
        "Start\tEnd\tUse\n"
        "1/6/2025\t2/4/2025\t182\n"
        "2/4/2025\t3/6/2025\tlots\n"
        "13/03/2025\t4/4/2025\t90\n"
        "4/4/2025\t4/1/2025\t80\n"
        "4/4/2025\t5/5/2025\t\n"
        "1/20/2025\t2/20/2025\t70\n"
        "5/5/2025\t6/4/2025\t-5\n"
        "6/4/2025\t7/3/2025\t1,5\n"
        "7/3/2025\t8/4/2025\t40\n"
    )
    read = read_bill_text(text)
    assert [r.number for r in read.rows] == list(range(2, 11))  # every row, by its line
    by_line = {r.number: r for r in read.rows}
    assert [r.number for r in read.kept] == [2, 10]
    assert by_line[3].field == "use" and "'lots' is not a number" in by_line[3].message
    assert by_line[4].field == "start" and "month/day/year" in by_line[4].message
    assert by_line[5].field == "end" and "must come after the start" in by_line[5].message
    assert by_line[6].field == "use" and "enter the use" in by_line[6].message
    assert by_line[7].field == "start" and "overlaps row 2" in by_line[7].message
    assert by_line[8].field == "use" and "zero or more" in by_line[8].message
    assert by_line[9].field == "use" and "did you mean 1.5 or 15" in by_line[9].message
    assert read.message == "2 periods read; 7 rows not used (see the messages)"
    assert [p["start"] for p in read.periods()] == ["2025-01-06", "2025-07-03"]


def test_a_metric_house_reads_decimal_commas_in_tab_separated_rows() -> None:
    read = read_bill_text("2025-01-06\t2025-02-04\t182,5", decimal_comma=True)
    assert read.rows[0].use == 182.5


@pytest.mark.parametrize(
    ("cell", "use", "estimated"),
    [("182 E", 182.0, True), ("182E", 182.0, True), ("182 (est)", 182.0, True),
     ("182*", 182.0, True), ("182", 182.0, False), ("1e2", 100.0, False)],
)  # fmt: skip
def test_estimated_marker_on_the_use(cell: str, use: float, estimated: bool) -> None:
    (row,) = read_bill_text(f"1/6/2025\t2/4/2025\t{cell}").rows
    assert (row.status, row.use, row.estimated) == ("ok", use, estimated)


def test_an_estimated_flag_column_with_unknown_marks_is_refused_per_row() -> None:
    read = read_bill_text(
        "start,end,use,estimated\n1/6/2025,2/4/2025,182,yes\n2/4/2025,3/6/2025,150,maybe\n"
    )
    assert read.rows[0].estimated
    assert read.rows[1].field == "estimated" and "mark an estimated read E" in read.rows[1].message


def test_single_read_dates_chain_into_periods() -> None:
    read = read_bill_text("Read date,Usage\n1/6/2025,100\n2/4/2025,182E\n3/6/2025,150\n")
    first, second, third = read.rows
    assert first.status == "error" and "only starts the series" in first.message
    assert (second.start, second.end, second.estimated) == (JAN6, date(2025, 2, 4), True)
    assert (third.start, third.end) == (date(2025, 2, 4), date(2025, 3, 6))


def test_a_days_column_gives_the_start_and_tells_an_inclusive_end() -> None:
    read = read_bill_text(
        "Read date\tDays\tkWh\n2/4/2025\t29\t640\n"
        "Start\tEnd\tDays\tkWh\n"  # not a bill: refused on its own row
    )
    assert read.rows[0].start == JAN6 and read.unit == "kWh" and read.fuel == "electricity"
    inclusive = read_bill_text("Start\tEnd\tDays\tUse\n1/6/2025\t2/3/2025\t29\t182\n").rows[0]
    # 6 January to 3 February is 28 days apart; 29 days of service means 3 February was the
    # last day served, so the next read (the period's exclusive end) is 4 February
    assert inclusive.end == date(2025, 2, 4) and inclusive.status == "warning"
    wrong = read_bill_text("Start\tEnd\tDays\tUse\n1/6/2025\t2/3/2025\t31\t182\n").rows[0]
    assert wrong.field == "days" and "28 days apart but days says 31" in wrong.message


def test_a_daily_usage_export_is_summed_into_calendar_months() -> None:
    # a portal's daily export: one date a row, a day apart: each row is that day's use;
    # January 31 × 10 kWh = 310 kWh, February 28 × 20 kWh = 560 kWh
    lines = ["Date,kWh"]
    for k in range(59):  # 1 January to 28 February 2025
        d = date(2025, 1, 1) + timedelta(days=k)
        lines.append(f"{d.month}/{d.day}/{d.year},{10 if d.month == 1 else 20}")
    read = read_bill_text("\n".join(lines))
    january, february = read.kept
    assert (january.start, january.end, january.use) == (date(2025, 1, 1), date(2025, 2, 1), 310.0)
    assert (february.start, february.end, february.use) == (
        date(2025, 2, 1),
        date(2025, 3, 1),
        560.0,
    )
    assert any("summed into 2 calendar months" in w for w in read.warnings)


def test_typed_degree_days_column() -> None:
    read = read_bill_text("start\tend\tuse\tHDD\n1/6/2025\t2/4/2025\t182\t1,012\n")
    assert read.columns[3] == "hdd" and read.rows[0].hdd == 1012.0
    assert read.periods()[0]["hdd"] == 1012.0


# --- CSV upload and its bounds -------------------------------------------------------------------


def test_csv_upload_reads_like_a_paste_from_a_spooled_file() -> None:
    data = (
        TAB_WITH_HEADER.replace("\t", ",")
        .replace("1,234", '"1,234"')
        .replace("$1,210.50", '"$1,210.50"')
    )
    read = read_bill_csv(io.BytesIO(("\ufeff" + data).encode()))
    assert read.source == "csv" and [r.use for r in read.rows] == [182.0, 1234.0, 96.5]
    assert read.periods()[0]["source"] == "csv"


def test_csv_with_too_many_rows_is_refused_before_the_rest_is_read() -> None:
    row = "1/6/2025,2/4/2025,182\n"
    with pytest.raises(InputError, match="more than 3,000 rows") as caught:
        read_bill_csv((row * (MAX_ROWS + 1)).encode())
    assert caught.value.field == "file"


def test_csv_with_a_line_too_long_is_refused() -> None:
    with pytest.raises(InputError, match="longer than 1,000 characters"):
        read_bill_csv(("1/6/2025,2/4/2025," + "9" * 2000 + "\n").encode())


def test_binary_or_empty_uploads_are_refused() -> None:
    for data, words in (
        (b"", "empty"),
        (b"PK\x03\x04zip", "not a text CSV"),
        (b"a\x00b", "not a text CSV"),
    ):
        with pytest.raises(InputError, match=words):
            read_bill_csv(data)


def test_a_paste_too_long_is_refused() -> None:
    with pytest.raises(InputError, match="more than 3,000 rows") as caught:
        read_bill_text("1/6/2025\t2/4/2025\t1\n" * (MAX_ROWS + 1))
    assert caught.value.field == "text"


# --- Green Button --------------------------------------------------------------------------------


def _monthly_gas() -> Meter:
    # therm (169) with powerOfTenMultiplier -3: values in thousandths of a therm
    return Meter(
        "gas",
        uom=169,
        power=-3,
        kind=1,
        readings=[
            Reading(local(2025, 1, 6), 29 * 86_400, 182_000, cost=21_050_000),
            Reading(local(2025, 2, 4), 30 * 86_400, 150_500, cost=17_500_000, quality=8),
            Reading(local(2025, 3, 6), 29 * 86_400, 96_250),
        ],
    )


def test_green_button_monthly_gas_readings_are_the_periods() -> None:
    read = read_green_button(feed([_monthly_gas()]))
    assert read.unit == "therm" and read.fuel == "natural_gas"
    first, second, third = read.rows
    # 182 000 × 10^-3 = 182 therm; cost 21 050 000 × 10^-5 = $210.50
    assert (first.start, first.end, first.use, first.cost) == (JAN6, date(2025, 2, 4), 182.0, 210.5)
    assert second.estimated and second.use == pytest.approx(150.5) and second.cost == 175.0
    assert (third.end, third.use, third.cost) == (date(2025, 4, 4), 96.25, None)


def test_green_button_hourly_electricity_is_summed_into_calendar_months() -> None:
    # Wh (72), multiplier 0: 500 Wh each January hour, 1000 Wh each February hour (local
    # time, UTC-5); January: 31 × 24 × 0.5 kWh = 372 kWh; February: 28 × 24 × 1 = 672 kWh
    start = local(2025, 1, 1)
    readings = hourly(start, (31 + 28) * 24, lambda m: 500 if m.month == 1 else 1000)
    read = read_green_button(feed([Meter("power", uom=72, readings=readings)]))
    assert read.unit == "kWh" and read.fuel == "electricity"
    january, february = read.rows
    assert (january.start, january.end, january.use) == (date(2025, 1, 1), date(2025, 2, 1), 372.0)
    assert (february.start, february.end, february.use) == (
        date(2025, 2, 1),
        date(2025, 3, 1),
        672.0,
    )
    assert january.status == "ok"
    assert any("1,416 interval readings summed into calendar months" in w for w in read.warnings)


def test_green_button_hourly_readings_follow_the_billing_periods_when_given() -> None:
    # 1000 Wh an hour; billing periods 6 January – 4 February (29 days) and 4 February –
    # 6 March (30 days): 29 × 24 = 696 kWh and 30 × 24 = 720 kWh; the hours of 1–5 January
    # fall outside every billing period and are left out
    readings = hourly(local(2025, 1, 1), 64 * 24, lambda m: 1000)
    bounds = [(local(2025, 1, 6), local(2025, 2, 4)), (local(2025, 2, 4), local(2025, 3, 6))]
    read = read_green_button(feed([Meter("power", uom=72, readings=readings)], summaries=bounds))
    first, second = read.rows
    assert (first.start, first.end, first.use) == (JAN6, date(2025, 2, 4), 696.0)
    assert (second.start, second.end, second.use) == (date(2025, 2, 4), date(2025, 3, 6), 720.0)
    assert any("outside the file's billing periods" in w for w in read.warnings)


def test_green_button_multiplier_and_missing_hours() -> None:
    # powerOfTenMultiplier 2 on Wh: value 5 = 500 Wh = 0.5 kWh; 10 January has no readings,
    # so January has 30 × 24 hours: 360 kWh, marked with the 24 missing hours
    readings = [r for r in hourly(local(2025, 1, 1), 31 * 24, lambda m: 5) if r.start.day != 10]
    read = read_green_button(feed([Meter("power", uom=72, power=2, readings=readings)]))
    (january,) = read.rows
    assert january.use == pytest.approx(360.0)
    assert (
        january.status == "warning"
        and "24 hours of the 31 days have no readings" in january.message
    )


def test_green_button_btu_are_therms_and_daily_gas_is_monthly() -> None:
    # Btu (132): 10 000 000 Btu a day = 100 therm a day; 31 days of January = 3100 therm
    readings = [
        Reading(local(2025, 1, 1) + timedelta(days=k), 86_400, 10_000_000) for k in range(31)
    ]
    read = read_green_button(feed([Meter("gas", uom=132, kind=1, readings=readings)]))
    assert read.unit == "therm" and read.rows[0].use == pytest.approx(3100.0)


def test_green_button_with_two_fuels_asks_which_and_follows_the_links() -> None:
    power = Meter("power", uom=72, readings=hourly(local(2025, 1, 1), 24, lambda m: 1000))
    data = feed([power, _monthly_gas()])
    with pytest.raises(InputError, match="kWh and therm: choose") as caught:
        read_green_button(data)
    assert caught.value.field == "unit"
    assert read_green_button(data, unit="therm").rows[0].use == 182.0
    assert read_green_button(data, unit="kWh").rows[0].use == 24.0  # 24 hours × 1 kWh


def test_green_button_reverse_flow_is_left_out() -> None:
    out = Meter("export", uom=72, flow=19, readings=hourly(local(2025, 1, 1), 24, lambda m: 9))
    into = Meter("power", uom=72, readings=hourly(local(2025, 1, 1), 24, lambda m: 1000))
    read = read_green_button(feed([into, out]))
    assert read.rows[0].use == 24.0
    assert any("24 readings of energy sent back" in w for w in read.warnings)


@pytest.mark.parametrize(
    ("data", "words"),
    [
        (b"<feed", "malformed"),
        (b"", "empty"),
        (b'<?xml version="1.0"?><feed xmlns="http://www.w3.org/2005/Atom"/>', "no IntervalBlock"),
        (
            b'<?xml version="1.0"?><!DOCTYPE feed [<!ENTITY a "aaaa">]>'
            b'<feed xmlns="http://www.w3.org/2005/Atom">&a;</feed>',
            "DTD or entities",
        ),
    ],
)
def test_files_that_are_not_green_button_are_refused(data: bytes, words: str) -> None:
    with pytest.raises(InputError, match=words) as caught:
        read_green_button(data)
    assert caught.value.field == "file"


def test_green_button_volume_units_are_refused_in_words() -> None:
    meter = Meter("gas", uom=119, kind=1, readings=[Reading(local(2025, 1, 6), 29 * 86_400, 1820)])
    with pytest.raises(InputError, match="cubic feet"):
        read_green_button(feed([meter]))


def test_green_button_size_bounds(monkeypatch: pytest.MonkeyPatch) -> None:
    data = feed([_monthly_gas()])
    monkeypatch.setattr(green_button, "MAX_XML_BYTES", len(data) - 1)
    with pytest.raises(InputError, match="larger than"):
        read_green_button(io.BytesIO(data))
    monkeypatch.setattr(green_button, "MAX_XML_BYTES", 32 * 1024 * 1024)
    monkeypatch.setattr(green_button_feed, "MAX_READINGS", 2)
    with pytest.raises(InputError, match="more than 2 interval readings"):
        read_green_button(data)
