"""A German equatorial mount's pier flips and its first slew from the park.

The reference geometry is written out here as vectors, apart from the code's closed form
(common practice for German mounts; the construction is ours): in the mount's frame (x to
the meridian on the equator, y to the east point, z to the elevated pole) a target at hour
angle H (west positive) and declination dec points along
v = (cos dec cos H, -cos dec sin H, sin dec). The tube is square to the declination axis, so
with the polar axis turned by theta it points along Rz(-theta) (0, cos psi, sin psi): theta
solves (Rz(theta) v)_x = 0, taking the root with |theta| <= 90 deg (counterweight below the
declination axis), and psi = atan2(z, y) of Rz(theta) v. Home is theta = 0, psi = 90 deg
(the pole, counterweight down). A southern mount is the mirror image (dec -> -dec).
"""
import math
from pathlib import Path

import numpy as np
import pytest

from epochpoint.core.horizon_geometry import SIDEREAL_DEG_PER_S
from epochpoint.core.schedule import Mount, schedule
from epochpoint.io import read_site


DEMO_SITE = Path(__file__).resolve().parents[2] / "sample_targets" / "loma_candil.toml"
pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


def mount_axes(ha_deg, dec_deg, pole_sign=1.0):
    """(theta, psi) in degrees of a German mount pointing at (ha, dec), by the vectors above."""
    h, d = math.radians(ha_deg), math.radians(pole_sign * dec_deg)
    v = np.array([math.cos(d) * math.cos(h), -math.cos(d) * math.sin(h), math.sin(d)])
    root = math.atan2(v[0], v[1])  # cos(t) v_x - sin(t) v_y = 0
    for theta in (root, root + math.pi, root - math.pi):
        if abs(theta) <= math.pi / 2 + 1e-12:
            break
    c, s = math.cos(theta), math.sin(theta)
    turned = np.array([c * v[0] - s * v[1], s * v[0] + c * v[1], v[2]])
    assert abs(turned[0]) < 1e-9
    return math.degrees(theta), math.degrees(math.atan2(turned[2], turned[1]))


def slew_s(a, b, settle_s, rate_deg_s):
    """Both axes at once at the slew rate, then the settle (common practice)."""
    return settle_s + max(abs(b[0] - a[0]), abs(b[1] - a[1])) / rate_deg_s


def test_the_reference_geometry_flips_both_axes():
    # Sanity of the written-out geometry: the same place seen from both sides of the meridian
    # differs by 180 deg on the polar axis and by 180 - 2 dec through the pole.
    east, west = mount_axes(-0.001, 30.0), mount_axes(0.001, 30.0)
    assert abs(west[0] - east[0]) == pytest.approx(180.0, abs=0.01)
    assert abs(west[1] - east[1]) == pytest.approx(120.0, abs=0.01)


def test_a_pier_flip_costs_both_axes_through_the_pier_change():
    # Invented night, latitude +40 deg, sidereal time 0 at t = 0. Target 0 (RA 10 deg) is
    # east of the meridian and may only be observed in the first 20 minutes; target 1 (RA
    # 350 deg) is west of it all night. The slew between them is a flip: the plain RA
    # reckoning gives 20 deg, the polar axis really turns about 160 deg.
    mount = Mount(settle_s=10.0, slew_rate_deg_s=2.0, german=True, latitude_deg=40.0,
                  lst_start_deg=0.0)
    ra, dec = [10.0, 350.0], [30.0, 35.0]
    order = schedule([2.0, 1.0], [600.0, 600.0], [[(0.0, 1200.0)], [(0.0, 7200.0)]], 7200.0,
                     ra_deg=ra, dec_deg=dec, mount=mount)
    assert [e.index for e in order.entries] == [0, 1]
    first, second = order.entries
    leave_s = first.end_s  # the slew starts when the first block ends
    ha = [(SIDEREAL_DEG_PER_S * leave_s - r + 180.0) % 360.0 - 180.0 for r in ra]
    assert ha[0] < 0.0 < ha[1]
    needed = slew_s(mount_axes(ha[0], dec[0]), mount_axes(ha[1], dec[1]), 10.0, 2.0)
    assert needed > 80.0
    assert second.start_s - first.end_s >= needed - 1e-6
    assert second.slew_s == pytest.approx(needed, abs=0.5)


def test_targets_on_one_side_cost_the_plain_slew():
    # Both west of the meridian: no flip, 20 deg on the polar axis.
    mount = Mount(settle_s=10.0, slew_rate_deg_s=2.0, german=True, latitude_deg=40.0,
                  lst_start_deg=60.0)
    order = schedule([2.0, 1.0], [600.0, 600.0], [[(0.0, 1200.0)], [(0.0, 7200.0)]], 7200.0,
                     ra_deg=[10.0, 350.0], dec_deg=[30.0, 35.0], mount=mount)
    first, second = order.entries
    assert second.start_s - first.end_s == pytest.approx(10.0 + 20.0 / 2.0)


def test_the_first_block_waits_for_the_slew_from_the_park():
    # Invented southern night (latitude -28 deg, 2.5 deg/s, 15 s settle), sidereal time 100
    # deg at t = 0. The mount rests at home: the south pole, counterweight down (park hour
    # angle -90 deg). One target 15 deg west of the meridian, window open from t = 0.
    mount = Mount(settle_s=15.0, slew_rate_deg_s=2.5, german=True, latitude_deg=-28.0,
                  lst_start_deg=100.0, park_ha_deg=-90.0, park_dec_deg=-90.0)
    order = schedule([1.0], [600.0], [[(0.0, 7200.0)]], 7200.0, ra_deg=[85.0],
                     dec_deg=[-30.0], mount=mount)
    (entry,) = order.entries
    ha = 100.0 + SIDEREAL_DEG_PER_S * entry.start_s - 85.0
    home = (0.0, 90.0)
    needed = slew_s(home, mount_axes(ha, -30.0, pole_sign=-1.0), 15.0, 2.5)
    assert needed > 40.0
    assert entry.start_s >= needed - 1e-6


def test_the_site_file_names_the_park(tmp_path):
    # The demo site (German mount in the south) with a park hour angle and declination in
    # its [mount] table; without them the park is home (the south pole, counterweight down).
    text = DEMO_SITE.read_text().replace("settle = 15.0", "settle = 15.0\npark_ha = 30.0\n"
                                         "park_dec = -20.0")
    assert "park_ha" in text
    (tmp_path / "site.toml").write_text(text)
    site = read_site(tmp_path / "site.toml")
    assert (site.interlocks.mount.park_ha, site.interlocks.mount.park_dec) == (30.0, -20.0)
    assert site.interlocks.mount.park(site.latitude) == (30.0, -20.0)
    assert read_site(DEMO_SITE).interlocks.mount.park(-28.0) == (-90.0, -90.0)
