"""The outside side of the night-planning tests: astropy altitude grids and their crossings.

Reference library (tests only): astropy's AltAz and HADec frames (ERFA apco, atioq with the
refraction constants of ERFA refco) for targets, and get_body('sun'/'moon') in AltAz with
pressure 0 for the Sun's and Moon's unrefracted altitudes. The engine is used here only to
read what it returned (seconds from the plan's reference instant), never to compute an
expected value. Crossing times are found on a grid and interpolated linearly between the two
samples around each sign change: at a 25 s step the altitude's curvature moves the result by
well under 0.1 s away from the zenith.
"""
from __future__ import annotations

from functools import lru_cache

import numpy as np
from astropy import units as u
from astropy.coordinates import (TETE, AltAz, Distance, EarthLocation, HADec, SkyCoord,
                                 angular_separation, get_body)
from astropy.time import Time, TimeDelta

GRID_STEP_S = 25.0  # a dense grid: 20-30 s


def earth_location(site) -> EarthLocation:
    return EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                       site.height * u.m)


def instants(plan, seconds) -> Time:
    """astropy Times for seconds after the plan's reference instant."""
    return plan.t_ref + TimeDelta(np.asarray(seconds, dtype=float), format="sec")


def altaz_frame(site, times: Time) -> AltAz:
    """AltAz with the site's pressure, temperature, humidity and wavelength (pressure 0 is
    astropy's own switch for no refraction)."""
    return AltAz(obstime=times, location=earth_location(site), pressure=site.pressure * u.hPa,
                 temperature=site.temperature * u.deg_C, relative_humidity=site.humidity,
                 obswl=site.wavelength * u.micron)


def icrs(ra_deg, dec_deg) -> SkyCoord:
    return SkyCoord(ra=np.asarray(ra_deg) * u.deg, dec=np.asarray(dec_deg) * u.deg, frame="icrs")


def _per_target(seconds) -> np.ndarray:
    """Times as a (1, times) row shared by every target, or (targets, times) rows as given."""
    seconds = np.asarray(seconds, dtype=float)
    return seconds[None, :] if seconds.ndim == 1 else seconds


def catalogue_place(columns: dict, plan, seconds: float) -> SkyCoord:
    """Catalogue targets (Targets.from_columns keywords) carried by astropy's
    apply_space_motion (ERFA pmsafe) to an instant of the night: ICRS position and distance,
    without the velocities (over one night the motion is far below a milliarcsecond)."""
    epoch = Time(np.broadcast_to(columns["epoch"], np.shape(columns["ra"])), format="jyear",
                 scale="tdb")
    star = SkyCoord(ra=columns["ra"] * u.deg, dec=columns["dec"] * u.deg,
                    distance=Distance(parallax=columns["parallax"] * u.mas),
                    pm_ra_cosdec=columns["pm_ra_cosdec"] * u.mas / u.yr,
                    pm_dec=columns["pm_dec"] * u.mas / u.yr,
                    radial_velocity=columns["radial_velocity"] * u.km / u.s,
                    obstime=epoch, frame="icrs")
    moved = star.apply_space_motion(new_obstime=instants(plan, seconds))
    return SkyCoord(ra=moved.ra, dec=moved.dec, distance=moved.distance, frame="icrs")


def target_altaz(site, plan, coords: SkyCoord, seconds) -> tuple[np.ndarray, np.ndarray]:
    """Observed altitude and azimuth (deg), shape (targets, times), from astropy AltAz.

    seconds: one row of times for every target, or one row per target."""
    frame = altaz_frame(site, instants(plan, _per_target(seconds)))
    altaz = coords.reshape(-1)[:, None].transform_to(frame)
    return altaz.alt.deg, altaz.az.deg


def target_ha_deg(site, plan, coords: SkyCoord, seconds) -> np.ndarray:
    """Topocentric hour angle (deg, west positive, in [-180, 180)), shape (targets, times),
    from astropy HADec (pressure 0)."""
    frame = HADec(obstime=instants(plan, _per_target(seconds)), location=earth_location(site),
                  pressure=0.0 * u.hPa)
    ha = coords.reshape(-1)[:, None].transform_to(frame).ha.deg
    return np.mod(ha + 180.0, 360.0) - 180.0


def crossings(t_s: np.ndarray, values: np.ndarray, level: float) -> list[tuple[float, bool]]:
    """(time, rising) where values cross level, linear between grid samples."""
    above = values >= level
    k = np.flatnonzero(above[1:] != above[:-1])
    out = []
    for j in k:
        f0, f1 = values[j] - level, values[j + 1] - level
        out.append((float(t_s[j] + (t_s[j + 1] - t_s[j]) * f0 / (f0 - f1)), bool(above[j + 1])))
    return out


def _runs(edges: list, t_s: np.ndarray, holds_at_start: bool) -> list[tuple[float, float]]:
    """Intervals from (time, rising) edges over the grid span t_s[0]..t_s[-1]."""
    out, start = [], (float(t_s[0]) if holds_at_start else None)
    for t, rising in edges:
        if rising:
            start = t
        elif start is not None:
            out.append((start, t))
            start = None
    if start is not None:
        out.append((start, float(t_s[-1])))
    return out


def runs_above(t_s: np.ndarray, values: np.ndarray, level: float) -> list[tuple[float, float]]:
    """Intervals of the grid span where values >= level, edges interpolated."""
    return _runs(crossings(t_s, values, level), t_s, bool(values[0] >= level))


