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
from astropy.coordinates import AltAz, EarthLocation, HADec, SkyCoord, get_body
from astropy.time import Time, TimeDelta

GRID_STEP_S = 25.0  # the brief asks for 20-30 s


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


def body_altitude_deg(site, plan, body: str, seconds) -> np.ndarray:
    """Unrefracted topocentric altitude (deg) of the centre of 'sun' or 'moon'."""
    return body_altitude_at(_location_key(site), body, instants(plan, seconds))


def crossings(t_s: np.ndarray, values: np.ndarray, level: float) -> list[tuple[float, bool]]:
    """(time, rising) where values cross level, linear between grid samples."""
    above = values >= level
    k = np.flatnonzero(above[1:] != above[:-1])
    out = []
    for j in k:
        f0, f1 = values[j] - level, values[j + 1] - level
        out.append((float(t_s[j] + (t_s[j + 1] - t_s[j]) * f0 / (f0 - f1)), bool(above[j + 1])))
    return out


def runs_above(t_s: np.ndarray, values: np.ndarray, level: float) -> list[tuple[float, float]]:
    """Intervals of the grid span where values >= level, edges interpolated."""
    edges = crossings(t_s, values, level)
    out, start = [], (float(t_s[0]) if values[0] >= level else None)
    for t, rising in edges:
        if rising:
            start = t
        elif start is not None:
            out.append((start, t))
            start = None
    if start is not None:
        out.append((start, float(t_s[-1])))
    return out


def grid_inside(start_s: float, end_s: float, step_s: float = GRID_STEP_S) -> np.ndarray:
    """Times from start to end (both included) at about step_s."""
    n = max(2, int(np.ceil((end_s - start_s) / step_s)) + 1)
    return np.linspace(start_s, end_s, n)


def _location_key(site) -> tuple:
    return (float(site.longitude), float(site.latitude), float(site.height))


def body_altitude_at(location_key: tuple, body: str, times: Time) -> np.ndarray:
    """Unrefracted altitude (deg) of 'sun' or 'moon' at a (lon deg, lat deg, height m) site."""
    lon, lat, height = location_key
    location = EarthLocation.from_geodetic(lon * u.deg, lat * u.deg, height * u.m)
    frame = AltAz(obstime=times, location=location, pressure=0.0 * u.hPa)
    return get_body(body, times, location).transform_to(frame).alt.deg


@lru_cache(maxsize=None)
def _body_below(location_key: tuple, body: str, t_ref_iso: str, length_s: float,
                level_deg: float) -> tuple:
    """Stretches with the body's centre below level: a 5 min scan, each crossing then
    re-sampled every 2 s inside its bracket (a dip shorter than 5 min can be missed, which
    the nights used here do not have)."""
    t_ref = Time(t_ref_iso, scale="utc")
    coarse = np.arange(0.0, length_s + 1.0, 300.0)
    alt = body_altitude_at(location_key, body, t_ref + TimeDelta(coarse, format="sec"))
    t_s, values = [coarse], [alt]
    for t, _ in crossings(coarse, alt, level_deg):
        j = int(np.searchsorted(coarse, t))
        fine = np.arange(coarse[j - 1], coarse[j], 2.0)[1:]
        t_s.append(fine)
        values.append(body_altitude_at(location_key, body, t_ref + TimeDelta(fine, format="sec")))
    t_s, values = np.concatenate(t_s), np.concatenate(values)
    order = np.argsort(t_s)
    return tuple(runs_above(t_s[order], -values[order], -level_deg))


def body_below(site, plan, body: str, level_deg: float) -> list[tuple[float, float]]:
    """Stretches of the plan's noon-to-noon window (seconds from t_ref) when astropy's 'sun'
    or 'moon' centre is below level_deg (unrefracted)."""
    length_s = float((plan.night.window_end - plan.t_ref).to_value("s"))
    return list(_body_below(_location_key(site), body, plan.t_ref.utc.isot, length_s, float(level_deg)))


def sun_below(site, plan, level_deg: float) -> list[tuple[float, float]]:
    """Stretches of the plan's window when astropy's Sun centre is below level_deg."""
    return body_below(site, plan, "sun", level_deg)
