"""The Drift tab marks what the catalogue does not say: "≥" before an error ellipse that
leaves out unknown proper-motion errors, "± ?" after a crossing whose errors are unknown.

Invented rows: a Gaia-like five-parameter row and a fast star whose proper motion comes without
errors. The measured row's size is the textbook growth sqrt(s0^2 + t^2 s_pm^2) (linear error
propagation, common practice).
"""
import numpy as np
import pytest
from PySide6.QtCore import QDate

import epochpoint as ep
from epochpoint.gui import workers
from epochpoint.gui.panels import DriftPanel
from epochpoint.gui.panels.drift_model import KEYS
from panels_demo import settle

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


@pytest.fixture
def panel(qtbot):
    targets = ep.Targets.from_columns(
        ra=[10.0, 12.0], dec=[5.0, 7.0], pm_ra_cosdec=[40.0, 300.0], pm_dec=[0.0, -400.0],
        epoch=2016.0, name=["measured", "motion-no-errors"],
        errors={"ra_error": [0.02, 1.0], "dec_error": [0.02, 1.0],
                "pm_ra_cosdec_error": [1.5, np.nan], "pm_dec_error": [1.5, np.nan]})
    widget = DriftPanel()
    qtbot.addWidget(widget)
    widget.date_edit.setDate(QDate(2027, 1, 1))
    widget.set_tolerance(1.0)
    widget.set_targets(targets)
    settle(qtbot, widget)
    qtbot.waitUntil(lambda: widget.result is not None
                    and widget.result["time"].startswith("2027-01-01"), timeout=10000)
    yield widget
    widget.close()
    workers.wait_for_workers()


def _crossing_cells(panel):
    c = KEYS.index("crossing")
    return [panel.model.data(panel.model.index(r, c)) for r in range(panel.model.rowCount())]


def test_unknown_crossing_error_reads_question_mark(panel):
    measured, moving = _crossing_cells(panel)
    assert moving.startswith("2017-12-31") and moving.endswith("± ?")
    assert "?" not in measured and "±" in measured


def test_ellipse_without_motion_errors_reads_at_least(panel):
    panel.set_selected(1)
    assert "≥ 1.000 mas" in panel.ellipse_text.text()
    panel.set_selected(0)
    text = panel.ellipse_text.text()
    assert "≥" not in text and "16.499 mas" in text  # 11 years of 1.5 mas/yr
