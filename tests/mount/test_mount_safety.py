"""Safety at the mount under races and faults, against the scripted INDI peer (scripted_peer.py).

Each test shows one defect of the earlier code (it failed there) and the behaviour now:
an abort latches, even one that arrives while the interlocks are computed; a refused mode
switch stops the command; a byte that is not UTF-8 neither loses the connection nor blocks an
abort; the interlocks hold at the end of the slew and along the track, and a watch stops the
tracking mount before a limit; the device's clock is compared with ours.

Outside references: target places are made with astropy (AltAz with refraction from the
site's weather, TETE for the apparent place of date, get_sun for the night side), never with
our engine. The sidereal rate, 15.041 arcsec per second, is common practice.
"""
from __future__ import annotations

import re
import threading
import time
from datetime import datetime, timedelta, timezone

import pytest
from astropy import units as u
from astropy.coordinates import ICRS, TETE, AltAz, EarthLocation, SkyCoord, get_sun
from astropy.time import Time, TimeDelta

from epochpoint.core.context import make_context
from epochpoint.core.limits import Interlocks, MountLimits
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.mount import (ConnectionLost, InterlockRefused, MountFailed, Telescope,
                              slew_to_target)
from epochpoint.mount import telescope as telescope_module
from scripted_peer import DEVICE, ScriptedPeer, definitions

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

SIDEREAL_ARCSEC_PER_S = 15.041  # common practice


def night_site(min_altitude: float = 10.0, settle: float = 10.0) -> Site:
    """A site under the anti-solar point now (astropy's Sun and sidereal time): the Sun is
    near the nadir, so every target above the horizon is far from it."""
    now = Time.now()
    sun = get_sun(now)
    ra, dec = (sun.ra.deg + 180.0) % 360.0, -sun.dec.deg
    gmst = now.sidereal_time("mean", longitude=0.0 * u.deg).deg
    longitude = (ra - gmst + 180.0) % 360.0 - 180.0
    limits = MountLimits(min_altitude=min_altitude, slew_rate=3.0, settle=settle)
    return Site(latitude=dec, longitude=longitude, height=0.0, name="invented",
                timezone="UTC", interlocks=Interlocks(mount=limits))


def _altaz_frame(site: Site, when: Time) -> AltAz:
    location = EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                           site.height * u.m)
    return AltAz(obstime=when, location=location, pressure=site.pressure * u.hPa,
                 temperature=site.temperature * u.deg_C, relative_humidity=site.humidity,
                 obswl=site.wavelength * u.micron)


def star_at(site: Site, alt_deg: float, az_deg: float, name: str = "Star"):
    """(Targets, apparent RA hours, apparent Dec) of a fixed star at refracted altitude alt_deg
    and azimuth az_deg now (astropy AltAz -> ICRS; TETE for the place of date)."""
    now = Time.now()
    there = SkyCoord(alt=alt_deg * u.deg, az=az_deg * u.deg, frame=_altaz_frame(site, now))
    icrs = there.transform_to(ICRS())
    tete = icrs.transform_to(TETE(obstime=now))
    targets = Targets.from_columns(ra=[icrs.ra.deg], dec=[icrs.dec.deg], name=[name],
                                   epoch=2016.0)
    return targets, tete.ra.hour, tete.dec.deg


def index_of(peer: ScriptedPeer, name: str) -> int:
    return next(i for i, e in enumerate(peer.received) if e.get("name") == name)


@pytest.fixture
def peers():
    made = []

    def make(*args, **kwargs) -> ScriptedPeer:
        made.append(ScriptedPeer(*args, **kwargs))
        return made[-1]

    yield make
    for peer in made:
        peer.close()


# -- 1. An abort latches ------------------------------------------------------------------

def _abort_during_check(monkeypatch, scope, on_call: int):
    """Make call number on_call of the interlock check send an abort from another thread,
    as a GUI's ABORT button would, and finish the check only once the abort was sent."""
    calls = {"n": 0}
    real = telescope_module.checked_pointing

    def checked(*args, **kwargs):
        calls["n"] += 1
        if calls["n"] == on_call:
            pressed = threading.Thread(target=scope.abort)
            pressed.start()
            pressed.join(5.0)
        return real(*args, **kwargs)

    monkeypatch.setattr(telescope_module, "checked_pointing", checked)


