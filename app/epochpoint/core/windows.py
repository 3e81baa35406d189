"""Observable windows: when, inside the chosen darkness, every constraint holds for a target.

Altitude (or airmass) limits and the mount's hour-angle limits are solved in closed form
(horizon_geometry.py) from each target's apparent place at mid-darkness and the sidereal
rate; the German-mount meridian limit splits a window where the mount must flip. The
horizon mask's crossings are found to 0.1 s, however narrow its features
(horizon_crossings.py). The Moon separation (while the Moon is above the horizon; optionally
scaled with its illumination) and Sun avoidance are sampled every `sample_step` seconds and
their edges refined by bisection to about a second. Times are seconds from the night's reference instant.

Solar-system bodies move in a night, so they leave the closed form: their places are sampled
along the night (body_track.py) and their altitude and hour-angle limits are found by the same
sampling and bisection as the sampled constraints, with the Sun, Moon and horizon checks along
the moving track. The Sun as a target is refused unless the site's interlocks say a solar
filter is fitted (limits.Interlocks.solar_filter_fitted).
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from functools import partial

from . import intervals as iv
from .body_track import build_body_track
from .constants import RAD_TO_DEG
from .horizon_crossings import mask_clear_intervals
from .limits import SUN_REFUSED
from .horizon_geometry import (SIDEREAL_DEG_PER_S, altaz_from_ha, altitude_for_airmass,
                               ha_at_altitude, observed_altitude, true_altitude_for_observed)
from .positions import positions
from .ranges import checked
from .site import Site
from .sky_track import SkyTrack
from .targets import Targets
from .vectors import wrap_pm180

_REFINE_STEPS = 10  # bisection halvings of a sample step (300 s -> 0.3 s)


@dataclass(frozen=True)
class Constraints:
    """What the observer asks of a window (angles in degrees, observed altitudes).

    min_altitude None: the mount's minimum altitude. moon_separation: the smallest allowed
    Moon-target distance while the Moon is up; with moon_scale it is multiplied by the
    Moon's illuminated fraction (a thin crescent then barely matters).
    """

    darkness: str = "astronomical"
    min_altitude: float | None = None
    max_airmass: float | None = None
    moon_separation: float = 0.0
    moon_scale: bool = False
    sample_step: float = 300.0

    def __post_init__(self):
        # Refuse what no sky allows (95 deg would act like 85, NaN like no limit at all).
        if self.min_altitude is not None:
            checked(self.min_altitude, "min_altitude", -90.0, 90.0, unit="deg")
        if self.max_airmass is not None:
            checked(self.max_airmass, "max_airmass", 1.0)
        checked(self.moon_separation, "moon_separation", 0.0, 180.0, unit="deg")
        checked(self.sample_step, "sample_step", 0.0, lo_open=True, unit="s")

    def altitude_limit(self, site: Site) -> float:
        """The observed altitude every window must stay above."""
        limit = site.interlocks.mount.min_altitude
        if self.min_altitude is not None:
            limit = max(limit, self.min_altitude)
        if self.max_airmass is not None:
            limit = max(limit, altitude_for_airmass(self.max_airmass))
        return limit


@dataclass
class TargetWindows:
    """Per target: windows (list of (start, end) seconds, every constraint met), transit (s),
    the highest observed altitude in the dark (deg), apparent ra/dec of date (deg) and the
    reason when there is no window. `blocks` are the windows an observation must fit in one
    piece: for a German mount the windows are cut where it must flip (see _ha_pieces)."""

    names: np.ndarray
    windows: list
    blocks: list
    transit: np.ndarray
    max_altitude: np.ndarray
    ra: np.ndarray
    dec: np.ndarray
    reason: np.ndarray
    dark: list = field(default_factory=list)
    geometry: object = None

    def observed_altaz(self, indices, t) -> tuple[np.ndarray, np.ndarray]:
        """Observed altitude and azimuth (deg) of targets `indices` at times t (seconds);
        broadcasts like numpy (e.g. indices[:, None] with t[None, :] gives a grid)."""
        return self.geometry.observed_altaz(np.asarray(indices), np.asarray(t, dtype=float))


class _Geometry:
    """A night's per-target hour angles and the site's refraction, for fast evaluation."""

    def __init__(self, targets: Targets, site: Site, sky: SkyTrack, t_mid: float):
        when = sky.time_at(t_mid)
        place = positions(targets, site, when)
        ctx = place.context
        self.site, self.sky, self.t_mid = site, sky, t_mid
        self.ra, self.dec = place["ra_apparent"], place["dec_apparent"]
        self.lat = site.latitude
        # Hour angle of date at t_mid; at other times it grows at the sidereal rate.
        self.ha_mid = wrap_pm180(ctx.site.last_rad * RAD_TO_DEG - self.ra)
        self.last_mid_deg = float(ctx.site.last_rad * RAD_TO_DEG)
        s = ctx.site
        self.refraction = (s.refa, s.refb, s.refraction_join, s.refraction_horizon)
        # Bodies (the Moon, planets, minor bodies): sampled along the night, not fixed.
        self.track = build_body_track(targets, site, sky)
        self.moving = (np.zeros(len(targets), dtype=bool) if self.track is None
                       else self.track.slot >= 0)

    def hadec(self, idx, t):
        """Hour angle and declination of date (deg) of targets idx at times t (broadcasting):
        a star's hour angle grows at the sidereal rate, a body follows its track."""
        ha = self.ha_mid[idx] + SIDEREAL_DEG_PER_S * (t - self.t_mid)
        if self.track is None:
            return ha, self.dec[idx]
        return self.track.at(idx, t, ha, self.dec[idx])

    def ha(self, idx, t):
        return self.hadec(idx, t)[0]

    def radec(self, idx, t):
        """Apparent right ascension and declination of date (deg) of targets idx at t."""
        if self.track is None:
            return self.ra[idx], self.dec[idx]
        ha, dec = self.hadec(idx, t)
        return self.local_sidereal_deg(t) - ha, dec

    def observed_altaz(self, idx, t):
        alt, az = altaz_from_ha(*self.hadec(idx, t), self.lat)
        return observed_altitude(alt, *self.refraction), az

    def local_sidereal_deg(self, t):
        """Local apparent sidereal time (deg, 0-360) at times t (seconds)."""
        return np.mod(self.last_mid_deg + SIDEREAL_DEG_PER_S * (np.asarray(t) - self.t_mid),
                      360.0)

    def time_of_ha(self, idx, ha_deg):
        return self.t_mid + (ha_deg - self.ha_mid[idx]) / SIDEREAL_DEG_PER_S


