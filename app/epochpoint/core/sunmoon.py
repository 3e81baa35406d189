"""The Sun and the Moon seen from a site: offline positions, altitudes and the Moon's phase.

Everything is vectorized over arrays of instants; about 25-30 ms for 1000 instants (most of
it ERFA epv00), 1-2 ms for a handful. Sources and accuracy:
- The Earth's heliocentric and barycentric position and velocity (hence the Sun): ERFA epv00
  (SOFA; fits to VSOP2000 and DE405 by Bretagnon & Francou), about 5 km, under 0.01 arcsec
  in the Sun's direction. Evaluated at TT instead of TDB (|TDB - TT| < 2 ms, 60 m).
- The Moon: ERFA moon98, the abridged ELP 2000-82 series of Meeus, Astronomical Algorithms
  (2nd ed. 1998), ch. 47, rotated to GCRS; SOFA's notes quote a few arcsec RMS and under
  20 arcsec worst case over 1950-2050 (from memory), a few km in distance.
- Precession-nutation: IAU 2000B (ERFA pnm00b, 1 mas over 1995-2050) with the CIO locator s
  (ERFA s00); far finer than the ephemerides need and twenty times faster than IAU 2006/2000A.
- Earth rotation: ERA from UT1 (IERS table shipped with astropy-iers-data, never downloaded;
  held at its last value beyond the table), TIO locator s' (ERFA sp00). Polar motion is
  left out (under 0.5 arcsec on altitude and azimuth).
- Topocentric place: the observer's barycentric position and velocity from the site (ERFA
  apco: geodetic WGS84 site, the site's rotation velocity), light time from the observer to
  the body (first order, barycentric velocity), relativistic aberration (ERFA ab) and the
  bias-precession-nutation rotation to CIRS, then CIRS to azimuth and altitude (ERFA atioq
  with zero refraction constants). The Sun's gravitational light deflection is left out
  (under 0.01 arcsec for the Moon, meaningless for the Sun itself).
Altitudes are geometric in the Almanac's sense: unrefracted altitudes of the apparent
(light-time and aberration corrected) topocentric direction of the body's centre.
"""
from __future__ import annotations

from dataclasses import dataclass

import erfa
import numpy as np
from astropy.time import Time

from . import earth_orientation
from .constants import AU_M, C_AU_PER_DAY, DEG_TO_RAD, RAD_TO_DEG
from .site import Site
from .timescale import parse_time, quiet_erfa

AU_KM = AU_M / 1000.0
# Mean radius of the Moon, km (IAU Working Group on Cartographic Coordinates, Archinal et al.
# 2018, Celest. Mech. Dyn. Astr. 130, 22).
MOON_RADIUS_KM = 1737.4


@dataclass(frozen=True)
class MoonPhase:
    """The Moon's phase seen from the geocentre (Meeus, Astronomical Algorithms, ch. 48)."""

    phase_angle_deg: np.ndarray  # Sun-Moon-Earth angle: 0 at full Moon, 180 at new Moon
    illumination: np.ndarray  # illuminated fraction of the disk, 0..1
    waxing: np.ndarray  # True while the Moon's ecliptic longitude leads the Sun's by 0..180


@dataclass(frozen=True)
class MoonTrack:
    """The Moon, and the Sun for avoidance checks, seen from a site; angles in degrees.

    ra/dec are topocentric apparent, true equator and equinox of date; alt/az are unrefracted
    (azimuth north through east); illumination and phase are geocentric (as in almanacs).
    """

    ra_deg: np.ndarray
    dec_deg: np.ndarray
    alt_deg: np.ndarray
    az_deg: np.ndarray
    distance_km: np.ndarray  # topocentric distance of the centre
    semidiameter_deg: np.ndarray  # topocentric apparent semidiameter
    illumination: np.ndarray
    phase_angle_deg: np.ndarray
    waxing: np.ndarray
    sun_ra_deg: np.ndarray
    sun_dec_deg: np.ndarray
    sun_alt_deg: np.ndarray
    sun_az_deg: np.ndarray


@dataclass(frozen=True)
class _Ephemeris:
    """Geocentric state of the Earth, Sun and (optionally) Moon at a flat array of instants."""

    t: Time  # the instants, flat, UTC
    tt: tuple  # two-part TT Julian dates (arrays)
    earth_helio: np.ndarray  # ERFA pv structures: the Earth's heliocentric p (AU), v (AU/d)
    earth_bary: np.ndarray  # the Earth's barycentric p, v
    moon_geo: np.ndarray | None  # the Moon's geocentric GCRS p, v (ERFA moon98)

    @property
    def sun_geo_au(self) -> np.ndarray:
        """The Sun's geocentric position, GCRS axes (AU), shape (n, 3)."""
        return -self.earth_helio["p"]

    @property
    def sun_bary_velocity(self) -> np.ndarray:
        """The Sun's barycentric velocity (AU/day), shape (n, 3)."""
        return self.earth_bary["v"] - self.earth_helio["v"]

    @property
    def moon_bary_velocity(self) -> np.ndarray:
        """The Moon's barycentric velocity (AU/day), shape (n, 3)."""
        return self.earth_bary["v"] + self.moon_geo["v"]


