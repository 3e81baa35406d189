"""A pointing followed in time: the slew's duration, and the observed place along the track.

The interlocks (core.limits) judge an observed place: refracted altitude and azimuth, and the
observed hour angle and declination (SOFA atioq, core.observed). This module applies that same
judgement to an interval instead of an instant, so a target allowed now but setting through
the altitude limit during the slew or soon after is refused.

Along a track the direction in the Celestial Intermediate Reference System (CIRS) is held
fixed: over an hour a star's CIRS place changes by well under an arcsecond (aberration and
precession-nutation are slow; space motion slower still), while the Earth turns it by 15
degrees. The Earth's turning is the Earth rotation angle's rate, 1.00273781191135448
revolutions per UT1 day (IERS Conventions 2010, eq. 5.15); turning the CIRS direction the
other way about the pole is the same as advancing the angle, so one observed_place call
evaluates a whole track. The Sun moves about 0.04 deg per hour against the stars: its
separation is taken at both ends of the track and the smaller one is used throughout.

Slews: both axes move at once at the mount's slew rate, then it settles (the planner's model,
core.schedule_slew); a German equatorial mount moves its mechanical axes, through a pier flip
when the side changes (core.schedule_pier). Cost: one context plus one vectorized call, about
a millisecond for an hour sampled every second.
"""
from __future__ import annotations

import numpy as np
from astropy.time import TimeDelta

from .constants import DEG_TO_RAD, RAD_TO_DEG
from .context import AstrometryContext
from .export import sun_separation_deg
from .horizon_geometry import SIDEREAL_DEG_PER_S
from .limits import MountLimits
from .observed import observed_place
from .schedule_pier import axis_angles, side_of
from .schedule_slew import _axis_slew_deg
from .site import Site
from .vectors import unit_vectors

# Samples along a track: the sky turns at most 15 arcsec per second, so a one-second step
# finds a limit crossing within a second (common practice: finer than any limit's accuracy).
TRACK_STEP_S = 1.0


def slew_seconds(ha_from_deg: float, dec_from_deg: float, ha_to_deg: float, dec_to_deg: float,
                 mount: MountLimits, latitude_deg: float) -> float:
    """How long a slew takes (s): settle + the larger axis travel / slew rate.

    Equatorial mounts: travel in hour angle and declination (core.schedule_slew); German
    equatorial mounts: travel of the mechanical axes on the pier sides of the two hour angles
    (core.schedule_pier.axis_angles, a flip when the sides differ); alt-az mounts are costed
    as equatorial ones (an upper bound on neither, an estimate like the planner's).
    """
    if mount.mount_type == "german":
        pole = 1.0 if latitude_deg >= 0.0 else -1.0
        theta_a, psi_a = axis_angles(ha_from_deg, dec_from_deg, side_of(ha_from_deg), pole)
        theta_b, psi_b = axis_angles(ha_to_deg, dec_to_deg, side_of(ha_to_deg), pole)
        travel = max(abs(float(theta_b - theta_a)), abs(float(psi_b - psi_a)))
    else:
        travel = float(_axis_slew_deg(ha_from_deg, dec_from_deg, ha_to_deg, dec_to_deg))
    return mount.settle + travel / mount.slew_rate


def slew_end_seconds(ha_from_deg: float, dec_from_deg: float, ha_to_deg: float,
                     dec_to_deg: float, mount: MountLimits, latitude_deg: float) -> float:
    """The slew's duration (s) to a target whose hour angle grows while the mount moves: the
    destination is taken where the target will be when the slew ends (one fixed-point step,
    enough while the slew rate exceeds the sidereal rate many times over)."""
    seconds = slew_seconds(ha_from_deg, dec_from_deg, ha_to_deg, dec_to_deg, mount,
                           latitude_deg)
    later_ha = ha_to_deg + SIDEREAL_DEG_PER_S * seconds
    return slew_seconds(ha_from_deg, dec_from_deg, later_ha, dec_to_deg, mount, latitude_deg)


def observed_track(ra_cirs_deg: float, dec_cirs_deg: float, ctx: AstrometryContext,
                   offsets_s) -> dict:
    """Observed place of one CIRS direction at ctx's instant plus offsets_s (seconds).

    Returns arrays shaped like offsets_s: alt, az, ha, dec (observed, refracted; degrees).
    """
    offsets_s = np.atleast_1d(np.asarray(offsets_s, dtype=float))
    # Advancing the Earth rotation angle by w t equals turning the direction by -w t.
    turn = -SIDEREAL_DEG_PER_S * offsets_s * DEG_TO_RAD
    p = unit_vectors(np.full(offsets_s.shape, ra_cirs_deg * DEG_TO_RAD) + turn,
                     np.full(offsets_s.shape, dec_cirs_deg * DEG_TO_RAD))
    place = observed_place(p, ctx.site)
    return {"alt": place.alt * RAD_TO_DEG, "az": place.az * RAD_TO_DEG,
            "ha": place.ha * RAD_TO_DEG, "dec": place.dec * RAD_TO_DEG}


def track_refusal(ra_apparent_deg: float, dec_apparent_deg: float, site: Site,
                  ctx: AstrometryContext, start_s: float, end_s: float,
                  step_s: float = TRACK_STEP_S) -> tuple[float | None, str]:
    """The first instant (s after ctx's time) in [start_s, end_s] at which the site's
    interlocks refuse a fixed apparent place of date, and why; (None, '') when none does.

    The apparent place (true equator and equinox of date) becomes CIRS by the equation of the
    origins; see the module docstring for the track and the Sun.
    """
    if end_s < start_s:
        end_s = start_s
    count = int(np.ceil((end_s - start_s) / step_s)) + 1
    offsets = np.minimum(start_s + step_s * np.arange(count), end_s)
    ra_cirs = ra_apparent_deg + ctx.cirs_minus_tod_rad * RAD_TO_DEG
    place = observed_track(ra_cirs, dec_apparent_deg, ctx, offsets)
    # The Sun at both ends; the smaller separation holds for the whole track.
    ends = ctx.time + TimeDelta(np.array([start_s, end_s]), format="sec")
    sun = sun_separation_deg(site, ends[0], [ra_apparent_deg], [dec_apparent_deg])
    sun_end = sun_separation_deg(site, ends[1], [ra_apparent_deg], [dec_apparent_deg])
    sun_deg = np.full(offsets.shape, min(float(sun[0]), float(sun_end[0])))
    reasons = site.interlocks.violations(place["alt"], place["az"], place["ha"], place["dec"],
                                         sun_deg)
    bad = np.flatnonzero(reasons != "")
    if bad.size == 0:
        return None, ""
    return float(offsets[bad[0]]), str(reasons[bad[0]])
