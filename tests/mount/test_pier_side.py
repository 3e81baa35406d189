"""A German mount's pier side at the slew and its meridian limit over the track, against the
real INDI telescope simulator (indiserver + indi_simulator_telescope, Debian indi-bin 1.9.9,
which simulates a German mount and reports TELESCOPE_PIER_SIDE), through `mount slew`.

References: a German equatorial mount takes the pier side of the target's hour angle at the
slew's end and may track past the meridian only up to its meridian limit (common practice);
the sky turns at 15.041 arcsec per second (common practice); INDI's TELESCOPE_PIER_SIDE names
the side the tube is on, PIER_WEST "West (pointing east)" and PIER_EAST "East (pointing
west)" (the labels the simulator itself defines: a target east of the meridian puts the tube
west of the pier). Hour angles come from astropy's apparent sidereal time and TETE frame (IAU
2006/2000A), never from our engine; the site has no refraction (pressure 0), so the observed
hour angle is the apparent one to well under an arcsecond (diurnal aberration, polar motion).
"""
from __future__ import annotations

import csv
import re
import time

import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import ICRS, TETE, SkyCoord
from astropy.time import Time

from epochpoint.cli.main import main
from epochpoint.io import read_site
from epochpoint.mount import Telescope

pytestmark = [pytest.mark.indi,
              pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

SIDEREAL_DEG_PER_S = 15.041 / 3600.0  # common practice
MERIDIAN_LIMIT = 5.0
# The longest slew the site's model allows: settle + 180 deg at 3 deg/s.
LONGEST_SLEW_S = 5.0 + 180.0 / 3.0
# Declination +80 at latitude +50 stands 60 deg high on the meridian and at least 56 deg from
# the Sun (whose declination is within +-23.44 deg), at any hour.
DEC = 80.0


def site_file(tmp_path, mount_type: str = "german"):
    """An invented site at +50, 8 E without refraction, with a German (or other) mount."""
    path = tmp_path / f"site-{mount_type}.toml"
    path.write_text(f"""[site]
name = "Hollow Ridge (invented)"
latitude = 50.0
longitude = 8.0
height = 300.0
timezone = "UTC"

[weather]
pressure = 0.0

[mount]
type = "{mount_type}"
meridian_limit = {MERIDIAN_LIMIT}
slew_rate = 3.0
settle = 5.0
""")
    return path


def star_at_hour_angle(ha_deg, dec_deg=DEC):
    """ICRS (ra, dec) of fixed stars at apparent hour angles ha_deg now (astropy: local
    apparent sidereal time minus the TETE right ascension, turned into ICRS)."""
    now = Time.now()
    last = now.sidereal_time("apparent", longitude=8.0 * u.deg).deg
    ha = np.atleast_1d(ha_deg)
    tete = SkyCoord(ra=((last - ha) % 360.0) * u.deg, dec=np.full(ha.shape, dec_deg) * u.deg,
                    frame=TETE(obstime=now))
    icrs = tete.transform_to(ICRS())
    return icrs.ra.deg, icrs.dec.deg, now


def astropy_hour_angle(ra_icrs, dec_icrs, when: Time) -> np.ndarray:
    tete = SkyCoord(ra=np.atleast_1d(ra_icrs) * u.deg, dec=np.atleast_1d(dec_icrs) * u.deg,
                    frame=ICRS()).transform_to(TETE(obstime=when))
    last = when.sidereal_time("apparent", longitude=8.0 * u.deg).deg
    return (last - tete.ra.deg + 180.0) % 360.0 - 180.0


def target_list(tmp_path, names, ra, dec):
    path = tmp_path / "targets.csv"
    path.write_text("name,ra,dec,epoch\n" + "".join(
        f"{n},{float(r)!r},{float(d)!r},2016.0\n" for n, r, d in zip(names, ra, dec)))
    return path


def slew(args_path, name, site, server, *more):
    return main(["mount", "slew", str(args_path), name, f"--site={site}", "--indi",
                 server.address, "--push-site", "--timeout", "90", "--max-residual", "30",
                 *more])


def test_a_flip_needed_mid_track_is_refused_with_the_time_and_nothing_moves(
        indi_server, tmp_path, capsys):
    site = site_file(tmp_path)
    ra, dec, built = star_at_hour_angle(-1.5)  # 6 min before the meridian
    targets = target_list(tmp_path, ["Eastern"], ra, dec)
    with Telescope.open(indi_server.address) as scope:
        before = scope.status()
    started = time.time()
    code = slew(targets, "Eastern", site, indi_server, "--track-minutes", "30")
    elapsed = time.time() - started
    out, err = capsys.readouterr()
    assert code == 3, err
    assert err.count("\n") == 1 and "Traceback" not in err
    assert "would cross the meridian limit (5 deg past the meridian) on the east pier side" \
        in err and "flip needed" in err and "nothing was sent to the mount" in err
    minutes = float(re.search(r"side ([\d.]+) min into the 30 min track", err).group(1))
    ha_end = float(re.search(r"hour angle ([+-][\d.]+) deg at the slew's end", err).group(1))
    # Its hour angle at the slew's end: astropy's at the build, plus the sky's turning over
    # the time to the check and a slew no longer than the site's longest.
    assert -1.5 - 0.01 <= ha_end <= -1.5 + SIDEREAL_DEG_PER_S * (elapsed + LONGEST_SLEW_S)
    # The limit comes when the hour angle has turned from there to +5 deg (hand computed).
    assert minutes == pytest.approx((MERIDIAN_LIMIT - ha_end) / SIDEREAL_DEG_PER_S / 60.0,
                                    abs=0.1)
    assert minutes < 30.0
    with Telescope.open(indi_server.address) as scope:
        after = scope.status()
    assert (after.target_ra_deg, after.target_dec_deg) == (before.target_ra_deg,
                                                          before.target_dec_deg)
    assert "Caution: the mount is about to move" not in out


@pytest.mark.parametrize("ha_deg, ours, device", [(-1.5, "east", "PIER_WEST"),
                                                  (1.5, "west", "PIER_EAST")])
def test_a_short_track_is_allowed_and_the_side_is_shown_beside_the_device(
        indi_server, tmp_path, capsys, ha_deg, ours, device):
    site = site_file(tmp_path)
    ra, dec, _ = star_at_hour_angle(ha_deg)
    targets = target_list(tmp_path, ["Near"], ra, dec)
    code = slew(targets, "Near", site, indi_server, "--track-minutes", "0.2", "--wait")
    out, err = capsys.readouterr()
    assert code == 0, err + out
    # Before the slew: our side with INDI's name for it; after: the device's beside ours.
    assert f"Pier side: {ours} (INDI {device}:" in out
    assert f"the device reports {device}, the same side." in out
    with Telescope.open(indi_server.address) as scope:
        assert scope.reported_pier_side() == device


def test_the_west_side_tracks_for_hours_without_a_flip(indi_server, tmp_path, capsys):
    # Just west of the meridian the mount has flipped already: 12 h of track need none.
    site = site_file(tmp_path)
    ra, dec, _ = star_at_hour_angle(0.5)
    targets = target_list(tmp_path, ["Western"], ra, dec)
    code = slew(targets, "Western", site, indi_server, "--track-minutes", "120")
    out, err = capsys.readouterr()
    assert code == 0, err
    assert "Pier side: west (INDI PIER_EAST:" in out and "no meridian flip ahead" in out


def test_a_fork_mount_has_no_pier_check(indi_server, tmp_path, capsys):
    site = site_file(tmp_path, "equatorial")
    ra, dec, _ = star_at_hour_angle(-1.5)
    targets = target_list(tmp_path, ["Eastern"], ra, dec)
    code = slew(targets, "Eastern", site, indi_server, "--track-minutes", "30")
    out, err = capsys.readouterr()
    assert code == 0, err
    assert "Pier side:" not in out


# -- pointing record: the pier side and the alt-az columns ----------------------------------

def read_rows(path):
    with open(path, newline="") as handle:
        rows = [r for r in csv.reader(handle) if r and not r[0].startswith("#")]
    return rows[0], [dict(zip(rows[0], r)) for r in rows[1:]]


def test_record_writes_the_pier_side_and_keeps_the_files_other_columns(indi_server,
                                                                       tmp_path):
    site = site_file(tmp_path)
    # One star 40 deg east of the meridian, one 40 deg west (dec 85: always high).
    ra, dec, built = star_at_hour_angle([-40.0, 40.0], 85.0)
    stars = target_list(tmp_path, ["CalEast", "CalWest"], ra, dec)
    samples = tmp_path / "samples.csv"
    # A file of an earlier night, with a column of the user's own and a comment.
    samples.write_text("# night of the 3rd\n"
                       "time,name,ha_target,dec_target,ha_mount,dec_mount,note\n"
                       "2026-01-03T20:00:00Z,Old,10.0,40.0,10.01,40.02,cloudy\n")
    code = main(["pointing", "record", str(stars), f"--site={site}", "--indi",
                 indi_server.address, "--samples", str(samples), "--no-prompt", "--settle",
                 "0.5", "--push-site", "--timeout", "90", "--track-minutes", "1"])
    assert code == 0
    text = samples.read_text()
    assert text.startswith("# night of the 3rd\n")
    header, rows = read_rows(samples)
    assert header[:7] == ["time", "name", "ha_target", "dec_target", "ha_mount", "dec_mount",
                          "note"] and "pier_side" in header
    assert [r["name"] for r in rows] == ["Old", "CalEast", "CalWest"]
    assert rows[0]["note"] == "cloudy" and rows[0]["ha_mount"] == "10.01"
    # The side from the device's TELESCOPE_PIER_SIDE, which must agree with the star's side
    # of the meridian by astropy's hour angle when it was recorded.
    for row in rows[1:]:
        when = Time(row["time"].rstrip("Z"), scale="utc")
        k = ["CalEast", "CalWest"].index(row["name"])
        ha = astropy_hour_angle(ra[k], dec[k], when)[0]
        assert row["pier_side"] == ("east" if ha < 0.0 else "west")
        # On the sky (times cos Dec): diurnal aberration and polar motion, under 1 arcsec.
        assert abs(float(row["ha_target"]) - ha) * np.cos(np.radians(dec[k])) * 3600.0 < 1.0
    assert [r["pier_side"] for r in rows[1:]] == ["east", "west"]


def hand_altaz(ha_deg, dec_deg, lat_deg):
    """(alt, az) from hour angle and declination by the spherical triangle of pole, zenith
    and star (Meeus, Astronomical Algorithms, 2nd ed., ch. 13, from memory; his azimuth counts
    from the south, ours from the north through east)."""
    h, d, p = np.radians(ha_deg), np.radians(dec_deg), np.radians(lat_deg)
    alt = np.arcsin(np.sin(p) * np.sin(d) + np.cos(p) * np.cos(d) * np.cos(h))
    az = np.arctan2(-np.cos(d) * np.sin(h), np.sin(d) * np.cos(p) - np.cos(d) * np.cos(h)
                    * np.sin(p))
    return np.degrees(alt), np.degrees(az) % 360.0


def test_record_on_an_altaz_mount_writes_the_altitude_and_azimuth_columns(indi_server,
                                                                          tmp_path):
    from astropy.coordinates import AltAz, EarthLocation

    site_path = site_file(tmp_path, "altaz")
    site = read_site(site_path)
    ra, dec, _ = star_at_hour_angle([-30.0], 75.0)
    stars = target_list(tmp_path, ["Cal"], ra, dec)
    samples = tmp_path / "samples.csv"
    code = main(["pointing", "record", str(stars), f"--site={site_path}", "--indi",
                 indi_server.address, "--samples", str(samples), "--no-prompt", "--settle",
                 "0.5", "--push-site", "--timeout", "90", "--track-minutes", "1"])
    assert code == 0
    header, rows = read_rows(samples)
    for column in ("alt_target", "az_target", "alt_mount", "az_mount"):
        assert column in header
    assert "pier_side" not in header or rows[0]["pier_side"] == ""
    row = {k: (v if k in ("time", "name", "pier_side") else float(v))
           for k, v in rows[0].items()}
    # The star's observed place against astropy's AltAz without refraction.
    location = EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                           site.height * u.m)
    when = Time(row["time"].rstrip("Z"), scale="utc")
    there = SkyCoord(ra=ra[0] * u.deg, dec=dec[0] * u.deg).transform_to(
        AltAz(obstime=when, location=location, pressure=0.0 * u.hPa))
    assert row["alt_target"] == pytest.approx(there.alt.deg, abs=1.0 / 3600.0)
    az_off = (row["az_target"] - there.az.deg + 180.0) % 360.0 - 180.0
    assert abs(az_off) * np.cos(np.radians(there.alt.deg)) * 3600.0 < 1.0
    # The axes' altitude and azimuth are their hour angle and declination, by hand.
    alt_m, az_m = hand_altaz(row["ha_mount"], row["dec_mount"], site.latitude)
    assert row["alt_mount"] == pytest.approx(alt_m, abs=1e-6)
    assert row["az_mount"] == pytest.approx(az_m, abs=1e-6)
    # The simulator ends where it was sent: axes and star agree to a few arcsec.
    daz = ((row["az_mount"] - row["az_target"] + 180.0) % 360.0 - 180.0) \
        * np.cos(np.radians(row["alt_target"]))
    assert np.hypot(daz, row["alt_mount"] - row["alt_target"]) * 3600.0 < 10.0
