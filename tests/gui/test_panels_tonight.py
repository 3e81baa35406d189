"""Tonight panel: the night chart drawn from a real plan, the hover readout, clicks that select
targets, and the schedule timeline under it (demo night, see panels_demo.py)."""
from __future__ import annotations

import datetime as dt
import math
import re
from zoneinfo import ZoneInfo

import matplotlib.dates as mdates
import numpy as np
import pytest
from PySide6.QtCore import QPoint, Qt

from epochpoint.gui.panels import TonightPanel
from panels_demo import demo_plan, shown_panel

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]


@pytest.fixture(scope="module")
def demo():
    return demo_plan()


@pytest.fixture
def panel(qtbot, demo):
    widget = shown_panel(qtbot, TonightPanel, (1100, 720), demo[0])
    yield widget
    widget.close()


def _target_lines(panel):
    """Label -> Line2D of the thin (full-night) target lines on the chart."""
    names = set(str(n) for n in panel.plan.windows.names)
    return {line.get_label(): line for line in panel.ax.get_lines()
            if line.get_label() in names}


def _t_ref_utc(plan) -> dt.datetime:
    return plan.t_ref.to_datetime(timezone=dt.timezone.utc)


def _x_of(plan, seconds: float) -> float:
    return mdates.date2num(_t_ref_utc(plan) + dt.timedelta(seconds=seconds))


def _clear_point(panel, min_gap_px=30.0):
    """A (target index, seconds, altitude) in a scheduled block far from every other line."""
    plan, ax = panel.plan, panel.ax
    drawn = list(panel.drawn)
    for i, s, e in zip(plan.schedule.index, plan.schedule.start_s, plan.schedule.end_s):
        if i not in drawn:
            continue
        for t in np.linspace(s, e, 5):
            alt, _ = plan.windows.observed_altaz(np.array(drawn), np.full(len(drawn), t))
            y = ax.transData.transform(np.column_stack((np.full(len(drawn), _x_of(plan, t)),
                                                        alt)))[:, 1]
            k = drawn.index(i)
            others = np.delete(y, k)
            moon = plan.sky.interp("moon_alt", t)
            if np.min(np.abs(others - y[k])) > min_gap_px and abs(moon - alt[k]) > 5:
                return int(i), float(t), float(alt[k])
    raise AssertionError("no scheduled block clear of other lines on the demo chart")


def test_chart_draws_one_line_per_target_with_its_observed_altitude(panel):
    plan = panel.plan
    lines = _target_lines(panel)
    # Twelve lines by default, and the demo night has more than twelve observable targets.
    observable = sum(1 for w in plan.windows.windows if w)
    assert len(lines) == min(12, observable) == len(panel.drawn)
    for index in panel.drawn:
        line = lines[str(plan.windows.names[index])]
        x, y = (np.asarray(v, dtype=float) for v in line.get_data())
        seconds = (x - _x_of(plan, 0.0)) * 86400.0
        expected, _ = plan.windows.observed_altaz(np.full(seconds.shape, index), seconds)
        np.testing.assert_allclose(y, expected, atol=1e-9)


def test_line_peaks_follow_the_meridian_altitude(panel):
    """A star's highest altitude is 90 - |latitude - declination| at transit (textbook
    spherical astronomy, e.g. Meeus, Astronomical Algorithms ch. 13; common practice), plus a
    refraction of about 1' at these altitudes; checked for lines whose transit is drawn."""
    plan = panel.plan
    lines = _target_lines(panel)
    checked = 0
    for index in panel.drawn:
        line = lines[str(plan.windows.names[index])]
        x, y = (np.asarray(v, dtype=float) for v in line.get_data())
        transit_x = _x_of(plan, plan.windows.transit[index])
        if not x[5] < transit_x < x[-5]:
            continue
        meridian = 90.0 - abs(plan.site.latitude - plan.windows.dec[index])
        if meridian < 30.0:
            continue
        # The chart samples every ~100 s; near the zenith altitude changes up to 0.25 deg/min.
        assert abs(np.max(y) - meridian) < 0.5, plan.windows.names[index]
        checked += 1
    assert checked >= 5


