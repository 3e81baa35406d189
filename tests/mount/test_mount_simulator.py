"""Slew, refuse, abort and lose the connection against a real INDI peer: indiserver running
indi_simulator_telescope (Debian indi-bin) on a loopback port.

The simulator keeps its own clock (the system clock) and site, so each test pushes our site
first and builds its targets for the present instant. Which targets are up, far from the Sun
or near the mount is decided with astropy (AltAz, get_sun); the expected apparent place of
date comes from astropy's TETE frame (true equator and true equinox, geocentric) after
astropy's apply_space_motion: an outside reference, never our own engine.
"""
from __future__ import annotations

import os
import queue
import subprocess
import sys
import threading
import time

import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import AltAz, EarthLocation, SkyCoord, get_sun
from astropy.time import Time

import epochpoint
from epochpoint.cli.main import main
from mount_reference import astropy_apparent, moving_targets
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.mount import InterlockRefused, Telescope, slew_to_target
from epochpoint.mount.telescope import EOD_COORD, angular_distance_arcsec

pytestmark = [pytest.mark.indi,
              pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

# An invented northern site: declinations above +55 never set below 15 deg there and stay
# more than 31 deg from the Sun (whose declination is within +-23.44 deg), at any hour.
SITE = Site(latitude=50.0, longitude=8.0, height=300.0, name="Hollow Ridge (invented)")
SITE_ARG = f"--site={SITE.latitude},{SITE.longitude},{SITE.height}"
LOCATION = EarthLocation.from_geodetic(SITE.longitude * u.deg, SITE.latitude * u.deg,
                                       SITE.height * u.m)
# The brief asks the commanded place to equal the apparent place within 0.5 arcsec and the
# simulated mount to end within a few arcsec of it.
COMMANDED_ARCSEC = 0.5
ARRIVED_ARCSEC = 5.0
SIDEREAL_ARCSEC_PER_S = 15.041  # the sky's turning (common practice)


def _sky_now():
    """The instant, astropy's Sun (GCRS direction) and an AltAz frame without refraction."""
    now = Time.now()
    return now, get_sun(now), AltAz(obstime=now, location=LOCATION)


def _allowed(ra_deg, dec_deg, min_alt_deg=20.0, min_sun_deg=40.0) -> np.ndarray:
    """Which directions astropy finds well up and well away from the Sun now."""
    now, sun, altaz = _sky_now()
    coords = SkyCoord(ra=np.atleast_1d(ra_deg) * u.deg, dec=np.atleast_1d(dec_deg) * u.deg)
    alt = coords.transform_to(altaz).alt.deg
    sun_sep = coords.separation(SkyCoord(ra=sun.ra, dec=sun.dec)).deg
    return (alt > min_alt_deg) & (sun_sep > min_sun_deg)


def _mount_place(scope):
    status = scope.status()
    return status.ra_deg, status.dec_deg


def _pick(scope, dec_deg, nearest: bool):
    """An allowed right ascension at dec_deg, nearest to (or farthest from) the mount."""
    grid_ra = np.arange(0.0, 360.0, 10.0)
    dec = np.full(grid_ra.shape, dec_deg)
    ok = _allowed(grid_ra, dec)
    assert ok.any(), "no allowed direction on the grid"
    mount_ra, mount_dec = _mount_place(scope)
    distance = np.array([angular_distance_arcsec(r, d, mount_ra, mount_dec)
                         for r, d in zip(grid_ra, dec)])
    distance[~ok] = np.nan
    row = np.nanargmin(distance) if nearest else np.nanargmax(distance)
    return float(grid_ra[row]), float(distance[row] / 3600.0)


# A moving invented star, so the check covers space motion, parallax and aberration.
def test_slew_sends_the_apparent_place_and_the_mount_arrives(indi_server):
    with Telescope.open(indi_server.address) as scope:
        scope.push_site(SITE)
        status = scope.status()
        assert status.latitude == pytest.approx(SITE.latitude, abs=1e-6)
        assert status.longitude == pytest.approx(SITE.longitude, abs=1e-6)
        # Targets for this instant around the sky at +80; take the allowed one nearest the
        # mount for a quick slew.
        ra, distance_deg = _pick(scope, 80.0, nearest=True)
        targets = moving_targets([ra, (ra + 120) % 360, (ra + 240) % 360], [80.0] * 3,
                           ["Near", "Other1", "Other2"])
        started = time.monotonic()
        report = slew_to_target(scope, targets, SITE, "Near", wait=True, timeout_s=40.0,
                                tolerance_arcsec=2.0)
        elapsed = time.monotonic() - started
        echoed = scope.status()
    assert report.coordinate_property == EOD_COORD
    # What the device took (TARGET_EOD_COORD) against astropy's apparent place of date.
    expected_ra, expected_dec = astropy_apparent(ra, 80.0, report.pointing.time)
    commanded_off = angular_distance_arcsec(echoed.target_ra_deg, echoed.target_dec_deg,
                                            expected_ra, expected_dec)
    assert commanded_off < COMMANDED_ARCSEC, f"commanded {commanded_off:.3f} arcsec off"
    # Where the simulated mount says it ended, against the commanded place.
    ended_off = angular_distance_arcsec(report.reported_ra_deg, report.reported_dec_deg,
                                        report.commanded_ra_deg, report.commanded_dec_deg)
    assert ended_off < ARRIVED_ARCSEC and report.residual_arcsec < ARRIVED_ARCSEC
    print(f"\nslew of {distance_deg:.1f} deg in {elapsed:.1f} s; commanded vs astropy "
          f"{commanded_off:.4f} arcsec; first residual {report.first_residual_arcsec:.2f}, "
          f"final {report.residual_arcsec:.2f} arcsec (refined: {report.refined})")


def test_sync_sets_the_device_coordinates_without_a_slew(indi_server):
    with Telescope.open(indi_server.address) as scope:
        scope.push_site(SITE)
        ra, _ = _pick(scope, 75.0, nearest=True)
        targets = moving_targets([ra], [75.0], ["Synced"])
        serial_before = scope.client.last_serial
        report = slew_to_target(scope, targets, SITE, "Synced", sync=True, wait=True,
                                timeout_s=10.0)
        states = scope.client.states_since(scope.device, EOD_COORD, serial_before)
    assert report.action == "sync" and not report.refined
    assert "Busy" not in states  # a sync moves nothing
    assert report.residual_arcsec < ARRIVED_ARCSEC, report


def _forbidden(kind: str) -> Targets:
    now, sun, _ = _sky_now()
    if kind == "below the horizon":
        # Dec -60 never rises at latitude +50, and stays over 36 deg from the Sun.
        return moving_targets([float(sun.ra.deg + 180.0) % 360.0], [-60.0], ["Under"])
    return moving_targets([float(sun.ra.deg)], [float(sun.dec.deg) + 5.0], ["Under"])


@pytest.mark.parametrize("sync", [False, True], ids=["slew", "sync"])
@pytest.mark.parametrize("kind", ["below the horizon", "near the Sun"])
def test_forbidden_targets_are_refused_and_nothing_moves(indi_server, kind, sync):
    targets = _forbidden(kind)
    with Telescope.open(indi_server.address) as scope:
        scope.push_site(SITE)
        sent_before = len(scope.client.sent())
        serial_before = scope.client.last_serial
        before, t_before = scope.status(), time.monotonic()
        with pytest.raises(InterlockRefused) as refused:
            slew_to_target(scope, targets, SITE, "Under", sync=sync, wait=True)
        time.sleep(1.0)
        after, t_after = scope.status(), time.monotonic()
        commands = [s for s in scope.client.sent()[sent_before:] if s[0].startswith("new")]
        states = scope.client.states_since(scope.device, EOD_COORD, serial_before)
    assert ("Sun" if kind == "near the Sun" else "altitude") in refused.value.reason
    assert commands == [], f"sent {commands}"
    assert "Busy" not in states
    assert (after.target_ra_deg, after.target_dec_deg) == (before.target_ra_deg,
                                                          before.target_dec_deg)
    # Unchanged: the declination stays put, right ascension moves no faster than the sky
    # turns (it stays fixed when the mount tracks).
    assert abs(after.dec_deg - before.dec_deg) * 3600.0 < 1.0
    ra_moved_arcsec = abs((after.ra_deg - before.ra_deg + 180.0) % 360.0 - 180.0) * 3600.0
    assert ra_moved_arcsec <= SIDEREAL_ARCSEC_PER_S * (t_after - t_before) + 1.0


def test_refusal_from_the_command_line_exits_3_without_contact(indi_server, tmp_path, capsys):
    now, sun, _ = _sky_now()
    path = tmp_path / "targets.csv"
    path.write_text(f"name,ra,dec,epoch\nUnder,{float(sun.ra.deg + 180.0) % 360.0!r},-60.0,2000.0\n")
    code = main(["mount", "slew", "Under", "--targets", str(path), SITE_ARG,
                 "--indi", indi_server.address, "--wait"])
    out, err = capsys.readouterr()
    assert code == 3
    assert err.count("\n") == 1 and "refused" in err and "Traceback" not in err
    assert "Caution" not in out  # no motion, so no caution line either


def test_abort_stops_a_slew(indi_server):
    # As a GUI does it: the slew waits in a worker thread, the abort comes from another.
    with Telescope.open(indi_server.address) as scope:
        scope.push_site(SITE)
        ra, distance_deg = _pick(scope, 60.0, nearest=False)
        assert distance_deg > 20.0, "no long slew available from here"
        targets = moving_targets([ra], [60.0], ["Far"])
        outcome = {}

        def worker():
            try:
                outcome["report"] = slew_to_target(scope, targets, SITE, "Far", wait=True,
                                                   timeout_s=60.0)
            except Exception as err:  # reported by the assertion below
                outcome["error"] = err

        thread = threading.Thread(target=worker)
        thread.start()
        scope.client.wait_for(lambda: scope.status().motion_state == "Busy", 5.0, "the slew")
        time.sleep(1.0)
        assert scope.status().motion_state == "Busy"  # still on its way
        sent_before_abort = len(scope.client.sent())
        state = scope.abort()
        thread.join(timeout=10.0)
        first, t_first = scope.status(), time.monotonic()
        time.sleep(1.5)
        second, t_second = scope.status(), time.monotonic()
        after_abort = [s[0] for s in scope.client.sent()[sent_before_abort:]]
    assert not thread.is_alive() and "error" not in outcome, outcome
    report = outcome["report"]
    assert report.aborted and not report.refined
    assert after_abort == ["newSwitchVector"]  # the abort itself, and no motion after it
    assert state != "Busy" and second.motion_state != "Busy"
    assert abs(second.dec_deg - first.dec_deg) * 3600.0 < 1.0
    ra_moved_arcsec = abs((second.ra_deg - first.ra_deg + 180.0) % 360.0 - 180.0) * 3600.0
    assert ra_moved_arcsec <= SIDEREAL_ARCSEC_PER_S * (t_second - t_first) + 1.0
    # It stopped short of the target.
    assert angular_distance_arcsec(second.ra_deg, second.dec_deg, report.commanded_ra_deg,
                                   report.commanded_dec_deg) > 3600.0


def test_status_and_abort_from_the_command_line(indi_server, capsys):
    with Telescope.open(indi_server.address) as scope:
        scope.push_site(SITE)
    code = main(["mount", "status", "--indi", indi_server.address, SITE_ARG])
    out, err = capsys.readouterr()
    assert code == 0, err
    # The device's site and clock beside ours (the site was pushed: they agree).
    device_site = next(line for line in out.splitlines() if line.startswith("Device site"))
    our_site = next(line for line in out.splitlines() if line.startswith("Our site"))
    assert device_site.split(None, 2)[2] == our_site.split(None, 2)[2]
    assert "Device clock" in out and "Our clock" in out and "EQUATORIAL_EOD_COORD" not in err
    code = main(["mount", "abort", "--indi", indi_server.address])
    out, err = capsys.readouterr()
    assert code == 0 and "Abort sent" in out, err


def _line_reader(stream, lines: queue.Queue):
    for line in stream:
        lines.put(line)
    lines.put(None)


def test_server_gone_mid_slew_is_reported_cleanly(fresh_indi_server, tmp_path):
    with Telescope.open(fresh_indi_server.address) as scope:
        scope.push_site(SITE)
        ra, distance_deg = _pick(scope, 60.0, nearest=False)
    assert distance_deg > 20.0, "no long slew available from here"
    path = tmp_path / "targets.csv"
    path.write_text(f"name,ra,dec,epoch\nFar,{ra!r},60.0,2000.0\n")
    app_dir = os.path.dirname(os.path.dirname(epochpoint.__file__))
    env = dict(os.environ, PYTHONPATH=app_dir + os.pathsep + os.environ.get("PYTHONPATH", ""))
    process = subprocess.Popen(
        [sys.executable, "-m", "epochpoint.cli.main", "mount", "slew", "Far", "--targets",
         str(path), SITE_ARG, "--indi", fresh_indi_server.address, "--wait", "--timeout", "60",
         "--push-site"],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env)
    lines: queue.Queue = queue.Queue()
    threading.Thread(target=_line_reader, args=(process.stdout, lines), daemon=True).start()
    seen = []
    deadline = time.monotonic() + 30.0
    while not any(line.startswith("Slew Far") for line in seen):
        line = lines.get(timeout=max(0.1, deadline - time.monotonic()))
        assert line is not None, f"the command ended early: {''.join(seen)}"
        seen.append(line)
    time.sleep(1.0)  # mid-slew
    fresh_indi_server.kill()
    try:
        process.wait(timeout=20)
    finally:
        process.kill()
    err = process.stderr.read()
    assert process.returncode == 4, err
    assert err.count("\n") == 1 and "Traceback" not in err
    assert "connection" in err and "may still be moving" in err