def test_an_abort_during_the_first_interlock_check_stops_the_slew(peers, monkeypatch):
    site = night_site()
    targets, _, _ = star_at(site, 60.0, 90.0)
    peer = peers()
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        _abort_during_check(monkeypatch, scope, on_call=1)
        report = slew_to_target(scope, targets, site, "Star", wait=True, timeout_s=5.0)
    abort_at = index_of(peer, "TELESCOPE_ABORT_MOTION")
    after = [e.get("name") for e in peer.received[abort_at + 1:] if e.tag.startswith("new")]
    assert after == [], f"sent after the abort: {after}"
    assert peer.coordinates_sent() == [] and report.aborted


def test_an_abort_during_the_refining_check_stops_the_refining_slew(peers, monkeypatch):
    site = night_site()
    targets, _, _ = star_at(site, 60.0, 90.0)
    peer = peers(arrive_off_deg=0.01)  # the first slew ends 36 arcsec off: a refinement
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        _abort_during_check(monkeypatch, scope, on_call=2)
        report = slew_to_target(scope, targets, site, "Star", wait=True, timeout_s=5.0)
    abort_at = index_of(peer, "TELESCOPE_ABORT_MOTION")
    after = [e.get("name") for e in peer.received[abort_at + 1:] if e.tag.startswith("new")]
    assert len(peer.coordinates_sent()) == 1 and after == []
    assert report.aborted and not report.refined


def test_an_abort_pressed_before_the_worker_starts_latches(peers):
    site = night_site()
    targets, _, _ = star_at(site, 60.0, 90.0)
    peer = peers()
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        token = scope.begin_command()  # the user confirmed the slew ...
        scope.latch_abort()  # ... and pressed ABORT before the worker thread ran
        report = slew_to_target(scope, targets, site, "Star", wait=True, timeout_s=5.0,
                                token=token)
        # A new command from the user moves again.
        moved = slew_to_target(scope, targets, site, "Star", wait=True, timeout_s=5.0)
    assert report.aborted and moved.final_state == "Ok" and not moved.aborted
    assert len(peer.coordinates_sent()) == 1


# -- 2. A refused mode switch stops the command -------------------------------------------

def test_a_refused_track_mode_is_not_turned_into_a_sync(peers):
    site = night_site()
    targets, _, _ = star_at(site, 60.0, 90.0)
    # The device is in SYNC and answers a switch to TRACK with Alert, staying in SYNC.
    peer = peers(definitions(modes=("SYNC", "TRACK", "SLEW")), refuse_mode=True)
    peer.mode = "SYNC"
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        with pytest.raises(MountFailed, match="refused ON_COORD_SET TRACK") as caught:
            slew_to_target(scope, targets, site, "Star", wait=True, timeout_s=5.0)
    assert "\n" not in str(caught.value)
    assert peer.coordinates_sent() == [], "coordinates reached a device left in SYNC"


# -- 3. A byte that is not UTF-8 ----------------------------------------------------------

def test_a_latin1_byte_keeps_the_connection_and_the_abort(peers):
    peer = peers()
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        # A Latin-1 degree sign (0xB0) inside a message attribute.
        peer.send_raw(f'<message device="{DEVICE}" message="Dome at 12\xb0 C"/>'
                      .encode("latin-1"))
        scope.client.wait_for(lambda: any("Dome at 12" in m for m in scope.client.messages()),
                              5.0, "the message")
        assert scope.client.lost is None
        state = scope.abort()
        assert any("\ufffd" in m for m in scope.client.messages())
        assert any("not UTF-8" in m for m in scope.client.messages())
    # The peer reads on its own thread: give it a moment to take the abort off the socket.
    deadline = time.monotonic() + 5.0
    while peer.aborts() == 0 and time.monotonic() < deadline:
        time.sleep(0.02)
    assert peer.aborts() == 1 and state == "Idle"


