"""The Sun's and the Moon's places and the Moon's phase against outside references.

References (tests only):
- astropy (get_body with the 'builtin' ephemeris, AltAz with pressure 0, TETE with a location):
  its own transformation chain (ICRS -> GCRS -> CIRS/TETE -> AltAz). astropy's built-in Moon
  is the same ERFA moon98 series as ours, so that comparison checks our frames, parallax,
  light time and aberration, not the lunar theory;
- PyEphem (the `ephem` package, libastro: its own Sun and Moon theories), which does check
  the lunar theory and the illuminated fraction;
- published times of lunar phases (US Naval Observatory / Astronomical Almanac phase tables,
  NASA eclipse pages), quoted from memory to the minute.
"""
import time

import ephem
import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import TETE, AltAz, EarthLocation, get_body, solar_system_ephemeris
from astropy.time import Time

from epochpoint.core.site import Site
from epochpoint.core.sunmoon import moon_phase, moon_track, sun_altaz

# The reference side notes "dubious year" (ERFA) and held polar motion (astropy) for instants
# past its tables; both are far below the tolerances here.
pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::astropy.utils.exceptions.AstropyWarning")]

SITES = (Site(-30.24, -70.74, 2200.0, name="southern mountain"),
         Site(52.0, 5.0, 10.0, name="northern lowland"),
         Site(69.65, 18.96, 100.0, name="arctic coast"))


def _instants(seed: int, n: int) -> Time:
    """n random instants over 2020-2030 (UTC)."""
    rng = np.random.default_rng(seed)
    return Time(rng.uniform(58849.0, 62502.0, n), format="mjd", scale="utc")


def _location(site: Site) -> EarthLocation:
    return EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                       site.height * u.m)


def _sep_arcsec(ra1, dec1, ra2, dec2):
    """Angular separation of degree arrays, arcsec (Vincenty form, as astropy)."""
    ra1, dec1, ra2, dec2 = map(np.radians, (ra1, dec1, ra2, dec2))
    dra = ra2 - ra1
    num = np.hypot(np.cos(dec2) * np.sin(dra),
                   np.cos(dec1) * np.sin(dec2) - np.sin(dec1) * np.cos(dec2) * np.cos(dra))
    den = np.sin(dec1) * np.sin(dec2) + np.cos(dec1) * np.cos(dec2) * np.cos(dra)
    return np.degrees(np.arctan2(num, den)) * 3600.0


def _altaz_sep_arcsec(alt1, az1, alt2, az2):
    return _sep_arcsec(az1, alt1, az2, alt2)


@pytest.mark.parametrize("site", SITES, ids=lambda s: s.name)
def test_sun_altitude_matches_astropy_within_2_arcsec(site):
    """Sun altitude/azimuth vs astropy AltAz(pressure=0) of get_body('sun'); brief asks 10"."""
    t = _instants(11, 60)
    alt, az = sun_altaz(site, t)
    with solar_system_ephemeris.set("builtin"):
        sun = get_body("sun", t, _location(site))
    theirs = sun.transform_to(AltAz(obstime=t, location=_location(site), pressure=0 * u.hPa))
    d_alt = np.abs(alt - theirs.alt.deg) * 3600.0
    d_dir = _altaz_sep_arcsec(alt, az, theirs.alt.deg, theirs.az.deg)
    assert d_alt.max() < 2.0, f"worst altitude difference {d_alt.max():.2f} arcsec"
    assert d_dir.max() < 2.0, f"worst direction difference {d_dir.max():.2f} arcsec"
    # The sample covers day and night: the comparison is not of a constant.
    assert alt.min() < -20.0 and alt.max() > 10.0


@pytest.mark.parametrize("site", SITES, ids=lambda s: s.name)
def test_moon_topocentric_place_matches_astropy_within_1_arcsec(site):
    """Moon (and Sun) topocentric apparent ra/dec of date vs astropy get_body(..., t, location)
    in TETE at the site, and Moon alt/az vs astropy AltAz(pressure=0); brief asks 30"."""
    t = _instants(12, 60)
    track = moon_track(site, t)
    loc = _location(site)
    with solar_system_ephemeris.set("builtin"):
        moon = get_body("moon", t, loc)
        sun = get_body("sun", t, loc)
    moon_tete = moon.transform_to(TETE(obstime=t, location=loc))
    sun_tete = sun.transform_to(TETE(obstime=t, location=loc))
    moon_altaz = moon.transform_to(AltAz(obstime=t, location=loc, pressure=0 * u.hPa))
    d_moon = _sep_arcsec(track.ra_deg, track.dec_deg, moon_tete.ra.deg, moon_tete.dec.deg)
    d_sun = _sep_arcsec(track.sun_ra_deg, track.sun_dec_deg, sun_tete.ra.deg, sun_tete.dec.deg)
    d_alt = _altaz_sep_arcsec(track.alt_deg, track.az_deg, moon_altaz.alt.deg,
                              moon_altaz.az.deg)
    assert d_moon.max() < 1.0, f"Moon ra/dec worst {d_moon.max():.3f} arcsec"
    # The Sun's own direction differs from astropy's by up to ~0.7" (measured over 2020-2030;
    # the difference is in the aberration astropy applies to the Sun, ours is ERFA ab).
    assert d_sun.max() < 2.0, f"Sun ra/dec worst {d_sun.max():.3f} arcsec"
    assert d_alt.max() < 2.0, f"Moon alt/az worst {d_alt.max():.3f} arcsec"
    # Topocentric, not geocentric: the geocentric place is up to ~1 deg away.
    with solar_system_ephemeris.set("builtin"):
        geocentric = get_body("moon", t).transform_to(TETE(obstime=t))
    parallax = _sep_arcsec(track.ra_deg, track.dec_deg, geocentric.ra.deg, geocentric.dec.deg)
    assert parallax.max() > 1800.0