def observable_windows(targets: Targets, site: Site, sky: SkyTrack, dark: list,
                       constraints: Constraints) -> TargetWindows:
    """Windows for every target inside the dark intervals `dark` (seconds on sky's clock)."""
    n = len(targets)
    span = dark if dark else [(sky.t[0], sky.t[-1])]
    t_mid = 0.5 * (span[0][0] + span[-1][1])
    geo = _Geometry(targets, site, sky, t_mid)
    limit = constraints.altitude_limit(site)
    mount = site.interlocks.mount
    refa, refb, join, horizon = geo.refraction
    h0, state = ha_at_altitude(true_altitude_for_observed(limit, refa, refb, join, horizon),
                               geo.dec, geo.lat)
    transit, max_alt = _transit_and_peak(geo, span)
    # Refraction moves the observed declination by at most about 0.6 deg (at the horizon):
    # targets that far beyond a limit never enter; those near one are checked along the night
    # in observed (refracted) declination, as the interlocks check it.
    dec_ok = ((geo.dec >= mount.dec_min - DEC_REFRACTION_MARGIN_DEG)
              & (geo.dec <= mount.dec_max + DEC_REFRACTION_MARGIN_DEG))
    checks = _SampledChecks(geo, site, constraints, span)

    reasons = np.full(n, "", dtype=object)
    german = mount.meridian_limit if mount.mount_type == "german" else None
    up = _ha_windows(geo, h0, 180.0, 180.0, None, dark)
    allowed = _ha_windows(geo, h0, mount.ha_east * 15.0, mount.ha_west * 15.0, german, dark)
    # The first constraint that leaves nothing names the reason.
    rules = ((not dark, f"no {constraints.darkness} darkness tonight"),
             (~dec_ok, "outside the mount's declination limits"),
             (state < 0, f"never rises above {limit:g} deg"),
             (~up.any(axis=1), f"above {limit:g} deg only in daylight"),
             (~allowed.any(axis=1), "outside the mount's hour-angle limits"))
    for broken, reason in rules:
        reasons[(reasons == "") & broken] = reason
    windows = _interval_lists(allowed, reasons == "", dark)
    if geo.track is not None:
        _moving_windows(geo, checks, limit, german, dark, windows, reasons)
    checks.apply(windows, reasons)
    return TargetWindows(names=targets.names(), windows=[iv.union(w) for w in windows],
                         blocks=windows, transit=transit,
                         max_altitude=max_alt, ra=geo.ra, dec=geo.dec, reason=reasons,
                         dark=list(dark), geometry=geo)