def test_an_abort_is_written_even_after_the_stream_broke(peers):
    peer = peers()
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        peer.send_raw(b"<setNumberVector device='x'><oops></setNumberVector>")
        assert peer.wait_until(lambda: scope.client.lost is not None)
        with pytest.raises(ConnectionLost, match="ABORT was sent"):
            scope.abort()
        assert peer.wait_until(lambda: peer.aborts() == 1)


# -- 4. The interlocks over the slew and the track ----------------------------------------

def test_track_refusal_finds_the_setting_time_astropy_finds():
    site = night_site(min_altitude=12.0)
    targets, _, _ = star_at(site, 12.5, 260.0)
    now = Time.now()
    star = SkyCoord(ra=targets.ra[0] * u.deg, dec=targets.dec[0] * u.deg)
    # astropy: the refracted altitude crosses 12 deg; bisect over two minutes.
    lo, hi = 0.0, 600.0
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        when = now + TimeDelta(mid, format="sec")
        alt = star.transform_to(_altaz_frame(site, when)).alt.deg
        lo, hi = (mid, hi) if alt >= 12.0 else (lo, mid)
    from epochpoint.core.positions import positions
    from epochpoint.core.track import track_refusal  # new with this check

    place = positions(targets, site, now)
    at_s, why = track_refusal(float(place["ra_apparent"][0]), float(place["dec_apparent"][0]),
                              site, make_context(now, site), 0.0, 600.0)
    print(f"\nastropy crossing {hi:.1f} s, track_refusal {at_s:.1f} s")
    assert "minimum altitude" in why
    assert abs(at_s - hi) <= 2.0  # a one-second step plus refraction models' difference


def test_a_target_that_sets_during_the_slew_is_refused(peers):
    site = night_site(min_altitude=12.0, settle=10.0)
    # 0.03 deg above the limit and setting: below it within the 10 s settle alone.
    targets, _, _ = star_at(site, 12.03, 260.0, "Setting")
    peer = peers()
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        with pytest.raises(InterlockRefused, match="by the end of the slew"):
            slew_to_target(scope, targets, site, "Setting", wait=True, timeout_s=5.0)
    assert not [e for e in peer.received if e.tag.startswith("new")]


def test_a_target_that_sets_during_the_track_is_refused_and_a_short_track_is_not(peers):
    site = night_site(min_altitude=12.0, settle=2.0)
    targets, ra_h, dec = star_at(site, 13.0, 260.0, "Low")
    peer = peers(definitions(ra_h=ra_h, dec_deg=dec))  # the mount is already there
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        with pytest.raises(InterlockRefused, match="min into the 10 min track"):
            slew_to_target(scope, targets, site, "Low", wait=True, timeout_s=5.0)
        assert peer.coordinates_sent() == []
        report = slew_to_target(scope, targets, site, "Low", wait=True, timeout_s=5.0,
                                track_s=60.0)
    assert report.final_state == "Ok" and len(peer.coordinates_sent()) == 1


@pytest.mark.parametrize("at_limit, sent", [("stop-tracking", "TELESCOPE_TRACK_STATE"),
                                            ("abort", "TELESCOPE_ABORT_MOTION")])
def test_the_watch_stops_the_mount_before_the_limit(peers, at_limit, sent):
    from epochpoint.mount import watch_track

    site = night_site(min_altitude=12.0)
    targets, ra_h, dec = star_at(site, 12.05, 260.0, "Setting")
    peer = peers(definitions(ra_h=ra_h, dec_deg=dec, track_state=True))
    said = []
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        why = watch_track(scope, targets, site, "Setting", seconds=5.0, at_limit=at_limit,
                          notify=said.append)
    assert why.startswith("stopped at the limit") and "minimum altitude" in why
    assert peer.wait_until(lambda: peer.named(sent))
    if at_limit == "stop-tracking":
        values = {one.get("name"): one.text for one in peer.named(sent)[0]}
        assert values == {"TRACK_ON": "Off", "TRACK_OFF": "On"}
    assert peer.coordinates_sent() == [] and said and "minimum altitude" in said[0]


