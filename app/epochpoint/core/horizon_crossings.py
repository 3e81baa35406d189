"""When each target's track crosses the horizon mask, found to 0.1 s and never missed.

Let f(t) = observed altitude(t) - mask(azimuth(t)); the target clears the mask where f >= 0.
The mask is a straight line in azimuth between its points, so f is smooth between the
instants the target's azimuth passes a mask point. Those instants are solved in closed form:
azimuth A0 is reached where the horizon components (east, north) of the direction are
parallel to (sin A0, cos A0), i.e. P sin H + Q cos H = R with P = -cos dec cos A0,
Q = sin A0 sin lat cos dec and R = sin A0 cos lat sin dec, keeping the roots with
north cos A0 + east sin A0 > 0 (spherical astronomy, e.g. Smart, Textbook on Spherical
Astronomy, 6th ed. (1977) ch. II, from memory).

Between those instants (and the points of a regular grid) f changes at most
D = w cos(lat) + |slope| w (|sin lat| + cos(lat) tan|alt|) degrees a second, with w the
sidereal rate and slope the mask segment's degrees of altitude per degree of azimuth: the
altitude changes at most w cos(lat), the azimuth at w |sin lat - cos lat cos A tan alt|
(Smart, ch. II, from memory), and refraction only slows the observed altitude (it
decreases monotonically with altitude). A piece [a, b] is settled when its end values show f
cannot change sign inside it: (f(a) + f(b)) / 2 >= D (b - a) / 2 with both ends clear, or the
mirror with both behind. Every other piece is halved until it is shorter than 0.1 s. So each
crossing is found to 0.1 s and a feature of the mask, however narrow, is never stepped over.
Cost: a few dozen evaluations per crossing and per grid step, vectorized over targets.
"""
from __future__ import annotations

import numpy as np

from .constants import DEG_TO_RAD
from .horizon_geometry import SIDEREAL_DEG_PER_S, altaz_from_ha, observed_altitude

RESOLUTION_S = 0.1  # crossings are found to this many seconds
_HIGHEST_ALT_DEG = 89.9999  # caps tan(alt) for tracks through the zenith


def mask_clear_intervals(geo, mask, idx: np.ndarray, span: tuple, step_s: float) -> list:
    """For targets `idx`, the intervals of `span` (seconds) where the observed altitude is at
    or above the mask. `geo` gives hour angles (geo.ha, geo.time_of_ha), geo.dec, geo.lat and
    geo.refraction as in windows._Geometry; `mask` is a limits.HorizonMask."""
    idx = np.asarray(idx, dtype=int)
    if idx.size == 0:
        return []
    track = _Track(geo, mask)
    rows, t = _breakpoints(geo, mask, idx, span, step_s)
    f, alt = track.clearance(idx[rows], t)
    # The mask segment of each piece, from the azimuth in its middle.
    same = rows[1:] == rows[:-1]
    a_row, a, b = rows[:-1][same], t[:-1][same], t[1:][same]
    fa, fb, alt_a, alt_b = f[:-1][same], f[1:][same], alt[:-1][same], alt[1:][same]
    slope = track.slope(idx[a_row], 0.5 * (a + b))
    points = [(rows, t, f)]
    while a.size:
        half = 0.5 * (b - a)
        rate = track.rate_bound(idx[a_row], np.maximum(np.abs(alt_a), np.abs(alt_b)), half, slope)
        mean = 0.5 * (fa + fb)
        settled = ((fa >= 0.0) & (fb >= 0.0) & (mean >= rate * half)) | \
                  ((fa < 0.0) & (fb < 0.0) & (mean <= -rate * half)) | (b - a <= RESOLUTION_S)
        keep = ~settled
        a_row, a, b, fa, fb, alt_a, alt_b, slope = (x[keep] for x in (a_row, a, b, fa, fb,
                                                                        alt_a, alt_b, slope))
        mid = 0.5 * (a + b)
        fm, alt_m = track.clearance(idx[a_row], mid)
        points.append((a_row, mid, fm))
        # Both halves go on: [a, mid] and [mid, b].
        a_row, a, b = np.concatenate((a_row, a_row)), np.concatenate((a, mid)), \
            np.concatenate((mid, b))
        fa, fb = np.concatenate((fa, fm)), np.concatenate((fm, fb))
        alt_a, alt_b = np.concatenate((alt_a, alt_m)), np.concatenate((alt_m, alt_b))
        slope = np.concatenate((slope, slope))
    return _runs(idx.size, *(np.concatenate(c) for c in zip(*points)))


