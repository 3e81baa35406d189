"""The per-instant astrometry context: everything that depends on the time, not on the star.

Built once per instant (about 1-2 ms) and then applied to any number of stars. It holds:
- TT, TDB and UT1 as two-part Julian dates (UT1-UTC and polar motion from the IERS table
  shipped with astropy-iers-data; never downloaded);
- the Earth's barycentric position and velocity and heliocentric position (ERFA epv00,
  after Bretagnon & Francou VSOP87 fits, accuracy ~5 km / ~1 mm/s; SOFA's choice for apci13);
- the bias-precession-nutation matrices to the true equator and equinox of date (ERFA
  pnm06a) and to the Celestial Intermediate Reference System (ERFA c2i06a), IAU 2006/2000A;
- Greenwich apparent sidereal time (ERFA gst06a) and the Earth rotation angle (ERFA era00);
- for a site: the star-independent CIRS-to-observed parameters (ERFA apio: longitude with
  the TIO locator s', polar motion about the local meridian, diurnal aberration) and the
  refraction constants A, B of A tan z + B tan^3 z (ERFA refco; Green 1987, Spherical
  Astronomy, sec. 4.31, fitted to the Hohenkerk & Sinclair 1985 ray-trace model), plus the
  factor joining our low-altitude refraction to that model (see refraction.py).
"""
from __future__ import annotations

from dataclasses import dataclass

import erfa
import numpy as np
from astropy.time import Time

from . import earth_orientation
from .constants import C_AU_PER_DAY, DEG_TO_RAD
from .refraction import density_factor, low_altitude_join_factor
from .site import Site
from .timescale import check_earth_orientation, jd_pair, parse_time


@dataclass(frozen=True)
class SiteContext:
    """Star-independent CIRS-to-observed parameters for one site at one instant."""

    site: Site
    eral: float  # local Earth rotation angle incl. longitude and s' (rad)
    xpl: float  # polar motion about the local meridian (rad)
    ypl: float
    sin_lat: float
    cos_lat: float
    diurnal_aberration: float  # site speed / c, towards the east
    refa: float  # refraction constants (rad)
    refb: float
    refraction_join: float  # factor joining the low-altitude formula to A, B at 15 deg
    refraction_horizon: float  # the low-altitude formula's density factor at the horizon
    last_rad: float  # local apparent sidereal time (rad), for hour angles of date


@dataclass(frozen=True)
class AstrometryContext:
    """Earth and frame state at one instant (geocentric), optionally with a site."""

    time: Time
    tt: tuple
    tdb: tuple
    ut1: tuple
    earth_bary_au: np.ndarray  # Earth barycentric position (AU), ICRS axes
    earth_velocity_c: np.ndarray  # Earth barycentric velocity in units of c
    lorentz_inverse: float  # sqrt(1 - v^2/c^2)
    sun_to_earth_unit: np.ndarray  # heliocentric direction of the Earth
    sun_distance_au: float
    npb_true_of_date: np.ndarray  # GCRS -> true equator and equinox of date
    c2i: np.ndarray  # GCRS -> CIRS
    cirs_minus_tod_rad: float  # right ascension in CIRS minus that of date (-equation of origins)
    gast_rad: float
    era_rad: float
    polar_motion_rad: tuple
    eop_warning: str | None
    site: SiteContext | None = None

    @property
    def epoch_jyear(self) -> float:
        """The instant as a Julian year (TDB), the unit of catalogue epochs."""
        return 2000.0 + ((self.tdb[0] - 2451545.0) + self.tdb[1]) / 365.25


def _polar_motion(t: Time) -> tuple[float, float]:
    """Polar motion x_p, y_p (rad) from the IERS table; held at the table's end beyond it."""
    xp, yp = earth_orientation.polar_motion_rad(t)
    return float(xp), float(yp)


def _site_context(site: Site, tt, era_rad: float, gast_rad: float, xp: float, yp: float):
    """CIRS-to-observed parameters for a site (ERFA apio + refco)."""
    elong, phi = site.longitude * DEG_TO_RAD, site.latitude * DEG_TO_RAD
    # Refraction constants from the weather (zero pressure means no refraction).
    refa, refb = erfa.refco(site.pressure, site.temperature, site.humidity, site.wavelength)
    # TIO locator, polar motion and the site's rotation velocity.
    sp = erfa.sp00(*tt)
    astrom = erfa.apio(sp, era_rad, elong, phi, site.height, xp, yp, refa, refb)
    return SiteContext(
        site=site, eral=float(astrom["eral"]), xpl=float(astrom["xpl"]),
        ypl=float(astrom["ypl"]), sin_lat=float(astrom["sphi"]), cos_lat=float(astrom["cphi"]),
        diurnal_aberration=float(astrom["diurab"]), refa=float(refa), refb=float(refb),
        refraction_join=low_altitude_join_factor(float(refa), float(refb)),
        refraction_horizon=density_factor(site.pressure, site.temperature),
        last_rad=float(np.mod(gast_rad + elong, 2.0 * np.pi)),
    )


def _z_rotation_angle(matrix: np.ndarray) -> float:
    """How far a rotation about the pole moves right ascensions: the CIRS and the true
    equator of date share the pole (the CIP), so c2i npb^T is a rotation about z and right
    ascensions differ by the equation of the origins (IERS Conventions 2010, sec. 5.5.7)."""
    return float(-np.arctan2(matrix[0, 1], matrix[0, 0]))


def make_context(when, site: Site | None = None) -> AstrometryContext:
    """Build the astrometry context for an instant (ISO 8601 UTC string, 'now' or Time)."""
    t = parse_time(when)
    # Warn, never fail, when the Earth-orientation table is stale for this instant.
    eop_warning = check_earth_orientation(t)
    tt, tdb, ut1 = jd_pair(t, "tt"), jd_pair(t, "tdb"), jd_pair(t, "ut1")

    # Earth's heliocentric and barycentric position and velocity (AU, AU/day).
    helio_pv, bary_pv = erfa.epv00(*tdb)
    sun_distance = float(np.sqrt(np.sum(helio_pv[0] ** 2)))
    velocity_c = bary_pv[1] / C_AU_PER_DAY
    # Frame rotations: IAU 2006/2000A, equinox-based and CIO-based.
    npb = erfa.pnm06a(*tt)
    c2i = erfa.c2i06a(*tt)
    # Earth rotation: angle (CIO-based) and apparent sidereal time (equinox-based).
    era = float(erfa.era00(*ut1))
    gast = float(erfa.gst06a(*ut1, *tt))
    xp, yp = _polar_motion(t)

    site_ctx = _site_context(site, tt, era, gast, xp, yp) if site is not None else None
    return AstrometryContext(
        time=t, tt=tt, tdb=tdb, ut1=ut1,
        earth_bary_au=np.asarray(bary_pv[0], dtype=float),
        earth_velocity_c=np.asarray(velocity_c, dtype=float),
        lorentz_inverse=float(np.sqrt(1.0 - np.sum(velocity_c ** 2))),
        sun_to_earth_unit=np.asarray(helio_pv[0] / sun_distance, dtype=float),
        sun_distance_au=sun_distance,
        npb_true_of_date=np.asarray(npb), c2i=np.asarray(c2i),
        cirs_minus_tod_rad=_z_rotation_angle(np.asarray(c2i) @ np.asarray(npb).T),
        gast_rad=gast, era_rad=era, polar_motion_rad=(xp, yp),
        eop_warning=eop_warning, site=site_ctx,
    )

