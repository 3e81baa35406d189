"""The observing site: where the telescope stands and the air it looks through."""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from .limits import Interlocks


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


@dataclass(frozen=True)
class Site:
    """A geodetic site (WGS84) with its default weather.

    latitude, longitude: degrees, longitude positive east; height: metres above the ellipsoid.
    pressure: hPa (None: the standard atmosphere at the site's height; 0 turns refraction off);
    temperature: degrees C; humidity: relative, 0..1; wavelength: micrometres.
    timezone: IANA name for local times; interlocks: horizon mask, mount limits, Sun avoidance.
    """

    latitude: float
    longitude: float
    height: float = 0.0
    pressure: float | None = None
    temperature: float = 10.0
    humidity: float = 0.5
    wavelength: float = 0.55
    name: str = ""
    timezone: str = "UTC"
    # Horizon mask, mount limits and Sun avoidance (on by default).
    interlocks: Interlocks = field(default_factory=Interlocks)

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

    def with_weather(self, pressure=None, temperature=None, humidity=None, wavelength=None):
        """A copy with the given weather values replaced (None keeps the site's own)."""
        changes = {k: v for k, v in (("pressure", pressure), ("temperature", temperature),
                                     ("humidity", humidity), ("wavelength", wavelength))
                   if v is not None}
        return replace(self, **changes)
