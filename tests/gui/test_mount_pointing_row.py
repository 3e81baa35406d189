"""The mount tab's pointing row, against the scripted INDI peer (tests/mount/scripted_peer.py):
after a slew, "Record centred star" appends one sample to the chosen file; with a model loaded,
the confirmation states the sky place and the corrected place, and the corrected one is sent.

References: the scripted peer arrives a set amount away from where it was sent, so the
recorded mount-minus-star difference is that amount (0.002 h low in RA: 0.03 deg high in hour
angle; 0.01 deg high in Dec); a controller's axis hour angle is the local apparent sidereal
time minus the RA of date (common practice), so a model whose only terms are index errors of
+0.1 deg in hour angle and -0.05 deg in declination commands an RA 0.1 deg lower and a Dec
0.05 deg lower than the place of date. Without refraction (pressure 0) observed and apparent
places differ by diurnal aberration and polar motion only, under 1 arcsec (IERS Conventions
2010, ch. 5; from memory).
"""
from __future__ import annotations

import csv
import json
import re
import sys
import threading
from pathlib import Path

import pytest
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QDialog

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "mount"))
from scripted_peer import ScriptedPeer  # noqa: E402
from test_mount_safety import night_site, star_at  # noqa: E402

from epochpoint.gui.panels.mount_panel import ConfirmMotionDialog, MountPanel  # noqa: E402

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

WAIT_MS = 20_000
NO_REFRACTION_ARCSEC = 1.0
HEADER = ["time", "name", "ha_target", "dec_target", "ha_mount", "dec_mount"]


@pytest.fixture
def site():
    return night_site().with_weather(pressure=0.0)


@pytest.fixture
def panel(qtbot, site):
    widget = MountPanel()
    qtbot.addWidget(widget)
    widget.resize(900, 800)
    widget.show()
    widget.set_site(site)
    yield widget
    assert widget.shutdown()
    left = [t.name for t in threading.enumerate() if t.name.startswith("mount: ")]
    assert left == []


@pytest.fixture
def confirmations(monkeypatch):
    seen = []

    def accept(dialog):
        seen.append(dialog.text())
        return QDialog.DialogCode.Accepted

    monkeypatch.setattr(ConfirmMotionDialog, "exec", accept)
    return seen


def connect_and_slew(qtbot, panel, peer, targets):
    panel.address_edit.setText(peer.address)
    qtbot.mouseClick(panel.connect_button, Qt.MouseButton.LeftButton)
    qtbot.waitUntil(lambda: panel.is_connected, timeout=WAIT_MS)
    panel.set_targets(targets)
    panel.set_selected(0)
    qtbot.waitUntil(lambda: panel.pointing is not None and panel.slew_button.isEnabled(),
                    timeout=WAIT_MS)
    qtbot.mouseClick(panel.slew_button, Qt.MouseButton.LeftButton)
    qtbot.waitUntil(lambda: panel.last_report is not None and not panel.is_moving,
                    timeout=WAIT_MS)


def test_record_after_a_slew_appends_the_offset_the_mount_shows(qtbot, panel, site,
                                                               confirmations, tmp_path):
    targets, _, _ = star_at(site, 55.0, 120.0, name="Cal")
    peer = ScriptedPeer(arrive_off_ra_h=-0.002, arrive_off_deg=0.01)
    path = tmp_path / "samples.csv"
    row = panel.pointing_row
    try:
        assert not row.record_button.isEnabled()  # nothing slewed yet
        connect_and_slew(qtbot, panel, peer, targets)
        assert panel.last_report.final_state == "Ok"
        qtbot.waitUntil(row.record_button.isEnabled, timeout=WAIT_MS)
        row.samples_edit.setText(str(path))
        for count in (1, 2):  # a second press appends a second row
            qtbot.mouseClick(row.record_button, Qt.MouseButton.LeftButton)
            qtbot.waitUntil(lambda: panel.busy_job is None and path.exists()
                            and len(path.read_text().splitlines()) == count + 1,
                            timeout=WAIT_MS)
    finally:
        panel.shutdown()
        peer.close()
    with open(path, newline="") as handle:
        rows = list(csv.reader(handle))
    assert rows[0] == HEADER and len(rows) == 3
    for sample in rows[1:]:
        values = dict(zip(HEADER, sample))
        assert values["name"] == "Cal" and values["time"].endswith("Z")
        dha = ((float(values["ha_mount"]) - float(values["ha_target"]) + 180.0) % 360.0
               - 180.0) * 3600.0
        ddec = (float(values["dec_mount"]) - float(values["dec_target"])) * 3600.0
        assert dha == pytest.approx(0.03 * 3600.0, abs=NO_REFRACTION_ARCSEC * 2.0)
        assert ddec == pytest.approx(0.01 * 3600.0, abs=NO_REFRACTION_ARCSEC)
    assert "Recorded Cal" in panel.log_view.toPlainText()