def grid_inside(start_s: float, end_s: float, step_s: float = GRID_STEP_S) -> np.ndarray:
    """Times from start to end (both included) at about step_s."""
    n = max(2, int(np.ceil((end_s - start_s) / step_s)) + 1)
    return np.linspace(start_s, end_s, n)


def _location_key(site) -> tuple:
    return (float(site.longitude), float(site.latitude), float(site.height))


def _body_altaz_at(location: EarthLocation, body: str, times: Time):
    """Unrefracted topocentric altitude and azimuth (deg) of the centre of 'sun' or 'moon'
    (astropy get_body, AltAz with pressure 0)."""
    frame = AltAz(obstime=times, location=location, pressure=0.0 * u.hPa)
    place = get_body(body, times, location).transform_to(frame)
    return place.alt.deg, place.az.deg


def body_altaz(site, plan, body: str, seconds) -> tuple[np.ndarray, np.ndarray]:
    """Unrefracted altitude and azimuth (deg) of 'sun' or 'moon' at seconds from t_ref."""
    return _body_altaz_at(earth_location(site), body, instants(plan, seconds))


@lru_cache(maxsize=None)
def _body_below(location_key: tuple, body: str, t_ref_iso: str, length_s: float,
                level_deg: float) -> tuple:
    """Stretches with the body's centre below level: a 5 min scan, each crossing then
    re-sampled every 2 s inside its bracket (a dip shorter than 5 min can be missed, which
    the nights used here do not have)."""
    t_ref = Time(t_ref_iso, scale="utc")
    lon, lat, height = location_key
    location = EarthLocation.from_geodetic(lon * u.deg, lat * u.deg, height * u.m)

    def altitude(seconds):
        return _body_altaz_at(location, body, t_ref + TimeDelta(seconds, format="sec"))[0]

    coarse = np.arange(0.0, length_s + 1.0, 300.0)
    alt = altitude(coarse)
    t_s, values = [coarse], [alt]
    for t, _ in crossings(coarse, alt, level_deg):
        j = int(np.searchsorted(coarse, t))
        fine = np.arange(coarse[j - 1], coarse[j], 2.0)[1:]
        t_s.append(fine)
        values.append(altitude(fine))
    t_s, values = np.concatenate(t_s), np.concatenate(values)
    order = np.argsort(t_s)
    return tuple(runs_above(t_s[order], -values[order], -level_deg))


def body_below(site, plan, body: str, level_deg: float) -> list[tuple[float, float]]:
    """Stretches of the plan's noon-to-noon window (seconds from t_ref) when astropy's 'sun'
    or 'moon' centre is below level_deg (unrefracted)."""
    length_s = float((plan.night.window_end - plan.t_ref).to_value("s"))
    return list(_body_below(_location_key(site), body, plan.t_ref.utc.isot, length_s,
                            float(level_deg)))


def sun_below(site, plan, level_deg: float) -> list[tuple[float, float]]:
    """Stretches of the plan's window when astropy's Sun centre is below level_deg."""
    return body_below(site, plan, "sun", level_deg)


def refined_runs(t_s: np.ndarray, ok: np.ndarray, ok_at, step_s: float = 1.0) -> list:
    """Intervals where a sampled condition holds, each inner edge re-sampled every step_s
    seconds by ok_at(seconds) -> bool array (the edge is the middle of the step where the
    condition changes). Edges at the grid's ends stay there."""
    edges = []
    for k in np.flatnonzero(ok[1:] != ok[:-1]):
        fine = np.arange(t_s[k], t_s[k + 1] + 0.5 * step_s, step_s)
        values = ok_at(fine)
        m = int(np.flatnonzero(values != values[0])[0]) if (values != values[0]).any() else \
            len(fine) - 1
        edges.append((0.5 * (fine[m - 1] + fine[m]), bool(ok[k + 1])))
    return _runs(edges, t_s, bool(ok[0]))


def local_sidereal_deg(site, plan, seconds) -> np.ndarray:
    """Local apparent sidereal time (deg) from astropy (IAU 2006/2000A, the shipped IERS
    UT1-UTC)."""
    return instants(plan, seconds).sidereal_time("apparent",
                                                 longitude=site.longitude * u.deg).deg


def of_date_deg(coords: SkyCoord, plan, seconds: float) -> tuple[np.ndarray, np.ndarray]:
    """Right ascension and declination of date (true equator and equinox, geocentric:
    astropy TETE), deg."""
    place = coords.transform_to(TETE(obstime=instants(plan, seconds)))
    return place.ra.deg, place.dec.deg


def from_altaz(site, plan, seconds: float, alt_deg, az_deg) -> SkyCoord:
    """The ICRS direction that astropy sees at (alt, az), unrefracted, at an instant: used to
    place invented targets relative to the Sun or the Moon."""
    frame = AltAz(obstime=instants(plan, seconds), location=earth_location(site),
                  pressure=0.0 * u.hPa)
    return SkyCoord(alt=np.atleast_1d(alt_deg) * u.deg, az=np.atleast_1d(az_deg) * u.deg,
                    frame=frame).transform_to("icrs")


def separation_deg(alt1, az1, alt2, az2) -> np.ndarray:
    """Angle between two horizon directions (deg), by astropy's angular_separation."""
    return np.degrees(angular_separation(np.radians(az1), np.radians(alt1), np.radians(az2),
                                         np.radians(alt2)))
