"""Drift panel: flags over the tolerance, the date control, tolerance signals and the error
ellipse of the selected target (demo targets, see panels_demo.py)."""
from __future__ import annotations

import datetime as dt
import math
import re

import numpy as np
import pytest
from astropy.time import Time
from PySide6.QtCore import QDate, Qt
from PySide6.QtWidgets import QPushButton

from epochpoint.core.drift import drift
from epochpoint.core.uncertainty import error_ellipse_at
from epochpoint.gui import workers
from epochpoint.gui.panels import DriftPanel
from epochpoint.gui.panels.drift_model import KEYS, OVER_MARK
from panels_demo import demo_inputs, settle

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

DATE = dt.date(2030, 1, 1)
INSTANT = "2030-01-01T00:00:00Z"


@pytest.fixture(scope="module")
def targets():
    return demo_inputs()[0]


@pytest.fixture
def panel(qtbot, targets):
    widget = DriftPanel()
    qtbot.addWidget(widget)
    widget.resize(1200, 600)
    widget.date_edit.setDate(QDate(DATE.year, DATE.month, DATE.day))
    widget.set_tolerance(60.0)
    widget.set_targets(targets)
    settle(qtbot, widget)
    _wait_for(qtbot, widget, INSTANT)
    yield widget
    widget.close()
    workers.wait_for_workers()


def _wait_for(qtbot, widget, instant_prefix: str):
    qtbot.waitUntil(lambda: widget.result is not None
                    and widget.result["time"].startswith(instant_prefix[:10]), timeout=10000)


def _column(panel, key):
    c = KEYS.index(key)
    return [panel.model.data(panel.model.index(r, c)) for r in range(panel.model.rowCount())]


def test_flags_match_core_drift_at_the_tolerance(panel, targets):
    expected = drift(targets, INSTANT, 60.0)["over_tolerance"]
    flags = _column(panel, "flag")
    assert [f == OVER_MARK for f in flags] == list(expected)
    assert 0 < sum(expected) < len(targets)
    assert f"{int(sum(expected))} of {len(targets)} targets over 60″" in panel.status.text()
    # The flag is a sign and a word, and the row is bold: not colour alone.
    row = int(np.flatnonzero(expected)[0])
    assert panel.model.data(panel.model.index(row, 1), Qt.ItemDataRole.FontRole).bold()


def test_flags_agree_with_linear_motion(panel, targets):
    """Drift ~ total proper motion x elapsed time (linear motion; the rigorous terms add well
    under 1 % over decades for these targets): clear cases either side of 60"."""
    years = Time(INSTANT).tdb.jyear - targets.epoch
    linear_arcsec = np.hypot(targets.pm_ra_cosdec, targets.pm_dec) / 1000.0 * years
    flags = np.array([f == OVER_MARK for f in _column(panel, "flag")])
    clear = np.abs(linear_arcsec - 60.0) > 2.0
    assert clear.sum() > 20
    assert list(flags[clear]) == list(linear_arcsec[clear] > 60.0)
    # The rate column is close to the total proper motion in arcsec/yr (common practice); the
    # fast demo movers with large radial velocities differ by up to ~1 % through perspective
    # acceleration decades from their epoch.
    rates = [float(t) for t in _column(panel, "drift_rate")]
    np.testing.assert_allclose(rates, np.hypot(targets.pm_ra_cosdec, targets.pm_dec) / 1000.0,
                               rtol=0.012, atol=1e-4)


def test_plus_one_year_grows_the_drift_by_the_rate(panel, qtbot, targets):
    before = np.array([float(t) for t in _column(panel, "drift")])
    buttons = {b.text(): b for b in panel.findChildren(QPushButton)}
    qtbot.mouseClick(buttons["+1 yr"], Qt.MouseButton.LeftButton)
    assert panel.chosen_date() == dt.date(2031, 1, 1)
    _wait_for(qtbot, panel, "2031-01-01")
    after = np.array([float(t) for t in _column(panel, "drift")])
    # Growth over one year ~ total proper motion (linear motion), for targets that have moved
    # away from the catalogue position in a straight line.
    growth = after - before
    mu_arcsec = np.hypot(targets.pm_ra_cosdec, targets.pm_dec) / 1000.0
    moving = mu_arcsec > 0.05
    np.testing.assert_allclose(growth[moving], mu_arcsec[moving], rtol=0.02, atol=2e-3)


def test_user_tolerance_edit_emits_and_recomputes(panel, qtbot, targets):
    with qtbot.waitSignal(panel.tolerance_changed, timeout=3000) as blocker:
        panel.tolerance_box.selectAll()
        qtbot.keyClicks(panel.tolerance_box, "120")
        qtbot.keyClick(panel.tolerance_box, Qt.Key.Key_Return)
    assert blocker.args == [pytest.approx(120.0)]
    qtbot.waitUntil(lambda: panel.result is not None and panel.result["tolerance"] == 120.0,
                    timeout=10000)
    expected = drift(targets, INSTANT, 120.0)["over_tolerance"]
    assert panel.over_tolerance_rows() == [int(i) for i in np.flatnonzero(expected)]


def test_set_tolerance_from_outside_does_not_emit(panel, qtbot):
    with qtbot.assertNotEmitted(panel.tolerance_changed, wait=600):
        panel.set_tolerance(5.0)
    qtbot.waitUntil(lambda: panel.result is not None and panel.result["tolerance"] == 5.0,
                    timeout=10000)


def test_ellipse_text_equals_error_ellipse_at(panel, qtbot, targets):
    epoch = Time(INSTANT).tdb.jyear
    ellipse = error_ellipse_at(targets, epoch)
    major, minor, pa = (ellipse[k][1] for k in ("error_major", "error_minor", "error_pa"))
    panel.set_selected(1)
    text = panel.ellipse_text.text()
    numbers = [float(x) for x in re.findall(r"(-?\d+\.\d+)", text)]
    assert numbers == [round(major, 3), round(minor, 3), round(pa, 1)]


def test_ellipse_follows_linear_error_growth(panel, targets):
    """Without correlations, sigma(t)^2 = sigma_0^2 + (sigma_mu t)^2 per axis (linear error
    propagation, Hipparcos Vol. 1 sec. 1.5.5): the first demo target (Gaia-like errors)."""
    panel.set_selected(0)
    major, minor, _ = panel.ellipse_values()
    t = Time(INSTANT).tdb.jyear - targets.epoch[0]
    e = targets.errors
    ra = math.hypot(e["ra_error"][0], e["pm_ra_cosdec_error"][0] * t)
    dec = math.hypot(e["dec_error"][0], e["pm_dec_error"][0] * t)
    assert (major, minor) == pytest.approx((max(ra, dec), min(ra, dec)), rel=0.01)
    ax = panel.ellipse_canvas.figure.axes[0]
    assert ax.get_xlim()[0] > ax.get_xlim()[1]  # east to the left


def test_row_click_emits_target_and_set_selected_does_not(panel, qtbot):
    view = panel.table
    source_row = 3
    view_index = panel.proxy.mapFromSource(panel.model.index(source_row, 1))
    rect = view.visualRect(view_index)
    with qtbot.waitSignal(panel.target_clicked, timeout=2000) as blocker:
        qtbot.mouseClick(view.viewport(), Qt.MouseButton.LeftButton, pos=rect.center())
    assert blocker.args == [source_row]
    with qtbot.assertNotEmitted(panel.target_clicked, wait=50):
        panel.set_selected(5)
    assert panel.proxy.mapToSource(view.currentIndex()).row() == 5
