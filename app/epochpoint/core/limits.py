"""What the telescope may point at: the horizon mask, the mount's limits and Sun avoidance.

These are the interlocks of the site. They are on by default (a minimum altitude, a 30 degree
Sun-avoidance radius); every check here is vectorized over targets or times.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

MOUNT_TYPES = ("equatorial", "german", "altaz")
# Shown every time the Sun is a target with the solar option on (common practice of the trade).
SOLAR_CAUTION = ("CAUTION: solar option on, the Sun may be a target. Never look through or "
                 "point an unfiltered telescope or finder at the Sun: blindness is instant and "
                 "permanent. Check the full-aperture solar filter is fitted and secured, and "
                 "cap the finder.")
SUN_REFUSED = "the Sun: refused by the interlocks (no solar filter declared fitted)"
# How each mount type is named to people (the trade's names, common practice).
MOUNT_TYPE_NAMES = {"equatorial": "fork equatorial", "german": "German equatorial",
                    "altaz": "alt-az"}


class LimitError(ValueError):
    """An invalid or inconsistent limit, naming the field."""

    def __init__(self, field_name: str, message: str):
        self.field = field_name
        super().__init__(f"{field_name}: {message}")


@dataclass(frozen=True, eq=False)
class HorizonMask:
    """Minimum observed altitude (deg) as a function of azimuth (deg, north through east).

    Points are joined by straight lines in azimuth, wrapping through north; between the last
    point and 360 deg the profile returns to the first point.
    """

    azimuth: np.ndarray
    altitude: np.ndarray

    def __post_init__(self):
        az = np.asarray(self.azimuth, dtype=float)
        alt = np.asarray(self.altitude, dtype=float)
        if az.ndim != 1 or az.shape != alt.shape or az.size < 1:
            raise LimitError("horizon", "needs matching lists of azimuths and altitudes")
        if not (np.isfinite(az).all() and np.isfinite(alt).all()):
            raise LimitError("horizon", "values must be finite numbers")
        if (az < 0.0).any() or (az >= 360.0).any():
            raise LimitError("horizon", "azimuths must be in [0, 360) degrees")
        if (np.diff(az) <= 0.0).any():
            raise LimitError("horizon", "azimuths must increase strictly")
        if (alt < -5.0).any() or (alt > 90.0).any():
            raise LimitError("horizon", "altitudes must be in [-5, 90] degrees")
        object.__setattr__(self, "azimuth", az)
        object.__setattr__(self, "altitude", alt)

    def __eq__(self, other):
        return (isinstance(other, HorizonMask) and np.array_equal(self.azimuth, other.azimuth)
                and np.array_equal(self.altitude, other.altitude))

    __hash__ = None

    def min_altitude(self, az_deg) -> np.ndarray:
        """The mask's altitude (deg) at azimuths (deg), periodic linear interpolation."""
        return np.interp(np.mod(az_deg, 360.0), self.azimuth, self.altitude, period=360.0)


