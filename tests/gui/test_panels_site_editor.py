"""Site editor: validation by the core objects, errors next to the field, the previous site
kept on bad input, the horizon mask table, and the Sun-avoidance warning (demo site)."""
from __future__ import annotations

import numpy as np
import pytest
from PySide6.QtCore import Qt

from epochpoint.gui.panels import SiteEditor
from panels_demo import demo_inputs, settle


@pytest.fixture(scope="module")
def site():
    return demo_inputs()[1]


@pytest.fixture
def editor(qtbot, site):
    widget = SiteEditor()
    qtbot.addWidget(widget)
    widget.resize(1150, 760)
    settle(qtbot, widget)
    with qtbot.assertNotEmitted(widget.site_edited, wait=20):
        widget.set_site(site)
    yield widget
    widget.close()


def _type(qtbot, field, text):
    """Replace a field's text as a user would, finishing with Enter."""
    field.setFocus()
    field.selectAll()
    qtbot.keyClicks(field, text)
    qtbot.keyClick(field, Qt.Key.Key_Return)


def test_form_shows_the_site(editor, site):
    assert float(editor.fields["latitude"].text()) == site.latitude
    assert editor.fields["timezone"].currentText() == site.timezone
    assert editor.fields["mount_type"].currentData() == site.interlocks.mount.mount_type
    assert editor.horizon.table.rowCount() == len(site.interlocks.horizon.azimuth)


def test_latitude_95_is_refused_and_the_old_site_stays(editor, qtbot, site):
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        _type(qtbot, editor.fields["latitude"], "95")
    assert "must be in [-90, +90]" in editor.errors["latitude"].text()
    assert editor.site is site
    # Fixing the field clears the message and applies the edit.
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        _type(qtbot, editor.fields["latitude"], "-28.5")
    assert editor.errors["latitude"].text() == ""
    assert blocker.args[0].latitude == -28.5


def test_good_edit_sends_the_new_site(editor, qtbot, site):
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        _type(qtbot, editor.fields["height"], "2900")
    new = blocker.args[0]
    assert new.height == 2900.0
    assert (new.latitude, new.longitude, new.timezone, new.interlocks) == (
        site.latitude, site.longitude, site.timezone, site.interlocks)
    assert editor.site is new


def test_no_signal_while_typing_and_none_for_an_unchanged_value(editor, qtbot):
    field = editor.fields["temperature"]
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        field.setFocus()
        field.selectAll()
        qtbot.keyClicks(field, "-3")  # no Enter yet: not finished
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        qtbot.keyClick(field, Qt.Key.Key_Return)
    assert blocker.args[0].temperature == -3.0
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        _type(qtbot, editor.fields["humidity"], editor.fields["humidity"].text())


def test_mount_limit_errors_come_from_the_core(editor, qtbot, site):
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        _type(qtbot, editor.fields["ha_east"], "13")
    assert "(0, 12] hours" in editor.errors["ha_east"].text()
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        _type(qtbot, editor.fields["slew_rate"], "fast")
    assert "'fast' is not a number" in editor.errors["slew_rate"].text()
    assert editor.site is site


def test_unknown_time_zone_is_refused(editor, qtbot, site):
    combo = editor.fields["timezone"]
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        _type(qtbot, combo.lineEdit(), "Mars/Olympus_Mons")
    assert "is not an IANA time zone name" in editor.errors["timezone"].text()
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        _type(qtbot, combo.lineEdit(), "America/Santiago")
    assert blocker.args[0].timezone == "America/Santiago"


def test_horizon_table_edit_gives_the_matching_mask(editor, qtbot):
    table = editor.horizon.table
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        table.item(2, 1).setText("30")  # the ridge at azimuth 85 rises to 30 deg
    mask = blocker.args[0].interlocks.horizon
    rows = [(float(table.item(r, 0).text()), float(table.item(r, 1).text()))
            for r in range(table.rowCount())]
    np.testing.assert_array_equal(mask.azimuth, [a for a, _ in rows])
    np.testing.assert_array_equal(mask.altitude, [h for _, h in rows])
    assert mask.min_altitude(85.0) == 30.0


def test_horizon_rows_added_sorted_and_removed(editor, qtbot, site):
    table = editor.horizon.table
    with qtbot.waitSignal(editor.site_edited, timeout=1000):
        editor.horizon.add_row()  # 310 deg, altitude of the last point
    assert table.rowCount() == len(site.interlocks.horizon.azimuth) + 1
    # An azimuth typed out of order is accepted and the table shows azimuth order.
    with qtbot.waitSignal(editor.site_edited, timeout=1000) as blocker:
        table.item(table.rowCount() - 1, 0).setText("30")
    mask = blocker.args[0].interlocks.horizon
    assert list(mask.azimuth) == sorted(mask.azimuth) and 30.0 in mask.azimuth
    assert float(table.item(1, 0).text()) == 30.0
    table.clearSelection()
    while table.rowCount():
        editor.horizon.remove_rows()
    assert editor.site.interlocks.horizon is None


def test_bad_horizon_point_is_shown_by_the_table(editor, qtbot, site):
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        editor.horizon.table.item(0, 0).setText("400")
    assert "[0, 360)" in editor.errors["horizon"].text()
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        editor.horizon.table.item(0, 0).setText("north")
    assert "row 1, azimuth: 'north' is not a number" in editor.errors["horizon"].text()
    assert editor.site is site


@pytest.mark.parametrize("radius, warned, words", [
    ("35", False, ""), ("20", True, "below 30°"), ("0", True, "OFF")])
def test_sun_avoidance_warning(editor, qtbot, radius, warned, words):
    editor.sun_warning.setVisible(False)
    _type(qtbot, editor.fields["sun_avoidance"], radius)
    assert editor.sun_warning.isVisible() is warned
    assert words in editor.sun_warning.text()
    assert editor.site.interlocks.sun_avoidance == float(radius)


def test_sun_avoidance_above_90_is_refused(editor, qtbot, site):
    with qtbot.assertNotEmitted(editor.site_edited, wait=50):
        _type(qtbot, editor.fields["sun_avoidance"], "95")
    assert "[0, 90]" in editor.errors["sun_avoidance"].text()
    assert editor.site is site