class _Candidates:
    """Per-target candidate intervals (n, K) in seconds; `valid` marks the non-empty ones."""

    def __init__(self, start: np.ndarray, end: np.ndarray):
        self.start, self.end = start, end
        self.valid = end > start

    def any(self, axis=1):
        return self.valid.any(axis=axis)


def _ha_windows(geo: _Geometry, h0: np.ndarray, east: float, west: float,
                meridian_limit: float | None, dark: list) -> _Candidates:
    """Intervals inside the dark span where the hour angle allows altitude >= limit (|HA| <=
    h0) and the mount's hour-angle limits, for all targets at once.

    The allowed hour angles repeat every 360 deg: [-a, b] with a = min(h0, east),
    b = min(h0, west). A German mount with meridian limit m cannot track through HA = +m:
    its allowed range becomes two overlapping windows [-a, m] (before the flip) and
    [0, b] (after it); with no limits at all it may track from HA = 0 round to 360 + m.
    """
    n = h0.shape[0]
    lo_t, hi_t = (dark[0][0], dark[-1][1]) if dark else (0.0, 0.0)
    a, b = np.minimum(h0, east), np.minimum(h0, west)
    full = a + b >= 360.0
    pieces = []
    if meridian_limit is None:
        pieces.append((np.where(full, -1e9, -a), np.where(full, 1e9, b)))
    else:
        split = b > meridian_limit
        pieces.append((np.where(full, 0.0, -a), np.where(full, 360.0 + meridian_limit,
                                                          np.where(split, meridian_limit, b))))
        pieces.append((np.where(split & ~full, np.maximum(-a, 0.0), np.nan),
                       np.where(split & ~full, b, np.nan)))
    ha_lo = geo.ha(np.arange(n), lo_t)
    k0 = np.floor((ha_lo - 180.0) / 360.0)
    starts, ends = [], []
    for start_ha, end_ha in pieces:
        for dk in range(-1, 3):
            shift = 360.0 * (k0 + dk)
            t0 = geo.time_of_ha(np.arange(n), start_ha + shift)
            t1 = geo.time_of_ha(np.arange(n), end_ha + shift)
            starts.append(np.clip(t0, lo_t, hi_t))
            ends.append(np.clip(t1, lo_t, hi_t))
    start = np.stack(starts, axis=1)
    end = np.stack(ends, axis=1)
    end = np.where(np.isnan(end) | np.isnan(start), -np.inf, end)
    return _Candidates(np.nan_to_num(start, nan=np.inf), end)


def _moving_windows(geo: _Geometry, checks, limit: float, meridian_limit: float | None,
                    dark: list, windows: list, reasons: np.ndarray) -> None:
    """Windows of the bodies, in place: the altitude limit and the mount's hour-angle range
    (a German mount's two overlapping ranges around its flip, as in _ha_windows) tested on
    samples along each body's track and refined by bisection (_SampledChecks._allowed); the
    Sun is refused unless the site declares a solar filter fitted."""
    idx = np.flatnonzero(geo.moving)
    mount = geo.site.interlocks.mount
    east, west = mount.ha_east * 15.0, mount.ha_west * 15.0
    ranges = [(-east, west)]
    if meridian_limit is not None and west > meridian_limit:
        ranges = [(-east, meridian_limit), (0.0, west)]

    def above(k, t, lo=-180.0, hi=180.0):
        alt, _ = geo.observed_altaz(k, t)
        ha = wrap_pm180(geo.ha(k, t))
        return (alt >= limit) & (ha >= lo) & (ha <= hi)

    pieces = [checks.allowed_by(partial(above, lo=lo, hi=hi), idx) for lo, hi in ranges]
    ever_above = checks.allowed_by(above, idx) if dark else [[] for _ in idx]
    for row, i in enumerate(idx):
        blocks = sorted(part for allowed in pieces for part in allowed[row])
        if len(dark) > 1:
            blocks = [part for block in blocks for part in iv.intersect([block], dark)]
        windows[i] = blocks if dark else []
        reasons[i] = ""
        if not dark:
            reasons[i] = f"no {checks.c.darkness} darkness tonight"
        elif not ever_above[row]:
            alt_day, _ = geo.observed_altaz(np.full(geo.track.t.shape, i), geo.track.t)
            reasons[i] = (f"never rises above {limit:g} deg" if alt_day.max() < limit
                          else f"above {limit:g} deg only in daylight")
        elif not blocks:
            reasons[i] = "outside the mount's hour-angle limits"
        if geo.track.names[geo.track.slot[i]] == "sun" and \
                not geo.site.interlocks.solar_filter_fitted:
            windows[i], reasons[i] = [], SUN_REFUSED


