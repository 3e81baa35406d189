"""Observable windows: when, inside the chosen darkness, every constraint holds for a target.

Altitude (or airmass) limits and the mount's hour-angle limits are solved in closed form
(horizon_geometry.py) from each target's apparent place at mid-darkness and the sidereal
rate; the German-mount meridian limit splits a window where the mount must flip. Only the
constraints that need it are sampled (every `sample_step` seconds) and their edges refined
by bisection to about a second: the horizon mask (altitude against azimuth), the Moon
separation (while the Moon is above the horizon; optionally scaled with its illumination)
and Sun avoidance. Times are seconds from the night's reference instant.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from . import intervals as iv
from .constants import RAD_TO_DEG
from .context import make_context
from .horizon_geometry import (SIDEREAL_DEG_PER_S, altaz_from_ha, altitude_for_airmass,
                               ha_at_altitude, observed_altitude, true_altitude_for_observed)
from .positions import positions
from .site import Site
from .sky_track import SkyTrack
from .targets import Targets
from .vectors import wrap_pm180

_REFINE_STEPS = 8  # bisection halvings of a sample step (120 s -> 0.5 s)


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
    sample_step: float = 120.0

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
        s = ctx.site
        self.refraction = (s.refa, s.refb, s.refraction_join, s.refraction_horizon)

    def ha(self, idx, t):
        return self.ha_mid[idx] + SIDEREAL_DEG_PER_S * (t - self.t_mid)

    def observed_altaz(self, idx, t):
        alt, az = altaz_from_ha(self.ha(idx, t), self.dec[idx], self.lat)
        return observed_altitude(alt, *self.refraction), az

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
    dec_ok = (geo.dec >= mount.dec_min) & (geo.dec <= mount.dec_max)
    checks = _SampledChecks(geo, site, constraints, span)

    windows, reasons = [], np.full(n, "", dtype=object)
    for i in range(n):
        if not dark:
            reasons[i] = f"no {constraints.darkness} darkness tonight"
        elif not dec_ok[i]:
            reasons[i] = "outside the mount's declination limits"
        elif state[i] < 0:
            reasons[i] = f"never rises above {limit:g} deg"
        if reasons[i]:
            windows.append([])
            continue
        up = _ha_pieces(geo, i, h0[i], 180.0, 180.0, None, dark)
        if not up:
            windows.append([])
            reasons[i] = f"above {limit:g} deg only in daylight"
            continue
        pieces = _ha_pieces(geo, i, h0[i], mount.ha_east * 15.0, mount.ha_west * 15.0,
                            mount.meridian_limit if mount.mount_type == "german" else None, dark)
        if not pieces:
            windows.append([])
            reasons[i] = "outside the mount's hour-angle limits"
            continue
        pieces, reasons[i] = checks.apply(i, pieces)
        windows.append(pieces)
    return TargetWindows(names=targets.names(), windows=[iv.union(w) for w in windows],
                         blocks=windows, transit=transit,
                         max_altitude=max_alt, ra=geo.ra, dec=geo.dec, reason=reasons,
                         dark=list(dark), geometry=geo)


def _ha_pieces(geo: _Geometry, i: int, h0: float, east: float, west: float,
               meridian_limit: float | None, dark: list) -> list:
    """Time intervals inside `dark` where |HA| allows altitude >= limit and the HA limits.

    With a German mount's meridian limit m the allowed hour angles [-a, b] become two
    overlapping windows [-a, m] (before the flip) and [0, b] (after it).
    """
    a, b = min(h0, east), min(h0, west)
    if a + b >= 360.0 and meridian_limit is None:
        return [(s, e) for s, e in dark]
    if meridian_limit is not None and b > meridian_limit:
        ha_pieces = [(-a, meridian_limit), (max(-a, 0.0), b)]
    else:
        ha_pieces = [(-a, b)]
    times = []
    lo_t, hi_t = dark[0][0], dark[-1][1]
    ha_lo = geo.ha(i, lo_t)
    for k in range(int(np.floor((ha_lo - 540.0) / 360.0)), int(np.ceil((ha_lo + 540.0) / 360.0))):
        for start_ha, end_ha in ha_pieces:
            start = geo.time_of_ha(i, start_ha + 360.0 * k)
            end = geo.time_of_ha(i, end_ha + 360.0 * k)
            if end > lo_t and start < hi_t:
                times.append((float(start), float(end)))
    # Join pieces that touch across periods; overlapping (flip) pieces stay separate.
    times.sort()
    joined = []
    for start, end in times:
        if joined and abs(start - joined[-1][1]) < 1e-6:
            joined[-1] = (joined[-1][0], end)
        else:
            joined.append((start, end))
    out = []
    for piece in joined:
        out.extend(iv.intersect([piece], dark))
    return out


def _transit_and_peak(geo: _Geometry, span: list):
    """Transit nearest mid-darkness (s) and the highest observed altitude in the span (deg)."""
    idx = np.arange(geo.ra.shape[0])
    transit = geo.t_mid - geo.ha_mid / SIDEREAL_DEG_PER_S
    peaks = []
    for start, end in span:
        inside = (transit >= start) & (transit <= end)
        at_start, _ = geo.observed_altaz(idx, np.full(idx.shape, start))
        at_end, _ = geo.observed_altaz(idx, np.full(idx.shape, end))
        at_transit, _ = geo.observed_altaz(idx, transit)
        peaks.append(np.where(inside, at_transit, np.maximum(at_start, at_end)))
    return transit, np.max(peaks, axis=0)


class _SampledChecks:
    """The horizon mask, Sun avoidance and Moon separation, sampled and refined."""

    def __init__(self, geo: _Geometry, site: Site, constraints: Constraints, span: list):
        self.geo, self.site, self.c = geo, site, constraints
        self.mask = site.interlocks.horizon
        self.sun_radius = site.interlocks.sun_avoidance
        self.moon_on = constraints.moon_separation > 0.0
        self.needed = self._screen(span, constraints.altitude_limit(site))

    def _screen(self, span: list, limit: float) -> dict:
        """Which targets each sampled check can possibly cut, from a coarse all-target pass.

        The Sun moves under 0.5 deg in a night and the Moon about 0.55 deg an hour, so a
        target farther than the limit plus that motion from the coarse samples is never cut.
        """
        geo, n = self.geo, self.geo.ra.shape[0]
        t = np.linspace(span[0][0], span[-1][1], 25)
        target = _unit(geo.ra, geo.dec)
        needed = {"mask": np.full(n, self.mask is not None and
                                  float(self.mask.altitude.max()) > limit)}
        sun_sep = np.min([geo.sky.separation_from("sun", target, np.full(n, ti)) for ti in t],
                         axis=0)
        needed["sun"] = sun_sep < self.sun_radius + 1.0
        if self.moon_on:
            moon_sep = np.min([geo.sky.separation_from("moon", target, np.full(n, ti))
                               for ti in t], axis=0)
            needed["moon"] = moon_sep < self.c.moon_separation + 1.0
        else:
            needed["moon"] = np.zeros(n, dtype=bool)
        return needed

    def _ok(self, which: str, idx, t):
        geo = self.geo
        if which == "mask":
            alt, az = geo.observed_altaz(idx, t)
            return alt >= self.mask.min_altitude(az)
        target = _unit(geo.ra[idx], geo.dec[idx])
        if which == "sun":
            return geo.sky.separation_from("sun", target, t) >= self.sun_radius
        required = self.c.moon_separation
        if self.c.moon_scale:
            required = required * geo.sky.interp("moon_illumination", t)
        moon_up = geo.sky.interp("moon_alt", t) > -0.833
        return ~moon_up | (geo.sky.separation_from("moon", target, t) >= required)

    def apply(self, i: int, pieces: list):
        """Pieces cut by each sampled check in turn; the reason if nothing is left."""
        for which, reason in (("mask", "behind the horizon mask"),
                              ("sun", "too near the Sun"), ("moon", "too near the Moon")):
            if not self.needed[which][i]:
                continue
            pieces = [part for piece in pieces for part in self._cut(which, i, piece)]
            if not pieces:
                return [], reason
        return pieces, ""

    def _cut(self, which: str, i: int, piece) -> list:
        start, end = piece
        steps = max(2, int(np.ceil((end - start) / self.c.sample_step)) + 1)
        t = np.linspace(start, end, steps)
        ok = self._ok(which, np.full(steps, i), t)
        if ok.all():
            return [piece]
        out = []
        for a, b in iv.runs(ok, np.arange(steps)):
            lo = t[a] if a == 0 else self._edge(which, i, t[a - 1], t[a])
            hi = t[b] if b == steps - 1 else self._edge(which, i, t[b + 1], t[b])
            if hi > lo:
                out.append((float(lo), float(hi)))
        return out

    def _edge(self, which: str, i: int, t_bad: float, t_good: float) -> float:
        """Bisection between a failing and a passing instant; returns the passing side."""
        idx = np.array([i])
        for _ in range(_REFINE_STEPS):
            mid = 0.5 * (t_bad + t_good)
            if self._ok(which, idx, np.array([mid]))[0]:
                t_good = mid
            else:
                t_bad = mid
        return t_good


def _unit(ra_deg, dec_deg):
    ra, dec = np.radians(ra_deg), np.radians(dec_deg)
    return np.stack((np.cos(dec) * np.cos(ra), np.cos(dec) * np.sin(ra), np.sin(dec)))