@dataclass(frozen=True)
class MountLimits:
    """Pointing limits of the mount (degrees; hour angles in hours, west positive).

    min_altitude: lowest observed altitude the telescope may point at (also the planner's
    default altitude limit). ha_east/ha_west: how far east (negative HA) and west of the
    meridian it may point. dec_min/dec_max: declination range. For a German equatorial
    mount, meridian_limit is how far past the meridian (degrees of hour angle) it may track
    before it must flip. slew_rate (deg/s, per axis) and settle (s) time the slews.
    park_ha/park_dec: where the mount rests before the night (degrees of hour angle, west
    positive, and degrees of declination); None for both: the common home position, the
    elevated celestial pole with the counterweight down (see `park`).
    """

    mount_type: str = "equatorial"
    min_altitude: float = 10.0
    ha_east: float = 12.0
    ha_west: float = 12.0
    dec_min: float = -90.0
    dec_max: float = 90.0
    meridian_limit: float = 5.0
    slew_rate: float = 3.0
    settle: float = 10.0
    park_ha: float | None = None
    park_dec: float | None = None

    def __post_init__(self):
        if self.mount_type not in MOUNT_TYPES:
            raise LimitError("mount_type", f"{self.mount_type!r} is not one of "
                             f"{', '.join(MOUNT_TYPES)}")
        for name in ("min_altitude", "ha_east", "ha_west", "dec_min", "dec_max",
                     "meridian_limit", "slew_rate", "settle"):
            value = getattr(self, name)
            if not isinstance(value, (int, float)) or not np.isfinite(value):
                raise LimitError(name, f"{value!r} is not a finite number")
        checks = (
            ("min_altitude", -5.0 <= self.min_altitude < 90.0, "must be in [-5, 90) degrees"),
            ("ha_east", 0.0 < self.ha_east <= 12.0, "must be in (0, 12] hours"),
            ("ha_west", 0.0 < self.ha_west <= 12.0, "must be in (0, 12] hours"),
            ("dec_min", -90.0 <= self.dec_min < self.dec_max,
             "must be at least -90 and below dec_max"),
            ("dec_max", self.dec_max <= 90.0, "must be at most +90"),
            ("meridian_limit", 0.0 <= self.meridian_limit <= 90.0,
             "must be in [0, 90] degrees of hour angle"),
            ("slew_rate", 0.0 < self.slew_rate <= 90.0, "must be in (0, 90] degrees per second"),
            ("settle", 0.0 <= self.settle <= 3600.0, "must be in [0, 3600] seconds"),
        )
        for name, ok, message in checks:
            if not ok:
                raise LimitError(name, f"{getattr(self, name)!r} {message}")
        if (self.park_ha is None) != (self.park_dec is None):
            raise LimitError("park_ha" if self.park_ha is None else "park_dec",
                             "park_ha and park_dec go together")
        if self.park_ha is not None:
            for name, bound in (("park_ha", 180.0), ("park_dec", 90.0)):
                value = getattr(self, name)
                if not isinstance(value, (int, float)) or not -bound <= value <= bound:
                    raise LimitError(name, f"{value!r} must be in [-{bound:g}, {bound:g}] "
                                           f"degrees")

    def park(self, latitude_deg: float) -> tuple[float, float]:
        """(hour angle, declination) in degrees where the mount starts the night: park_ha and
        park_dec, or by default the elevated celestial pole with the counterweight down
        (hour angle -90 deg for a German mount, whose counterweight then hangs straight
        down; 0 for the others; common practice for a mount's home position)."""
        if self.park_ha is not None:
            return float(self.park_ha), float(self.park_dec)
        pole = 90.0 if latitude_deg >= 0.0 else -90.0
        return (-90.0 if self.mount_type == "german" else 0.0), pole


@dataclass(frozen=True)
class Interlocks:
    """Limits the site enforces before any motion, with Sun avoidance (radius in degrees).

    The Sun as a target is always refused unless `solar_filter_fitted` says a full-aperture
    solar filter is on the telescope (off by default); with it on, SOLAR_CAUTION is shown
    every time the Sun is planned or pointed at.
    """

    mount: MountLimits = field(default_factory=MountLimits)
    horizon: HorizonMask | None = None
    sun_avoidance: float = 30.0
    solar_filter_fitted: bool = False

    def __post_init__(self):
        if not isinstance(self.solar_filter_fitted, bool):
            raise LimitError("solar_filter_fitted", f"{self.solar_filter_fitted!r} must be "
                             "true or false")
        if not (isinstance(self.sun_avoidance, (int, float)) and
                0.0 <= self.sun_avoidance <= 90.0):
            raise LimitError("sun_avoidance", f"{self.sun_avoidance!r} must be in [0, 90] degrees")

    def cautions(self) -> list[str]:
        """What must be said with every plan, export or slew under these interlocks: the
        solar caution while the solar option is on; nothing otherwise."""
        return [SOLAR_CAUTION] if self.solar_filter_fitted else []

    def min_altitude(self, az_deg) -> np.ndarray:
        """The effective lowest altitude (deg) at azimuths: mount limit or mask, the higher."""
        floor = np.full(np.shape(az_deg), self.mount.min_altitude, dtype=float)
        if self.horizon is None:
            return floor
        return np.maximum(floor, self.horizon.min_altitude(az_deg))

    def violations(self, alt_deg, az_deg, ha_deg, dec_deg, sun_separation_deg,
                   is_sun=False) -> np.ndarray:
        """Why each pointing is refused ('' when allowed), as an array of short reasons.

        Checked in order of danger: the Sun as a target (is_sun, per pointing or for all)
        first, refused unless solar_filter_fitted (then exempt from Sun avoidance, its
        separation from itself being 0); then Sun avoidance, altitude and horizon, the
        mount's hour-angle and declination ranges.
        """
        alt_deg, az_deg = np.asarray(alt_deg, dtype=float), np.asarray(az_deg, dtype=float)
        ha_h = np.asarray(ha_deg, dtype=float) / 15.0
        dec_deg = np.asarray(dec_deg, dtype=float)
        reasons = np.full(alt_deg.shape, "", dtype=object)
        sun_target = np.broadcast_to(np.asarray(is_sun, dtype=bool), alt_deg.shape)
        rules = (
            (sun_target & (not self.solar_filter_fitted), SUN_REFUSED),
            (~sun_target & (np.asarray(sun_separation_deg) < self.sun_avoidance),
             f"within {self.sun_avoidance:g} deg of the Sun"),
            (alt_deg < self.mount.min_altitude,
             f"below the minimum altitude {self.mount.min_altitude:g} deg"),
            (alt_deg < self.min_altitude(az_deg), "behind the horizon mask"),
            ((ha_h < -self.mount.ha_east) | (ha_h > self.mount.ha_west),
             "outside the hour-angle limits"),
            ((dec_deg < self.mount.dec_min) | (dec_deg > self.mount.dec_max),
             "outside the declination limits"),
        )
        for broken, reason in rules:
            reasons[(reasons == "") & broken] = reason
        return reasons


