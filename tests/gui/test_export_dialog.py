"""File > Export positions: every format written through the dialog and read back with an
independent parser, refused targets left out unless asked for, the summary, a bad path shown
as an error with the document untouched, and the plan's mid-darkness as the instant.

Outside references (tests only): astropy AltAz and get_sun decide which invented targets are
up, down or beside the Sun at the instant; Python's csv and json modules and
astropy.io.votable read the files back.
"""
from __future__ import annotations

import csv
import json

import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import AltAz, EarthLocation, SkyCoord, get_sun
from astropy.io.votable import parse as parse_votable
from astropy.time import Time

from epochpoint.core.limits import Interlocks, MountLimits
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.gui.export_dialog import ExportDialog
from shell_support import DEMO_PLAN, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

# An invented southern site with its interlocks; an instant inside the shipped IERS table.
SITE = Site(latitude=-30.2, longitude=-70.8, height=2200.0, name="Cerro Ventoso (invented)",
            interlocks=Interlocks(mount=MountLimits(min_altitude=15.0), sun_avoidance=30.0))
WHEN = "2025-03-10T04:00:00Z"
WAIT_MS = 30_000


@pytest.fixture(scope="module")
def sample():
    """Two targets well up, two well down and one beside the Sun at WHEN (by astropy), with
    the reason each refused one must carry."""
    location = EarthLocation.from_geodetic(SITE.longitude * u.deg, SITE.latitude * u.deg,
                                           SITE.height * u.m)
    grid_ra = np.arange(0.0, 360.0, 30.0)
    alt = SkyCoord(ra=grid_ra * u.deg, dec=np.full(grid_ra.shape, -45.0) * u.deg).transform_to(
        AltAz(obstime=Time(WHEN), location=location)).alt.deg
    up, down = grid_ra[alt > 35.0][:2], grid_ra[alt < -5.0][:2]
    assert up.size == 2 and down.size == 2, "the sample instant no longer splits the sky"
    sun = get_sun(Time(WHEN))  # geocentric direction of the Sun
    names = ["Up0", "Up1", "Down0", "Down1", "BesideSun"]
    targets = Targets.from_columns(ra=np.concatenate([up, down, [sun.ra.deg]]),
                                   dec=[-45.0] * 4 + [sun.dec.deg + 4.0], epoch=2000.0,
                                   name=names)
    reasons = {"Up0": "", "Up1": "", "Down0": "altitude", "Down1": "altitude",
               "BesideSun": "Sun"}
    return targets, reasons


@pytest.fixture
def dialog(qtbot, sample, tmp_path):
    widget = ExportDialog(sample[0], SITE, tolerance_arcsec=1.0,
                          path=str(tmp_path / "positions.csv"))
    qtbot.addWidget(widget)
    widget.set_instant(WHEN)
    return widget


def _export(qtbot, dialog):
    dialog.export_button.click()
    qtbot.waitUntil(lambda: dialog.task is None, timeout=WAIT_MS)


def _read(path, fmt) -> list[dict]:
    """Rows of an export as dicts of text, by an independent reader per format."""
    if fmt == "csv":
        with open(path, newline="", encoding="utf-8") as f:
            lines = [line for line in f if not line.startswith("#")]
        return list(csv.DictReader(lines))
    if fmt == "json":
        with open(path, encoding="utf-8") as f:
            return [{k: str(v) for k, v in row.items()} for row in json.load(f)["targets"]]
    table = parse_votable(str(path)).get_first_table().to_table()
    return [{c: str(table[c][i]) for c in table.colnames} for i in range(len(table))]


@pytest.mark.parametrize("include", [False, True], ids=["allowed only", "with refused"])
@pytest.mark.parametrize("fmt,frame,extension", [("csv", "apparent", ".csv"),
                                                 ("json", "icrs", ".json"),
                                                 ("votable", "observed", ".vot")])
def test_each_format_is_written_and_refused_targets_only_when_asked(
        qtbot, dialog, sample, fmt, frame, extension, include):
    _, reasons = sample
    dialog.format_combo.setCurrentIndex(dialog.format_combo.findData(fmt))
    dialog.frame_combo.setCurrentIndex(dialog.frame_combo.findData(frame))
    dialog.include_refused.setChecked(include)
    assert dialog.path_edit.text().endswith("positions" + extension)  # follows the format
    _export(qtbot, dialog)
    assert dialog.error_label.text() == "", dialog.error_label.text()
    rows = _read(dialog.path_edit.text(), fmt)
    names = [row["name"] for row in rows]
    allowed = [n for n, why in reasons.items() if not why]
    if include:
        assert names == list(reasons)
        for row in rows:
            expected = reasons[row["name"]]
            assert (expected in row["refused"]) if expected else row["refused"] in ("", "--")
    else:
        assert names == allowed and all("refused" not in row for row in rows)
    summary = dialog.summary
    assert summary.time == "2025-03-10T04:00:00.000Z" and summary.frame == frame
    assert summary.exported == len(names) and summary.refused == 3
    text = dialog.summary_label.text()
    # The sample has no proper motion: its propagated ICRS places never change.
    validity = "Valid without limit" if frame == "icrs" else "Valid until"
    assert validity in text and f"Wrote {len(names)} target(s)" in text
    assert ("included" if include else "left out") in text


def test_a_file_that_cannot_be_written_is_an_error_and_nothing_else(qtbot, dialog, tmp_path):
    bad = tmp_path / "no such folder" / "positions.csv"
    dialog.path_edit.setText(str(bad))
    _export(qtbot, dialog)
    assert "Not exported" in dialog.error_label.text() and str(bad) in dialog.error_label.text()
    assert dialog.summary is None and not bad.exists()
    assert list(tmp_path.iterdir()) == []  # no temporary file left behind


def test_the_menu_opens_it_on_the_document_and_mid_darkness_is_offered(make_window, qtbot,
                                                                        tmp_path):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    window.actions_by_name["export"].trigger()
    dialog = window.export_dialog
    assert dialog.isVisible() and len(dialog.targets) == window.document.row_count()
    # The plan's mid-darkness lies inside its astronomical darkness.
    night = window.plan.night
    assert dialog.darkness_radio.isEnabled() and dialog.darkness_radio.isChecked()
    instant = Time(dialog.instant().rstrip("Z"))
    assert night.astronomical_twilight_end < instant < night.astronomical_twilight_start
    dialog.format_combo.setCurrentIndex(dialog.format_combo.findData("json"))
    dialog.path_edit.setText(str(tmp_path / "demo.json"))
    _export(qtbot, dialog)
    with open(tmp_path / "demo.json", encoding="utf-8") as f:
        written = Time(json.load(f)["meta"]["time"].rstrip("Z"))
    assert abs((written - instant).to_value("s")) < 0.001
    dialog.path_edit.setText(str(tmp_path / "missing" / "demo.json"))
    _export(qtbot, dialog)
    assert "Not exported" in dialog.error_label.text()
    assert not window.document.dirty and window.document.undo_stack.count() == 0
    dialog.close()