def test_moon_place_matches_pyephem_within_20_arcsec():
    """Moon topocentric apparent ra/dec vs PyEphem (Observer with pressure 0; .ra/.dec are
    topocentric apparent of date): independent lunar theory, so a check of moon98 itself."""
    site = SITES[0]
    t = _instants(13, 40)
    track = moon_track(site, t)
    observer = ephem.Observer()
    observer.lat, observer.lon = str(site.latitude), str(site.longitude)
    observer.elevation, observer.pressure = site.height, 0.0
    theirs = []
    for instant in t:
        observer.date = ephem.Date(instant.datetime)
        moon = ephem.Moon(observer)
        theirs.append((np.degrees(float(moon.ra)), np.degrees(float(moon.dec))))
    theirs = np.array(theirs)
    d = _sep_arcsec(track.ra_deg, track.dec_deg, theirs[:, 0], theirs[:, 1])
    assert d.max() < 20.0, f"worst {d.max():.2f} arcsec vs PyEphem"


def test_illumination_matches_pyephem_within_0_005():
    """Geocentric illuminated fraction vs PyEphem Moon.moon_phase (fraction lit, 0..1)."""
    t = _instants(14, 60)
    ours = moon_phase(t).illumination
    theirs = np.array([ephem.Moon(ephem.Date(instant.datetime)).moon_phase for instant in t])
    assert np.abs(ours - theirs).max() < 0.005
    assert ours.min() < 0.1 and ours.max() > 0.9  # the sample spans the phases


# Lunar phases, UTC to the minute, from memory: USNO phase tables (2024 January); the new Moon
# of the total solar eclipse of 2024 April 8 and the full Moon of the total lunar eclipse of
# 2025 March 14 (NASA eclipse pages / Astronomical Almanac).
FULL_MOONS = ("2024-01-25T17:54:00", "2025-03-14T06:55:00")
NEW_MOONS = ("2024-01-11T11:57:00", "2024-04-08T18:21:00")


@pytest.mark.parametrize("when", FULL_MOONS)
def test_full_moon_is_lit_and_turns_from_waxing_to_waning(when):
    t = Time(when, scale="utc") + np.array([-2.0, 0.0, 2.0]) * u.min
    phase = moon_phase(t)
    assert phase.illumination[1] > 0.99  # the Moon's latitude keeps it from exactly 1
    assert phase.waxing[0] and not phase.waxing[2]  # the phase instant, to 2 minutes
    if when.startswith("2025-03-14"):  # a total lunar eclipse: the Moon is near the node
        assert phase.illumination[1] > 0.9999


@pytest.mark.parametrize("when", NEW_MOONS)
def test_new_moon_is_dark_and_turns_from_waning_to_waxing(when):
    t = Time(when, scale="utc") + np.array([-2.0, 0.0, 2.0]) * u.min
    phase = moon_phase(t)
    assert phase.illumination[1] < 0.01
    assert not phase.waxing[0] and phase.waxing[2]
    if when.startswith("2024-04-08"):  # a total solar eclipse: the Moon on the Sun's line
        assert phase.illumination[1] < 1e-4


def test_first_quarter_is_half_lit():
    """First quarter 2024-01-18 03:53 UTC (USNO phase tables, from memory): about half lit."""
    phase = moon_phase(Time("2024-01-18T03:53:00", scale="utc"))
    assert abs(float(phase.illumination) - 0.5) < 0.02 and bool(phase.waxing)


def test_shapes_follow_the_times():
    site = SITES[1]
    alt, az = sun_altaz(site, "2024-06-21T12:00:00Z")
    assert alt.shape == () and az.shape == ()
    grid = Time("2024-06-21T00:00:00", scale="utc") + np.arange(12).reshape(3, 4) * u.hour
    track = moon_track(site, grid)
    assert track.alt_deg.shape == (3, 4) and track.waxing.shape == (3, 4)
    # The same instants flat give the same numbers.
    flat = moon_track(site, grid.ravel())
    assert np.array_equal(flat.ra_deg, track.ra_deg.ravel())


def test_a_thousand_instants_are_fast():
    """Vectorized over time: 1000 instants well under a second (about 30 ms when idle)."""
    site = SITES[0]
    t = Time("2024-06-21T00:00:00", scale="utc") + np.linspace(0.0, 2.0, 1000) * u.day
    moon_track(site, t[:2])  # load the Earth-orientation table once
    start = time.perf_counter()
    moon_track(site, t)
    assert time.perf_counter() - start < 1.0