def test_selected_target_is_drawn_thicker(panel):
    index = int(panel.drawn[2])
    panel.set_selected(index)
    lines = _target_lines(panel)
    name = str(panel.plan.windows.names[index])
    widths = {label: line.get_linewidth() for label, line in lines.items()}
    assert widths[name] > max(w for label, w in widths.items() if label != name)


def test_click_on_a_line_emits_its_target(panel, qtbot):
    index, t, alt = _clear_point(panel)
    pos = panel.canvas.widget_pos(panel.ax, _x_of(panel.plan, t), alt)
    with qtbot.waitSignal(panel.target_clicked, timeout=2000) as blocker:
        qtbot.mouseClick(panel.canvas, Qt.MouseButton.LeftButton, pos=pos)
    assert blocker.args == [index]


def test_click_far_from_every_line_emits_nothing(panel, qtbot):
    plan = panel.plan
    # 89 deg ten minutes before the chart's right edge: no demo target is that high then.
    t = (panel.ax.get_xlim()[1] - _x_of(plan, 0.0)) * 86400.0 - 600.0
    pos = panel.canvas.widget_pos(panel.ax, _x_of(plan, t), 89.0)
    with qtbot.assertNotEmitted(panel.target_clicked, wait=100):
        qtbot.mouseClick(panel.canvas, Qt.MouseButton.LeftButton, pos=pos)


def test_hover_reads_time_altitude_and_airmass(panel, qtbot):
    plan = panel.plan
    index, t, alt = _clear_point(panel)
    pos = panel.canvas.widget_pos(panel.ax, _x_of(plan, t), alt)
    qtbot.mouseMove(panel.canvas, pos)
    qtbot.waitUntil(lambda: str(plan.windows.names[index]) in panel.readout.text(), timeout=2000)
    text = panel.readout.text()
    # The time under the cursor in the site's IANA zone, labelled with the zone's own
    # abbreviation, then UTC, to the pixel's minute (reference: zoneinfo).
    x_px = pos.x() * (panel.canvas.device_pixel_ratio or 1.0)
    x_data = panel.ax.transData.inverted().transform((x_px, 0.0))[0]
    utc = mdates.num2date(x_data).astimezone(dt.timezone.utc)
    local = utc.astimezone(ZoneInfo(plan.site.timezone))
    assert f"{local:%H:%M} {local.tzname()} ({utc:%H:%M} UTC)" in text
    shown_alt = float(re.search(r"altitude ([\d.]+)°", text).group(1))
    assert shown_alt == pytest.approx(alt, abs=0.3)
    # Airmass by Kasten & Young (1989, Applied Optics 28, 4735), written out here.
    h = shown_alt
    airmass = 1.0 / (math.sin(math.radians(h)) + 0.50572 * (h + 6.07995) ** -1.6364)
    shown_airmass = float(re.search(r"airmass ([\d.]+)", text).group(1))
    assert shown_airmass == pytest.approx(airmass, abs=0.02)


def test_timeline_block_click_emits_its_target(panel, qtbot):
    timeline = panel.timeline
    blocks = timeline.block_rects()
    assert [b[0] for b in blocks] == [int(i) for i in panel.plan.schedule.index]
    widest = max(blocks, key=lambda b: b[1].width())
    centre = widest[1].center()
    with qtbot.waitSignal(panel.target_clicked, timeout=2000) as blocker:
        qtbot.mouseClick(timeline, Qt.MouseButton.LeftButton,
                         pos=QPoint(int(centre.x()), int(centre.y())))
    assert blocker.args == [widest[0]]


def test_timeline_lines_up_with_the_chart(panel):
    """A block's left edge sits under its start time on the chart axes (within 2 px)."""
    plan, timeline = panel.plan, panel.timeline
    i, rect, start, _ = timeline.block_rects()[0]
    chart_x_px = panel.ax.transData.transform((_x_of(plan, start), 0.0))[0]
    chart_x = chart_x_px / (panel.canvas.device_pixel_ratio or 1.0) + panel.canvas.x()
    assert abs((rect.left() + timeline.x()) - chart_x) < 2.0


def test_no_plan_clears_the_chart(panel):
    panel.set_plan(None)
    assert panel.ax is None
    assert "No plan" in panel.readout.text()
