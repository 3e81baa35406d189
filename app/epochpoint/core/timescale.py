"""Instants, time scales and the Earth-orientation table, all offline.

The IERS Bulletin A table (finals2000A) shipped by the astropy-iers-data package supplies
UT1-UTC and polar motion, read from a binary cache of it (earth_orientation.py,
iers_cache.py) with astropy's own interpolation. Nothing is ever downloaded: when an instant lies beyond the table's
predictions, long after its last measurement, or before its first entry (1973), a
`StaleEarthOrientation` warning says so and the computation goes on with astropy's
extrapolation (UT1-UTC held at the nearest value, polar motion from its long-term mean).

Instants and dates are accepted from 1800 to 2200. ERFA's Earth ephemeris (epv00) is specified
for 1900-2100 and its errors merely double by 1800 and 2200 (ERFA epv00, note 4); the
precession-nutation and Moon models degrade likewise. Outside that span the answers would be
guesses, so such times are refused in one line. Leap seconds (23:59:60 on a day the leap-second
table lists, e.g. 2016-12-31) are accepted as instants.
"""
from __future__ import annotations

import datetime as _dt
import functools
import re
import warnings
from dataclasses import dataclass

import erfa
import numpy as np
from astropy.time import Time

from . import earth_orientation

# Offline for good: astropy never downloads and never refuses an old table, and it takes
# the leap seconds from the cache (earth_orientation.py) instead of parsing the list again.
earth_orientation.keep_astropy_offline()
try:
    earth_orientation.install_leap_seconds()
except Exception:  # tables unreadable: astropy's own check runs, and says why, when first needed
    pass

# An instant this long after the table's last measured value counts as stale (UT1 prediction
# errors grow to ~10 ms, 0.15" at the equator, after about 90 days: IERS Bulletin A accuracy note).
STALE_AFTER_DAYS = 90.0
# The years every instant and date must lie in (see the module docstring).
FIRST_YEAR, LAST_YEAR = 1800, 2200
# Julian dates of 1799-12-31T00:00 and 2201-01-02T00:00: the same span for astropy Times, with
# a day's margin for the night grids of the first and last dates.
_FIRST_JD, _END_JD = 2378495.5, 2524959.5
# Seconds "60" in an ISO 8601 time, with optional fraction and UTC offset.
_LEAP_SECOND = re.compile(r"T\d{2}:\d{2}:(60)(?:[.,]\d+)?(?:[+-]\d{2}:?\d{2})?$")


class TimeInputError(ValueError):
    """A time string that cannot be read."""


class StaleEarthOrientation(UserWarning):
    """The Earth-orientation table does not cover an instant with measured or fresh values."""


@dataclass(frozen=True)
class EarthOrientationStatus:
    """What the shipped IERS table covers (dates as ISO 8601 UTC)."""

    last_measured: str
    predictions_end: str
    age_days: float  # from the last measured value to now


def quiet_erfa(func):
    """Silence ERFA's "dubious year" notes: the staleness check says it once, in our words."""
    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", erfa.ErfaWarning)
            return func(*args, **kwargs)
    return wrapper


def _table_limits() -> tuple[float, float]:
    """(MJD of the last measured value, MJD of the last predicted value)."""
    table = earth_orientation.table()
    return table.last_measured_mjd, table.predictions_end_mjd


def _table_start() -> float:
    """MJD of the table's first entry."""
    return earth_orientation.table().first_mjd


@quiet_erfa
def _mjd_to_iso(mjd: float) -> str:
    return iso_z(Time(mjd, format="mjd", scale="utc"))


def earth_orientation_status(now: Time | None = None) -> EarthOrientationStatus:
    """The coverage of the shipped Earth-orientation table and its age today."""
    last_measured, predictions_end = _table_limits()
    now = Time.now() if now is None else now
    return EarthOrientationStatus(last_measured=_mjd_to_iso(last_measured),
                                  predictions_end=_mjd_to_iso(predictions_end),
                                  age_days=float(now.utc.mjd - last_measured))


@quiet_erfa
def check_earth_orientation(t: Time) -> str | None:
    """Warn (never fail) when the table is stale for instant t; return the message or None."""
    last_measured, predictions_end = _table_limits()
    first = _table_start()
    mjd_utc = np.atleast_1d(t.utc.mjd)
    mjd, earliest = float(np.max(mjd_utc)), float(np.min(mjd_utc))
    if earliest < first:
        message = (f"Earth-orientation data begin {_mjd_to_iso(first)[:10]}; UT1-UTC is held "
                   f"at its first value for {iso_z(Time(earliest, format='mjd'))} (sidereal "
                   "time and pointing may be off by arcseconds to minutes of arc)")
    elif mjd > predictions_end:
        message = (f"Earth-orientation predictions end {_mjd_to_iso(predictions_end)[:10]}; "
                   f"UT1-UTC is held at its last value for {iso_z(Time(mjd, format='mjd'))} "
                   "(pointing error may grow to several arcseconds; update astropy-iers-data)")
    elif mjd - last_measured > STALE_AFTER_DAYS:
        message = (f"Earth-orientation data last measured {_mjd_to_iso(last_measured)[:10]}, "
                   f"{mjd - last_measured:.0f} days before the requested instant; predictions "
                   "that old may be off by 0.1-1 arcsec (update astropy-iers-data)")
    else:
        return None
    warnings.warn(message, StaleEarthOrientation, stacklevel=3)
    return message


