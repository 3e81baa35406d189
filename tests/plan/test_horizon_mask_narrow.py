"""Narrow horizon-mask features against a 1 s astropy brute force.

Reference (tests only): astropy AltAz (pressure 0 on both sides) of each target at every second
around the moment it passes the feature; the target is behind the mask where that altitude is
below the mask's straight-line profile in azimuth. Invented site and mask: a flat 6 deg horizon
with a tower 1 deg wide and 85 deg tall (peak at azimuth 100.5) and a mast 0.5 deg wide (peak
at 200.25). Random targets (seeded) are placed with astropy so that they pass each peak at a
random altitude between 12 and 80 deg at a random moment of the dark. A mask sampled every
300 s steps over such a feature; the planner must cut every second the target is behind it.
"""
import numpy as np
import pytest

from epochpoint.core.limits import HorizonMask, Interlocks, MountLimits
from epochpoint.core.plan import plan
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.core.windows import observable_windows

import plan_reference as ref

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

SEED = 1307
PER_FEATURE = 16
AROUND_S = 600.0  # brute force from 10 min before to 10 min after the peak passage
# A second of astropy samples this close to a window edge is not judged (the edges are found
# to 0.1 s; the two sides' places differ by well under an arcsecond).
EDGE_PAD_S = 1.0
MARGIN_DEG = 0.05  # samples this close to the mask are not judged either
FEATURES = {"tower 1 deg": 100.5, "mast 0.5 deg": 200.25}
MASK = HorizonMask(np.array([0.0, 100.0, 100.5, 101.0, 200.0, 200.25, 200.5]),
                   np.array([6.0, 6.0, 85.0, 6.0, 6.0, 85.0, 6.0]))
SITE = Site(35.5, -105.9, 2100.0, timezone="America/Denver", pressure=0.0)
NIGHT = "2025-10-20"


def _with_mask(mask):
    return Site(SITE.latitude, SITE.longitude, SITE.height, timezone=SITE.timezone,
                pressure=0.0, interlocks=Interlocks(mount=MountLimits(min_altitude=6.0),
                                                    horizon=mask))


def _inside(t, windows, pad):
    return any(s + pad <= t <= e - pad for s, e in windows)


@pytest.fixture(scope="module")
def crossing():
    """Targets passing each feature, their windows with and without the mask, and astropy's
    1 s altitude and azimuth around each passage."""
    base = plan(Targets.from_columns(ra=[0.0], dec=[0.0]), _with_mask(None), NIGHT,
                max_iterations=0)
    dark = base.windows.dark[0]
    rng = np.random.default_rng(SEED)
    when, alt, az = [], [], []
    for peak in FEATURES.values():
        when += list(rng.uniform(dark[0] + AROUND_S, dark[1] - AROUND_S, PER_FEATURE))
        alt += list(rng.uniform(12.0, 80.0, PER_FEATURE))
        az += [peak] * PER_FEATURE
    coords = [ref.from_altaz(SITE, base, t, a, z) for t, a, z in zip(when, alt, az)]
    ra = np.array([c.ra.deg[0] for c in coords])
    dec = np.array([c.dec.deg[0] for c in coords])
    targets = Targets.from_columns(ra=ra, dec=dec)
    windows = {}
    for key, mask in (("masked", MASK), ("open", None)):
        windows[key] = observable_windows(targets, _with_mask(mask), base.sky, [dark],
                                          base.constraints).windows
    t_s = np.array(when)[:, None] + np.arange(-AROUND_S, AROUND_S + 1.0)[None, :]
    alt_ref, az_ref = ref.target_altaz(SITE, base, ref.icrs(ra, dec), t_s)
    return dict(t_s=t_s, alt=alt_ref, az=az_ref, windows=windows)


def test_no_second_behind_a_narrow_feature_is_left_in_a_window(crossing):
    behind_total, leaks = 0, []
    for i in range(crossing["t_s"].shape[0]):
        mask_alt = MASK.min_altitude(crossing["az"][i])
        behind = crossing["alt"][i] < mask_alt - MARGIN_DEG
        behind_total += int(behind.sum())
        for t in crossing["t_s"][i][behind]:
            if _inside(t, crossing["windows"]["masked"][i], EDGE_PAD_S):
                leaks.append((i, float(t)))
    assert behind_total > 10 * len(FEATURES) * PER_FEATURE, "the targets barely pass the features"
    assert leaks == [], f"{len(leaks)} s behind the mask left in windows, first {leaks[:5]}"


def test_every_clear_second_stays_in_a_window(crossing):
    lost = []
    for i in range(crossing["t_s"].shape[0]):
        mask_alt = MASK.min_altitude(crossing["az"][i])
        clear = crossing["alt"][i] > mask_alt + MARGIN_DEG
        for t in crossing["t_s"][i][clear]:
            if _inside(t, crossing["windows"]["open"][i], EDGE_PAD_S) and \
                    not _inside(t, crossing["windows"]["masked"][i], -EDGE_PAD_S):
                lost.append((i, float(t)))
    assert lost == [], f"{len(lost)} clear seconds cut, first {lost[:5]}"
