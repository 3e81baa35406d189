"""The German mount's pier side and meridian limit (core.limits.pier_flip_check).

References: a German equatorial mount takes the pier side of the target's hour angle when the
slew ends (east of the meridian, H < 0: the east side) and tracks past the meridian up to its
meridian limit before it must flip (common practice of mount firmware); the sky turns at
15.041 arcsec per second (common practice). The random cases take their hour angles and the
time the hour angle needs to reach the limit from astropy's apparent sidereal time (IAU
2006/2000A), an outside reference, at seeded random instants, longitudes and right ascensions.
"""
from __future__ import annotations

import numpy as np
import pytest
from astropy import units as u
from astropy.time import Time, TimeDelta

import epochpoint  # noqa: F401  (sets astropy's Earth-orientation tables offline)
from epochpoint.core.limits import pier_flip_check

SIDEREAL_DEG_PER_S = 15.041 / 3600.0  # common practice
# 15.041 is the rate rounded to 5 digits: 4.5e-6 of it (0.4 s over a day of hour angle).
RATE_ROUNDING = 1e-5


@pytest.mark.parametrize("ha, limit, hold, side, seconds, flip", [
    # 2 deg east of the meridian, limit 5 deg past it: 7 deg to go, 1675.4 s (27.9 min).
    (-2.0, 5.0, 1800.0, "east", 7.0 / SIDEREAL_DEG_PER_S, True),
    (-2.0, 5.0, 1500.0, "east", 7.0 / SIDEREAL_DEG_PER_S, False),
    # Just east of the meridian with no margin: the limit comes in 0.24 s.
    (-0.001, 0.0, 0.0, "east", 0.001 / SIDEREAL_DEG_PER_S, False),
    (-0.001, 0.0, 1.0, "east", 0.001 / SIDEREAL_DEG_PER_S, True),
    # On the meridian the mount is already on the west side: no flip within 12 h.
    (0.0, 5.0, 43200.0, "west", 365.0 / SIDEREAL_DEG_PER_S, False),
    (1.0, 5.0, 43200.0, "west", 364.0 / SIDEREAL_DEG_PER_S, False),
    # Far east, the widest limit: 269.5 deg to go, 17.9 h.
    (-179.5, 90.0, 43200.0, "east", 269.5 / SIDEREAL_DEG_PER_S, False),
    # Hour angles wrap: +190 deg is 170 deg east of the meridian.
    (190.0, 5.0, 3600.0, "east", 175.0 / SIDEREAL_DEG_PER_S, False),
])
def test_hand_computed_cases(ha, limit, hold, side, seconds, flip):
    check = pier_flip_check(ha, hold, limit)
    assert check.side[()] == side
    assert float(check.limit_s) == pytest.approx(seconds, rel=RATE_ROUNDING)
    assert bool(check.flip) is flip


def _sidereal_advance_deg(t0: Time, hours: int, longitude_deg) -> np.ndarray:
    """astropy's local apparent sidereal time at t0 + k hours (k = 0..hours), unwrapped, as
    degrees advanced since t0: shape (hours + 1, n)."""
    steps = [t0 + TimeDelta(3600.0 * k, format="sec") for k in range(hours + 1)]
    last = np.array([t.sidereal_time("apparent", longitude=longitude_deg * u.deg).deg
                     for t in steps])
    # One hour turns the sky 15 deg: unwrapping hour by hour is unambiguous.
    return np.degrees(np.unwrap(np.radians(last), axis=0)) - last[0]


def _astropy_seconds_to(t0: Time, longitude_deg, advance_deg) -> np.ndarray:
    """Seconds after t0 when astropy's sidereal time has advanced by advance_deg (bisection
    inside the hour found on an hourly grid)."""
    hours = int(np.ceil(advance_deg.max() / 15.0)) + 2
    grid = _sidereal_advance_deg(t0, hours, longitude_deg)
    n = advance_deg.size
    k = np.array([np.searchsorted(grid[:, j], advance_deg[j]) - 1 for j in range(n)])
    lo, hi = 3600.0 * k, 3600.0 * (k + 1)
    base = np.array([grid[k[j], j] for j in range(n)])
    start_last = t0.sidereal_time("apparent", longitude=longitude_deg * u.deg).deg
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        last = (t0 + TimeDelta(mid, format="sec")).sidereal_time(
            "apparent", longitude=longitude_deg * u.deg).deg
        # Degrees advanced since t0, unwrapped near the grid value at the bracket's start.
        advanced = base + ((last - start_last - base) + 180.0) % 360.0 - 180.0
        below = advanced < advance_deg
        lo, hi = np.where(below, mid, lo), np.where(below, hi, mid)
    return 0.5 * (lo + hi)


def test_random_slews_against_astropy_sidereal_time():
    rng = np.random.default_rng(20240611)
    n = 120
    # Instants from 1995 to 2024 (inside the IERS tables), any longitude, any RA.
    t0 = Time(rng.uniform(Time("1995-01-01").jd, Time("2024-06-01").jd, n), format="jd",
              scale="utc")
    longitude = rng.uniform(-180.0, 180.0, n)
    ra = rng.uniform(0.0, 360.0, n)
    limit = rng.uniform(0.0, 90.0, n)
    hold = rng.uniform(0.0, 12.0 * 3600.0, n)
    # The hour angle now by astropy, handed over with whole turns added (it must wrap).
    last0 = t0.sidereal_time("apparent", longitude=longitude * u.deg).deg
    ha = (last0 - ra + 180.0) % 360.0 - 180.0
    turns = rng.integers(-2, 3, n) * 360.0
    check = pier_flip_check(ha + turns, hold, limit)
    east = ha < 0.0
    assert list(check.side) == ["east" if e else "west" for e in east]
    # The limit's hour angle: +m on the east side, 360 + m round on the west side.
    advance = np.where(east, limit - ha, 360.0 + limit - ha)
    reference = _astropy_seconds_to(t0, longitude, advance)
    # A leap second inside the interval shifts UTC against the sky by 1 s.
    assert np.max(np.abs(check.limit_s - reference)) < 1.5
    clear = np.abs(reference - hold) > 2.0
    assert clear.sum() > n * 0.9
    np.testing.assert_array_equal(check.flip[clear], (reference <= hold)[clear])
    assert check.flip.any() and not check.flip.all()  # both outcomes are exercised