def _interval_lists(c: _Candidates, keep: np.ndarray, dark: list) -> list:
    """Per target, its valid candidate intervals as a sorted list (only where `keep`),
    intersected with the dark intervals when there are several."""
    out = []
    for i in range(c.start.shape[0]):
        if not keep[i]:
            out.append([])
            continue
        cols = np.flatnonzero(c.valid[i])
        pieces = sorted({(float(c.start[i, j]), float(c.end[i, j])) for j in cols})
        if len(dark) > 1:
            pieces = [part for piece in pieces for part in iv.intersect([piece], dark)]
        out.append(pieces)
    return out


def _transit_and_peak(geo: _Geometry, span: list):
    """Transit nearest mid-darkness (s) and the highest observed altitude in the span (deg)."""
    idx = np.arange(geo.ra.shape[0])
    transit = geo.t_mid - geo.ha_mid / SIDEREAL_DEG_PER_S
    moving = np.flatnonzero(geo.moving)
    for _ in range(3):  # a body's transit: where its own hour angle is zero
        transit[moving] -= wrap_pm180(geo.ha(moving, transit[moving])) / SIDEREAL_DEG_PER_S
    peaks = []
    for start, end in span:
        inside = (transit >= start) & (transit <= end)
        at_start, _ = geo.observed_altaz(idx, np.full(idx.shape, start))
        at_end, _ = geo.observed_altaz(idx, np.full(idx.shape, end))
        at_transit, _ = geo.observed_altaz(idx, transit)
        peaks.append(np.where(inside, at_transit, np.maximum(at_start, at_end)))
    return transit, np.max(peaks, axis=0)


# Largest change refraction makes to a declination (horizontal refraction is about 34', and
# the observed-place model extends to 1 deg below the horizon), with room to spare.
DEC_REFRACTION_MARGIN_DEG = 1.0


