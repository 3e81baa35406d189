"""How long an equatorial mount takes from one target to the next: the slew table.

Both axes slew at once at the same rate, then the mount settles, so a slew lasts
settle + max(|delta hour angle|, |delta dec|) / rate (common practice for equatorial mounts;
acceleration is folded into the settle time).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .schedule_model import ScheduleInputError


@dataclass(frozen=True)
class Mount:
    """How an equatorial mount moves: both axes slew at once at `slew_rate_deg_s`, then it
    settles for `settle_s` seconds; optional park position as right ascension and declination.

    The park is fixed on the mount (an hour angle), so its right ascension is the local
    sidereal time at the night's start minus the park hour angle; the first slew is reckoned
    with that value (exact when the first block starts near the night's start).
    """
    settle_s: float
    slew_rate_deg_s: float
    park_ra_deg: float | None = None
    park_dec_deg: float | None = None

    def __post_init__(self):
        if not (math.isfinite(self.settle_s) and self.settle_s >= 0.0):
            raise ScheduleInputError("mount", None, f"settle_s {self.settle_s!r} is not >= 0")
        if not (math.isfinite(self.slew_rate_deg_s) and self.slew_rate_deg_s > 0.0):
            raise ScheduleInputError("mount", None,
                                     f"slew_rate_deg_s {self.slew_rate_deg_s!r} is not > 0")
        if (self.park_ra_deg is None) != (self.park_dec_deg is None):
            raise ScheduleInputError("mount", None, "park needs both park_ra_deg and park_dec_deg")


def _axis_slew_deg(ra_a, dec_a, ra_b, dec_b):
    """Largest axis travel (deg). At one instant the hour-angle difference of two targets
    equals minus their right-ascension difference (same local sidereal time), so the polar
    axis turns by |delta ra| wrapped to +-180 deg. The sky turns 15 arcsec/s during a slew and
    German-mount meridian flips are not modelled (common practice for a planning estimate)."""
    d_ra = (np.asarray(ra_b) - np.asarray(ra_a) + 180.0) % 360.0 - 180.0
    return np.maximum(np.abs(d_ra), np.abs(np.asarray(dec_b) - np.asarray(dec_a)))


def slew_table_s(ra_deg, dec_deg, mount: Mount) -> np.ndarray:
    """(n + 1, n + 1) slew times (s): settle + largest axis travel / rate. Row n: from the
    park (settle alone when no park is given); column n: to the end of the night (0 s).
    Memory 8 (n + 1)**2 bytes: 2 MB for 500 targets, 200 MB for 5000."""
    ra, dec = np.asarray(ra_deg, dtype=float), np.asarray(dec_deg, dtype=float)
    n = ra.size
    table = np.zeros((n + 1, n + 1))
    travel = _axis_slew_deg(ra[:, None], dec[:, None], ra[None, :], dec[None, :])
    table[:n, :n] = mount.settle_s + travel / mount.slew_rate_deg_s
    table[n, :n] = mount.settle_s
    if mount.park_ra_deg is not None:
        table[n, :n] += _axis_slew_deg(mount.park_ra_deg, mount.park_dec_deg, ra, dec) \
            / mount.slew_rate_deg_s
    return table
