"""Instants, time scales and the Earth-orientation table, all offline.

The IERS Bulletin A table (finals2000A) shipped by the astropy-iers-data package supplies
UT1-UTC and polar motion. Nothing is ever downloaded: when an instant lies beyond the table's
predictions, or long after its last measurement, a `StaleEarthOrientation` warning states the
table's age and the computation goes on with astropy's extrapolation (UT1-UTC held, polar
motion from its long-term mean).
"""
from __future__ import annotations

import datetime as _dt
import functools
import warnings
from dataclasses import dataclass
from functools import lru_cache

import erfa
import numpy as np
from astropy.time import Time
from astropy.utils import iers

# Offline for good: never download, never refuse an old table.
iers.conf.auto_download = False
iers.conf.auto_max_age = None
iers.conf.iers_degraded_accuracy = "ignore"

# An instant this long after the table's last measured value counts as stale (UT1 prediction
# errors grow to ~10 ms, 0.15" at the equator, after about 90 days: IERS Bulletin A accuracy note).
STALE_AFTER_DAYS = 90.0


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


@lru_cache(maxsize=1)
def _table():
    return iers.IERS_Auto.open()


@lru_cache(maxsize=1)
def _table_limits() -> tuple[float, float]:
    """(MJD of the last measured value, MJD of the last predicted value)."""
    table = _table()
    mjd = np.asarray(table["MJD"].to_value("d"))
    predicted = np.asarray(table["UT1Flag"]) == "P"
    last_measured = mjd[~predicted][-1] if (~predicted).any() else mjd[0]
    return float(last_measured), float(mjd[-1])


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
    mjd = float(np.max(t.utc.mjd))
    if mjd > predictions_end:
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
    """
    if isinstance(value, Time):
        return value.utc
    if isinstance(value, _dt.datetime):
        if value.tzinfo is not None:
            value = value.astimezone(_dt.timezone.utc).replace(tzinfo=None)
        return Time(value, scale="utc")
    text = str(value).strip()
    if text.lower() == "now":
        return Time.now().utc
    try:
        parsed = _dt.datetime.fromisoformat(text.replace("Z", "+00:00").replace("z", "+00:00"))
    except ValueError:
        raise TimeInputError(f"time {text!r} is not ISO 8601 UTC (e.g. 2027-01-20T23:10:00Z) "
                             "or 'now'") from None
    if parsed.tzinfo is not None:
        parsed = parsed.astimezone(_dt.timezone.utc).replace(tzinfo=None)
    return Time(parsed, scale="utc")


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
    converted = getattr(t, scale)
    return float(converted.jd1), float(converted.jd2)
