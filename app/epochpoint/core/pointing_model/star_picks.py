"""Calibration stars: a few bright stars spread evenly over the sky a mount may reach now.

The candidates are the stars whose observed place at the instant the site's interlocks allow
(Sun avoidance, altitude, horizon mask, hour-angle and declination limits: core.export.refusals)
and that stand above the requested altitude. From them N are chosen by farthest-point
sampling (Gonzalez 1985, Theor. Comput. Sci. 38, 293: each new star is the one farthest from
all chosen so far, which covers the region within a factor two of the best possible spread),
starting at the star nearest the zenith. They are then ordered as a nearest-neighbour tour from
the most eastern pick, improved by 2-opt exchanges (Croes 1958, Oper. Res. 6, 791), so the
mount's slews between them stay short.

Cost: one positions() call for the candidates (about 1 ms per 1000 stars) and O(N x candidates)
distances.
"""
from __future__ import annotations

import numpy as np

from ..constants import DEG_TO_RAD
from ..export import refusals, sun_separation_deg
from ..positions import positions


def _horizon_vectors(alt_deg, az_deg) -> np.ndarray:
    alt, az = np.asarray(alt_deg) * DEG_TO_RAD, np.asarray(az_deg) * DEG_TO_RAD
    return np.stack([np.cos(alt) * np.cos(az), np.cos(alt) * np.sin(az), np.sin(alt)], axis=1)


def _spread(u: np.ndarray, count: int, first: int) -> list[int]:
    """Farthest-point sampling of `count` rows of unit vectors u (n, 3) from row `first`."""
    chosen = [first]
    nearest = u @ u[first]  # cosine to the nearest chosen star, per candidate
    while len(chosen) < min(count, len(u)):
        k = int(np.argmin(nearest))
        chosen.append(k)
        nearest = np.maximum(nearest, u @ u[k])
    return chosen


def _tour(u: np.ndarray, start: int) -> list[int]:
    """A short open path through all rows of u from `start` (nearest neighbour + 2-opt)."""
    angle = np.arccos(np.clip(u @ u.T, -1.0, 1.0))
    order, left = [start], set(range(len(u))) - {start}
    while left:
        here = order[-1]
        nxt = min(left, key=lambda j: angle[here, j])
        order.append(nxt)
        left.remove(nxt)
    improved = True
    while improved:
        improved = False
        for i in range(1, len(order) - 1):
            for j in range(i + 1, len(order)):
                a, b = order[i - 1], order[i]
                c = order[j]
                d = order[j + 1] if j + 1 < len(order) else None
                old = angle[a, b] + (angle[c, d] if d is not None else 0.0)
                new = angle[a, c] + (angle[b, d] if d is not None else 0.0)
                if new < old - 1e-12:
                    order[i:j + 1] = order[i:j + 1][::-1]
                    improved = True
    return order


def pick_calibration_stars(stars, site, when, count: int, min_altitude: float = 20.0):
    """(rows of `stars` in slew order, positions() result of those rows) for `count` stars
    spread over the allowed sky (see module docstring). Fewer when fewer are allowed."""
    result = positions(stars, site, when)
    sun_deg = sun_separation_deg(site, result.context.time, result["ra_apparent"],
                                 result["dec_apparent"])
    allowed = (refusals(result, site, sun_deg) == "") & (result["alt"] >= min_altitude)
    candidates = np.flatnonzero(allowed)
    if candidates.size == 0:
        return candidates, None
    u = _horizon_vectors(result["alt"][candidates], result["az"][candidates])
    picked = _spread(u, count, int(np.argmax(u[:, 2])))
    # The tour starts at the most eastern pick (most negative hour angle).
    ha = result["ha"][candidates][picked]
    start = int(np.argmin(ha))
    order = [picked[k] for k in _tour(u[picked], start)]
    rows = candidates[order]
    return rows, positions(stars[rows], site, when)
