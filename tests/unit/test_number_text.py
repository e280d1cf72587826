"""The one reader of typed numbers (server/services/number_text.py): every rule, and round trips."""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from server.physics.units import FOOT_M, INCH_M
from server.services.number_text import NumberTextError, read_decimal, read_integer, read_length


@pytest.mark.parametrize(
    ("text", "value"),
    [
        ("1,234,567", 1234567.0),
        ("12,000", 12000.0),  # grouping comma in US units
        ("1,000", 1000.0),
        ("1,234.5", 1234.5),
        ("-1,234,567.25", -1234567.25),
        (" 3.5 ", 3.5),
        (".5", 0.5),
        ("5.", 5.0),
        ("1e3", 1000.0),
        ("\u22122.5", -2.5),  # a typographic minus sign
    ],
)
def test_decimals_in_us_units(text: str, value: float) -> None:
    assert read_decimal(text) == value


@pytest.mark.parametrize(
    ("text", "question"),
    [("1,5", "1,5: did you mean 1.5 or 15?"), ("0,75", "0,75: did you mean 0.75 or 075?"),
     ("12,3456", "12,3456: did you mean 12.3456 or 123456?")],
)  # fmt: skip
def test_lone_comma_in_us_units_asks_which_was_meant(text: str, question: str) -> None:
    with pytest.raises(NumberTextError) as caught:
        read_decimal(text)
    assert str(caught.value).startswith(question)


@pytest.mark.parametrize(("text", "value"), [("1,5", 1.5), ("0,75", 0.75), ("-2,25", -2.25)])
def test_decimal_comma_where_the_user_is_metric(text: str, value: float) -> None:
    assert read_decimal(text, decimal_comma=True) == value


def test_one_comma_then_three_digits_is_ambiguous_in_metric() -> None:
    # a decimal-comma writer means 1.000 by "1,000"; a grouping writer means 1000: ask
    with pytest.raises(NumberTextError, match=r"did you mean 1\.000 or 1000\?"):
        read_decimal("1,000", decimal_comma=True)
    # two commas or a dot after the comma can only be grouping
    assert read_decimal("1,234,567", decimal_comma=True) == 1234567.0
    assert read_decimal("1,234.5", decimal_comma=True) == 1234.5


@pytest.mark.parametrize("text", ["1.234,5", "1.234.567,89"])
def test_dot_then_comma_is_refused(text: str) -> None:
    with pytest.raises(NumberTextError, match="mixes a dot and a comma"):
        read_decimal(text, decimal_comma=True)


@pytest.mark.parametrize("text", ["1,23,456", "12,34,567.5"])
def test_commas_not_in_groups_of_three_are_refused(text: str) -> None:
    with pytest.raises(NumberTextError, match="groups of three digits"):
        read_decimal(text)


@pytest.mark.parametrize("text", ["NaN", "nan", "inf", "-Infinity"])
def test_nan_and_infinity_are_refused(text: str) -> None:
    with pytest.raises(NumberTextError, match="finite number"):
        read_decimal(text)


@pytest.mark.parametrize("text", ["1e309", "-1e400", "9" * 30 + "e290"])
def test_numbers_beyond_a_float_are_refused(text: str) -> None:
    with pytest.raises(NumberTextError, match="too large"):
        read_decimal(text)


@pytest.mark.parametrize("text", ["²", "٣", "１２", "1_000", "0x10", "three", "", "   "])
def test_not_numbers(text: str) -> None:
    # "²".isdigit() and "٣".isdigit() are True in Python, and float("٣") is 3.0
    with pytest.raises(NumberTextError):
        read_decimal(text)


def test_bounds_messages() -> None:
    with pytest.raises(NumberTextError, match="must be greater than zero"):
        read_decimal("0", low=0.0, low_open=True)
    with pytest.raises(NumberTextError, match="must be zero or more"):
        read_decimal("-1", low=0.0)
    with pytest.raises(NumberTextError, match="must be at most 5"):
        read_decimal("6", high=5.0)
    assert read_decimal("0", low=0.0) == 0.0


@pytest.mark.parametrize(
    ("text", "value"), [("30", 30), (" +7 ", 7), ("-3", -3), ("20.0", 20), ("1,000", 1000)]
)
def test_integers(text: str, value: int) -> None:
    assert read_integer(text) == value


@pytest.mark.parametrize(
    ("text", "message"),
    [("²", "is not a number"), ("٣", "is not a number"), ("20.5", "whole number"),
     ("NaN", "finite"), ("inf", "finite"), ("1e309", "too large"), ("9" * 50, "too long")],
)  # fmt: skip
def test_integer_refusals(text: str, message: str) -> None:
    with pytest.raises(NumberTextError, match=message):
        read_integer(text)


def test_integer_bounds() -> None:
    with pytest.raises(NumberTextError, match="at least 1"):
        read_integer("0", low=1)
    with pytest.raises(NumberTextError, match="at most 90"):
        read_integer("91", high=90)


@pytest.mark.parametrize(
    ("text", "metres"),
    [("3-1/2", 3.5 * INCH_M), ('5 1/2"', 5.5 * INCH_M), ("89 mm", 0.089),
     ("5' 6\"", 66 * INCH_M), ("2 ft", 2 * FOOT_M), ("11/16", 11 / 16 * INCH_M)],
)  # fmt: skip
def test_lengths_as_the_trade_says_them(text: str, metres: float) -> None:
    # 1 in = 0.0254 m, 1 ft = 0.3048 m exactly (NIST SP 811 appendix B)
    assert read_length(text) == pytest.approx(metres, rel=1e-12)


def test_length_decimal_comma_only_for_metric_users() -> None:
    assert read_length("12,5 mm", decimal_comma=True) == pytest.approx(0.0125, rel=1e-12)
    with pytest.raises(NumberTextError, match=r"did you mean 12\.5 or 125\?"):
        read_length("12,5 mm")


@pytest.mark.parametrize("text", ["²", "3-1/0", "0", "-2", "½", "1" * 41])
def test_length_refusals(text: str) -> None:
    with pytest.raises(NumberTextError):
        read_length(text)


def test_the_error_is_a_value_error() -> None:
    # callers that caught ValueError from the old readers keep working
    assert issubclass(NumberTextError, ValueError)


@given(st.floats(min_value=-1e15, max_value=1e15, allow_nan=False, allow_infinity=False))
def test_grouped_float_reads_back_exactly(value: float) -> None:
    # format(x, ",") writes the shortest repr with 1,234,567 grouping; reading it gives x back
    assert read_decimal(format(value, ",")) == value


@given(st.floats(min_value=-1e15, max_value=1e15, allow_nan=False, allow_infinity=False))
def test_plain_float_reads_back_exactly_in_either_system(value: float) -> None:
    assert read_decimal(repr(value)) == value
    assert read_decimal(repr(value), decimal_comma=True) == value


@given(st.integers(min_value=0, max_value=10**12), st.integers(min_value=0, max_value=99))
def test_metric_decimal_comma_reads_back(whole: int, hundredths: int) -> None:
    # "12,05" (two decimals, never three) is a decimal comma for a metric user
    text = f"{whole},{hundredths:02d}"
    assert read_decimal(text, decimal_comma=True) == float(f"{whole}.{hundredths:02d}")


@given(st.integers(min_value=-(10**15), max_value=10**15))
def test_integer_round_trip(value: int) -> None:
    assert read_integer(str(value)) == value
    assert read_integer(format(value, ",")) == value
    assert math.isfinite(float(value))