def _sexagesimal(text: str) -> float:
    sign = -1.0 if text.startswith("-") else 1.0
    a, b, c = (float(x) for x in text.lstrip("+-").split(":"))
    return sign * (a + b / 60.0 + c / 3600.0)


def test_a_slew_with_a_model_states_both_places_and_sends_the_corrected_one(
        qtbot, panel, site, confirmations, tmp_path):
    model = tmp_path / "model.json"
    model.write_text(json.dumps({
        "mount_type": "equatorial", "latitude": site.latitude,
        "terms": {"hour_axis_index": {"value_arcsec": 360.0, "error_arcsec": 1.0},
                  "dec_axis_index": {"value_arcsec": -180.0, "error_arcsec": 1.0}}}))
    targets, _, _ = star_at(site, 60.0, 200.0, name="Cal")
    peer = ScriptedPeer()
    row = panel.pointing_row
    assert row.load_model(str(model))
    row.use_model.setChecked(True)
    try:
        connect_and_slew(qtbot, panel, peer, targets)
        sent = peer.coordinates_sent()
    finally:
        panel.shutdown()
        peer.close()
    text = confirmations[0]
    ra = re.search(r"RA\s+\S+\s+\(([\d.]+) h\)", text)
    dec = re.search(r"Dec\s+\S+\s+\(([+-][\d.]+)°\)", text)
    sky = re.search(r"without it: RA (\S+)\s+Dec (\S+);", text)
    assert ra and dec and sky, text
    ra_sent, dec_sent = float(ra.group(1)) * 15.0, float(dec.group(1))
    ra_sky, dec_sky = _sexagesimal(sky.group(1)) * 15.0, _sexagesimal(sky.group(2))
    assert (ra_sent - ra_sky) * 3600.0 == pytest.approx(-360.0, abs=NO_REFRACTION_ARCSEC)
    assert (dec_sent - dec_sky) * 3600.0 == pytest.approx(-180.0, abs=NO_REFRACTION_ARCSEC)
    first = {one.get("name"): float(one.text) for one in sent[0]}
    assert first["RA"] * 15.0 == pytest.approx(ra_sent, abs=1e-6)
    assert first["DEC"] == pytest.approx(dec_sent, abs=1e-6)


# -- A German mount: the pier side in the confirmation, the report and the samples ----------
# References: a German equatorial mount takes the pier side of the target's hour angle at the
# slew's end (east of the meridian: the east side) and may track past the meridian only up to
# its meridian limit (common practice); INDI's TELESCOPE_PIER_SIDE names the side the tube is
# on, PIER_WEST "West (pointing east)" (the INDI telescope simulator's label), so our east
# side is INDI's PIER_WEST. The sky turns at 15.041 arcsec per second (common practice).

def german(site, meridian_limit: float = 5.0):
    from dataclasses import replace

    from epochpoint.core.limits import Interlocks, MountLimits

    mount = MountLimits(mount_type="german", meridian_limit=meridian_limit,
                        min_altitude=site.interlocks.mount.min_altitude, slew_rate=3.0,
                        settle=site.interlocks.mount.settle)
    return replace(site, interlocks=Interlocks(mount=mount))


def pier_peer(on: str | None) -> ScriptedPeer:
    """A scripted mount that reports TELESCOPE_PIER_SIDE with switch `on` (or none)."""
    from scripted_peer import DEVICE, definitions

    switches = "".join(f'<defSwitch name="{n}">{"On" if n == on else "Off"}</defSwitch>'
                       for n in ("PIER_WEST", "PIER_EAST"))
    return ScriptedPeer(definitions() + f"""
<defSwitchVector device="{DEVICE}" name="TELESCOPE_PIER_SIDE" state="Ok" perm="ro"
  rule="AtMostOne">{switches}</defSwitchVector>
""")


@pytest.mark.parametrize("reported, recorded", [("PIER_WEST", "east"), ("PIER_EAST", "west"),
                                                (None, "east")])
