"""Keyboard and readouts: Esc in the filter clears it; a date typed into a date field is read
as typed wherever the click put the cursor; the chart's hover readout goes when the mouse
leaves; a crossing whose error is unknown (or zero) reads "± ?", one far off "never within".

Dates, targets and key presses are invented; the expected dates are the typed ones.
"""
from __future__ import annotations

import numpy as np
import pytest
from matplotlib.backend_bases import MouseEvent
from PySide6.QtCore import QDate, QEvent, Qt
from PySide6.QtWidgets import QApplication, QLineEdit

import epochpoint as ep
from epochpoint.gui import workers
from epochpoint.gui.night_bar import NightBar
from epochpoint.gui.panels import DriftPanel, TonightPanel
from epochpoint.gui.panels.drift_model import KEYS
from epochpoint.gui.panels.tonight import HINT
from panels_demo import demo_plan, settle, shown_panel
from shell_support import make_window, settings  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


def test_escape_in_the_filter_clears_it(make_window, qtbot):
    window = make_window()
    window.filter_box.setFocus()
    qtbot.keyClicks(window.filter_box, "wick")
    assert window.filter_box.text() == "wick"
    qtbot.keyClick(window.filter_box, Qt.Key.Key_Escape)
    assert window.filter_box.text() == ""


def _type_date_after_a_click_in_the_month(qtbot, field, text):
    line = field.findChild(QLineEdit)
    # The middle of "2027-01-19" is the month: Qt puts the cursor in that section.
    qtbot.mouseClick(line, Qt.MouseButton.LeftButton, pos=line.rect().center())
    qtbot.wait(20)
    qtbot.keyClicks(field, text)  # keys go to the focused field
    qtbot.keyClick(field, Qt.Key.Key_Tab)


def test_typed_night_date_is_read_as_typed(qtbot):
    bar = NightBar()
    qtbot.addWidget(bar)
    bar.date.setDate(QDate(2027, 1, 19))
    settle(qtbot, bar)
    bar.date.clearFocus()
    _type_date_after_a_click_in_the_month(qtbot, bar.date, "2027-03-15")
    assert bar.date.date() == QDate(2027, 3, 15)
    assert bar.night.date == "2027-03-15"


def test_typed_drift_date_is_read_as_typed(qtbot):
    panel = DriftPanel()
    qtbot.addWidget(panel)
    panel.date_edit.setDate(QDate(2027, 1, 19))
    settle(qtbot, panel)
    _type_date_after_a_click_in_the_month(qtbot, panel.date_edit, "2031-11-05")
    assert panel.date_edit.date() == QDate(2031, 11, 5)
    panel.close()
    workers.wait_for_workers()


def test_hover_readout_goes_when_the_mouse_leaves(qtbot):
    plan = demo_plan()[0]
    panel = shown_panel(qtbot, TonightPanel, (1000, 700), plan)
    canvas = panel.canvas
    box = panel.ax.get_window_extent()
    MouseEvent("motion_notify_event", canvas, box.x0 + box.width / 2,
               box.y0 + box.height / 2)._process()
    assert panel.readout.text() != HINT and "UTC" in panel.readout.text()
    QApplication.sendEvent(canvas, QEvent(QEvent.Type.Leave))
    assert panel.readout.text() == HINT


@pytest.fixture
def drift_panel(qtbot):
    # Invented: a star with zero errors given for everything, one crawling at 0.4 mas/yr
    # (1 arcsec takes 2500 years), one with real errors.
    targets = ep.Targets.from_columns(
        ra=[10.0, 12.0, 14.0], dec=[5.0, 7.0, 9.0], pm_ra_cosdec=[300.0, 0.4, 40.0],
        pm_dec=[-400.0, 0.0, 0.0], epoch=2016.0, name=["zero-errors", "crawler", "measured"],
        errors={"ra_error": [0.0, 0.1, 0.02], "dec_error": [0.0, 0.1, 0.02],
                "pm_ra_cosdec_error": [0.0, 0.1, 1.5], "pm_dec_error": [0.0, 0.1, 1.5]})
    panel = DriftPanel()
    qtbot.addWidget(panel)
    panel.date_edit.setDate(QDate(2027, 1, 1))
    panel.set_tolerance(1.0)
    panel.set_targets(targets)
    settle(qtbot, panel)
    qtbot.waitUntil(lambda: panel.result is not None
                    and panel.result["time"].startswith("2027-01-01"), timeout=10000)
    yield panel
    panel.close()
    workers.wait_for_workers()


def test_unknown_or_far_crossings_say_so(drift_panel):
    c = KEYS.index("crossing")
    zero, crawler, measured = (drift_panel.model.data(drift_panel.model.index(r, c))
                               for r in range(3))
    assert zero.endswith("± ?") and "0.0 d" not in zero
    assert crawler == "never within 1000 yr"
    assert "±" in measured and "?" not in measured and np.isfinite(
        drift_panel.result["drift"]["crossing_sigma_days"][2])
