"""`epochpoint pointing record`: slew to calibration stars over INDI and record samples.

Against the real INDI telescope simulator (indiserver + indi_simulator_telescope, Debian
indi-bin) through the command line with --no-prompt: the samples file gets one row per star with
the issue's columns. Against the scripted peer (scripted_peer.py) for a mount that reports
a known offset from where it was sent: the recorded mount-minus-star differences equal it.

References: an INDI controller's axis hour angle is the local apparent sidereal time minus
the right ascension of date it reports (common practice); so a mount reporting its RA lower by
x reads its hour angle higher by x. Without refraction (pressure 0) the observed place and the
apparent place differ by diurnal aberration and polar motion only, under 1 arcsec (IERS
Conventions 2010, ch. 5: polar motion under 0.5 arcsec; diurnal aberration at most 0.32 arcsec;
from memory).
"""
from __future__ import annotations

import csv

import numpy as np
import pytest

from epochpoint.cli.main import main
from epochpoint.mount import Telescope
from epochpoint.mount.calibration import record_star
from scripted_peer import ScriptedPeer
from test_mount_safety import night_site, star_at
from test_mount_simulator import SITE, _allowed

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

HEADER = ["time", "name", "ha_target", "dec_target", "ha_mount", "dec_mount"]
# Diurnal aberration plus polar motion (module docstring), with room for rounding.
NO_REFRACTION_ARCSEC = 1.0


def test_a_mount_reporting_an_offset_records_that_offset(tmp_path):
    site = night_site().with_weather(pressure=0.0)  # no refraction: see the module docstring
    targets, _, _ = star_at(site, 55.0, 120.0, name="Cal")
    # The mount ends 0.002 h (108 arcsec of time: 0.03 deg) low in RA and 0.01 deg high in Dec.
    peer = ScriptedPeer(arrive_off_ra_h=-0.002, arrive_off_deg=0.01)
    try:
        with Telescope.open(peer.address, timeout_s=5.0) as scope:
            sample = record_star(scope, targets, site, "Cal", settle_s=0.0, timeout_s=5.0,
                                 track_s=60.0, notify=lambda _text: None)
    finally:
        peer.close()
    assert sample["name"] == "Cal" and sample["time"].endswith("Z")
    dha_arcsec = ((sample["ha_mount"] - sample["ha_target"] + 180.0) % 360.0 - 180.0) * 3600.0
    ddec_arcsec = (sample["dec_mount"] - sample["dec_target"]) * 3600.0
    cos_dec = np.cos(np.radians(sample["dec_target"]))
    assert dha_arcsec * cos_dec == pytest.approx(0.03 * 3600.0 * cos_dec,
                                                 abs=NO_REFRACTION_ARCSEC)
    assert ddec_arcsec == pytest.approx(0.01 * 3600.0, abs=NO_REFRACTION_ARCSEC)
    assert len(peer.coordinates_sent()) >= 1  # it did slew (and refined once)


def test_a_prompt_answered_skip_records_nothing(tmp_path):
    site = night_site().with_weather(pressure=0.0)
    targets, _, _ = star_at(site, 55.0, 120.0, name="Cal")
    peer = ScriptedPeer()
    asked = []
    try:
        with Telescope.open(peer.address, timeout_s=5.0) as scope:
            sample = record_star(scope, targets, site, "Cal", timeout_s=5.0, track_s=60.0,
                                 confirm=lambda name: asked.append(name) or False,
                                 notify=lambda _text: None)
    finally:
        peer.close()
    assert sample is None and asked == ["Cal"]