def test_a_german_mount_shows_its_pier_side_and_records_it(qtbot, panel, site, confirmations,
                                                           tmp_path, reported, recorded):
    site = german(site)
    panel.set_site(site)
    # 55 deg high in the east-south-east: hours east of the meridian, the east side.
    targets, _, _ = star_at(site, 55.0, 120.0, name="Cal")
    peer = pier_peer(reported)
    path = tmp_path / "samples.csv"
    row = panel.pointing_row
    try:
        connect_and_slew(qtbot, panel, peer, targets)
        assert panel.last_report.final_state == "Ok"
        report = panel.report_label.text()
        qtbot.waitUntil(row.record_button.isEnabled, timeout=WAIT_MS)
        row.samples_edit.setText(str(path))
        qtbot.mouseClick(row.record_button, Qt.MouseButton.LeftButton)
        qtbot.waitUntil(lambda: panel.busy_job is None and path.exists(), timeout=WAIT_MS)
    finally:
        panel.shutdown()
        peer.close()
    text = confirmations[0]
    assert "Pier side: east (INDI PIER_WEST: the tube west of the pier, pointing east) for " \
           "Cal now" in text
    assert (f"the device reports {reported} now, before the slew" if reported
            else "the device reports no pier side") in text
    if reported == "PIER_WEST":
        assert "the device reports PIER_WEST, the same side." in report
    elif reported == "PIER_EAST":
        assert "Caution: the device reports PIER_EAST, not our east side" in report
    else:
        assert "the device reports none" in report
    # The device's side wins in the sample; without one, the side our check found.
    with open(path, newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert [r["pier_side"] for r in rows] == [recorded]
    assert f"{recorded} pier side" in panel.log_view.toPlainText()


def test_a_flip_needed_mid_track_is_refused_in_the_app_and_nothing_is_sent(
        qtbot, panel, site, confirmations):
    from astropy import units as u
    from astropy.coordinates import ICRS, TETE, SkyCoord
    from astropy.time import Time

    from epochpoint.core.targets import Targets

    # Meridian limit 0.5 deg; a star 1 deg east of the meridian (astropy's apparent sidereal
    # time and TETE) reaches it within 1.5 deg / 15.041"/s = 6 min, inside the app's 10 min
    # track, even after a slew of the longest the site allows (10 s + 180 deg at 3 deg/s).
    site = german(site, meridian_limit=0.5)
    panel.set_site(site)
    now = Time.now()
    last = now.sidereal_time("apparent", longitude=site.longitude * u.deg).deg
    dec = site.latitude + 30.0  # 60 deg high on the meridian
    icrs = SkyCoord(ra=(last + 1.0) % 360.0 * u.deg, dec=dec * u.deg,
                    frame=TETE(obstime=now)).transform_to(ICRS())
    targets = Targets.from_columns(ra=[icrs.ra.deg], dec=[icrs.dec.deg], name=["Near"],
                                   epoch=2016.0)
    peer = ScriptedPeer()
    try:
        panel.address_edit.setText(peer.address)
        qtbot.mouseClick(panel.connect_button, Qt.MouseButton.LeftButton)
        qtbot.waitUntil(lambda: panel.is_connected, timeout=WAIT_MS)
        panel.set_targets(targets)
        panel.set_selected(0)
        qtbot.waitUntil(lambda: panel.pointing is not None and panel.slew_button.isEnabled(),
                        timeout=WAIT_MS)
        qtbot.mouseClick(panel.slew_button, Qt.MouseButton.LeftButton)
        qtbot.waitUntil(lambda: panel.report_label.text().startswith("Not completed"),
                        timeout=WAIT_MS)
        sent = peer.coordinates_sent()
    finally:
        panel.shutdown()
        peer.close()
    shown = panel.report_label.text()
    assert "would cross the meridian limit (0.5 deg past the meridian) on the east pier side" \
        in shown and "flip needed" in shown and "nothing was sent" in shown
    minutes = float(re.search(r"side ([\d.]+) min into the 10 min track", shown).group(1))
    # From 1 deg east at the build, less what the sky turned until the slew's end (at most the
    # longest slew and a minute of test), to +0.5 deg (hand computed).
    rate = 15.041 / 3600.0
    assert (1.5 - rate * (70.0 + 60.0)) / rate / 60.0 <= minutes <= 1.5 / rate / 60.0 + 0.05
    assert sent == []