def test_the_watch_leaves_a_safe_track_alone(peers):
    from epochpoint.mount import watch_track

    site = night_site()
    targets, ra_h, dec = star_at(site, 60.0, 90.0, "High")
    peer = peers(definitions(ra_h=ra_h, dec_deg=dec, track_state=True))
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        sent_before = len(peer.received)
        why = watch_track(scope, targets, site, "High", seconds=2.5, poll_s=0.5)
    assert why == "the watch ran its time" and len(peer.received) == sent_before


# -- 5. Clocks ----------------------------------------------------------------------------

def _utc(offset_s: float, fraction: bool) -> str:
    moment = datetime.now(timezone.utc) + timedelta(seconds=offset_s)
    return moment.strftime("%Y-%m-%dT%H:%M:%S.%f")[:-3] if fraction else \
        moment.strftime("%Y-%m-%dT%H:%M:%S")


def test_a_device_clock_ten_seconds_off_is_refused_before_anything_is_sent(peers):
    site = night_site()
    targets, _, _ = star_at(site, 60.0, 90.0)
    peer = peers(definitions(time_utc=_utc(10.0, fraction=False)))
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        with pytest.raises(InterlockRefused, match="clock") as caught:
            slew_to_target(scope, targets, site, "Star", wait=True, timeout_s=5.0)
    # Whole seconds: the device's value is read at the middle of its second.
    offset = float(re.search(r"by ([+-][\d.]+) s", str(caught.value)).group(1))
    assert 9.4 < offset < 10.6
    assert not [e for e in peer.received if e.tag.startswith("new")]


def test_a_clock_half_a_second_off_is_sent_with_a_caution(peers):
    site = night_site()
    targets, _, _ = star_at(site, 60.0, 90.0)
    peer = peers(definitions(time_utc=_utc(0.5, fraction=True)))
    said = []
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        report = slew_to_target(scope, targets, site, "Star", wait=True, timeout_s=5.0,
                                notify=said.append)
    cautions = [line for line in said if "clock" in line]
    assert report.final_state == "Ok" and len(cautions) == 1, said
    offset = float(re.search(r"by ([+-][\d.]+) s", cautions[0]).group(1))
    arcsec = float(re.search(r"about (\d+) arcsec", cautions[0]).group(1))
    assert 0.3 < offset <= 0.5  # less the time the definitions took to arrive
    # Hour angle at 15.041 arcsec per second of clock.
    assert abs(arcsec - offset * SIDEREAL_ARCSEC_PER_S) <= 0.6


def test_push_site_sends_the_clock_to_the_millisecond(peers):
    site = night_site()
    peer = peers(definitions(time_utc=_utc(0.0, fraction=False)))
    with Telescope.open(peer.address, timeout_s=5.0) as scope:
        scope.push_site(site)
        after = datetime.now(timezone.utc)
        sent = {one.get("name"): one.text for one in peer.named("TIME_UTC")[-1]}
        assert re.fullmatch(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}", sent["UTC"]), sent
        moment = datetime.fromisoformat(sent["UTC"]).replace(tzinfo=timezone.utc)
        assert 0.0 <= (after - moment).total_seconds() < 0.5
        # The device echoed our clock: it now agrees with ours to the millisecond.
        offset, doubt = scope.clock_offset()
    assert abs(offset) < 0.1 and doubt < 0.01


def test_a_sync_never_says_the_mount_is_about_to_move(peers):
    """A sync only tells the mount where it points; the motion caution is for slews (issue:
    the caution once, and never on a sync)."""
    site = night_site()
    targets, _, _ = star_at(site, 60.0, 90.0)
    for sync, expected in ((True, 0), (False, 1)):
        peer = peers(definitions(time_utc=_utc(0.0, fraction=True)))
        said = []
        with Telescope.open(peer.address, timeout_s=5.0) as scope:
            slew_to_target(scope, targets, site, "Star", sync=sync, wait=not sync,
                           timeout_s=5.0, track_s=60.0, notify=said.append)
        moving = [line for line in said if "about to move" in line]
        assert len(moving) == expected, (sync, said)
