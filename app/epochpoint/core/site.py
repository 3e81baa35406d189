"""The observing site: where the telescope stands and the air it looks through."""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from zoneinfo import ZoneInfo, ZoneInfoNotFoundError

from .limits import Interlocks
from .zones import zone_at


class SiteError(ValueError):
    """A site value that cannot be used, naming the field."""

    def __init__(self, field_name: str, message: str):
        self.field = field_name
        super().__init__(f"site {field_name}: {message}")


def standard_pressure_hpa(height_m: float) -> float:
    """Pressure of the ICAO Standard Atmosphere (ISO 2533:1975) at a height, in hPa.

    p = 1013.25 (1 - 2.25577e-5 h)^5.25588, valid in the troposphere (h < 11 km).
    """
    return 1013.25 * (1.0 - 2.25577e-5 * height_m) ** 5.25588


def _is_zone(name) -> bool:
    """True when `name` is a time zone name that zoneinfo knows."""
    if not isinstance(name, str):
        return False
    try:
        ZoneInfo(name)
    except (ZoneInfoNotFoundError, ValueError, OSError):
        return False
    return True


class _ZoneFoundWhenRead:
    """The `timezone` field: a zone left out (None) is found from the coordinates the first
    time it is read, not when the Site is made (timezonefinder takes about 0.4 s to load,
    and most computations never show a local time)."""

    def __set_name__(self, owner, name):
        self.stored = "_" + name

    def __get__(self, site, owner=None):
        if site is None:
            return None  # the field's default
        zone = site.__dict__.get(self.stored)
        if zone is None:
            zone = zone_at(site.latitude, site.longitude)
            site.__dict__[self.stored] = zone
        return zone

    def __set__(self, site, value):
        site.__dict__[self.stored] = value


@dataclass(frozen=True)
class Site:
    """A geodetic site (WGS84) with its default weather.

    latitude, longitude: degrees, longitude positive east; height: metres above the ellipsoid.
    pressure: hPa (None: the standard atmosphere at the site's height; 0 turns refraction off);
    temperature: degrees C; humidity: relative, 0..1; wavelength: micrometres.
    timezone: IANA name used to show local times, or None (the default) for the zone that holds
    the coordinates, found offline (`zones.zone_at`; `timezone_from_coordinates` is then True).
    The zone only labels times: the night of a date is fixed by the longitude, not the zone.
    interlocks: horizon mask, mount limits, Sun avoidance.
    """

    latitude: float
    longitude: float
    height: float = 0.0
    pressure: float | None = None
    temperature: float = 10.0
    humidity: float = 0.5
    wavelength: float = 0.55
    name: str = ""
    timezone: str | None = _ZoneFoundWhenRead()
    # Horizon mask, mount limits and Sun avoidance (on by default).
    interlocks: Interlocks = field(default_factory=Interlocks)
    # True when the zone was found from the coordinates rather than given.
    timezone_from_coordinates: bool = field(default=False, compare=False)

    def __post_init__(self):
        for field_name in ("latitude", "longitude", "height", "temperature", "humidity",
                           "wavelength"):
            value = getattr(self, field_name)
            if not isinstance(value, (int, float)) or not math.isfinite(value):
                raise SiteError(field_name, f"{value!r} is not a finite number")
        if not -500.0 <= self.height <= 10000.0:
            raise SiteError("height", f"{self.height!r} must be in [-500, 10000] m")
        if self.pressure is None:
            object.__setattr__(self, "pressure", standard_pressure_hpa(self.height))
        checks = (
            ("latitude", abs(self.latitude) <= 90.0, "must be in [-90, +90] degrees"),
            ("longitude", -360.0 <= self.longitude <= 360.0, "must be in [-360, +360] degrees"),
            ("pressure", math.isfinite(self.pressure) and 0.0 <= self.pressure <= 1200.0,
             "must be in [0, 1200] hPa"),
            ("temperature", -80.0 <= self.temperature <= 60.0, "must be in [-80, +60] C"),
            ("humidity", 0.0 <= self.humidity <= 1.0, "must be a fraction in [0, 1]"),
            ("wavelength", 0.3 <= self.wavelength <= 30.0, "must be in [0.3, 30] micrometres"),
        )
        for field_name, ok, message in checks:
            if not ok:
                raise SiteError(field_name, f"{getattr(self, field_name)!r} {message}")
        if not isinstance(self.interlocks, Interlocks):
            raise SiteError("interlocks", "must be an Interlocks")
        given = self.__dict__.get("_timezone")
        if given is None or not str(given).strip():
            object.__setattr__(self, "timezone", None)  # found when first read
            object.__setattr__(self, "timezone_from_coordinates", True)
        elif not _is_zone(self.timezone):
            raise SiteError("timezone", f"{self.timezone!r} is not an IANA time zone name "
                            "(e.g. America/Santiago, Europe/Madrid, Etc/GMT+10, UTC)")
        elif not isinstance(self.timezone, str):
            raise SiteError("timezone", f"{self.timezone!r} is not an IANA time zone name")

    @property
    def timezone_source(self) -> str:
        """Where the zone came from: 'site' (given) or 'coordinates' (found from them)."""
        return "coordinates" if self.timezone_from_coordinates else "site"

    def with_timezone(self, name: str | None):
        """A copy showing local times in zone `name` (None: the zone of the coordinates)."""
        return replace(self, timezone=name, timezone_from_coordinates=False)

    def with_weather(self, pressure=None, temperature=None, humidity=None, wavelength=None):
        """A copy with the given weather values replaced (None keeps the site's own)."""
        changes = {k: v for k, v in (("pressure", pressure), ("temperature", temperature),
                                     ("humidity", humidity), ("wavelength", wavelength))
                   if v is not None}
        # A zone not looked up yet stays so (None: found from the coordinates when read).
        return replace(self, timezone=self.__dict__.get("_timezone"), **changes)
