"""How long an equatorial mount takes from one target to the next: the slew table.

Both axes slew at once at the same rate, then the mount settles, so a slew lasts
settle + max(|delta hour angle|, |delta dec|) / rate (common practice for equatorial mounts;
acceleration is folded into the settle time). A German equatorial mount also changes pier
side; schedule_pier.py costs that from the mount's mechanical axis angles.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .schedule_model import ScheduleInputError


@dataclass(frozen=True)
class Mount:
    """How an equatorial mount moves: both axes slew at once at `slew_rate_deg_s`, then it
    settles for `settle_s` seconds.

    Where it starts the night: `park_ha_deg`/`park_dec_deg` (a parked mount keeps its hour
    angle, west positive) or `park_ra_deg`/`park_dec_deg`. `lst_start_deg` is the local
    sidereal time at the night's start (t = 0); with it the park's hour angle becomes a right
    ascension (LST - HA), and a German mount (`german`) is costed with its pier sides (see
    schedule_pier.py). `latitude_deg` says which celestial pole the polar axis points at.
    """
    settle_s: float
    slew_rate_deg_s: float
    park_ra_deg: float | None = None
    park_dec_deg: float | None = None
    german: bool = False
    latitude_deg: float = 0.0
    lst_start_deg: float | None = None
    park_ha_deg: float | None = None

    def __post_init__(self):
        if not (math.isfinite(self.settle_s) and self.settle_s >= 0.0):
            raise ScheduleInputError("mount", None, f"settle_s {self.settle_s!r} is not >= 0")
        if not (math.isfinite(self.slew_rate_deg_s) and self.slew_rate_deg_s > 0.0):
            raise ScheduleInputError("mount", None,
                                     f"slew_rate_deg_s {self.slew_rate_deg_s!r} is not > 0")
        parks = (self.park_ra_deg is not None) + (self.park_ha_deg is not None)
        if parks > 1:
            raise ScheduleInputError("mount", None, "give park_ra_deg or park_ha_deg, not both")
        if bool(parks) != (self.park_dec_deg is not None):
            raise ScheduleInputError("mount", None, "park needs both park_ra_deg and park_dec_deg"
                                     if self.park_ha_deg is None else
                                     "park needs both park_ha_deg and park_dec_deg")
        needs_lst = self.german or self.park_ha_deg is not None
        if needs_lst and not (self.lst_start_deg is not None
                              and math.isfinite(self.lst_start_deg)):
            raise ScheduleInputError("mount", None, "a German mount or a park hour angle needs "
                                                    "lst_start_deg")
        for name in ("park_ra_deg", "park_dec_deg", "park_ha_deg", "latitude_deg"):
            value = getattr(self, name)
            if value is not None and not math.isfinite(value):
                raise ScheduleInputError("mount", None, f"{name} {value!r} is not a number")
        if self.park_dec_deg is not None and abs(self.park_dec_deg) > 90.0:
            raise ScheduleInputError("mount", None,
                                     f"park_dec_deg {self.park_dec_deg!r} is not in [-90, 90]")

    @property
    def pole_sign(self) -> float:
        """+1 when the polar axis points at the north celestial pole, -1 at the south."""
        from .pointing_model.pier_sides import pole_sign_for
        return pole_sign_for(self.latitude_deg)

    def park_ra(self) -> float | None:
        """The park's right ascension at the night's start (deg), or None without a park."""
        if self.park_ha_deg is not None:
            return (self.lst_start_deg - self.park_ha_deg) % 360.0
        return self.park_ra_deg


def _axis_slew_deg(ra_a, dec_a, ra_b, dec_b):
    """Largest axis travel (deg). At one instant the hour-angle difference of two targets
    equals minus their right-ascension difference (same local sidereal time), so the polar
    axis turns by |delta ra| wrapped to +-180 deg. The sky turns 15 arcsec/s during a slew
    (common practice for a planning estimate); pier flips are in schedule_pier.py."""
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
    if mount.park_dec_deg is not None:
        table[n, :n] += _axis_slew_deg(mount.park_ra(), mount.park_dec_deg, ra, dec) \
            / mount.slew_rate_deg_s
    return table
