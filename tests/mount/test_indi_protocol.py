"""The INDI client against a scripted loopback peer: the XML it writes and reads, a J2000-only
mount, and a peer that talks nonsense. No indiserver needed.

Reference: INDI protocol 1.7 (E. C. Downey, "INDI: Instrument-Neutral Distributed Interface",
2007): element names (getProperties, defNumberVector/defNumber, setNumberVector/oneNumber,
newNumberVector/oneNumber, newSwitchVector/oneSwitch), attributes (device, name, state,
perm, rule), switch values On/Off and sexagesimal numbers. Expected J2000 places come from
astropy (apply_space_motion, the Earth's barycentric position from get_body_barycentric,
FK5 at equinox J2000.0), never from our engine.
"""
from __future__ import annotations

import socket
import time

import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import (FK5, CartesianRepresentation, Distance, SkyCoord,
                                 get_body_barycentric)
from astropy.time import Time

from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.mount import ConnectionLost, IndiClient, Telescope, slew_to_target
from epochpoint.mount.indi_client import parse_address, parse_number
from epochpoint.mount.telescope import J2000_COORD, angular_distance_arcsec
from scripted_peer import DEVICE, ScriptedPeer, definitions

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

# A J2000-only mount that slews or syncs (no TRACK mode).
DEFINITIONS = definitions(coords="EQUATORIAL_COORD", modes=("SLEW", "SYNC"))


@pytest.fixture
def peer():
    scripted = ScriptedPeer(DEFINITIONS)
    yield scripted
    scripted.close()


def test_numbers_and_addresses():
    # INDI 1.7 sec. 4: numbers may be sexagesimal with ':' or ' ' (or ';') separators.
    assert parse_number("-10:30:00") == -10.5
    assert parse_number("12 30") == 12.5
    assert parse_number(" 1:30:36 ") == pytest.approx(1.51)
    assert parse_number("3.25e1") == 32.5
    assert np.isnan(parse_number("north"))
    assert parse_address("localhost:7625") == ("localhost", 7625)
    assert parse_address("[::1]:7000") == ("::1", 7000)
    assert parse_address("mount.local") == ("mount.local", 7624)
    with pytest.raises(ValueError):
        parse_address("host:99999")


def test_client_reads_definitions_and_writes_new_vectors(peer):
    with IndiClient("127.0.0.1", peer.port) as client:
        coords = client.wait_for(lambda: client.vector(DEVICE, "EQUATORIAL_COORD"), 5.0,
                                 "the definitions")
        assert coords.values == {"RA": 1.5, "DEC": -10.5} and coords.perm == "rw"
        assert client.vector(DEVICE, "CONNECTION").values["CONNECT"] is True
        client.send_new(DEVICE, "ON_COORD_SET", {"SLEW": False, "SYNC": True})
        deadline = time.monotonic() + 5.0
        while len(peer.received) < 2 and time.monotonic() < deadline:
            time.sleep(0.01)
    ask, switch = peer.received[:2]
    assert ask.tag == "getProperties" and ask.get("version") == "1.7"
    assert switch.tag == "newSwitchVector" and switch.get("device") == DEVICE
    assert [(one.tag, one.get("name"), one.text) for one in switch] == [
        ("oneSwitch", "SLEW", "Off"), ("oneSwitch", "SYNC", "On")]


def test_a_j2000_only_mount_gets_the_geocentric_astrometric_place(peer):
    site = Site(latitude=-31.0, longitude=-69.5, height=2400.0, name="invented")
    # Pick a declination the site sees now: the zenith's, at the local sidereal time.
    now = Time.now()
    lst_deg = now.sidereal_time("apparent", longitude=site.longitude * u.deg).deg
    star = dict(ra=lst_deg, dec=-31.0, pm_ra_cosdec=900.0, pm_dec=-700.0, parallax=120.0,
                radial_velocity=30.0)
    targets = Targets.from_columns(epoch=2016.0, name=["Overhead"],
                                   **{k: [v] for k, v in star.items()})
    with Telescope.open(f"127.0.0.1:{peer.port}", timeout_s=5.0) as scope:
        report = slew_to_target(scope, targets, site, "Overhead", wait=True, timeout_s=5.0,
                                tolerance_arcsec=2.0)
    assert report.coordinate_property == J2000_COORD
    sent = [e for e in peer.received if e.tag == "newNumberVector"][-1]
    values = {one.get("name"): float(one.text) for one in sent}
    # astropy: propagate, look from the geocentre, express on FK5 J2000.0 axes.
    when = Time(report.pointing.time.rstrip("Z"), scale="utc")
    moved = SkyCoord(ra=star["ra"] * u.deg, dec=star["dec"] * u.deg,
                     pm_ra_cosdec=star["pm_ra_cosdec"] * u.mas / u.yr,
                     pm_dec=star["pm_dec"] * u.mas / u.yr,
                     distance=Distance(parallax=star["parallax"] * u.mas),
                     radial_velocity=star["radial_velocity"] * u.km / u.s,
                     obstime=Time(2016.0, format="jyear", scale="tdb")
                     ).apply_space_motion(new_obstime=when)
    earth = get_body_barycentric("earth", when)
    geocentric = moved.cartesian.without_differentials() - earth
    expected = SkyCoord(CartesianRepresentation(geocentric.xyz), frame="icrs").transform_to(
        FK5(equinox="J2000"))
    off = angular_distance_arcsec(values["RA"] * 15.0, values["DEC"], expected.ra.deg,
                                  expected.dec.deg)
    # FK5 J2000 and the IAU 2006 mean J2000 differ by some 10-20 mas (frame bias models).
    print(f"\nJ2000 command vs astropy FK5 J2000: {off:.4f} arcsec")
    assert off < 0.05, f"{off:.4f} arcsec"
    assert report.residual_arcsec < 0.01 and report.final_state == "Ok"


def test_nonsense_from_the_peer_is_a_lost_connection():
    scripted = ScriptedPeer("<defNumberVector device='x' name='y'><oops></def>")
    try:
        with IndiClient("127.0.0.1", scripted.port) as client:
            with pytest.raises(ConnectionLost, match="malformed XML"):
                client.wait_for(lambda: False, 5.0, "anything")
    finally:
        scripted.close()


def test_nobody_listening_is_a_lost_connection():
    with socket.create_server(("127.0.0.1", 0)) as probe:
        port = probe.getsockname()[1]
    with pytest.raises(ConnectionLost, match="cannot reach"):
        IndiClient("127.0.0.1", port, connect_timeout_s=2.0).open()
