"""`mount slew --model`: the commanded coordinates are where the pointing model says the axes
must go, turned into right ascension of date with the local apparent sidereal time; the
interlocks judge the sky place and the commanded axes.

Independent reference: the model's terms are written out below from the first-order pointing
formulas of the literature (P. T. Wallace, "A rigorous algorithm for telescope pointing",
Proc. SPIE 4848, 125 (2002); from memory), in our sign convention (axis reading minus sky),
and inverted here by our own fixed-point loop; the sidereal time is astropy's apparent
sidereal time (IAU 2006/2000A). An INDI controller's RA of date is its axes' hour angle
subtracted from the local apparent sidereal time (common practice).
"""
from __future__ import annotations

import json

import numpy as np
import pytest
from astropy import units as u
from astropy.time import Time

from epochpoint.cli.main import main
from epochpoint.core.pointing_model import PointingModel
from epochpoint.mount import InterlockRefused, Telescope, slew_to_target
from scripted_peer import ScriptedPeer
from test_mount_safety import night_site, star_at

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

# An invented mount: term values in arcsec.
TERMS = {"hour_axis_index": 250.0, "dec_axis_index": -140.0, "optical_axis_skew": 60.0,
         "polar_axis_tilt_meridian": 180.0, "tube_sag": 45.0}
# astropy's and ERFA's sidereal time agree far below this (the same IAU 2006/2000A model).
COMMANDED_ARCSEC = 0.05


def model_json(latitude: float, terms=TERMS) -> dict:
    return {"mount_type": "equatorial", "latitude": latitude,
            "terms": {n: {"value_arcsec": v, "error_arcsec": 1.0} for n, v in terms.items()},
            "rms_before_arcsec": 300.0, "rms_after_arcsec": 4.2, "samples": 30,
            "rejected": []}


def offsets_deg(h_deg, d_deg, lat_deg):
    """Axis reading minus sky (deg), the written-out formulas (see the module docstring)."""
    h, d, lat = np.radians(h_deg), np.radians(d_deg), np.radians(lat_deg)
    d_hour = (TERMS["hour_axis_index"] + TERMS["optical_axis_skew"] / np.cos(d)
              + TERMS["polar_axis_tilt_meridian"] * np.sin(h) * np.tan(d)
              - TERMS["tube_sag"] * np.cos(lat) * np.sin(h) / np.cos(d))
    d_dec = (TERMS["dec_axis_index"] + TERMS["polar_axis_tilt_meridian"] * np.cos(h)
             + TERMS["tube_sag"] * (np.sin(lat) * np.cos(d) - np.cos(lat) * np.cos(h) * np.sin(d)))
    return d_hour / 3600.0, d_dec / 3600.0


def axes_for(ha_sky, dec_sky, lat_deg):
    """The axes that see the sky place: mount = sky + offsets(mount), iterated."""
    ha_m, dec_m = ha_sky, dec_sky
    for _ in range(50):
        dh, dd = offsets_deg(ha_m, dec_m, lat_deg)
        ha_m, dec_m = ha_sky + dh, dec_sky + dd
    return ha_m, dec_m


def test_the_slew_commands_the_model_corrected_place(tmp_path):
    site = night_site()
    targets, _, _ = star_at(site, 50.0, 200.0)
    model = PointingModel.from_dict(model_json(site.latitude))
    peer = ScriptedPeer()
    said = []
    try:
        with Telescope.open(peer.address, timeout_s=5.0) as scope:
            report = slew_to_target(scope, targets, site, "Star", wait=True, timeout_s=5.0,
                                    track_s=60.0, model=model, notify=said.append)
    finally:
        peer.close()
    sent = peer.coordinates_sent()[0]
    values = {one.get("name"): float(one.text) for one in sent}
    pointing = report.pointing
    ha_m, dec_m = axes_for(pointing.ha_deg, pointing.dec_observed_deg, site.latitude)
    last = Time(pointing.time.rstrip("Z"), scale="utc").sidereal_time(
        "apparent", longitude=site.longitude * u.deg).deg
    expected_ra = (last - ha_m) % 360.0
    ra_off = ((values["RA"] * 15.0 - expected_ra + 180.0) % 360.0 - 180.0) * 3600.0
    assert abs(ra_off * np.cos(np.radians(dec_m))) < COMMANDED_ARCSEC
    assert abs(values["DEC"] - dec_m) * 3600.0 < COMMANDED_ARCSEC
    # The terms moved the command by arcminutes from the sky place: the test can tell.
    assert abs(values["DEC"] - pointing.dec_apparent_deg) * 3600.0 > 60.0
    text = " ".join(said)
    assert "Sky place of Star" in text and "(commanded, pointing model)" in text


def test_commanded_axes_beyond_a_limit_are_refused_and_said_so():
    site = night_site()
    targets, _, _ = star_at(site, 12.0, 180.0)  # allowed: above the 10 deg limit
    # The declination axis reads 3 deg low: to see the star due south its reading must be 3 deg
    # lower, which the interlocks take as 9 deg of altitude, below the limit.
    model = PointingModel.from_dict(model_json(site.latitude,
                                               {"dec_axis_index": -3.0 * 3600.0}))
    peer = ScriptedPeer()
    try:
        with Telescope.open(peer.address, timeout_s=5.0) as scope:
            with pytest.raises(InterlockRefused, match="commanded axes below the minimum"):
                slew_to_target(scope, targets, site, "Star", wait=True, timeout_s=5.0,
                               track_s=60.0, model=model)
            # Without the model the same star is allowed.
            slew_to_target(scope, targets, site, "Star", wait=True, timeout_s=5.0, track_s=60.0)
    finally:
        peer.close()
    assert len(peer.coordinates_sent()) == 1


def test_the_command_line_slews_with_a_model_file(tmp_path, capsys):
    site = night_site()
    targets, _, _ = star_at(site, 50.0, 200.0)
    listing = tmp_path / "targets.csv"
    ra, dec = float(targets.ra[0]), float(targets.dec[0])
    listing.write_text(f"name,ra,dec,epoch\nStar,{ra!r},{dec!r},2016.0\n")
    model = tmp_path / "model.json"
    model.write_text(json.dumps(model_json(site.latitude)))
    peer = ScriptedPeer()
    try:
        code = main(["mount", "slew", str(listing), "Star",
                     f"--site={site.latitude},{site.longitude},0", "--indi", peer.address,
                     "--model", str(model), "--wait", "--timeout", "5", "--track-minutes", "0"])
    finally:
        peer.close()
    captured = capsys.readouterr()
    out = captured.out
    assert code == 0, captured.err
    assert f"Pointing model {model}" in out and "rms 4.2 arcsec" in out
    assert "Sky place of Star" in out and "(commanded, pointing model)" in out
    assert len(peer.coordinates_sent()) == 1


def test_a_broken_model_file_is_one_line_before_connecting(tmp_path, capsys):
    model = tmp_path / "model.json"
    model.write_text('{"mount_type": "equatorial", "latitude": 40, "terms": {"sag": {}}}')
    listing = tmp_path / "targets.csv"
    listing.write_text("name,ra,dec\nStar,10.0,20.0\n")
    code = main(["mount", "slew", str(listing), "Star", "--site=40,0,0", "--indi",
                 "127.0.0.1:9", "--model", str(model)])
    err = capsys.readouterr().err
    assert code == 2 and "terms.sag" in err and len(err.strip().splitlines()) == 1
