"""The mount panel against a real INDI peer: indiserver running indi_simulator_telescope
(Debian indi-bin) on a loopback port, started by the fixtures of tests/mount/conftest.py.

Checked: connecting fills the device list and the status box; targets the interlocks refuse
keep Slew and Sync disabled with the reason; the confirmation states the coordinates to be
sent and the caution, and only then does the mount move; the slew report; a sync; ABORT (the
Esc key) during a slew; a server that dies mid-slew; a placeholder site.

Outside references (tests only): astropy decides which targets are up or near the Sun (AltAz,
get_sun) and gives the apparent place of date (apply_space_motion, then TETE) and the
refracted altitude/azimuth the confirmation must state; the simulator reports what it
received (TARGET_EOD_COORD) and how it moves.
"""
from __future__ import annotations

import importlib.util
import re
import sys
import threading
import time
from pathlib import Path

import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import AltAz, EarthLocation, SkyCoord, get_sun
from astropy.time import Time
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QDialog

from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.gui.panels.mount_panel import ConfirmMotionDialog, MountPanel
from epochpoint.mount import CAUTION
from epochpoint.mount.telescope import angular_distance_arcsec
from mount_reference import astropy_altaz, astropy_apparent, moving_targets


def _mount_fixtures():
    """tests/mount/conftest.py as a module of its own (its name would clash with ours)."""
    path = Path(__file__).resolve().parents[1] / "mount" / "conftest.py"
    name = "mount_indi_fixtures"
    if name not in sys.modules:
        spec = importlib.util.spec_from_file_location(name, path)
        sys.modules[name] = importlib.util.module_from_spec(spec)
        spec.loader.exec_module(sys.modules[name])
    return sys.modules[name]


_indi = _mount_fixtures()
indi_server, fresh_indi_server = _indi.indi_server, _indi.fresh_indi_server

