"""The observer's barycentric state for arrays of instants: the geocentre from DE421, plus
the site's geocentric position and velocity when a site is given.

Per instant (computed once, vectorized): the Earth from DE421 (ephemeris.py); for a site,
ERFA pvtob (the site's position and rotation velocity on the WGS84 ellipsoid, with polar
motion and the TIO locator s'; IERS Conventions 2010 ch. 5) rotated from CIRS to GCRS by the
transpose of the celestial-to-intermediate matrix, as SOFA's apco does.
"""
from __future__ import annotations

from dataclasses import dataclass

import erfa
import numpy as np

from ..constants import DEG_TO_RAD, SECONDS_PER_DAY
from ..context import AstrometryContext
from ..constants import AU_M
from .ephemeris import barycentric_state


@dataclass(frozen=True)
class Observer:
    """Where the light arrives, at n instants; vectors (3, n) on ICRS axes, AU and AU/day."""

    tdb1: np.ndarray
    tdb2: np.ndarray
    p_bary_au: np.ndarray  # observer (geocentre or site)
    v_earth_au_d: np.ndarray  # the geocentre's velocity: the annual aberration
    v_bary_au_d: np.ndarray  # the observer's own velocity (site rotation included): rates
    sun_bary_au: np.ndarray  # the Sun at the instant

    @property
    def size(self) -> int:
        return self.tdb1.shape[0]


def site_gcrs_offset(site, tt, era_rad, polar_motion_rad, c2i) -> tuple[np.ndarray, np.ndarray]:
    """Geocentric position (AU) and velocity (AU/day) of a site on GCRS axes at one instant."""
    sp = erfa.sp00(*tt)
    pv = erfa.pvtob(site.longitude * DEG_TO_RAD, site.latitude * DEG_TO_RAD, site.height,
                    polar_motion_rad[0], polar_motion_rad[1], sp, era_rad)
    # pvtob gives metres and metres per second on CIRS axes.
    p = np.asarray(c2i).T @ pv[0] / AU_M
    v = np.asarray(c2i).T @ pv[1] * SECONDS_PER_DAY / AU_M
    return p, v


def observer_from_context(ctx: AstrometryContext, *, topocentric: bool = True) -> Observer:
    """The observer of one astrometry context (the site when it has one, else the geocentre)."""
    tdb1, tdb2 = np.array([ctx.tdb[0]]), np.array([ctx.tdb[1]])
    earth_p, earth_v = barycentric_state("earth", tdb1, tdb2)
    sun_p, _ = barycentric_state("sun", tdb1, tdb2)
    p, v = earth_p, earth_v
    if topocentric and ctx.site is not None:
        dp, dv = site_gcrs_offset(ctx.site.site, ctx.tt, ctx.era_rad, ctx.polar_motion_rad,
                                  ctx.c2i)
        p, v = earth_p + dp[:, None], earth_v + dv[:, None]
    return Observer(tdb1=tdb1, tdb2=tdb2, p_bary_au=p, v_earth_au_d=earth_v, v_bary_au_d=v,
                    sun_bary_au=sun_p)
