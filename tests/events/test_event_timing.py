"""Mid-event times at the site from barycentric ephemerides, checked against astropy.

Reference: astropy's `Time.light_travel_time(coord, kind="barycentric", location=...)` (its
built-in ERFA Earth ephemeris), with BJD_TDB = t.tdb + ltt; the observed instant of a given
BJD_TDB is found here by iterating that relation (independently of the code under test).
"""
import warnings

import astropy.units as u
import numpy as np
import pytest
from astropy.coordinates import EarthLocation, SkyCoord
from astropy.time import Time

from epochpoint.core.events import BarycentricClock, mid_error_s, to_bjd_tdb, tt_days_of
from epochpoint.core.site import Site

J2000 = 2451545.0
SITE = Site(latitude=31.96, longitude=-111.6, height=2100.0)
LOCATION = EarthLocation.from_geodetic(SITE.longitude * u.deg, SITE.latitude * u.deg,
                                       SITE.height * u.m)


@pytest.fixture(autouse=True)
def _quiet():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        yield


def _astropy_observed(bjd_tdb_jd: np.ndarray, coord: SkyCoord) -> Time:
    """The UTC instants whose barycentric TDB is bjd_tdb_jd, by fixed-point iteration on
    astropy's light_travel_time (barycentric, at the site)."""
    t = Time(bjd_tdb_jd, format="jd", scale="tdb", location=LOCATION)
    for _ in range(4):
        ltt = t.light_travel_time(coord, kind="barycentric", location=LOCATION)
        t = Time(Time(bjd_tdb_jd, format="jd", scale="tdb") - ltt, location=LOCATION)
    return t.utc


def _unit(coord: SkyCoord, k: int) -> np.ndarray:
    return np.repeat(coord.icrs.cartesian.xyz.value[:, None], k, axis=1)


def _ecliptic_coords(lon_deg, lat_deg) -> SkyCoord:
    return SkyCoord(lon=lon_deg * u.deg, lat=lat_deg * u.deg,
                    frame="barycentrictrueecliptic").icrs


@pytest.mark.parametrize("lon,lat", [(0.0, 0.0), (90.0, 0.0), (180.0, 0.0), (270.0, 0.0),
                                     (45.0, 30.0), (200.0, -60.0), (0.0, 90.0)])
def test_mid_times_match_astropy_through_the_year(lon, lat):
    """Observed mid times within 1 s of astropy's barycentric light travel time, inverted
    (source: astropy Time.light_travel_time), at 24 instants through 2027."""
    coord = _ecliptic_coords(np.array([lon]), np.array([lat]))[0]
    bjd = Time("2027-01-03T00:00:00", scale="tdb").jd + np.linspace(0.0, 365.0, 24)
    reference = _astropy_observed(bjd, coord)
    ref_tt = tt_days_of(reference)
    clock = BarycentricClock(SITE, ref_tt.min() - 1.0, ref_tt.max() + 1.0)
    mine = clock.observed_tt(bjd - J2000, _unit(coord, bjd.size))
    assert np.abs(mine - ref_tt).max() * 86400.0 < 1.0


def test_annual_amplitude_on_the_ecliptic_and_at_the_pole():
    """The correction's annual amplitude is the light time for 1 au, 499 s, on the ecliptic
    (common practice; the orbit's eccentricity 0.0167 moves it by about 8 s), and a few
    seconds at most at an ecliptic pole, across which the Earth's orbit lies."""
    t = Time("2027-01-01T00:00:00", scale="utc") + np.linspace(0.0, 365.25, 400) * u.day
    tt = tt_days_of(t)
    clock = BarycentricClock(SITE, tt.min(), tt.max())
    on_ecliptic = _ecliptic_coords(np.array([120.0]), np.array([0.0]))[0]
    pole = _ecliptic_coords(np.array([0.0]), np.array([90.0]))[0]
    corr = (clock.bjd_tdb(tt, _unit(on_ecliptic, tt.size)) - tt) * 86400.0
    assert abs(0.5 * (corr.max() - corr.min()) - 499.0) < 10.0
    corr_pole = (clock.bjd_tdb(tt, _unit(pole, tt.size)) - tt) * 86400.0
    assert np.abs(corr_pole).max() < 3.0


def test_hjd_utc_epoch_converted_like_astropy():
    """An epoch given as HJD (UTC) becomes the BJD_TDB astropy gives for the same instant
    (source: astropy light_travel_time, heliocentric and barycentric, at the geocentre),
    within 10 ms; a JD (UTC) epoch likewise."""
    coords = _ecliptic_coords(np.array([10.0, 100.0, 250.0]), np.array([5.0, -40.0, 70.0]))
    t = Time(["2012-05-01T03:00:00", "2019-11-20T12:00:00", "2031-08-15T20:30:00"],
             scale="utc")
    direction = coords.cartesian.xyz.value
    geocentre = EarthLocation.from_geocentric(0.0, 0.0, 0.0, unit=u.m)
    hjd = t.jd + t.light_travel_time(coords, kind="heliocentric",
                                     location=geocentre).to_value(u.day)
    bjd_ref = (t.tdb + t.light_travel_time(coords, kind="barycentric", location=geocentre)).jd
    bjd, assumed = to_bjd_tdb(hjd, np.array(["hjd_utc"] * 3, dtype=object), direction)
    assert np.abs(bjd - bjd_ref).max() * 86400.0 < 0.01
    assert all("HJD" in a for a in assumed)
    bjd_jd, _ = to_bjd_tdb(t.jd, np.array(["jd_utc"] * 3, dtype=object), direction)
    assert np.abs(bjd_jd - bjd_ref).max() * 86400.0 < 0.01
    unchanged, none = to_bjd_tdb(t.jd, np.array(["bjd_tdb"] * 3, dtype=object), direction)
    assert np.array_equal(unchanged, t.jd) and not any(none)


def test_mid_time_uncertainty_grows_with_cycle():
    """sigma(n) = sqrt(sigma_T0^2 + n^2 sigma_P^2) (linear ephemeris, common practice):
    0.001 d and 0.0001 d at n = 30 give 0.0031623 d."""
    sigma = mid_error_s(0.001, 0.0001, np.array([0, 30, -30]))
    assert sigma == pytest.approx(np.array([86.4, 273.22, 273.22]), rel=1e-4)
