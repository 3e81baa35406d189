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

A solar-system body moves against the stars (the Moon about 0.5 arcsec per second): its
track is its topocentric apparent place sampled every BODY_STEP_S seconds (core.body_track,
the chain positions() uses) and interpolated linearly between samples (the Moon's path bends
by under 1 arcsec across 10 minutes, core/body_track.py), each sample's CIRS direction turned
by the Earth as a star's is; its Sun separation is taken at every sample. The Sun as a target
is refused unless a solar filter is declared fitted (core.limits.Interlocks.violations).

Slews: both axes move at once at the mount's slew rate, then it settles (the planner's model,
core.schedule_slew); a German equatorial mount moves its mechanical axes, through a pier flip
when the side changes (core.pointing_model.pier_sides). Cost: one context plus one vectorized
call, about a millisecond for an hour sampled every second.
"""
from __future__ import annotations

import numpy as np
from astropy.time import TimeDelta

from dataclasses import dataclass

from .constants import DEG_TO_RAD, RAD_TO_DEG
from .context import AstrometryContext, make_context
from .export import sun_separation_deg
from .horizon_geometry import SIDEREAL_DEG_PER_S
from .limits import MountLimits
from .observed import observed_place
from .pointing_model.pier_sides import axis_angles, pole_sign_for, side_of
from .schedule_slew import _axis_slew_deg
from .site import Site
from .vectors import separation, unit_vectors

# Samples along a track: the sky turns at most 15 arcsec per second, so a one-second step
# finds a limit crossing within a second (common practice: finer than any limit's accuracy).
TRACK_STEP_S = 1.0
# Samples of a body's place along a track (see the module docstring).
BODY_STEP_S = 600.0


@dataclass(frozen=True, eq=False)
class BodyMotion:
    """A body's topocentric apparent place of date sampled at offsets_s (seconds after an
    instant), degrees, right ascension unwrapped; `is_sun` for the Sun itself."""

    offsets_s: np.ndarray
    ra_deg: np.ndarray
    dec_deg: np.ndarray
    is_sun: bool = False

    def at(self, offsets_s) -> tuple[np.ndarray, np.ndarray]:
        """(RA, Dec) of date in degrees at offsets (s), linear between samples (the end
        segments extended)."""
        t = np.atleast_1d(np.asarray(offsets_s, dtype=float))
        j = np.clip(np.searchsorted(self.offsets_s, t, side="right") - 1, 0,
                    self.offsets_s.size - 2)
        w = (t - self.offsets_s[j]) / (self.offsets_s[j + 1] - self.offsets_s[j])
        ra = self.ra_deg[j] + w * (self.ra_deg[j + 1] - self.ra_deg[j])
        dec = self.dec_deg[j] + w * (self.dec_deg[j + 1] - self.dec_deg[j])
        return np.mod(ra, 360.0), dec

    def shift(self, offsets_s) -> tuple[np.ndarray, np.ndarray]:
        """How far the place has moved at offsets (s) since offset 0 (deg of RA, of Dec)."""
        ra0, dec0 = self.at(0.0)
        ra, dec = self.at(offsets_s)
        return (ra - ra0 + 180.0) % 360.0 - 180.0, dec - dec0


def body_motion(source, site: Site, when, end_s: float,
                step_s: float = BODY_STEP_S) -> BodyMotion:
    """The source's (core.bodies.sources) topocentric apparent place of date from `when`
    to end_s seconds after it, sampled every step_s or finer (at least both ends). One
    astrometry context per sample (about 2 ms) and one light-time solution."""
    from .bodies.sources import MajorBody
    from .body_track import apparent_of_date
    from .timescale import parse_time

    t0 = parse_time(when)
    end_s = max(float(end_s), 1.0)
    offsets = np.linspace(0.0, end_s, int(np.ceil(end_s / step_s)) + 1)
    contexts = [make_context(t0 + TimeDelta(dt, format="sec"), site) for dt in offsets]
    ra, dec, _ = apparent_of_date([source], contexts)
    return BodyMotion(offsets, np.degrees(np.unwrap(np.radians(ra[0]))), dec[0],
                      is_sun=isinstance(source, MajorBody) and source.name == "sun")


def slew_seconds(ha_from_deg: float, dec_from_deg: float, ha_to_deg: float, dec_to_deg: float,
                 mount: MountLimits, latitude_deg: float) -> float:
    """How long a slew takes (s): settle + the larger axis travel / slew rate.

    Equatorial mounts: travel in hour angle and declination (core.schedule_slew); German
    equatorial mounts: travel of the mechanical axes on the pier sides of the two hour angles
    (core.pointing_model.pier_sides.axis_angles, a flip when the sides differ); alt-az mounts
    are costed as equatorial ones (an upper bound on neither, an estimate like the planner's).
    """
    if mount.mount_type == "german":
        pole = pole_sign_for(latitude_deg)
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
    """Observed place of one CIRS direction (or one per offset) at ctx's instant plus
    offsets_s (seconds).

    Returns arrays shaped like offsets_s: alt, az, ha, dec (observed, refracted; degrees).
    """
    offsets_s = np.atleast_1d(np.asarray(offsets_s, dtype=float))
    # Advancing the Earth rotation angle by w t equals turning the direction by -w t.
    turn = -SIDEREAL_DEG_PER_S * offsets_s * DEG_TO_RAD
    ra_rad = np.broadcast_to(np.asarray(ra_cirs_deg, dtype=float), offsets_s.shape) * DEG_TO_RAD
    dec_rad = np.broadcast_to(np.asarray(dec_cirs_deg, dtype=float), offsets_s.shape) \
        * DEG_TO_RAD
    p = unit_vectors(ra_rad + turn, dec_rad)
    place = observed_place(p, ctx.site)
    return {"alt": place.alt * RAD_TO_DEG, "az": place.az * RAD_TO_DEG,
            "ha": place.ha * RAD_TO_DEG, "dec": place.dec * RAD_TO_DEG}


def track_refusal(ra_apparent_deg: float, dec_apparent_deg: float, site: Site,
                  ctx: AstrometryContext, start_s: float, end_s: float,
                  step_s: float = TRACK_STEP_S,
                  motion: BodyMotion | None = None) -> tuple[float | None, str]:
    """The first instant (s after ctx's time) in [start_s, end_s] at which the site's
    interlocks refuse an apparent place of date, and why; (None, '') when none does.

    The place is fixed, or with `motion` (a body's, its offsets from ctx's time) carried
    along by the body's motion since ctx's time. The apparent place (true equator and equinox
    of date) becomes CIRS by the equation of the origins; see the module docstring for the
    track and the Sun.
    """
    if end_s < start_s:
        end_s = start_s
    count = int(np.ceil((end_s - start_s) / step_s)) + 1
    offsets = np.minimum(start_s + step_s * np.arange(count), end_s)
    if motion is None:
        ra, dec = ra_apparent_deg, dec_apparent_deg
        # The Sun at both ends; the smaller separation holds for the whole track.
        ends = ctx.time + TimeDelta(np.array([start_s, end_s]), format="sec")
        sun = sun_separation_deg(site, ends[0], [ra], [dec])
        sun_end = sun_separation_deg(site, ends[1], [ra], [dec])
        sun_deg = np.full(offsets.shape, min(float(sun[0]), float(sun_end[0])))
    else:
        # The body's own motion moves the place; its Sun separation at every sample.
        dra, ddec = motion.shift(offsets)
        ra, dec = ra_apparent_deg + dra, dec_apparent_deg + ddec
        sun_deg = _moving_sun_separation(site, ctx, ra_apparent_deg, dec_apparent_deg,
                                         motion, offsets)
    ra_cirs = ra + ctx.cirs_minus_tod_rad * RAD_TO_DEG
    place = observed_track(ra_cirs, dec, ctx, offsets)
    reasons = site.interlocks.violations(place["alt"], place["az"], place["ha"], place["dec"],
                                         sun_deg, is_sun=motion is not None and motion.is_sun)
    bad = np.flatnonzero(reasons != "")
    if bad.size == 0:
        return None, ""
    return float(offsets[bad[0]]), str(reasons[bad[0]])


def _moving_sun_separation(site: Site, ctx: AstrometryContext, ra_deg: float, dec_deg: float,
                           motion: BodyMotion, offsets) -> np.ndarray:
    """Separation (deg) from the Sun of a place carried by `motion`, at its samples within
    the offsets' span, interpolated to the offsets."""
    from .sunmoon import moon_track

    inside = (motion.offsets_s > offsets[0]) & (motion.offsets_s < offsets[-1])
    samples = np.unique(np.concatenate(([offsets[0], offsets[-1]],
                                        motion.offsets_s[inside])))
    sun = moon_track(site, ctx.time + TimeDelta(samples, format="sec"))
    dra, ddec = motion.shift(samples)
    place = unit_vectors((ra_deg + dra) * DEG_TO_RAD, (dec_deg + ddec) * DEG_TO_RAD)
    sun_u = unit_vectors(sun.sun_ra_deg * DEG_TO_RAD, sun.sun_dec_deg * DEG_TO_RAD)
    return np.interp(offsets, samples, separation(place, sun_u) * RAD_TO_DEG)