@dataclass(frozen=True, eq=False)
class PierCheck:
    """A German mount's pier side after slews to hour angles, and its meridian limit there
    (arrays, one entry per slew; see pier_flip_check)."""

    side: np.ndarray  # "east" (target east of the meridian at the slew's end) or "west"
    limit_s: np.ndarray  # seconds of tracking after the slew until the side's meridian limit
    flip: np.ndarray  # True when that comes within the hold: a flip would be needed mid-track


def pier_flip_check(ha_end_deg, hold_s, meridian_limit_deg) -> PierCheck:
    """Whether a German equatorial mount, slewed to hour angle ha_end_deg (deg, west positive,
    the target's at the slew's end) and tracking for hold_s seconds, stays on its pier side.

    The side: the mount takes the side of the target's hour angle when the slew ends, east
    for H < 0 and west otherwise (core.pointing_model.pier_sides), then tracks past the
    meridian up to its meridian limit before it must flip (common practice of mount firmware;
    the same model as the planner's, core.windows and core.schedule_pier). On the east side
    the limit is at H = +m; on the west side the mount may track until the hour angle comes
    round to 360 deg + m (in practice its hour-angle limits stop it long before: 12 h of hold
    are only 180 deg).
    Tracking turns the hour angle at the sidereal rate, the Earth rotation angle's rate of
    1.00273781191135448 revolutions per UT1 day (IERS Conventions 2010, eq. 5.15; about
    15.041 arcsec per second), so the limit comes (limit - H) / rate seconds after the slew.
    A star's observed hour angle follows that rate but for refraction, which near the meridian
    lifts the star almost along its hour circle (seconds of time at most); a body's own motion
    slows its hour angle by under 4 % (the Moon's), so the limit comes a little later than
    said: the check errs on the safe side for it.

    Vectorised over slews (ha_end_deg, hold_s and meridian_limit_deg broadcast); pure
    arithmetic: about 25 us a call, 55 ns per slew on long arrays (measured, 10^6 slews).
    """
    from .horizon_geometry import SIDEREAL_DEG_PER_S
    from .pointing_model.pier_sides import EAST, PIER_SIDES, side_of
    from .vectors import wrap_pm180

    ha = wrap_pm180(np.asarray(ha_end_deg, dtype=float))
    # The side the slew takes (the mount-frame stage's rule).
    codes = side_of(ha)
    # The hour angle at which this side's meridian limit lies.
    limit_ha = np.where(codes == EAST, 0.0, 360.0) + np.asarray(meridian_limit_deg, dtype=float)
    # Tracking turns the hour angle at the sidereal rate until it gets there.
    limit_s = (limit_ha - ha) / SIDEREAL_DEG_PER_S
    side = np.asarray(np.array(PIER_SIDES, dtype=object)[codes], dtype=object)
    return PierCheck(side=side, limit_s=limit_s,
                     flip=limit_s <= np.asarray(hold_s, dtype=float))
