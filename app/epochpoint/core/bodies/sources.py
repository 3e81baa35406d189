"""Sources: things in the sky that give directions and distances for arrays of instants.

A major body (DE421) and a minor body (two-body orbit around DE421's Sun) differ only in
their barycentric state function; everything after it is one path, the same for both:
1. light time, iterated: the body's barycentric position at t - tau, tau = |rho| / c, until
   tau changes by under a microsecond (the "astrometric place", Explanatory Supplement to
   the Astronomical Almanac, 3rd ed. 2013, sec. 7.2.3; Kaplan 2005, USNO Circular 179, 7);
2. light deflection by the Sun and annual aberration: the steps used for stars
   (core/apparent.py, SOFA ldsun and ab) applied to the light-time direction;
3. the observed place (core/observed.py) of the result, fed with the topocentric direction
   when a site is given (the site's position from the context: parallax, up to ~1 deg for
   the Moon), diurnal aberration applied there.
Catalogue stars keep their own propagation (core/spacemotion.py) and join the same steps 2-3
in core/positions.py. `moves_in_a_night` says whether a source may be held fixed over a night.
Cost: per instant the observer (observer.py); per source and instant 3-4 ephemeris
evaluations and about 100 array operations.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..apparent import aberrate, deflect_by_sun
from ..constants import C_AU_PER_DAY
from ..vectors import dot
from .ephemeris import MAJOR_BODIES, barycentric_state
from .kepler import Orbit, heliocentric_state

# Beyond this many days from the element epoch two-body motion drifts noticeably (planetary
# perturbations): a warning, common practice for osculating elements.
STALE_ELEMENTS_DAYS = 200.0


@dataclass(frozen=True)
class MajorBody:
    """The Sun, the Moon, a planet or Pluto, from DE421."""

    name: str  # lower case, one of MAJOR_BODIES

    moves_in_a_night = True

    def barycentric_state(self, tdb1, tdb2):
        return barycentric_state(self.name, tdb1, tdb2)

    def warnings(self, tdb1, tdb2) -> list:
        return []


@dataclass(frozen=True)
class MinorBody:
    """An asteroid or comet on a two-body orbit, with its magnitude parameters (NaN: none)."""

    name: str
    orbit: Orbit
    abs_magnitude: float = np.nan
    slope: float = np.nan
    comet_m1: float = np.nan
    comet_k1: float = np.nan

    moves_in_a_night = True

    def barycentric_state(self, tdb1, tdb2):
        # Heliocentric two-body state plus the Sun's barycentric state (TT taken as TDB: 2 ms).
        sun_p, sun_v = barycentric_state("sun", tdb1, tdb2)
        helio_p, helio_v = heliocentric_state(self.orbit, np.asarray(tdb1) + np.asarray(tdb2))
        return sun_p + helio_p, sun_v + helio_v

    def warnings(self, tdb1, tdb2) -> list:
        days = np.abs(np.asarray(tdb1) + np.asarray(tdb2) - self.orbit.epoch_jd)
        if np.size(days) and float(np.max(days)) > STALE_ELEMENTS_DAYS:
            return [f"{self.name}: instant {float(np.max(days)):.0f} days from the element "
                    f"epoch (two-body motion drifts beyond ~{STALE_ELEMENTS_DAYS:.0f} days)"]
        return []


def major_body(name: str) -> MajorBody:
    """The major body called `name` (case-insensitive); ValueError naming the choices."""
    key = str(name).strip().lower()
    if key not in MAJOR_BODIES:
        raise ValueError(f"unknown body {name!r}; expected one of {', '.join(MAJOR_BODIES)}")
    return MajorBody(key)


@dataclass(frozen=True)
class BodyPlace:
    """A source seen by an observer at n instants; vectors (3, n) on GCRS/ICRS axes."""

    p_gcrs: np.ndarray  # apparent (proper) direction: deflected and aberrated, unit
    u_astrometric: np.ndarray  # light-time corrected geometric direction, unit
    rate_au_d: np.ndarray  # d(rho)/dt: the observer-to-body vector's rate, AU/day
    distance_au: np.ndarray  # |rho| at the light-time-corrected instant
    light_time_d: np.ndarray
    body_to_sun_au: np.ndarray  # at the emission instant
    observer_to_sun_au: np.ndarray  # at the observation instant
    extra: dict = field(default_factory=dict)


def apparent_place(source, observer) -> BodyPlace:
    """Light-time, deflection and aberration for one source at the observer's instants."""
    tdb1, tdb2, obs_p = observer.tdb1, observer.tdb2, observer.p_bary_au
    # Light time, iterated from tau = 0 (three to four passes reach a microsecond).
    tau = np.zeros(observer.size)
    for _ in range(6):
        body_p, body_v = source.barycentric_state(tdb1, tdb2 - tau)
        rho = body_p - obs_p
        distance = np.sqrt(dot(rho, rho))
        tau_new = distance / C_AU_PER_DAY
        converged = np.all(np.abs(tau_new - tau) < 1e-11)
        tau = tau_new
        if converged:
            break
    body_p, body_v = source.barycentric_state(tdb1, tdb2 - tau)
    rho = body_p - obs_p
    distance = np.sqrt(dot(rho, rho))
    u = rho / distance
    # Rate of rho: the body's velocity at emission, slowed by d(tau)/dt, less the observer's.
    tau_rate = dot(u, body_v - observer.v_bary_au_d) / C_AU_PER_DAY
    rate = body_v * (1.0 - tau_rate) - observer.v_bary_au_d

    # Light deflection by the Sun and annual aberration, as for stars (apparent.py).
    sun_to_obs = obs_p - observer.sun_bary_au
    sun_distance = np.sqrt(dot(sun_to_obs, sun_to_obs))
    # The Sun-to-body direction at emission; the Sun itself is deflected as a star (astropy's
    # choice, atciqz) since the direction from its own centre is undefined.
    sun_then, _ = barycentric_state("sun", tdb1, tdb2 - tau)
    q = body_p - sun_then
    q_norm = np.sqrt(dot(q, q))
    q = np.where(q_norm > 1e-10, q / np.maximum(q_norm, 1e-300), u)
    p_deflected = deflect_by_sun(u, sun_to_obs / sun_distance, sun_distance, q)
    v_c = observer.v_earth_au_d / C_AU_PER_DAY
    lorentz_inverse = np.sqrt(1.0 - dot(v_c, v_c))
    p_proper = aberrate(p_deflected, v_c, sun_distance, lorentz_inverse)

    return BodyPlace(p_gcrs=p_proper, u_astrometric=u, rate_au_d=rate, distance_au=distance,
                     light_time_d=tau, body_to_sun_au=sun_then - body_p,
                     observer_to_sun_au=-sun_to_obs)