@pytest.mark.indi
def test_record_through_the_simulator_writes_one_row_per_star(indi_server, tmp_path):
    # Three invented stars near the pole of an invented site at +50: always up and far from
    # the Sun (test_mount_simulator.SITE); each must be allowed now by astropy's reckoning.
    ra = np.array([30.0, 150.0, 270.0])
    dec = np.full(3, 85.0)
    assert _allowed(ra, dec).all()
    stars = tmp_path / "calibration.csv"
    stars.write_text("name,ra,dec,epoch\n" + "".join(
        f"Cal{k},{r},{d},2016.0\n" for k, (r, d) in enumerate(zip(ra, dec), start=1)))
    samples = tmp_path / "samples.csv"
    site_arg = f"--site={SITE.latitude},{SITE.longitude},{SITE.height}"
    code = main(["pointing", "record", str(stars), site_arg, "--pressure", "0",
                 "--indi", indi_server.address, "--samples", str(samples), "--no-prompt",
                 "--settle", "0.5", "--push-site", "--timeout", "90", "--track-minutes", "1"])
    assert code == 0
    with open(samples, newline="") as handle:
        rows = list(csv.reader(handle))
    assert rows[0] == HEADER
    assert [r[1] for r in rows[1:]] == ["Cal1", "Cal2", "Cal3"]
    for row in rows[1:]:
        assert row[0].endswith("Z")
        ha_t, dec_t, ha_m, dec_m = map(float, row[2:])
        # The simulator ends where it was sent (within a few arcsec), so with no refraction
        # its axes and the star's observed place agree to a few arcsec.
        dha = ((ha_m - ha_t + 180.0) % 360.0 - 180.0) * np.cos(np.radians(dec_t))
        assert np.hypot(dha, dec_m - dec_t) * 3600.0 < 10.0
    # A second run adds to the file instead of replacing it.
    one = tmp_path / "one.csv"
    one.write_text(f"name,ra,dec,epoch\nCal4,{ra[0] + 10.0},{dec[0]},2016.0\n")
    code = main(["pointing", "record", str(one), site_arg, "--pressure", "0", "--indi",
                 indi_server.address, "--samples", str(samples), "--no-prompt", "--settle",
                 "0", "--push-site", "--timeout", "90", "--track-minutes", "1"])
    assert code == 0
    assert [line.split(",")[1] for line in samples.read_text().splitlines()[1:]] == \
        ["Cal1", "Cal2", "Cal3", "Cal4"]


def test_a_star_that_is_neither_a_file_nor_a_hipparcos_name_is_one_line(tmp_path, capsys):
    code = main(["pointing", "record", "Cal1", "--site=50,8,300", "--indi", "127.0.0.1:9",
                 "--samples", str(tmp_path / "s.csv"), "--no-prompt"])
    err = capsys.readouterr().err
    assert code == 2 and "'Cal1' is neither a file nor a Hipparcos name" in err
    assert len(err.strip().splitlines()) == 1 and not (tmp_path / "s.csv").exists()


def test_a_pointing_stars_list_is_read_by_its_hipparcos_names(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("EPOCHPOINT_CACHE_DIR", str(tmp_path / "cache"))
    # The shape of `pointing stars --format csv`: names, no ra/dec columns.
    stars = tmp_path / "stars.csv"
    stars.write_text("order,name,hp_mag,ra_apparent,dec_apparent\n1,HIP 32349,-1.09,101.5,-16.7\n")
    code = main(["pointing", "record", str(stars), "--site=50,8,300", "--indi", "127.0.0.1:9",
                 "--samples", str(tmp_path / "s.csv"), "--no-prompt", "--connect-timeout", "1"])
    err = capsys.readouterr().err
    assert code == 4, err  # the names were accepted; only the (absent) server failed
    unknown = tmp_path / "unknown.csv"
    unknown.write_text("order,name\n1,HIP 999999\n")
    code = main(["pointing", "record", str(unknown), "--site=50,8,300", "--indi",
                 "127.0.0.1:9", "--samples", str(tmp_path / "s.csv"), "--no-prompt"])
    err = capsys.readouterr().err
    assert code == 2 and "HIP 999999" in err and len(err.strip().splitlines()) == 1
