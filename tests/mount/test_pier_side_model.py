"""A German pointing model corrects on the pier side the mount will be on when the slew ends,
against the scripted INDI peer (scripted_peer.py).

References: a German equatorial mount takes the pier side of the target's hour angle at the
slew's end (east of the meridian: the east side; common practice); its declination scale's
zero point reads high by p on the east side and low by p on the west, where the scale is
mirrored through the pole (the model's convention, values as seen on the east side; a term
fixed in the declination axis's frame: P. T. Wallace, "A rigorous algorithm for telescope
pointing", Proc. SPIE 4848, 125 (2002), from memory). The sky turns at 15.041 arcsec per
second (common practice); the hour angle is astropy's apparent sidereal time minus the TETE
right ascension.
"""
from __future__ import annotations

from dataclasses import replace

import pytest
from astropy import units as u
from astropy.coordinates import ICRS, TETE, SkyCoord
from astropy.time import Time

from epochpoint.core.limits import Interlocks, MountLimits
from epochpoint.core.pointing_model import PointingModel
from epochpoint.core.targets import Targets
from epochpoint.mount import Telescope, slew_to_target
from scripted_peer import ScriptedPeer, definitions
from test_mount_safety import night_site

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

DEC_INDEX_ARCSEC = 600.0


def test_a_german_model_corrects_on_the_side_taken_at_the_slew_end():
    base = night_site()
    mount = MountLimits(mount_type="german", meridian_limit=5.0, min_altitude=10.0,
                        slew_rate=3.0, settle=10.0)
    site = replace(base, interlocks=Interlocks(mount=mount))
    # A star 0.06 deg (14 s) east of the meridian, 60 deg high; the mount waits at Dec -60,
    # over 66 deg of declination axis away: the slew takes at least 10 s + 66 deg / 3 deg/s =
    # 32 s, over which the sky turns 0.13 deg, so the slew ends with the star west of it.
    now = Time.now()
    last = now.sidereal_time("apparent", longitude=site.longitude * u.deg).deg
    dec = site.latitude + 30.0
    icrs = SkyCoord(ra=(last + 0.06) % 360.0 * u.deg, dec=dec * u.deg,
                    frame=TETE(obstime=now)).transform_to(ICRS())
    targets = Targets.from_columns(ra=[icrs.ra.deg], dec=[icrs.dec.deg], name=["Near"],
                                   epoch=2016.0)
    model = PointingModel.from_dict({
        "mount_type": "german", "latitude": site.latitude,
        "terms": {"dec_axis_index": {"value_arcsec": DEC_INDEX_ARCSEC, "error_arcsec": 1.0}}})
    said = []
    peer = ScriptedPeer(definitions(ra_h=(last / 15.0 + 6.0) % 24.0, dec_deg=-60.0))
    try:
        with Telescope.open(peer.address, timeout_s=5.0) as scope:
            report = slew_to_target(scope, targets, site, "Near", wait=True, timeout_s=5.0,
                                    track_s=60.0, model=model, notify=said.append)
    finally:
        peer.close()
    assert report.pointing.pier_side == "west"
    assert any(line.startswith("Pier side: west (INDI PIER_EAST:") for line in said), said
    # On the west side the scale reads low by p: the axes go p below the observed place.
    values = {one.get("name"): float(one.text) for one in peer.coordinates_sent()[-1]}
    expected = report.pointing.dec_observed_deg - DEC_INDEX_ARCSEC / 3600.0
    assert values["DEC"] == pytest.approx(expected, abs=0.01 / 3600.0)
