"""Sky dome panel: marker positions, orientation, the Moon, the Sun-avoidance circle, the
default instant and click-to-select (demo night, see panels_demo.py)."""
from __future__ import annotations

import math
import re

import numpy as np
import pytest
from PySide6.QtCore import Qt

from epochpoint.gui.panels import SkyDomePanel
from panels_demo import demo_plan, shown_panel

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


@pytest.fixture(scope="module")
def demo():
    return demo_plan()


@pytest.fixture
def panel(qtbot, demo):
    widget = shown_panel(qtbot, SkyDomePanel, (900, 760), demo[0])
    yield widget
    widget.close()


def _mid_darkness(plan) -> float:
    a, b = plan.night.spans["astronomical"]
    return float(((a - plan.t_ref) + 0.5 * (b - a)).to_value("s"))


def _line(ax, gid):
    found = [line for line in ax.get_lines() if line.get_gid() == gid]
    return found[0] if found else None


def test_default_instant_is_mid_darkness_when_now_is_not_in_the_night(panel):
    import datetime as dt

    from epochpoint.charts.night_chart import time_span
    from epochpoint.charts.plan_clock import seconds_of

    start, end = time_span(panel.plan)
    if start <= seconds_of(panel.plan, dt.datetime.now(dt.timezone.utc)) <= end:
        pytest.skip("running during the demo night itself")
    assert panel.t_seconds == pytest.approx(_mid_darkness(panel.plan), abs=1.0)


def test_markers_sit_at_the_plans_observed_altitude_and_azimuth(panel):
    plan, t = panel.plan, panel.t_seconds
    n = len(plan.windows.names)
    alt, az = plan.windows.observed_altaz(np.arange(n), np.full(n, t))
    up = alt > 0.0
    drawn = []
    for gid in ("targets_observable", "targets_not_observable"):
        theta, r = (np.asarray(v, dtype=float) for v in _line(panel.ax, gid).get_data())
        drawn += list(zip(np.degrees(theta) % 360.0, 90.0 - r))
    expected = sorted(zip(az[up], alt[up]))
    assert len(drawn) == int(up.sum()) > 10
    np.testing.assert_allclose(sorted(drawn), expected, atol=1e-9)


def test_observable_and_not_differ_in_shape_and_colour(panel):
    yes = _line(panel.ax, "targets_observable")
    no = _line(panel.ax, "targets_not_observable")
    assert yes.get_marker() != no.get_marker()
    assert yes.get_color() != no.get_color()
    # Observable now means inside one of the target's windows (every constraint met).
    t = panel.t_seconds
    theta, _ = yes.get_data()
    windows = panel.plan.windows.windows
    inside = [any(s <= t <= e for s, e in windows[i]) for i in panel.marks.indices]
    assert len(theta) == sum(inside)


def test_east_is_left_and_north_is_up(panel):
    """Seen looking up, with north at the top, east is on the left (common practice for
    all-sky maps)."""
    ax = panel.ax
    centre = ax.transData.transform((0.0, 0.0))
    east = ax.transData.transform((math.radians(90.0), 45.0))
    north = ax.transData.transform((0.0, 45.0))
    assert east[0] < centre[0] - 50 and abs(east[1] - centre[1]) < 1
    assert north[1] > centre[1] + 50 and abs(north[0] - centre[0]) < 1
    assert "east at LEFT" in " ".join(t.get_text() for t in panel.canvas.figure.texts)


def test_moon_label_gives_its_illuminated_fraction(panel):
    """The Moon's illuminated fraction against PyEphem (moon_phase), within 1 %."""
    import ephem

    plan, t = panel.plan, panel.t_seconds
    labels = [a.get_text() for a in panel.ax.texts if a.get_text().startswith("Moon ")]
    assert labels, "the Moon is up at mid-darkness on the demo night"
    shown = float(re.search(r"Moon (\d+)%", labels[0]).group(1))
    when = plan.sky.time_at(t).datetime
    reference = 100.0 * ephem.Moon(ephem.Date(when)).moon_phase
    assert shown == pytest.approx(reference, abs=1.0)


def test_sun_avoidance_circle_in_twilight_only(panel):
    plan = panel.plan
    assert _line(panel.ax, "sun_avoidance") is None  # Sun far below -18 deg at mid-darkness
    sunset = float((plan.night.sunset - plan.t_ref).to_value("s"))
    panel.set_time(sunset - 600.0)
    circle = _line(panel.ax, "sun_avoidance")
    sun = _line(panel.ax, "sun")
    assert circle is not None and sun is not None
    # Every point of the circle lies the avoidance radius from the Sun (spherical law of
    # cosines, computed here).
    s_theta, s_r = (float(v[0]) for v in sun.get_data())
    h0, a0 = math.radians(90.0 - s_r), s_theta
    theta, r = (np.asarray(v, dtype=float) for v in circle.get_data())
    h = np.radians(90.0 - r)
    cos_d = np.sin(h0) * np.sin(h) + np.cos(h0) * np.cos(h) * np.cos(theta - a0)
    distance = np.degrees(np.arccos(np.clip(cos_d, -1, 1)))
    np.testing.assert_allclose(distance, plan.site.interlocks.sun_avoidance, atol=1e-6)


def test_click_near_a_marker_selects_it(panel, qtbot):
    m = panel.marks
    points = panel.marker_positions()
    # The marker farthest from all others, so the click is unambiguous.
    gaps = [np.min(np.delete(np.hypot(*(points - p).T), k)) for k, p in enumerate(points)]
    k = int(np.argmax(gaps))
    pos = panel.canvas.widget_pos(panel.ax, math.radians(m.az[k]), 90.0 - m.alt[k])
    with qtbot.waitSignal(panel.target_clicked, timeout=2000) as blocker:
        qtbot.mouseClick(panel.canvas, Qt.MouseButton.LeftButton, pos=pos)
    assert blocker.args == [int(m.indices[k])]


def test_slider_moves_the_sky(panel, qtbot):
    before = panel.t_seconds
    panel.slider.setValue(panel.slider.value() + 60)  # one hour later
    qtbot.waitUntil(lambda: not panel._redraw.isActive(), timeout=2000)
    assert panel.t_seconds == pytest.approx(before + 3600.0, abs=60.0)
    texts = " ".join(t.get_text() for t in panel.canvas.figure.texts)
    assert f"sky at {panel.time_label.text()}" in texts


def test_selected_target_is_ringed(panel):
    index = int(panel.marks.indices[0])
    panel.set_selected(index)
    ring = _line(panel.ax, "selected")
    theta, r = (float(v[0]) for v in ring.get_data())
    k = list(panel.marks.indices).index(index)
    assert (math.degrees(theta) % 360.0, 90.0 - r) == pytest.approx(
        (panel.marks.az[k], panel.marks.alt[k]))
