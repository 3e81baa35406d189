"""Sexagesimal parsing and formatting, checked against values worked by hand.

Hand arithmetic: 1 h = 15 deg, 1 min = 1/60, 1 s = 1/3600 of the unit (common practice).
"""
import math

import numpy as np
import pytest
from hypothesis import given, strategies as st

from epochpoint.io import (format_dec_dms, format_hours, format_ra_hms, parse_dec, parse_ra,
                           sidereal_time_text)


@pytest.mark.parametrize("text, expected_deg", [
    ("12:30:00", 187.5),                 # 12.5 h x 15
    ("12 30 00", 187.5),                 # space-separated form
    ("12:30", 187.5),                    # seconds omitted
    ("00:00:00", 0.0),
    ("23:59:59.9", (23 + 59 / 60 + 59.9 / 3600) * 15),  # 359.999583...
    ("06:45:08.917", (6 + 45 / 60 + 8.917 / 3600) * 15),
    ("187.5", 187.5),                    # decimal degrees
    (" 0.0 ", 0.0),
])
def test_parse_ra_hand_worked(text, expected_deg):
    assert parse_ra(text) == pytest.approx(expected_deg, abs=1e-12)


def test_parse_ra_hand_worked_literal_value():
    # 06:45:08.917 = 6.752476944 h = 101.28715417 deg (worked by hand to 8 decimals).
    assert parse_ra("06:45:08.917") == pytest.approx(101.28715417, abs=1e-8)


@pytest.mark.parametrize("text, expected_deg", [
    ("-00:30:00", -0.5),                 # the sign belongs to the whole angle
    ("-00 30 00", -0.5),
    ("-00:00:36", -0.01),
    ("+45:15:36", 45.26),                # 45 + 15/60 + 36/3600
    ("-45 15 36", -45.26),
    ("45:15:36", 45.26),
    ("+07:24:25.4", 7 + 24 / 60 + 25.4 / 3600),
    ("90:00:00", 90.0),
    ("-90:00:00", -90.0),
    ("-0.5", -0.5),
    ("+12.25", 12.25),
])
def test_parse_dec_hand_worked(text, expected_deg):
    assert parse_dec(text) == pytest.approx(expected_deg, abs=1e-12)


@pytest.mark.parametrize("text", [
    "not-a-number", "", "12:60:00", "12:30:60", "24:00:00", "-01:00:00", "360", "-1", "nan",
    "12:30:", "12::30", "1:2:3:4", "12.5:30:00", "12h30m00s", "inf",
])
def test_parse_ra_rejects(text):
    with pytest.raises(ValueError) as info:
        parse_ra(text)
    assert "\n" not in str(info.value)


@pytest.mark.parametrize("text", [
    "+90:00:01", "91", "-90.5", "00:60:00", "10:10:60", "--1:00:00", "+-1", "abc", "nan",
    "1:2:3:4",
])
def test_parse_dec_rejects(text):
    with pytest.raises(ValueError):
        parse_dec(text)


def test_format_ra_hms_hand_worked():
    assert format_ra_hms(187.5) == "12:30:00.00"
    assert format_ra_hms(0.0, 0) == "00:00:00"
    # 359.99999999 deg = 23:59:59.9999976 h, which rounds up to 24:00:00.00 and wraps to 0.
    assert format_ra_hms(359.99999999, 2) == "00:00:00.00"
    assert list(format_ra_hms(np.array([187.5, 15.0]), 1)) == ["12:30:00.0", "01:00:00.0"]


def test_format_dec_dms_hand_worked():
    assert format_dec_dms(-0.5) == "-00:30:00.0"
    assert format_dec_dms(45.26, 0) == "+45:15:36"
    assert format_dec_dms(-1e-9) == "+00:00:00.0"  # rounds to zero: no "-00:00:00.0"
    # 10.999999 deg = 10:59:59.9964, rounds up with carry into the degrees.
    assert format_dec_dms(10.999999, 1) == "+11:00:00.0"
    assert format_dec_dms(np.nan) == ""


def test_format_hours_signed_and_wrapped():
    assert format_hours(-7.5) == "-00:30:00"       # -7.5 deg = -0.5 h
    assert format_hours(190.0) == "-11:20:00"      # 190 deg wraps to -170 deg = -11h20m
    assert format_hours(22.5, 1) == "+01:30:00.0"
    assert list(format_hours(np.array([0.0, np.nan]))) == ["+00:00:00", ""]


@given(st.floats(min_value=0.0, max_value=359.999, allow_nan=False))
def test_ra_format_then_parse_is_within_half_a_digit(ra_deg):
    # 3 decimals of a second of time: the rounding error is at most 0.0005 s = 0.0075 arcsec.
    half_digit_deg = 0.0005 * 15 / 3600
    assert parse_ra(format_ra_hms(ra_deg, 3)) == pytest.approx(ra_deg, abs=half_digit_deg + 1e-12)


@given(st.floats(min_value=-90.0, max_value=90.0, allow_nan=False))
def test_dec_format_then_parse_is_within_half_a_digit(dec_deg):
    parsed = parse_dec(format_dec_dms(dec_deg, 2))
    assert parsed == pytest.approx(dec_deg, abs=0.005 / 3600 + 1e-12)
    assert math.copysign(1.0, parsed) == math.copysign(1.0, dec_deg) or abs(dec_deg) < 0.005 / 3600


@pytest.mark.parametrize("hours, expected", [
    (19.5, "LST 19:30:00.0"),            # 19.5 h = 19 h 30 min (hand arithmetic)
    (-1.0, "LST 23:00:00.0"),            # a negative sidereal time wraps into 0..24 h, no sign
    (25.25, "LST 01:15:00.0"),           # above 24 h wraps too
    (0.0, "LST 00:00:00.0"),
    (23.99999, "LST 00:00:00.0"),        # 23:59:59.964 rounds to 24:00:00.0, which is 0 h
    (6.0 + 45 / 60 + 8.94 / 3600, "LST 06:45:08.9"),
    (float("nan"), "LST --"),
])
def test_sidereal_time_text_hand_worked(hours, expected):
    assert sidereal_time_text(hours) == expected


@given(st.floats(min_value=-48.0, max_value=48.0, allow_nan=False))
def test_sidereal_time_text_is_unsigned_and_below_24h(hours):
    text = sidereal_time_text(hours)
    assert text.startswith("LST ") and "-" not in text and "+" not in text
    assert 0.0 <= parse_ra(text[4:]) / 15.0 < 24.0
