"""Atmospheric refraction, from the zenith down to (and just below) the horizon.

Above 15 degrees altitude: the A tan z + B tan^3 z model with A, B from ERFA refco (Green
1987, Spherical Astronomy, sec. 4.31; Hohenkerk & Sinclair 1985, NAO Technical Note 63),
applied from the topocentric (unrefracted) zenith distance with one Newton-Raphson step as in
SOFA's atioq; it uses pressure, temperature, humidity and wavelength, and agrees with ray
tracing to about 0.1" at 45 deg and a few arcseconds at 75 deg zenith distance.

Below 15 degrees, where A tan z + B tan^3 z fails, Saemundsson's formula
R = 1.02' / tan(h + 10.3 / (h + 5.11)) for true altitude h in degrees (Saemundsson 1986, Sky &
Telescope 72, 70; Meeus, Astronomical Algorithms, 2nd ed., eq. 16.4), made for 1010 hPa and
10 C, is scaled by a factor that runs linearly in altitude from the density ratio
(P / 1010 hPa) (283 K / T) at the horizon (Meeus, ch. 16) to the value that makes it meet the
A, B model at 15 degrees, so refraction is continuous and keeps the weather and wavelength
dependence of A, B. Near the horizon real refraction varies by several arcminutes with the
temperature profile: no formula is better than about 1' there. Below a true altitude of
-1 degree the refraction is held at its value there.
"""
from __future__ import annotations

import numpy as np

from .constants import DEG_TO_RAD

JOIN_ALTITUDE_DEG = 15.0
LOWEST_ALTITUDE_DEG = -1.0
_ARCMIN_TO_RAD = DEG_TO_RAD / 60.0


def saemundsson_rad(true_alt_deg: np.ndarray) -> np.ndarray:
    """Saemundsson's refraction (radians) at standard conditions for true altitude (deg)."""
    h = np.maximum(true_alt_deg, LOWEST_ALTITUDE_DEG)
    return 1.02 * _ARCMIN_TO_RAD / np.tan((h + 10.3 / (h + 5.11)) * DEG_TO_RAD)


def refraction_ab_rad(sin_alt: np.ndarray, cos_alt: np.ndarray, refa: float, refb: float):
    """A tan z + B tan^3 z refraction (radians) for topocentric altitude (SOFA atioq form)."""
    r = np.maximum(cos_alt, 1e-6)
    z = np.maximum(sin_alt, 0.05)
    tz = r / z
    w = refb * tz * tz
    return (refa + w) * tz / (1.0 + (refa + 3.0 * w) / (z * z))


def low_altitude_join_factor(refa: float, refb: float) -> float:
    """Scale that makes Saemundsson's formula meet the A, B model at 15 deg altitude."""
    h = JOIN_ALTITUDE_DEG * DEG_TO_RAD
    at_join = refraction_ab_rad(np.sin(h), np.cos(h), refa, refb)
    return float(at_join / saemundsson_rad(np.array(JOIN_ALTITUDE_DEG)))


def density_factor(pressure_hpa: float, temperature_c: float) -> float:
    """Air density relative to Saemundsson's 1010 hPa and 10 C (Meeus, ch. 16)."""
    return (pressure_hpa / 1010.0) * (283.0 / (273.0 + temperature_c))


def refraction_rad(sin_alt, cos_alt, refa: float, refb: float, join: float,
                   horizon_factor: float) -> np.ndarray:
    """Refraction (radians, to add to the altitude) for topocentric sin/cos of altitude.

    join: low_altitude_join_factor(refa, refb); horizon_factor: density_factor(P, T).
    """
    refraction = refraction_ab_rad(sin_alt, cos_alt, refa, refb)
    low = sin_alt < np.sin(JOIN_ALTITUDE_DEG * DEG_TO_RAD)
    if low.any():
        alt_deg = np.degrees(np.arctan2(sin_alt[low], cos_alt[low]))
        weight = np.clip(alt_deg / JOIN_ALTITUDE_DEG, 0.0, 1.0)
        factor = horizon_factor + (join - horizon_factor) * weight
        refraction[low] = factor * saemundsson_rad(alt_deg)
    return refraction
