"""Observed place at a site: from CIRS directions to hour angle, altitude and azimuth.

Follows SOFA's atioq (IAU SOFA Astrometry Tools) step by step, in numpy for arrays of stars:
Earth rotation and longitude (with the TIO locator s'), polar motion about the local
meridian, diurnal aberration, the horizon frame, refraction (see refraction.py, which extends
SOFA's model to the horizon), and back to observed hour angle and declination. Also the
airmass (Kasten & Young 1989) and the parallactic angle (Meeus, Astronomical Algorithms,
2nd ed., eq. 14.1).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .context import SiteContext
from .refraction import refraction_rad


@dataclass(frozen=True)
class ObservedPlace:
    """Observed quantities in radians; airmass is NaN below the horizon."""

    ha: np.ndarray  # observed hour angle, (-pi, pi], west positive
    dec: np.ndarray  # observed declination
    alt: np.ndarray  # observed (refracted) altitude
    az: np.ndarray  # azimuth, north through east, [0, 2 pi)
    alt_topocentric: np.ndarray  # altitude before refraction
    refraction: np.ndarray  # refraction applied (rad)
    diurnal_aberration: np.ndarray  # size of the diurnal aberration step (rad)
    parallactic_angle: np.ndarray
    airmass: np.ndarray


def kasten_young_airmass(alt_rad: np.ndarray) -> np.ndarray:
    """Relative airmass for observed altitude (Kasten & Young 1989, Applied Optics 28, 4735).

    X = 1 / (sin h + 0.50572 (h + 6.07995 deg)^-1.6364), h in degrees; about 38 at the horizon;
    NaN below it.
    """
    h_deg = np.degrees(alt_rad)
    with np.errstate(invalid="ignore"):
        airmass = 1.0 / (np.sin(alt_rad) + 0.50572 * (h_deg + 6.07995) ** -1.6364)
    return np.where(h_deg >= 0.0, airmass, np.nan)


def observed_place(p_cirs: np.ndarray, site: SiteContext) -> ObservedPlace:
    """Observed place of (3, n) CIRS unit vectors at the context's site (SOFA atioq)."""
    # CIRS to the local -HA/Dec frame: rotate by the local Earth rotation angle.
    c, s = np.cos(site.eral), np.sin(site.eral)
    x = c * p_cirs[0] + s * p_cirs[1]
    y = -s * p_cirs[0] + c * p_cirs[1]
    z = p_cirs[2]

    # Polar motion about the local meridian.
    sx, cx = np.sin(site.xpl), np.cos(site.xpl)
    sy, cy = np.sin(site.ypl), np.cos(site.ypl)
    xhd = cx * x + sx * z
    yhd = sx * sy * x + cy * y - cx * sy * z
    zhd = -sx * cy * x + sy * y + cx * cy * z

    # Diurnal aberration from the site's rotation velocity (first order, as atioq).
    f = 1.0 - site.diurnal_aberration * yhd
    xhdt, yhdt, zhdt = f * xhd, f * (yhd + site.diurnal_aberration), f * zhd
    diurnal = np.sqrt((xhdt - xhd) ** 2 + (yhdt - yhd) ** 2 + (zhdt - zhd) ** 2)

    # The horizon frame (x south, y east, z zenith).
    xaet = site.sin_lat * xhdt - site.cos_lat * zhdt
    yaet = yhdt
    zaet = site.cos_lat * xhdt + site.sin_lat * zhdt
    az = np.arctan2(yaet, -xaet)
    az = np.where(az < 0.0, az + 2.0 * np.pi, az)
    r = np.hypot(xaet, yaet)
    alt_topo = np.arctan2(zaet, r)

    # Refraction lifts the star towards the zenith by del.
    delta = refraction_rad(zaet, r, site.refa, site.refb, site.refraction_join,
                           site.refraction_horizon)
    # Rotate by exactly delta (atioq's small-angle form loses 0.04" near the horizon).
    r_safe = np.maximum(r, 1e-6)
    cosdel, sindel = np.cos(delta), np.sin(delta)
    f = cosdel - sindel * zaet / r_safe
    xaeo, yaeo = xaet * f, yaet * f
    zaeo = cosdel * zaet + sindel * r
    alt = np.arctan2(zaeo, np.hypot(xaeo, yaeo))

    # Back to the -HA/Dec frame for the observed hour angle and declination.
    vx = site.sin_lat * xaeo + site.cos_lat * zaeo
    vy = yaeo
    vz = -site.cos_lat * xaeo + site.sin_lat * zaeo
    ha = -np.arctan2(vy, vx)
    rho2 = vx * vx + vy * vy
    dec = np.arctan2(vz, np.sqrt(rho2))

    # Parallactic angle from the observed hour angle and declination (Meeus eq. 14.1,
    # multiplied through by cos dec).
    pa = np.arctan2(-vy * site.cos_lat, site.sin_lat * rho2 - site.cos_lat * vz * vx)
    return ObservedPlace(ha=ha, dec=dec, alt=alt, az=az, alt_topocentric=alt_topo,
                         refraction=delta, diurnal_aberration=diurnal, parallactic_angle=pa,
                         airmass=kasten_young_airmass(alt))
