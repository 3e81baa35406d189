"""`epochpoint mount slew` and the solar option: without it the Sun is refused before any
connection (exit 3, nothing sent, no caution); with --solar-filter-fitted, or the site file's
[safety] solar_filter_fitted = true, the slew is sent and the solar caution is said on stderr
before anything else, then again by the mount's own report (stdout).

The peer is the scripted loopback INDI server of scripted_peer.py. The site is invented and
put under the Sun now by astropy's built-in ephemeris (body_sites.site_under); the place sent
is checked against the Sun's topocentric apparent place of date from DE421 through astropy
(body_sites.reference_apparent), within the 60 arcsec the slew's end-time estimate allows
(the Sun moves about 0.04 arcsec per second against the stars; the place is taken at the
estimated end).
"""
from __future__ import annotations

import time

import pytest
from astropy.time import Time

from body_sites import reference_apparent, separation_arcsec, site_under
from epochpoint.cli.main import main
from epochpoint.core.limits import SOLAR_CAUTION
from scripted_peer import ScriptedPeer, definitions

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


@pytest.fixture
def sun_now(tmp_path):
    """(site option text, site file with the solar option on, target list, peer)."""
    now = Time.now()
    site = site_under("sun", now)
    ra_ref, dec_ref = reference_apparent("sun", site, now)
    peer = ScriptedPeer(definitions(ra_h=ra_ref / 15.0, dec_deg=dec_ref, track_state=True))
    listing = tmp_path / "day.csv"
    listing.write_text("name,ra,dec,body\nSol,,,sun\n")
    site_file = tmp_path / "site.toml"
    site_file.write_text(f"[site]\nlatitude = {float(site.latitude)!r}\nlongitude = "
                         f"{float(site.longitude)!r}\nheight = 0.0\n"
                         "timezone = \"UTC\"\n\n[safety]\nsolar_filter_fitted = true\n")
    option = f"--site={float(site.latitude)!r},{float(site.longitude)!r},0"
    yield option, str(site_file), str(listing), peer, site
    peer.close()


def test_the_sun_is_refused_before_any_connection_without_the_option(sun_now, capsys):
    option, _, listing, peer, _ = sun_now
    code = main(["mount", "slew", listing, "Sol", option, "--pressure", "0",
                 "--indi", peer.address])
    out, err = capsys.readouterr()
    assert code == 3, err
    assert "no solar filter declared fitted" in err and "CAUTION" not in out + err
    time.sleep(0.2)
    assert peer.connections == 0 and peer.coordinates_sent() == []


@pytest.mark.parametrize("how", ["flag", "site file"])
def test_the_sun_is_slewed_to_with_the_caution_when_the_option_is_on(sun_now, capsys, how):
    option, site_file, listing, peer, site = sun_now
    where = [option, "--pressure", "0", "--solar-filter-fitted"] if how == "flag" else \
        ["--site", site_file, "--pressure", "0"]
    code = main(["mount", "slew", listing, "Sol", *where, "--indi", peer.address])
    out, err = capsys.readouterr()
    assert code == 0, err
    assert err.count(SOLAR_CAUTION) == 1 and SOLAR_CAUTION in out
    sent = peer.coordinates_sent()
    assert sent, out
    values = {one.get("name"): float(one.text) for one in sent[0]}
    ra_ref, dec_ref = reference_apparent("sun", site, Time.now())
    assert separation_arcsec(values["RA"] * 15.0, values["DEC"], ra_ref, dec_ref) < 60.0
