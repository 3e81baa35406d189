"""Catalogue epochs: Julian years pass through, Besselian epochs become Julian years."""
import pytest

from epochpoint.io import parse_epoch

JD_J2000 = 2451545.0  # J2000.0 (IAU 1976), Julian date
DAYS_PER_JULIAN_YEAR = 365.25


@pytest.mark.parametrize("text, expected", [("2016.0", 2016.0), ("J2016.0", 2016.0),
                                            ("j1991.25", 1991.25), (" 2000 ", 2000.0),
                                            ("J 2015.5", 2015.5)])
def test_julian_epochs(text, expected):
    assert parse_epoch(text) == expected


@pytest.mark.parametrize("text, jd", [
    # B1950.0 = JD 2433282.4235 and B1900.0 = JD 2415020.3135 (Lieske 1979, A&A 73, 282;
    # also the Explanatory Supplement to the Astronomical Almanac, 1992, sec. 3.4).
    ("B1950.0", 2433282.4235),
    ("B1900.0", 2415020.3135),
])
def test_besselian_epochs_against_published_julian_dates(text, jd):
    expected_jyear = 2000.0 + (jd - JD_J2000) / DAYS_PER_JULIAN_YEAR
    # The published JDs have 4 decimals (0.0001 d = 3e-7 yr).
    assert parse_epoch(text) == pytest.approx(expected_jyear, abs=5e-7)


@pytest.mark.parametrize("text", ["X2000", "", "J", "2000-01-01", "B99999", "J2016.0.1", "nan"])
def test_bad_epochs(text):
    with pytest.raises(ValueError):
        parse_epoch(text)