def _flat_times(times) -> tuple[Time, tuple]:
    """The instants as a flat UTC Time array, and the caller's shape."""
    t = parse_time(times)
    return t.reshape((-1,)), t.shape


@quiet_erfa
def _ephemeris(t: Time, with_moon: bool) -> _Ephemeris:
    tt = t.tt
    tt = (tt.jd1, tt.jd2)
    earth_helio, earth_bary = erfa.epv00(*tt)
    moon_geo = erfa.moon98(*tt) if with_moon else None
    return _Ephemeris(t=t, tt=tt, earth_helio=earth_helio, earth_bary=earth_bary,
                      moon_geo=moon_geo)


@quiet_erfa
def _observer(site: Site, eph: _Ephemeris):
    """ERFA ASTROM structures for the site (one per instant) and the equation of the origins.

    The equation of the origins (ERA - GST) turns CIRS right ascension into right ascension
    of date: ra_date = ra_cirs - eo.
    """
    ut1 = earth_orientation.with_ut1_utc(eph.t).ut1
    rnpb = erfa.pnm00b(*eph.tt)
    x, y = erfa.bpn2xy(rnpb)
    s = erfa.s00(*eph.tt, x, y)
    era = erfa.era00(ut1.jd1, ut1.jd2)
    sp = erfa.sp00(*eph.tt)
    astrom = erfa.apco(*eph.tt, eph.earth_bary, eph.earth_helio["p"], x, y, s, era,
                       site.longitude * DEG_TO_RAD, site.latitude * DEG_TO_RAD, site.height,
                       0.0, 0.0, sp, 0.0, 0.0)
    return astrom, erfa.eors(rnpb, s)


def _apparent_direction(p_from_observer_au, body_bary_velocity, observer_velocity_c,
                        sun_distance_au, lorentz_inverse):
    """Apparent GCRS-axes unit vector (n, 3) and distance (AU) of a body seen by an observer.

    Light time to first order: the body is seen where it was a light time ago (its barycentric
    velocity times the light time), then relativistic aberration of the observer's barycentric
    velocity (ERFA ab, SOFA).
    """
    distance_au = np.sqrt(np.sum(p_from_observer_au ** 2, axis=-1))
    light_time_d = distance_au / C_AU_PER_DAY
    p = p_from_observer_au - body_bary_velocity * light_time_d[:, None]
    u_astrometric = p / np.sqrt(np.sum(p ** 2, axis=-1))[:, None]
    u_apparent = erfa.ab(u_astrometric, observer_velocity_c, sun_distance_au, lorentz_inverse)
    return u_apparent, distance_au


def _topocentric(p_geo_au, body_bary_velocity, eph: _Ephemeris, astrom, eo_rad):
    """(ra_date, dec_date, alt, az) in degrees and the topocentric distance (AU) of a body."""
    observer_geo_au = astrom["eb"] - eph.earth_bary["p"]
    u_gcrs, distance_au = _apparent_direction(p_geo_au - observer_geo_au, body_bary_velocity,
                                              astrom["v"], astrom["em"], astrom["bm1"])
    # Rotate into CIRS, then to the horizon (no refraction: refa = refb = 0).
    u_cirs = np.einsum("nij,nj->ni", astrom["bpn"], u_gcrs)
    ra_cirs, dec = erfa.c2s(u_cirs)
    az, zenith_distance, _, _, _ = erfa.atioq(ra_cirs, dec, astrom)
    ra_date = erfa.anp(ra_cirs - eo_rad)
    return (ra_date * RAD_TO_DEG, dec * RAD_TO_DEG, 90.0 - zenith_distance * RAD_TO_DEG,
            az * RAD_TO_DEG, distance_au)