class _Track:
    """The clearance f(t) of targets above the mask and the bound on its rate."""

    def __init__(self, geo, mask):
        self.geo, self.mask = geo, mask
        az = np.append(mask.azimuth, mask.azimuth[0] + 360.0)
        alt = np.append(mask.altitude, mask.altitude[0])
        # Degrees of altitude per degree of azimuth on each segment (the last one wraps
        # through north back to the first point).
        self.segment_slope = np.diff(alt) / np.maximum(np.diff(az), 1e-12)
        lat = geo.lat * DEG_TO_RAD
        self.sin_lat, self.cos_lat = abs(np.sin(lat)), np.cos(lat)

    def clearance(self, target, t):
        """(observed altitude - mask altitude, true altitude), degrees."""
        geo = self.geo
        alt, az = altaz_from_ha(geo.ha(target, t), geo.dec[target], geo.lat)
        return observed_altitude(alt, *geo.refraction) - self.mask.min_altitude(az), alt

    def slope(self, target, t):
        _, az = altaz_from_ha(self.geo.ha(target, t), self.geo.dec[target], self.geo.lat)
        k = np.searchsorted(self.mask.azimuth, np.mod(az, 360.0), side="right") - 1
        return np.abs(self.segment_slope[k])  # k = -1: before the first point, the wrap

    def rate_bound(self, target, abs_alt_ends, half_s, slope):
        """Largest |df/dt| (deg/s) on a piece, from its end altitudes and half length."""
        geo = self.geo
        w = SIDEREAL_DEG_PER_S
        dec = geo.dec[target]
        # |alt| inside the piece: at most the ends' plus the altitude rate over half of it,
        # and never nearer the zenith or nadir than the target comes.
        nearest = np.minimum(np.abs(geo.lat - dec), np.abs(geo.lat + dec))
        top = np.minimum(abs_alt_ends + w * self.cos_lat * half_s, 90.0 - nearest)
        tan_top = np.tan(np.minimum(top, _HIGHEST_ALT_DEG) * DEG_TO_RAD)
        return w * self.cos_lat + slope * w * (self.sin_lat + self.cos_lat * tan_top)


def _breakpoints(geo, mask, idx, span, step_s):
    """Rows (into idx) and times, sorted by row then time: a regular grid over the span and
    every instant a target's azimuth passes a mask point."""
    t0, t1 = float(span[0]), float(span[1])
    steps = max(2, int(np.ceil((t1 - t0) / step_s)) + 1)
    grid = np.linspace(t0, t1, steps)
    rows = [np.repeat(np.arange(idx.size), steps)]
    times = [np.tile(grid, idx.size)]
    dec, lat = geo.dec[idx] * DEG_TO_RAD, geo.lat * DEG_TO_RAD
    period_s = 360.0 / SIDEREAL_DEG_PER_S
    for az0 in mask.azimuth * DEG_TO_RAD:
        p = -np.cos(dec) * np.cos(az0)
        q = np.sin(az0) * np.sin(lat) * np.cos(dec)
        r = np.sin(az0) * np.cos(lat) * np.sin(dec)
        size = np.hypot(p, q)
        ratio = np.where(size > 0.0, r / np.where(size > 0.0, size, 1.0), 2.0)
        beta, spread = np.arctan2(p, q), np.arccos(np.clip(ratio, -1.0, 1.0))
        for sign in (1.0, -1.0):
            ha = beta + sign * spread
            east = -np.cos(dec) * np.sin(ha)
            north = np.cos(lat) * np.sin(dec) - np.sin(lat) * np.cos(dec) * np.cos(ha)
            real = (np.abs(ratio) <= 1.0) & (north * np.cos(az0) + east * np.sin(az0) > 0.0)
            base = geo.time_of_ha(idx, ha / DEG_TO_RAD)
            for turn in range(-2, 3):
                when = base + turn * period_s
                inside = real & (when > t0) & (when < t1)
                rows.append(np.flatnonzero(inside))
                times.append(when[inside])
    rows, times = np.concatenate(rows), np.concatenate(times)
    order = np.lexsort((times, rows))
    return rows[order], times[order]


def _runs(count: int, rows, t, f) -> list:
    """Per row, the runs of clear samples (f >= 0) as (first, last) time intervals."""
    order = np.lexsort((t, rows))
    rows, t, clear = rows[order], t[order], f[order] >= 0.0
    new_row = np.ones(rows.size, dtype=bool)
    new_row[1:] = rows[1:] != rows[:-1]
    last_of_row = np.roll(new_row, -1)
    last_of_row[-1] = True
    begins = clear & (new_row | ~np.roll(clear, 1))
    ends = clear & (last_of_row | ~np.roll(clear, -1))
    out = [[] for _ in range(count)]
    for row, start, end in zip(rows[begins], t[begins], t[ends]):
        if end > start:
            out[row].append((float(start), float(end)))
    return out