@quiet_erfa
def parse_time(value) -> Time:
    """An astropy Time (UTC) from an astropy Time, a datetime, 'now', or an ISO 8601 string.

    ISO strings are UTC: a trailing 'Z' or '+00:00' is accepted, other offsets are converted.
    A leap second (23:59:60) is accepted on the days UTC inserted one. Times outside the years
    FIRST_YEAR..LAST_YEAR raise TimeInputError.
    """
    if isinstance(value, Time):
        jd = np.asarray(value.jd1) + np.asarray(value.jd2)
        if np.size(jd) and not (np.min(jd) >= _FIRST_JD and np.max(jd) < _END_JD):
            worst = np.ravel(value)[int(np.argmax(np.abs(np.ravel(jd) - 2451545.0)))]
            raise TimeInputError(f"time {worst.utc.isot}Z {_OUTSIDE_YEARS}")
        return value.utc
    if isinstance(value, _dt.datetime):
        if value.tzinfo is not None:
            value = value.astimezone(_dt.timezone.utc).replace(tzinfo=None)
        check_year(value.year, f"time {value.isoformat()!r}")
        return Time(value, scale="utc")
    text = str(value).strip()
    if text.lower() == "now":
        return Time.now().utc
    normalized = text.replace("Z", "+00:00").replace("z", "+00:00")
    leap = _LEAP_SECOND.search(normalized)
    if leap is not None:
        return _leap_second(text, normalized[:leap.start(1)] + "59" + normalized[leap.end(1):])
    parsed = _utc_datetime(text, normalized)
    return Time(parsed, scale="utc")


_OUTSIDE_YEARS = (f"is outside the years {FIRST_YEAR} to {LAST_YEAR} (the span of the time "
                  "scales and models used here)")


def check_year(year: int, what: str) -> None:
    """TimeInputError('<what> is outside the years 1800 to 2200 ...') for a year outside."""
    if not FIRST_YEAR <= year <= LAST_YEAR:
        raise TimeInputError(f"{what} {_OUTSIDE_YEARS}")


def _utc_datetime(text: str, normalized: str) -> _dt.datetime:
    """A naive UTC datetime from ISO 8601 text, checked against the year span."""
    try:
        parsed = _dt.datetime.fromisoformat(normalized)
    except ValueError:
        raise TimeInputError(f"time {text!r} is not ISO 8601 UTC (e.g. 2027-01-20T23:10:00Z) "
                             "or 'now'") from None
    check_year(parsed.year, f"time {text!r}")
    if parsed.tzinfo is not None:
        try:
            parsed = parsed.astimezone(_dt.timezone.utc).replace(tzinfo=None)
        except OverflowError:
            raise TimeInputError(f"time {text!r} {_OUTSIDE_YEARS}") from None
        check_year(parsed.year, f"time {text!r}")
    return parsed


def _leap_second(text: str, one_second_earlier: str) -> Time:
    """The instant of a leap second written as hh:mm:60, read as the second after :59.

    Leap seconds end a UTC day on which TAI-UTC steps by one second (ERFA dat, from the IERS
    leap-second table); any other :60 is refused.
    """
    before = _utc_datetime(text, one_second_earlier)
    day = before.date()
    after = day + _dt.timedelta(days=1)
    inserted = (erfa.dat(after.year, after.month, after.day, 0.0)
                - erfa.dat(day.year, day.month, day.day, 0.0)) > 0.5
    if before.time().replace(microsecond=0) != _dt.time(23, 59, 59) or not inserted:
        raise TimeInputError(f"time {text!r} names a leap second UTC never had (leap seconds "
                             "are 23:59:60 UTC on the days the leap-second table lists)")
    return Time(f"{day.isoformat()}T23:59:60.{before.microsecond:06d}", scale="utc")


@quiet_erfa
def iso_z(t: Time) -> str | list:
    """ISO 8601 UTC with a trailing Z, to the millisecond."""
    text = t.utc.isot
    if np.ndim(text) == 0:
        return str(text) + "Z"
    return [str(x) + "Z" for x in np.ravel(text)]


@quiet_erfa
def jd_pair(t: Time, scale: str) -> tuple[float, float]:
    """The two-part Julian date of t in the given scale (tt, tdb, ut1, utc)."""
    if scale == "ut1":  # UT1-UTC from the cached table, as astropy would interpolate it
        t = earth_orientation.with_ut1_utc(t)
    converted = getattr(t, scale)
    return float(converted.jd1), float(converted.jd2)
