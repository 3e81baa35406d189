"""A German equatorial mount's pier sides in the schedule: what a flip costs.

The mount's mechanical geometry (sides, axis angles theta and psi) lives in the mount-frame
stage, core/pointing_model/pier_sides.py, shared with the slew and the interlocks. A slew
turns the axes by |delta theta| and |delta psi|; a flip between two targets at the same place
costs 180 deg on the polar axis and |180 - 2 p dec| on the declination axis.

The mount takes a side when it slews to a block: the side of the target's hour angle at the
block's start (common practice of mount firmware, which then tracks past the meridian up to
its meridian limit). So each target becomes up to two items, one per side, holding the block
starts on that side; the scheduler takes at most one item per target.
"""
from __future__ import annotations

import math

import numpy as np

from .horizon_geometry import SIDEREAL_DEG_PER_S
from .pointing_model.pier_sides import (EAST, POLAR_ANGLE_OFFSET_DEG, WEST, axis_angles,
                                        side_of)
from .schedule_model import NightProblem, night_problem
from .schedule_slew import Mount
from .vectors import wrap_pm180


def side_windows(windows, duration_s: float, ha_start_deg: float):
    """One target's windows split by the pier side of the block's start: (east, west) lists.

    A window (s, e) holds starts in [s, e - d]; those are cut where the hour angle passes 0 or
    180 deg, and each piece [u, v] becomes the window (u, min(e, v + d)) of its side. A
    window too short for the block goes to the side of its opening, so the reason stays 'no
    window long enough'.
    """
    out = ([], [])
    for s, e in windows:
        last = e - duration_s
        if last < s:
            out[int(side_of(ha_start_deg + SIDEREAL_DEG_PER_S * s))].append((s, e))
            continue
        # Times where the hour angle is a multiple of 180 deg inside the starts' range.
        lo = math.floor((ha_start_deg + SIDEREAL_DEG_PER_S * s) / 180.0) + 1
        hi = math.floor((ha_start_deg + SIDEREAL_DEG_PER_S * last) / 180.0)
        cuts = [(180.0 * k - ha_start_deg) / SIDEREAL_DEG_PER_S for k in range(lo, hi + 1)]
        edges = [s] + [c for c in cuts if s < c < last] + [last]
        for u, v in zip(edges[:-1], edges[1:]):
            middle = ha_start_deg + SIDEREAL_DEG_PER_S * 0.5 * (u + v)
            out[int(side_of(middle))].append((u, min(e, v + duration_s)))
    return out


def pier_problem(weight, duration_s, windows_s, night_end_s, ra_deg, dec_deg,
                 mount: Mount) -> NightProblem:
    """The night as (target, pier side) items with the German mount's slew table.

    Item slews: settle + max(|delta theta|, |delta psi|) / rate from axis_angles. At one
    instant two targets' hour angles differ by their right-ascension difference, so delta
    theta is that difference plus the sides' offsets, wrapped to +-180 deg (exact while both
    polar-axis angles lie within +-90 deg, i.e. counterweight below the declination axis).
    From the park, whose polar-axis angle stays fixed while the sky turns, the slew is the
    largest over the item's earliest and latest block starts (an upper bound: theta moves
    linearly in between). Cost: (items + 1)**2 table entries, items <= 2 x targets.
    """
    weight = np.asarray(weight, dtype=float)
    duration = np.asarray(duration_s, dtype=float)
    ra, dec = np.asarray(ra_deg, dtype=float), np.asarray(dec_deg, dtype=float)
    ha_start = mount.lst_start_deg - ra
    group, side, item_windows = [], [], []
    for i in range(weight.size):
        east, west = side_windows(windows_s[i], float(duration.ravel()[i]), float(ha_start[i]))
        for which, pieces in ((EAST, east), (WEST, west)):
            if pieces or (which == EAST and not west):
                group.append(i)
                side.append(which)
                item_windows.append(sorted(pieces))
    group, side = np.array(group, dtype=int), np.array(side, dtype=int)
    table = _item_table(ra[group], dec[group], side, item_windows, duration[group], mount)
    return night_problem(weight[group], duration[group], item_windows, night_end_s, table,
                         group=group, target_windows=windows_s)


def _item_table(ra, dec, side, windows, duration, mount: Mount) -> np.ndarray:
    m, rate, p = ra.size, mount.slew_rate_deg_s, mount.pole_sign
    table = np.zeros((m + 1, m + 1))
    offset = POLAR_ANGLE_OFFSET_DEG[side]
    _, psi = axis_angles(np.zeros(m), dec, side, p)
    # Polar axis: at one instant H_b - H_a = ra_a - ra_b.
    d_theta = wrap_pm180((ra[:, None] - ra[None, :]) + offset[None, :] - offset[:, None])
    travel = np.maximum(np.abs(d_theta), np.abs(psi[None, :] - psi[:, None]))
    table[:m, :m] = mount.settle_s + travel / rate
    table[m, :m] = mount.settle_s
    if mount.park_dec_deg is not None:
        park_ha = mount.lst_start_deg - mount.park_ra()
        park_theta, park_psi = axis_angles(park_ha, mount.park_dec_deg, side_of(park_ha), p)
        for b in range(m):
            starts = [t for s, e in windows[b] for t in (s, max(s, e - duration[b]))] or [0.0]
            ha = mount.lst_start_deg - ra[b] + SIDEREAL_DEG_PER_S * np.array(starts)
            theta, _ = axis_angles(ha, dec[b], side[b], p)
            polar = float(np.max(np.abs(theta - park_theta)))
            table[m, b] += max(polar, abs(float(psi[b]) - float(park_psi))) / rate
    return table