class _SampledChecks:
    """The mount's declination limits (in observed, refracted declination), the horizon mask,
    Sun avoidance and Moon separation, sampled for all targets at once on one grid over the
    dark span and refined by vectorized bisection at each change."""

    def __init__(self, geo: _Geometry, site: Site, constraints: Constraints, span: list):
        self.geo, self.site, self.c = geo, site, constraints
        self.mask = site.interlocks.horizon
        self.sun_radius = site.interlocks.sun_avoidance
        self.moon_on = constraints.moon_separation > 0.0
        self.span = (float(span[0][0]), float(span[-1][1]))
        self.needed = self._screen(constraints.altitude_limit(site))
        if self.mask is not None:
            # The mask's nodes as unrefracted altitudes: refraction is monotonic, so
            # comparing true altitudes is the same test without refracting every sample
            # (between nodes the straight line differs by under 30").
            self.mask_true = np.array([true_altitude_for_observed(h, *geo.refraction)
                                       for h in self.mask.altitude])

    def _screen(self, limit: float) -> dict:
        """Which targets each sampled check can possibly cut, from a coarse all-target pass.

        The Sun moves under 0.5 deg in a night and the Moon about 0.55 deg an hour, so a
        target farther than the limit plus that motion from the coarse samples is never cut.
        """
        geo, n = self.geo, self.geo.ra.shape[0]
        t = np.linspace(self.span[0], self.span[1], 25)[None, :]
        target = _unit(geo.ra, geo.dec)[:, :, None]
        mount = self.site.interlocks.mount
        needed = {"mask": np.full(n, self.mask is not None and
                                  float(self.mask.altitude.max()) > limit),
                  "dec": ((np.abs(geo.dec - mount.dec_min) < DEC_REFRACTION_MARGIN_DEG)
                          | (np.abs(geo.dec - mount.dec_max) < DEC_REFRACTION_MARGIN_DEG))}
        sun_sep = geo.sky.separation_from("sun", target, t).min(axis=1)
        needed["sun"] = (self.sun_radius > 0.0) & (sun_sep < self.sun_radius + 1.0)
        if self.moon_on:
            moon_sep = geo.sky.separation_from("moon", target, t).min(axis=1)
            needed["moon"] = moon_sep < self.c.moon_separation + 1.0
        else:
            needed["moon"] = np.zeros(n, dtype=bool)
        if geo.track is not None:
            # Bodies move: every check along their track, but the Moon is never too near
            # itself, nor the Sun (planned only with a solar filter) too near the Sun.
            switched_on = {"mask": self.mask is not None, "dec": True,
                           "sun": self.sun_radius > 0.0, "moon": self.moon_on}
            for which in needed:
                needed[which] = needed[which] | (geo.moving & switched_on[which])
            own = {name: geo.track.rows[k] for k, name in enumerate(geo.track.names)
                   if name in ("sun", "moon")}
            for name, row in own.items():
                needed[name][row] = False
        return needed

    def _ok(self, which: str, idx, t):
        """Whether the check passes for targets idx at times t (broadcasting)."""
        geo = self.geo
        if which == "mask":
            alt, az = altaz_from_ha(*geo.hadec(idx, t), geo.lat)
            return alt >= np.interp(az, self.mask.azimuth, self.mask_true, period=360.0)
        if which == "dec":
            mount = self.site.interlocks.mount
            dec_observed = observed_declination(*geo.observed_altaz(idx, t), geo.lat)
            return (dec_observed >= mount.dec_min) & (dec_observed <= mount.dec_max)
        target = _unit(*geo.radec(idx, t))
        if which == "sun":
            return geo.sky.separation_from("sun", target, t) >= self.sun_radius
        required = self.c.moon_separation
        if self.c.moon_scale:
            required = required * geo.sky.interp("moon_illumination", t)
        moon_up = geo.sky.interp("moon_alt", t) > -0.833
        return ~moon_up | (geo.sky.separation_from("moon", target, t) >= required)

    def apply(self, windows: list, reasons: np.ndarray) -> None:
        """Cut every target's pieces by each check in turn, in place; record the reason of
        targets left with nothing."""
        for which, reason in (("dec", "outside the mount's declination limits"),
                              ("mask", "behind the horizon mask"),
                              ("sun", "too near the Sun"), ("moon", "too near the Moon")):
            idx = np.array([i for i in np.flatnonzero(self.needed[which]) if windows[i]],
                           dtype=int)
            moving = self.geo.moving[idx]
            if which == "mask" and idx.size:
                # Stars: closed-form mask crossings where they dip below it; bodies: sampled.
                fixed = idx[~moving]
                fixed = fixed[self._dips_below_mask(fixed, windows)] if fixed.size else fixed
                idx = np.concatenate((fixed, idx[moving]))
                moving = self.geo.moving[idx]
            if idx.size == 0:
                continue
            if which == "mask":
                allowed = [None] * idx.size
                for part, found in ((~moving, lambda k: mask_clear_intervals(
                        self.geo, self.mask, k, self.span, self.c.sample_step)),
                                    (moving, lambda k: self._allowed(which, k))):
                    if part.any():
                        for row, intervals in zip(np.flatnonzero(part), found(idx[part])):
                            allowed[row] = intervals
            else:
                allowed = self._allowed(which, idx)
            for i, intervals in zip(idx, allowed):
                windows[i] = [part for piece in windows[i] for part in iv.intersect([piece], intervals)]
                if not windows[i]:
                    reasons[i] = reason

    def _dips_below_mask(self, idx: np.ndarray, windows: list) -> np.ndarray:
        """Which targets go below the mask's highest point during their windows.

        Along a window the altitude changes monotonically between culminations, so its
        lowest value is at an end or at the lower culmination (HA = 180) when inside.
        """
        geo = self.geo
        owner = np.repeat(np.arange(idx.size), [len(windows[i]) for i in idx])
        ends = np.array([t for i in idx for piece in windows[i] for t in piece]).reshape(-1, 2)
        target = idx[owner]
        alt_start, _ = altaz_from_ha(geo.ha(target, ends[:, 0]), geo.dec[target], geo.lat)
        alt_end, _ = altaz_from_ha(geo.ha(target, ends[:, 1]), geo.dec[target], geo.lat)
        lowest = np.minimum(alt_start, alt_end)
        ha0, ha1 = geo.ha(target, ends[:, 0]), geo.ha(target, ends[:, 1])
        crosses = np.floor((ha1 - 180.0) / 360.0) > np.floor((ha0 - 180.0) / 360.0)
        lower, _ = altaz_from_ha(np.full(target.shape, 180.0), geo.dec[target], geo.lat)
        lowest = np.where(crosses, np.minimum(lowest, lower), lowest)
        per_target = np.full(idx.size, np.inf)
        np.minimum.at(per_target, owner, lowest)
        return per_target < float(self.mask_true.max())

    def allowed_by(self, test, idx: np.ndarray) -> list:
        """For targets idx, the intervals of the span where test(idx, t) holds (sampled every
        sample_step and refined by bisection)."""
        return self._allowed(test, idx)

    def _allowed(self, which, idx: np.ndarray) -> list:
        """For targets idx, the intervals of the span where the check passes (`which`: a
        check's name or a test(idx, t))."""
        steps = max(2, int(np.ceil((self.span[1] - self.span[0]) / self.c.sample_step)) + 1)
        t = np.linspace(self.span[0], self.span[1], steps)
        test = which if callable(which) else partial(self._ok, which)
        ok = test(idx[:, None], t[None, :])
        padded = np.zeros((idx.size, steps + 2), dtype=np.int8)
        padded[:, 1:-1] = ok
        change = np.diff(padded, axis=1)
        # Rising edges start a run at sample j, falling edges end one at sample j - 1.
        rows_up, cols_up = np.nonzero(change == 1)
        rows_down, cols_down = np.nonzero(change == -1)
        starts = self._edges(test, idx[rows_up], t, cols_up, rising=True)
        ends = self._edges(test, idx[rows_down], t, cols_down - 1, rising=False)
        allowed = [[] for _ in range(idx.size)]
        for row, start, end in zip(rows_up, starts, ends):
            if end > start:
                allowed[row].append((float(start), float(end)))
        return allowed

    def _edges(self, test, idx, t, cols, rising: bool) -> np.ndarray:
        """Refined times of run edges at sample columns `cols` (the first or last passing
        sample); the span's own ends stay where they are."""
        edge = t[cols].copy()
        inner = (cols > 0) if rising else (cols < t.size - 1)
        if not inner.any():
            return edge
        t_good = t[cols[inner]]
        t_bad = t[cols[inner] - 1] if rising else t[cols[inner] + 1]
        k = idx[inner]
        # Bisection between a failing and a passing sample, all edges at once.
        for _ in range(_REFINE_STEPS):
            mid = 0.5 * (t_bad + t_good)
            passed = test(k, mid)
            t_good = np.where(passed, mid, t_good)
            t_bad = np.where(passed, t_bad, mid)
        edge[inner] = t_good
        return edge


def observed_declination(alt_deg, az_deg, lat_deg):
    """Declination (deg) of an observed direction (altitude, azimuth N through E): the
    spherical triangle pole-zenith-star, sin(dec) = sin(lat) sin(alt) + cos(lat) cos(alt)
    cos(az) (Smart, Textbook on Spherical Astronomy, ch. II; common practice)."""
    alt, az, lat = np.radians(alt_deg), np.radians(az_deg), np.radians(lat_deg)
    sin_dec = np.sin(lat) * np.sin(alt) + np.cos(lat) * np.cos(alt) * np.cos(az)
    return np.degrees(np.arcsin(np.clip(sin_dec, -1.0, 1.0)))


def _unit(ra_deg, dec_deg):
    ra, dec = np.radians(ra_deg), np.radians(dec_deg)
    return np.stack((np.cos(dec) * np.cos(ra), np.cos(dec) * np.sin(ra), np.sin(dec)))
