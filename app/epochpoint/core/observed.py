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
    alt_rad = np.asarray(alt_rad, dtype=float)
    airmass = np.full(alt_rad.shape, np.nan)
    up = alt_rad >= 0.0
    h = alt_rad[up]
    airmass[up] = 1.0 / (np.sin(h) + 0.50572 * (np.degrees(h) + 6.07995) ** -1.6364)
    return airmass


def _rz(angle: float) -> np.ndarray:
    c, s = np.cos(angle), np.sin(angle)
    return np.array([[c, s, 0.0], [-s, c, 0.0], [0.0, 0.0, 1.0]])


def site_matrices(site: SiteContext) -> tuple[np.ndarray, np.ndarray]:
    """The two rotations of atioq as matrices (per instant): CIRS to the local -HA/Dec frame
    (Earth rotation angle with longitude and s', then polar motion about the local meridian),
    and -HA/Dec to the horizon frame (x south, y east, z zenith)."""
    sx, cx = np.sin(site.xpl), np.cos(site.xpl)
    sy, cy = np.sin(site.ypl), np.cos(site.ypl)
    polar = np.array([[cx, 0.0, sx], [sx * sy, cy, -cx * sy], [-sx * cy, sy, cx * cy]])
    to_hadec = polar @ _rz(site.eral)
    to_horizon = np.array([[site.sin_lat, 0.0, -site.cos_lat], [0.0, 1.0, 0.0],
                           [site.cos_lat, 0.0, site.sin_lat]])
    return to_hadec, to_horizon


def observed_place(p_cirs: np.ndarray, site: SiteContext,
                   to_cirs: np.ndarray | None = None) -> ObservedPlace:
    """Observed place of (3, n) CIRS unit vectors at the context's site (SOFA atioq).

    With `to_cirs` (a 3x3 rotation, e.g. GCRS to CIRS) the vectors are given in that frame
    and the rotation is folded into the per-instant matrix."""
    to_hadec, to_horizon = site_matrices(site)
    if to_cirs is not None:
        to_hadec = to_hadec @ to_cirs
    # Earth rotation and polar motion: CIRS to the local -HA/Dec frame.
    xhd, yhd, zhd = to_hadec @ p_cirs

    # Diurnal aberration from the site's rotation velocity (first order, as atioq).
    f = 1.0 - site.diurnal_aberration * yhd
    hd_aberrated = np.stack((f * xhd, f * (yhd + site.diurnal_aberration), f * zhd))
    d = hd_aberrated - np.stack((xhd, yhd, zhd))
    diurnal = np.sqrt(d[0] * d[0] + d[1] * d[1] + d[2] * d[2])

    # The horizon frame (x south, y east, z zenith).
    xaet, yaet, zaet = to_horizon @ hd_aberrated
    az = np.arctan2(yaet, -xaet)
    az += (az < 0.0) * (2.0 * np.pi)
    r = np.sqrt(xaet * xaet + yaet * yaet)
    alt_topo = np.arctan2(zaet, r)

    # Refraction lifts the star towards the zenith by exactly delta.
    delta = refraction_rad(zaet, r, site.refa, site.refb, site.refraction_join,
                           site.refraction_horizon)
    r_safe = np.maximum(r, 1e-6)
    cosdel, sindel = np.cos(delta), np.sin(delta)
    f = cosdel - sindel * zaet / r_safe
    aeo = np.stack((xaet * f, yaet * f, cosdel * zaet + sindel * r))
    alt = np.arctan2(aeo[2], r * f)

    # Back to the -HA/Dec frame for the observed hour angle and declination.
    vx, vy, vz = to_horizon.T @ aeo
    ha = np.arctan2(-vy, vx)
    rho2 = vx * vx + vy * vy
    dec = np.arctan2(vz, np.sqrt(rho2))

    # Parallactic angle from the observed hour angle and declination (Meeus eq. 14.1,
    # multiplied through by cos dec).
    pa = np.arctan2(-vy * site.cos_lat, site.sin_lat * rho2 - site.cos_lat * vz * vx)
    return ObservedPlace(ha=ha, dec=dec, alt=alt, az=az, alt_topocentric=alt_topo,
                         refraction=delta, diurnal_aberration=diurnal, parallactic_angle=pa,
                         airmass=kasten_young_airmass(alt))