def _phase(eph: _Ephemeris) -> MoonPhase:
    """Geocentric phase angle, illuminated fraction and waxing flag (flat arrays).

    Meeus ch. 48 in vector form: the phase angle i is the angle at the Moon between the
    directions to the Sun and to the Earth (eq. 48.3 from the geocentric distances and the
    elongation), and the illuminated fraction is k = (1 + cos i) / 2 (eq. 48.1). Apparent
    geocentric positions are used, as in the almanacs' phase tables.
    """
    velocity_c = eph.earth_bary["v"] / C_AU_PER_DAY
    lorentz_inverse = np.sqrt(1.0 - np.sum(velocity_c ** 2, axis=-1))
    sun_distance_au = np.sqrt(np.sum(eph.earth_helio["p"] ** 2, axis=-1))
    u_sun, r_sun = _apparent_direction(eph.sun_geo_au, eph.sun_bary_velocity, velocity_c,
                                       sun_distance_au, lorentz_inverse)
    u_moon, r_moon = _apparent_direction(eph.moon_geo["p"], eph.moon_bary_velocity,
                                         velocity_c, sun_distance_au, lorentz_inverse)
    p_sun, p_moon = u_sun * r_sun[:, None], u_moon * r_moon[:, None]
    # The phase angle: between Moon->Sun and Moon->Earth.
    to_sun, to_earth = p_sun - p_moon, -p_moon
    cross = np.cross(to_sun, to_earth)
    phase_angle = np.arctan2(np.sqrt(np.sum(cross ** 2, axis=-1)),
                             np.sum(to_sun * to_earth, axis=-1))
    # Waxing while the Moon is east of the Sun: the sign of (S x M) along the pole of the
    # mean ecliptic of date (ERFA ecm06, IAU 2006), i.e. of sin(lambda_moon - lambda_sun).
    ecliptic_pole = erfa.ecm06(*eph.tt)[:, 2, :]
    waxing = np.sum(np.cross(p_sun, p_moon) * ecliptic_pole, axis=-1) > 0.0
    return MoonPhase(phase_angle_deg=phase_angle * RAD_TO_DEG,
                     illumination=0.5 * (1.0 + np.cos(phase_angle)), waxing=waxing)


@quiet_erfa
def sun_altaz(site: Site, times) -> tuple[np.ndarray, np.ndarray]:
    """Unrefracted topocentric altitude and azimuth (north through east) of the Sun's centre.

    times: an astropy Time (any shape; UTC) or anything `parse_time` reads. Returns two float
    arrays in degrees shaped like times. Accuracy about 1 arcsec (epv00 + IAU 2000B + ERA).
    """
    t, shape = _flat_times(times)
    eph = _ephemeris(t, with_moon=False)
    astrom, eo_rad = _observer(site, eph)
    _, _, alt, az, _ = _topocentric(eph.sun_geo_au, eph.sun_bary_velocity, eph, astrom, eo_rad)
    return alt.reshape(shape), az.reshape(shape)


@quiet_erfa
def moon_phase(times) -> MoonPhase:
    """Geocentric phase angle (deg), illuminated fraction and waxing flag of the Moon.

    Meeus, Astronomical Algorithms, ch. 48 (see `MoonPhase`); accuracy set by moon98, a few
    arcsec in the elongation, i.e. about 1e-4 in the illuminated fraction.
    """
    t, shape = _flat_times(times)
    phase = _phase(_ephemeris(t, with_moon=True))
    return MoonPhase(phase_angle_deg=phase.phase_angle_deg.reshape(shape),
                     illumination=phase.illumination.reshape(shape),
                     waxing=phase.waxing.reshape(shape))


@quiet_erfa
def moon_track(site: Site, times) -> MoonTrack:
    """The Moon's topocentric place, altitude, size and phase, and the Sun's place, at a site.

    The Moon's horizontal parallax is about 1 deg, so ra/dec here are topocentric (apparent,
    true equator and equinox of date) and differ from geocentric ones by up to that much.
    Accuracy: a few arcsec (moon98); semidiameter from the Moon's mean radius and topocentric
    distance. Arrays are shaped like times.
    """
    t, shape = _flat_times(times)
    eph = _ephemeris(t, with_moon=True)
    astrom, eo_rad = _observer(site, eph)
    moon_ra, moon_dec, moon_alt, moon_az, moon_au = _topocentric(
        eph.moon_geo["p"], eph.moon_bary_velocity, eph, astrom, eo_rad)
    sun_ra, sun_dec, sun_alt, sun_az, _ = _topocentric(
        eph.sun_geo_au, eph.sun_bary_velocity, eph, astrom, eo_rad)
    phase = _phase(eph)
    distance_km = moon_au * AU_KM
    semidiameter_deg = np.arcsin(MOON_RADIUS_KM / distance_km) * RAD_TO_DEG
    fields = dict(ra_deg=moon_ra, dec_deg=moon_dec, alt_deg=moon_alt, az_deg=moon_az,
                  distance_km=distance_km, semidiameter_deg=semidiameter_deg,
                  illumination=phase.illumination, phase_angle_deg=phase.phase_angle_deg,
                  waxing=phase.waxing, sun_ra_deg=sun_ra, sun_dec_deg=sun_dec,
                  sun_alt_deg=sun_alt, sun_az_deg=sun_az)
    return MoonTrack(**{name: value.reshape(shape) for name, value in fields.items()})
