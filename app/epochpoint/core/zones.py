"""The civil time zone of a place, found from its coordinates, offline.

The zone only labels times for people: every computation runs in UTC and the night of a date
is fixed by the site's longitude (see `night.night_window`). A site that names no zone gets
the IANA zone whose boundary polygon holds its coordinates, from the `timezonefinder` package
(which ships the boundary data of the timezone-boundary-builder project, built from
OpenStreetMap; no network). Open sea lies in the nautical zones `Etc/GMT+N` / `Etc/GMT-N`
(15 degrees wide, centred on multiples of 15 degrees; note the POSIX sign: `Etc/GMT+10` is
UTC-10). When the package is missing or finds nothing, the nautical zone of the longitude is
used, so a zone is always found.

Cost: the first lookup loads the boundary index (about 0.1 s); later lookups take about 50 us.
"""
from __future__ import annotations

import datetime as _dt
import functools
import math

from zoneinfo import ZoneInfo, ZoneInfoNotFoundError


def nautical_zone(longitude_deg: float) -> str:
    """The nautical time zone (IANA `Etc/GMT±N`, POSIX sign) of a longitude, east positive."""
    offset_h = int(round(wrap_longitude(longitude_deg) / 15.0))
    offset_h = max(-12, min(12, offset_h))
    if offset_h == 0:
        return "Etc/GMT"
    # POSIX convention: Etc/GMT+N is N hours *behind* UTC, i.e. west of Greenwich.
    return f"Etc/GMT{'+' if offset_h < 0 else '-'}{abs(offset_h)}"


def wrap_longitude(longitude_deg: float) -> float:
    """Longitude brought into [-180, +180) degrees."""
    return (float(longitude_deg) + 180.0) % 360.0 - 180.0


@functools.lru_cache(maxsize=1)
def _finder():
    # Without numba (installed for the compiled positions chain): timezonefinder would
    # compile its helpers with it, 0.3 s a process instead of 0.04 s for its first lookup.
    from .kernels import numba_hidden

    try:
        with numba_hidden():
            from timezonefinder import TimezoneFinder
    except ImportError:  # pragma: no cover - a declared dependency; the fallback still works
        return None
    return TimezoneFinder()


@functools.lru_cache(maxsize=4096)
def zone_at(latitude_deg: float, longitude_deg: float) -> str:
    """The IANA time zone name at a place (degrees, east positive), found offline."""
    finder = _finder()
    name = None
    if finder is not None and math.isfinite(latitude_deg) and math.isfinite(longitude_deg):
        lon = wrap_longitude(longitude_deg)
        name = finder.timezone_at(lat=float(latitude_deg), lng=lon)
        if name is None:  # a point the polygons miss (none in the shipped data, but be sure)
            name = finder.timezone_at_land(lat=float(latitude_deg), lng=lon)
    if name:
        try:
            ZoneInfo(name)
            return name
        except (ZoneInfoNotFoundError, ValueError, OSError):
            pass  # a zone newer than the installed tzdata: fall back to the nautical zone
    return nautical_zone(longitude_deg)


def zone_or_utc(name: str):
    """The zone called `name`, or UTC when zoneinfo does not know it."""
    try:
        return ZoneInfo(name)
    except (ZoneInfoNotFoundError, ValueError, OSError, TypeError):
        return _dt.timezone.utc


def clock_label(instant: _dt.datetime, zone_name: str, with_seconds: bool = False) -> str:
    """'HH:MM ABBR (HH:MM UTC)': an aware instant in the zone, labelled with the zone's own
    abbreviation or offset (e.g. 'MST', '-03'), then in UTC."""
    fmt = "%H:%M:%S" if with_seconds else "%H:%M"
    local = instant.astimezone(zone_or_utc(zone_name))
    return f"{local:{fmt}} {local.tzname()} ({instant.astimezone(_dt.timezone.utc):{fmt}} UTC)"
