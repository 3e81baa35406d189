"""Times at the edges: years outside what the models cover are refused in one line, a leap
second is an instant, and instants before the Earth-orientation table warn like those after it.

References: the leap second at the end of 2016-12-31 (IERS Bulletin C 52, from memory; and
ERFA's leap-second table, which astropy reads independently of our parsing); no leap second
ended 2017-06-30 (IERS Bulletin C 53, from memory). The IERS finals2000A table begins on
1973-01-02 (the first MJD of the file astropy-iers-data ships, read through astropy).
"""
from __future__ import annotations

import warnings
from pathlib import Path

import pytest
from astropy.time import Time
from astropy.utils import iers

import epochpoint as ep
from epochpoint.cli.main import main
from epochpoint.core.night import night_boundaries
from epochpoint.core.timescale import StaleEarthOrientation, TimeInputError, iso_z, parse_time

SAMPLES = Path(__file__).resolve().parents[2] / "sample_targets"
SITE = ep.Site(latitude=-24.6, longitude=-70.4, height=2635.0, timezone="America/Santiago")
STAR = ep.Targets.from_columns(ra=[10.0], dec=[-20.0])


@pytest.mark.parametrize("text", ["1799-12-31T23:59:59Z", "2201-01-01T00:00:00Z",
                                  "0001-01-01T00:00:00Z", "1700-06-01T12:00:00+01:00",
                                  "9999-12-31T23:59:59-05:00"])
def test_instants_outside_1800_to_2200_are_refused_in_our_words(text):
    with pytest.raises(TimeInputError) as caught:
        parse_time(text)
    message = str(caught.value)
    assert text in message and "outside the years 1800 to 2200" in message
    assert "\n" not in message


def test_night_far_in_the_future_is_a_range_error_not_an_overflow():
    with pytest.raises(TimeInputError, match="date '9999-12-31' is outside the years 1800"):
        night_boundaries(SITE, "9999-12-31")
    # The ends of the span themselves are accepted, nights that run past them included.
    for text in ("1800-01-01T00:00:00Z", "2200-12-31T23:59:59Z"):
        assert parse_time(text).utc.isot[:4] == text[:4]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        assert night_boundaries(SITE, "2200-12-31").sunset is not None


def test_cli_night_9999_exits_2_with_one_line(capsys):
    code = main(["plan", str(SAMPLES / "loma_candil_targets.csv"), "--site",
                 str(SAMPLES / "loma_candil.toml"), "--night", "9999-12-31"])
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 2
    assert len(err) == 1 and "outside the years 1800 to 2200" in err[0]


def test_a_leap_second_is_an_instant():
    t = parse_time("2016-12-31T23:59:60Z")
    # astropy reads the same label through ERFA's own leap-second table.
    reference = Time("2016-12-31T23:59:60", scale="utc")
    assert abs((t - reference).to_value("s")) < 1e-6
    assert (Time("2017-01-01T00:00:00", scale="utc") - t).to_value("s") == pytest.approx(1.0)
    assert (t - Time("2016-12-31T23:59:59", scale="utc")).to_value("s") == pytest.approx(1.0)
    assert iso_z(parse_time("2016-12-31T23:59:60.5Z")) == "2016-12-31T23:59:60.500Z"


def test_a_leap_second_utc_never_had_is_refused():
    with pytest.raises(TimeInputError, match="leap second"):
        parse_time("2017-06-30T23:59:60Z")


def test_positions_at_a_leap_second_from_the_command_line(capsys):
    code = main(["positions", str(SAMPLES / "loma_candil_targets.csv"), "--site",
                 str(SAMPLES / "loma_candil.toml"), "--at", "2016-12-31T23:59:60Z",
                 "--format", "csv"])
    out, err = capsys.readouterr()
    assert code == 0, err
    assert "# time: 2016-12-31T23:59:60.000Z" in out


def test_before_the_earth_orientation_table_warns_like_after_it():
    first = iers.IERS_Auto.open()["MJD"][0]
    assert Time(first, format="mjd").isot[:10] == "1973-01-02"
    with pytest.warns(StaleEarthOrientation, match="begin 1973-01-02"):
        ep.positions(STAR, SITE, "1965-06-01T00:00:00Z")
    # Inside the measured part of the table: no warning at all.
    with warnings.catch_warnings():
        warnings.simplefilter("error", StaleEarthOrientation)
        ep.positions(STAR, SITE, "2001-06-01T00:00:00Z")
