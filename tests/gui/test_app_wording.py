"""Words that mean one thing in the app: catalogue and apparent coordinates labelled as such,
"Drift" only for the offset from the catalogue position, "illuminated fraction" for the Moon,
one unit style (°, ″, h), the sidereal time as the command line prints it, the mount types by
their trade names, a sync confirmation that never speaks of motion, the caution said once, and
Esc that aborts a running motion from anywhere in the window."""
from __future__ import annotations

import datetime as dt
import re
from types import SimpleNamespace

import pytest
from astropy import units as u
from astropy.coordinates import EarthLocation
from astropy.time import Time
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QAbstractButton, QLabel

from epochpoint.gui.panels.mount_text import confirmation_text
from epochpoint.gui.status import StatusClocks
from epochpoint.gui.target_model import COLUMN_INDEX
from epochpoint.mount import CAUTION
from panels_demo import demo_inputs
from shell_support import DEMO_PLAN, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

UNIT_WORDS = re.compile(r"\b(deg|degrees|arcsec|arcseconds|hours)\b")


def _header(window, key):
    return window.model.headerData(COLUMN_INDEX[key], Qt.Orientation.Horizontal)


def _texts(widget):
    """Every label, button text and tooltip a person can read in a widget tree."""
    out = []
    for child in [widget] + widget.findChildren(QLabel) + widget.findChildren(QAbstractButton):
        out.append(child.toolTip())
        if isinstance(child, (QLabel, QAbstractButton)):
            out.append(child.text())
    return [t for t in out if t]


def test_catalogue_and_apparent_coordinates_are_labelled(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    qtbot.waitUntil(lambda: window.ledger.row is not None, timeout=30000)
    assert _header(window, "ra") == "RA (catalogue)"
    assert _header(window, "dec") == "Dec (catalogue)"
    ra_text, dec_text = window.ledger.place_text("apparent")
    assert ra_text.startswith("RA of date ") and dec_text.startswith("Dec of date ")


def test_drift_moon_and_units_are_said_one_way(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    assert "illuminated fraction" in window.night_bar.moon_scaled.text()
    texts = _texts(window) + [window.model.headerData(i, Qt.Orientation.Horizontal,
                                                      Qt.ItemDataRole.ToolTipRole)
                              for i in range(window.model.columnCount())]
    texts.append(window.model.data(window.model.index(0, COLUMN_INDEX["ra"]),
                                   Qt.ItemDataRole.ToolTipRole))
    # The Earth-orientation warning is the core's own text, shared with the command line.
    texts.remove(window.clocks.table_age.toolTip())
    assert not [t for t in texts if "phase" in t.lower()]
    assert not [t for t in texts if UNIT_WORDS.search(t)]
    drift_tip = window.model.headerData(COLUMN_INDEX["drift"], Qt.Orientation.Horizontal,
                                        Qt.ItemDataRole.ToolTipRole)
    assert "catalogue position" in drift_tip
    # "Tolerance" alone would be read as the drift tolerance: the mount's is named for itself.
    assert "Settle tolerance" in _texts(window.mount_panel)


def test_sidereal_time_reads_as_the_command_line_prints_it(qtbot):
    _, site = demo_inputs()
    clocks = StatusClocks()
    qtbot.addWidget(clocks)
    clocks.timer.stop()
    instant = dt.datetime(2027, 1, 20, 4, 40, 0, tzinfo=dt.timezone.utc)
    clocks.set_site(site)
    clocks.refresh(instant)
    match = re.fullmatch(r"LST (\d\d):(\d\d):(\d\d\.\d)", clocks.sidereal.text())
    assert match, clocks.sidereal.text()
    shown_h = int(match[1]) + int(match[2]) / 60 + float(match[3]) / 3600
    # Reference: astropy's local apparent sidereal time (IAU 2006/2000A) at the site.
    location = EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                           site.height * u.m)
    expected_h = Time(instant).sidereal_time("apparent", longitude=location.lon).hour
    assert abs((shown_h - expected_h + 12) % 24 - 12) * 3600 < 0.2


def test_mount_types_are_shown_by_their_trade_names(qtbot):
    from epochpoint.gui.panels import SiteEditor

    _, site = demo_inputs()
    editor = SiteEditor()
    qtbot.addWidget(editor)
    editor.set_site(site)  # the demo mount is "german"
    combo = editor.fields["mount_type"]
    shown = sorted(combo.itemText(i) for i in range(combo.count()))
    assert shown == ["German equatorial", "alt-az", "fork equatorial"]
    assert combo.currentText() == "German equatorial"
    combo.setCurrentIndex(combo.findText("alt-az"))
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        editor.commit()
    assert blocker.args[0].interlocks.mount.mount_type == "altaz"


def _pointing():
    return SimpleNamespace(name="Wick", time="2027-01-20T04:40:00.000Z", alt_deg=52.1,
                           az_deg=210.4, sun_separation_deg=120.0, ra_apparent_deg=38.9,
                           dec_apparent_deg=-41.2, ra_j2000_deg=38.7, dec_j2000_deg=-41.3,
                           command_eod_deg=None, is_sun=False)


def test_sync_confirmation_never_speaks_of_motion_and_a_slew_says_the_caution_once():
    sync = confirmation_text(_pointing(), True, "Scope", None, 30.0)
    assert "about to move" not in sync and CAUTION not in sync and "moves nothing" in sync
    slew = confirmation_text(_pointing(), False, "Scope", None, 30.0)
    assert slew.count(CAUTION) == 1 and slew.count("solar filter") == 1
    assert slew.count("Keep people") + slew.count("keep clear") == 1


def test_escape_aborts_a_running_motion_from_anywhere_in_the_window(make_window, qtbot,
                                                                    monkeypatch):
    window = make_window(DEMO_PLAN)
    panel = window.mount_panel
    aborts = []
    monkeypatch.setattr(panel, "abort_motion", lambda: aborts.append(1))
    window.show_tab(0)  # the Tonight tab: the mount panel is hidden
    window.activateWindow()
    qtbot.waitUntil(window.isActiveWindow, timeout=2000)
    window.table.setFocus()

    qtbot.keyClick(window.table, Qt.Key.Key_Escape)
    assert aborts == []  # no motion: Esc is the list's own key

    panel.motion_job = object()  # a followed slew is under way
    panel._update_controls()
    qtbot.keyClick(window.table, Qt.Key.Key_Escape)
    assert aborts == [1]
    assert "anywhere" in panel.abort_button.text()
    panel.motion_job = None
    panel._update_controls()
