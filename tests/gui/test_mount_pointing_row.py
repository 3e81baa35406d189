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
