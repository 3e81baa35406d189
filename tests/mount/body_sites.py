"""Bodies for the mount tests, and sites that have them high in the sky now (test-only).

Not a test module. Choosing the body and the site uses astropy's own built-in ephemeris
(get_body, offline); the reference places the tests compare against are DE421 positions read
through jplephem's own package reader, light time iterated here, through astropy's ICRS ->
TETE with the site's location (topocentric apparent place of date): an outside pipeline, never
our engine (as tests/bodies/test_vs_astropy_de421.py builds it).
"""
from __future__ import annotations

import erfa
import numpy as np
from astropy import units as u
from astropy.coordinates import (TETE, CartesianRepresentation, EarthLocation, ICRS, get_body,
                                 get_sun)
from astropy.time import Time

from epochpoint.core.limits import Interlocks, MountLimits
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets

AU_KM = 149597870.7
C_KM_S = 299792.458
CANDIDATES = ("moon", "venus", "mars", "jupiter", "saturn", "mercury")


def body_row(body: str, name: str) -> Targets:
    return Targets.from_columns(ra=[0.0], dec=[0.0], name=[name],
                                extra={"body": np.array([body], dtype=object)})


def away_from_sun(now: Time, min_elongation_deg: float = 45.0) -> str:
    """The first of CANDIDATES (the Moon first: the fastest) farther than the limit from
    the Sun now (astropy's built-in ephemeris)."""
    sun = get_sun(now)
    for body in CANDIDATES:
        if get_body(body, now).separation(sun).deg > min_elongation_deg:
            return body
    raise AssertionError("no candidate body far from the Sun")


def site_under(body: str, now: Time, hour_angle_deg: float = -10.0, settle: float = 10.0,
               solar_filter: bool = False, latitude_offset_deg: float = 0.0) -> Site:
    """An invented site where `body` is just east of the meridian near the zenith now (or
    `latitude_offset_deg` north of the body's declination)."""
    place = get_body(body, now)
    latitude = float(np.clip(place.dec.deg + latitude_offset_deg, -60.0, 60.0))
    gast = now.sidereal_time("apparent", longitude=0.0 * u.deg).deg
    longitude = (place.ra.deg + hour_angle_deg - gast + 180.0) % 360.0 - 180.0
    limits = MountLimits(min_altitude=10.0, slew_rate=3.0, settle=settle)
    return Site(latitude=latitude, longitude=longitude, height=0.0, pressure=0.0,
                name="invented", timezone="UTC",
                interlocks=Interlocks(mount=limits, solar_filter_fitted=solar_filter))


def _jpl_bary_au(name: str, tdb_jd: float) -> np.ndarray:
    import de421
    from jplephem.ephem import Ephemeris

    eph = Ephemeris(de421)
    if name in ("earth", "moon"):
        emb, moon = eph.position("earthmoon", tdb_jd), eph.position("moon", tdb_jd)
        p = emb - moon * eph.earth_share if name == "earth" else emb + moon * eph.moon_share
    else:
        p = eph.position(name, tdb_jd)
    return np.asarray(p, dtype=float).reshape(3) / AU_KM


def reference_apparent(body: str, site: Site, t: Time) -> tuple[float, float]:
    """Topocentric apparent RA, Dec of date (deg) of `body` at the site: DE421 (jplephem),
    light time from the site, through astropy ICRS -> TETE(location)."""
    loc = EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                      site.height * u.m)
    offset = loc.get_gcrs_posvel(t)[0].xyz.to_value(u.au)
    jd = t.tdb.jd
    observer = _jpl_bary_au("earth", jd) + offset
    lt_days = 0.0
    for _ in range(6):
        pb = _jpl_bary_au(body, jd - lt_days)
        lt_days = np.linalg.norm(pb - observer) * AU_KM / C_KM_S / 86400.0
    astropy_earth = erfa.epv00(t.tdb.jd1, t.tdb.jd2)[1][0]
    icrs = ICRS(CartesianRepresentation((pb - observer + offset + astropy_earth) * u.au))
    tete = icrs.transform_to(TETE(obstime=t, location=loc))
    return float(tete.ra.deg), float(tete.dec.deg)


def separation_arcsec(ra1, dec1, ra2, dec2) -> float:
    a = np.radians([ra1, dec1, ra2, dec2])
    c = np.sin(a[1]) * np.sin(a[3]) + np.cos(a[1]) * np.cos(a[3]) * np.cos(a[0] - a[2])
    s = np.hypot(np.cos(a[3]) * np.sin(a[0] - a[2]),
                 np.cos(a[1]) * np.sin(a[3]) - np.sin(a[1]) * np.cos(a[3]) * np.cos(a[0] - a[2]))
    return float(np.degrees(np.arctan2(s, c)) * 3600.0)