pytestmark = [pytest.mark.indi,
              pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

# An invented northern site; declinations above +55 stay more than 15 deg up and 31 deg from
# the Sun there at any hour.
SITE = Site(latitude=50.0, longitude=8.0, height=300.0, name="Hollow Ridge (invented)")
LOCATION = EarthLocation.from_geodetic(SITE.longitude * u.deg, SITE.latitude * u.deg,
                                       SITE.height * u.m)
WAIT_MS = 20_000
SLEW_MS = 40_000
# The confirmation rounds RA to 0.01 s of time and Dec to 0.1 arcsec (sexagesimal).
SEXAGESIMAL_ARCSEC = 0.5
# Its decimal hours (8 places) and degrees (7 places) are the numbers sent, to < 0.001".
DECIMAL_ARCSEC = 0.01
ARRIVED_ARCSEC = 5.0
SIDEREAL_ARCSEC_PER_S = 15.041  # the sky's turning (common practice)


# ---------------------------------------------------------------------------- sky helpers
def _allowed_ra(dec_deg: float, min_alt_deg=25.0, min_sun_deg=45.0) -> np.ndarray:
    """Right ascensions at dec_deg that astropy finds well up and far from the Sun now."""
    now = Time.now()
    ra = np.arange(0.0, 360.0, 10.0)
    coords = SkyCoord(ra=ra * u.deg, dec=np.full(ra.shape, dec_deg) * u.deg)
    alt = coords.transform_to(AltAz(obstime=now, location=LOCATION)).alt.deg
    sun = get_sun(now)
    sun_sep = coords.separation(SkyCoord(ra=sun.ra, dec=sun.dec)).deg
    return ra[(alt > min_alt_deg) & (sun_sep > min_sun_deg)]


def _pick(panel, dec_deg: float, nearest: bool) -> tuple[float, float]:
    """An allowed RA at dec_deg nearest to (or farthest from) the mount; and that distance."""
    status = panel.scope.status()
    ra = _allowed_ra(dec_deg)
    assert ra.size, "no allowed direction on the grid"
    distance = np.array([angular_distance_arcsec(r, dec_deg, status.ra_deg, status.dec_deg)
                         for r in ra]) / 3600.0
    k = int(np.argmin(distance) if nearest else np.argmax(distance))
    return float(ra[k]), float(distance[k])


def _forbidden() -> Targets:
    """Beside the Sun (5 deg away) and under the horizon (Dec -60 never rises at +50)."""
    sun = get_sun(Time.now())
    return moving_targets([float(sun.ra.deg), float(sun.ra.deg + 180.0) % 360.0],
                    [float(sun.dec.deg) + 5.0, -60.0], ["Sunward", "Under"])


def _astropy_place(ra_deg, dec_deg, when_iso):
    """Apparent place of date (TETE) and refracted alt/az from astropy at when_iso."""
    return (*astropy_apparent(ra_deg, dec_deg, when_iso),
            *astropy_altaz(ra_deg, dec_deg, when_iso, SITE))


def _sexagesimal(text: str) -> float:
    sign = -1.0 if text.startswith("-") else 1.0
    a, b, c = (float(x) for x in text.lstrip("+-").split(":"))
    return sign * (a + b / 60.0 + c / 3600.0)


def _stated(text: str) -> dict:
    """The numbers a confirmation states."""
    ra = re.search(r"RA\s+(\d\d:\d\d:\d\d\.\d+)\s+\(([\d.]+) h\)", text)
    dec = re.search(r"Dec\s+([+-]\d\d:\d\d:\d\d\.\d+)\s+\(([+-][\d.]+)°\)", text)
    now = re.search(r"at (\S+Z): altitude ([-\d.]+)°, azimuth ([\d.]+)°", text)
    assert ra and dec and now, text
    return dict(ra_hms_deg=_sexagesimal(ra.group(1)) * 15.0, ra_deg=float(ra.group(2)) * 15.0,
                dec_dms_deg=_sexagesimal(dec.group(1)), dec_deg=float(dec.group(2)),
                time=now.group(1), alt=float(now.group(2)), az=float(now.group(3)))


# ---------------------------------------------------------------------------- panel helpers
@pytest.fixture
def panel(qtbot):
    widget = MountPanel()
    qtbot.addWidget(widget)  # closed and deleted at teardown
    widget.resize(900, 760)
    widget.show()
    widget.set_site(SITE)
    yield widget
    assert widget.shutdown(), "a mount job was still running at the end of the test"
    left = [t.name for t in threading.enumerate() if t.name.startswith(("mount: ", "indi-"))]
    assert left == [], f"threads left running: {left}"


@pytest.fixture
def confirmations(monkeypatch):
    """Accept every confirmation, keeping its text (no modal dialog in tests)."""
    seen = []

    def accept(dialog):
        seen.append(dialog.text())
        return QDialog.DialogCode.Accepted

    monkeypatch.setattr(ConfirmMotionDialog, "exec", accept)
    return seen


def _connect(qtbot, panel, server, push_site=True):
    panel.address_edit.setText(server.address)
    qtbot.mouseClick(panel.connect_button, Qt.MouseButton.LeftButton)
    qtbot.waitUntil(lambda: panel.is_connected, timeout=WAIT_MS)
    if push_site:
        qtbot.mouseClick(panel.push_site_button, Qt.MouseButton.LeftButton)
        qtbot.waitUntil(lambda: panel.busy_job is None, timeout=WAIT_MS)
        panel.refresh_status()


def _select(qtbot, panel, targets, row):
    panel.set_targets(targets)
    panel.set_selected(row)
    qtbot.waitUntil(lambda: panel.pointing is not None or bool(panel.check_error),
                    timeout=WAIT_MS)


def _slew_and_wait_busy(qtbot, panel):
    commands_before = len(panel.scope.client.sent())
    qtbot.mouseClick(panel.slew_button, Qt.MouseButton.LeftButton)
    qtbot.waitUntil(lambda: panel.is_moving, timeout=WAIT_MS)
    qtbot.waitUntil(lambda: panel.scope.status().motion_state == "Busy", timeout=WAIT_MS)
    return commands_before


# ---------------------------------------------------------------------------- tests
def test_connect_fills_the_devices_and_the_status_box(qtbot, panel, indi_server):
    assert not panel.slew_button.isEnabled() and not panel.abort_button.isEnabled()
    assert "Connect" in panel.why_label.text()
    _connect(qtbot, panel, indi_server)
    scope = panel.scope
    assert [panel.device_combo.itemText(i) for i in range(panel.device_combo.count())] == \
        ["Telescope Simulator"]
    assert panel.device_combo.currentText() == scope.device
    assert panel.abort_button.isEnabled() and "Connected to Telescope Simulator" in \
        panel.connection_label.text()
    # The coordinates shown are the device's own EQUATORIAL_EOD_COORD (RA in hours).
    raw = scope.client.vector(scope.device, "EQUATORIAL_EOD_COORD")
    shown = re.search(r"RA (\S+)\s+Dec (\S+)", panel.device_place_label.text())
    assert shown and "equinox of date" in panel.device_place_label.text()
    assert angular_distance_arcsec(_sexagesimal(shown.group(1)) * 15.0,
                                   _sexagesimal(shown.group(2)), raw.values["RA"] * 15.0,
                                   raw.values["DEC"]) < 1.0 + SIDEREAL_ARCSEC_PER_S
    assert panel.motion_label.text().split(" ")[0] in ("Idle", "Ok", "Busy", "Alert")
    # Our site was sent: the device's site reads back as ours; clocks side by side.
    assert panel.device_site_label.text() == panel.our_site_label.text()
    assert panel.site_match_label.text() == "Same site as ours"
    assert panel.device_clock_label.text().endswith("Z (as last reported)")
    assert panel.our_clock_label.text().endswith("Z")


def test_connect_stays_disabled_while_connected(qtbot, panel, indi_server):
    """Connect is offered only without a live connection: not after connecting, nor after a
    site, target list, selection or status refresh (each re-enables controls); Disconnect is
    the way out, and Connect comes back after it."""
    assert panel.connect_button.isEnabled() and not panel.disconnect_button.isEnabled()
    _connect(qtbot, panel, indi_server)
    assert not panel.connect_button.isEnabled() and not panel.address_edit.isEnabled()
    assert panel.disconnect_button.isEnabled()
    targets = _forbidden()
    for step in (lambda: panel.set_site(SITE), lambda: _select(qtbot, panel, targets, 0),
                 lambda: _select(qtbot, panel, targets, 1), panel.refresh_status,
                 lambda: panel.set_selected(None)):
        step()
        qtbot.wait(200)
        assert panel.is_connected and not panel.connect_button.isEnabled()
    qtbot.mouseClick(panel.disconnect_button, Qt.MouseButton.LeftButton)
    qtbot.waitUntil(lambda: not panel.is_connected and panel.busy_job is None,
                    timeout=WAIT_MS)
    assert panel.connect_button.isEnabled() and not panel.disconnect_button.isEnabled()


def test_refused_targets_keep_slew_and_sync_disabled_with_the_reason(qtbot, panel,
                                                                      indi_server,
                                                                      confirmations):
    _connect(qtbot, panel, indi_server)
    targets = _forbidden()
    sent_before = len(panel.scope.client.sent())
    for row, reason in ((0, "Sun"), (1, "altitude")):
        _select(qtbot, panel, targets, row)
        assert not panel.pointing.allowed
        assert reason in panel.pointing.refusal
        for button in (panel.slew_button, panel.sync_button):
            assert not button.isEnabled() and reason in button.toolTip()
        assert reason in panel.why_label.text() and "refused" in panel.why_label.text()
        assert "REFUSED" in panel.verdict_label.text()
        panel.request_slew()  # even asked directly, nothing is asked or sent
        panel.request_sync()
        qtbot.wait(300)
    assert confirmations == [] and not panel.is_moving
    assert [s for s in panel.scope.client.sent()[sent_before:] if s[0].startswith("new")] == []
    assert panel.abort_button.isEnabled()  # ABORT never depends on the target


def test_confirmed_slew_sends_the_stated_coordinates_and_reports(qtbot, panel, indi_server,
                                                                  confirmations):
    _connect(qtbot, panel, indi_server)
    ra, _ = _pick(panel, 80.0, nearest=True)
    _select(qtbot, panel, moving_targets([ra], [80.0], ["Nearby"]), 0)
    assert panel.slew_button.isEnabled() and panel.why_label.text() == ""
    qtbot.mouseClick(panel.slew_button, Qt.MouseButton.LeftButton)
    qtbot.waitUntil(lambda: panel.last_report is not None, timeout=SLEW_MS)
    report, status = panel.last_report, panel.scope.status()

    [text] = confirmations
    assert "Nearby" in text and CAUTION in text and text.count("solar filter") == 1
    stated = _stated(text)
    expected_ra, expected_dec, expected_alt, expected_az = _astropy_place(ra, 80.0,
                                                                          stated["time"])
    assert angular_distance_arcsec(stated["ra_hms_deg"], stated["dec_dms_deg"], expected_ra,
                                   expected_dec) < SEXAGESIMAL_ARCSEC
    assert abs(stated["alt"] - expected_alt) < 0.02 and abs(stated["az"] - expected_az) < 0.05
    # What the device took is what the confirmation stated.
    assert angular_distance_arcsec(status.target_ra_deg, status.target_dec_deg,
                                   stated["ra_deg"], stated["dec_deg"]) < DECIMAL_ARCSEC
    # The report: where the mount ended, shown in the panel.
    assert not report.aborted and report.final_state == "Ok"
    assert report.residual_arcsec < ARRIVED_ARCSEC
    assert f"residual {report.residual_arcsec:.2f}″" in panel.report_label.text()
    assert status.motion_state != "Busy" and not panel.is_moving
    assert panel.slew_button.isEnabled()  # ready for the next one


def test_confirmed_sync_moves_nothing_and_sets_the_device_place(qtbot, panel, indi_server,
                                                                confirmations):
    _connect(qtbot, panel, indi_server)
    ra, _ = _pick(panel, 75.0, nearest=True)
    _select(qtbot, panel, moving_targets([ra], [75.0], ["Synced"]), 0)
    serial = panel.scope.client.last_serial
    qtbot.mouseClick(panel.sync_button, Qt.MouseButton.LeftButton)
    qtbot.waitUntil(lambda: panel.last_report is not None, timeout=WAIT_MS)
    states = panel.scope.client.states_since(panel.scope.device, "EQUATORIAL_EOD_COORD", serial)
    [text] = confirmations
    assert text.startswith("Sync Telescope Simulator to Synced") and CAUTION not in text
    assert "about to move" not in text and "moves nothing" in text
    report = panel.last_report
    assert report.action == "sync" and "Busy" not in states  # a sync moves nothing
    assert report.residual_arcsec < ARRIVED_ARCSEC
    assert panel.report_label.text().startswith("Sync of Synced ended Ok")


def test_escape_aborts_a_slew_in_progress(qtbot, panel, indi_server, confirmations):
    _connect(qtbot, panel, indi_server)
    ra, distance_deg = _pick(panel, 60.0, nearest=False)
    assert distance_deg > 20.0, "no long slew available from here"
    _select(qtbot, panel, moving_targets([ra], [60.0], ["Faraway"]), 0)
    _slew_and_wait_busy(qtbot, panel)
    qtbot.wait(800)  # well on its way
    assert panel.slew_button.isEnabled() is False and panel.abort_button.isEnabled()
    sent_before_abort = len(panel.scope.client.sent())
    panel.log_view.setFocus()
    qtbot.keyClick(panel.log_view, Qt.Key.Key_Escape)
    qtbot.waitUntil(lambda: panel.last_report is not None, timeout=WAIT_MS)
    report = panel.last_report
    first, t_first = panel.scope.status(), time.monotonic()
    qtbot.wait(1500)
    second, t_second = panel.scope.status(), time.monotonic()
    after_abort = [s[0] for s in panel.scope.client.sent()[sent_before_abort:]]
    assert report.aborted and not report.refined and "ABORT" in panel.report_label.text()
    assert after_abort == ["newSwitchVector"]  # the abort, and no motion after it
    assert second.motion_state != "Busy"
    assert abs(second.dec_deg - first.dec_deg) * 3600.0 < 1.0
    ra_moved_arcsec = abs((second.ra_deg - first.ra_deg + 180.0) % 360.0 - 180.0) * 3600.0
    assert ra_moved_arcsec <= SIDEREAL_ARCSEC_PER_S * (t_second - t_first) + 1.0
    assert angular_distance_arcsec(second.ra_deg, second.dec_deg, report.commanded_ra_deg,
                                   report.commanded_dec_deg) > 3600.0  # stopped short


def test_server_killed_mid_slew_shows_connection_lost(qtbot, panel, fresh_indi_server,
                                                      confirmations):
    _connect(qtbot, panel, fresh_indi_server)
    ra, distance_deg = _pick(panel, 60.0, nearest=False)
    assert distance_deg > 20.0, "no long slew available from here"
    _select(qtbot, panel, moving_targets([ra], [60.0], ["Faraway"]), 0)
    _slew_and_wait_busy(qtbot, panel)
    client = panel.scope.client
    fresh_indi_server.kill()
    qtbot.waitUntil(lambda: "connection lost" in panel.connection_label.text().lower(),
                    timeout=WAIT_MS)
    qtbot.waitUntil(lambda: not panel.is_moving, timeout=WAIT_MS)
    assert "may still be moving" in panel.connection_label.text()
    assert "may still be moving" in panel.report_label.text()
    assert panel.last_report is None
    for button in (panel.slew_button, panel.sync_button, panel.abort_button,
                   panel.push_site_button):
        assert not button.isEnabled()
    assert panel.connect_button.isEnabled()  # only the user reconnects
    qtbot.wait(1000)
    assert panel.scope.client is client and client.lost is not None and not panel.is_connected


def test_a_placeholder_site_blocks_pointing(qtbot, panel):
    from epochpoint.gui.document import placeholder_site

    panel.set_site(placeholder_site())
    panel.set_targets(moving_targets([10.0], [80.0], ["Anything"]))
    panel.set_selected(0)
    qtbot.waitUntil(lambda: panel.pointing is not None, timeout=WAIT_MS)
    assert "placeholder" in panel.block_reason()
    assert "placeholder" in panel.why_label.text() and not panel.slew_button.isEnabled()
    # The abort shortcut exists whether or not a mount is connected.
    assert panel.abort_action.shortcut().toString() == "Ctrl+Shift+A"
