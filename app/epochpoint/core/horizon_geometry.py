"""Closed-form geometry of a star's daily path at a site.

For a fixed apparent place (right ascension and declination of date) the topocentric
altitude and azimuth follow from the hour angle by the spherical-triangle relations
(Meeus, Astronomical Algorithms, 2nd ed., eqs. 13.5-13.6; Smart, Textbook on Spherical
Astronomy, ch. 2): sin h = sin phi sin dec + cos phi cos dec cos H. The hour angle at which
the star crosses altitude h0 is then cos H0 = (sin h0 - sin phi sin dec) / (cos phi cos dec)
(Meeus eq. 15.1). Over one night the apparent place changes by well under an arcsecond, so
these give rise and set times to about a second. All functions are vectorized.
"""
from __future__ import annotations

import numpy as np

from .constants import DEG_TO_RAD, RAD_TO_DEG
from .refraction import refraction_rad

# Sidereal rate: degrees of hour angle per second of UT1 (IERS Conventions 2010, ch. 5:
# 1.00273781191135448 sidereal revolutions per UT1 day).
SIDEREAL_DEG_PER_S = 360.0 * 1.00273781191135448 / 86400.0


def altaz_from_ha(ha_deg, dec_deg, lat_deg):
    """Topocentric (unrefracted) altitude and azimuth (deg, N through E) for hour angles."""
    ha, dec, lat = ha_deg * DEG_TO_RAD, np.asarray(dec_deg) * DEG_TO_RAD, lat_deg * DEG_TO_RAD
    sin_lat, cos_lat = np.sin(lat), np.cos(lat)
    sin_dec, cos_dec = np.sin(dec), np.cos(dec)
    cos_ha = np.cos(ha)
    sin_alt = sin_lat * sin_dec + cos_lat * cos_dec * cos_ha
    # East and north components of the direction in the horizon frame.
    east = -cos_dec * np.sin(ha)
    north = cos_lat * sin_dec - sin_lat * cos_dec * cos_ha
    alt = np.arctan2(sin_alt, np.hypot(east, north)) * RAD_TO_DEG
    az = np.mod(np.arctan2(east, north) * RAD_TO_DEG, 360.0)
    return alt, az


def ha_at_altitude(alt_deg, dec_deg, lat_deg):
    """Hour angle (deg, >= 0) where a star crosses altitude alt_deg, as cos H0 = ... .

    Returns (h0, state): state -1 where the star never reaches the altitude, +1 where it never
    goes below it (h0 is then 180), 0 where it crosses.
    """
    lat, dec = lat_deg * DEG_TO_RAD, np.asarray(dec_deg, dtype=float) * DEG_TO_RAD
    denominator = np.cos(lat) * np.cos(dec)
    with np.errstate(divide="ignore", invalid="ignore"):
        cos_h0 = (np.sin(np.asarray(alt_deg) * DEG_TO_RAD) - np.sin(lat) * np.sin(dec)) / denominator
    # At the poles the altitude does not change with hour angle.
    pole_alt = np.arcsin(np.clip(np.sin(lat) * np.sin(dec), -1.0, 1.0)) * RAD_TO_DEG
    cos_h0 = np.where(denominator > 1e-12, cos_h0,
                      np.where(pole_alt >= alt_deg, -2.0, 2.0))
    state = np.where(cos_h0 > 1.0, -1, np.where(cos_h0 < -1.0, 1, 0))
    h0 = np.degrees(np.arccos(np.clip(cos_h0, -1.0, 1.0)))
    return h0, state


def true_altitude_for_observed(observed_deg: float, refa: float, refb: float, join: float,
                               horizon: float) -> float:
    """The unrefracted altitude (deg) that refraction lifts to an observed altitude.

    Fixed-point iteration h = h_obs - R(h) with the engine's refraction (refraction.py);
    converges to micro-arcseconds in a few steps above -1 deg.
    """
    h = float(observed_deg)
    for _ in range(20):
        h_rad = np.array([h * DEG_TO_RAD])
        r = refraction_rad(np.sin(h_rad), np.cos(h_rad), refa, refb, join, horizon)[0]
        h_new = observed_deg - r * RAD_TO_DEG
        if abs(h_new - h) < 1e-10:
            return h_new
        h = h_new
    return h


def observed_altitude(alt_true_deg, refa, refb, join, horizon):
    """Observed (refracted) altitude (deg) from topocentric altitude (deg)."""
    h = np.asarray(alt_true_deg, dtype=float) * DEG_TO_RAD
    return (h + refraction_rad(np.sin(h), np.cos(h), refa, refb, join, horizon)) * RAD_TO_DEG


def altitude_for_airmass(max_airmass: float) -> float:
    """Observed altitude (deg) at which the Kasten & Young (1989) airmass equals max_airmass.

    Bisection on the monotonic formula (see observed.kasten_young_airmass).
    """
    from .observed import kasten_young_airmass

    if max_airmass < 1.0:
        raise ValueError(f"maximum airmass must be at least 1, got {max_airmass}")
    lo, hi = 0.0, 90.0
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        if kasten_young_airmass(np.array([mid * DEG_TO_RAD]))[0] > max_airmass:
            lo = mid
        else:
            hi = mid
    return hi
