"""One shown instant for the whole window: the target table, the pointing verdicts and the
correction ledger use the instant the night chart shows, and say which one it is.

References: the night's sunset and sunrise from PyEphem (test-only; the Sun's centre at
-50' without refraction, the Astronomical Almanac's convention), local times from the IANA
zone database (zoneinfo), and the rule that a night runs from the site's local mean solar
noon to the next (12:00 UTC minus longitude/15 h; common practice, as issue 8 states it).
"""
from __future__ import annotations

import datetime as dt
import math
from zoneinfo import ZoneInfo

import ephem
import matplotlib.dates as mdates
import numpy as np
import pytest
from PySide6.QtCore import QPoint, Qt

from epochpoint.gui.target_model import COLUMN_INDEX
from epochpoint.io.planfile import read_plan_file
from shell_support import DEMO_PLAN, WAIT_MS, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

DEMO_NIGHT = "2027-01-19"
ZONE = ZoneInfo("America/Argentina/Catamarca")  # the demo site's zone (sample_targets/)


def _utc(iso: str) -> dt.datetime:
    return dt.datetime.fromisoformat(iso.replace("Z", "+00:00"))


def _label(instant: dt.datetime) -> str:
    local = instant.astimezone(ZONE)
    return f"{local:%H:%M} {local.tzname()}"


def _pyephem_middle_of_night(site, date: str) -> dt.datetime:
    """Midpoint of sunset and the next sunrise (PyEphem), searched from local mean noon."""
    observer = ephem.Observer()
    observer.lat, observer.lon = str(site.latitude), str(site.longitude)
    observer.elevation = site.height
    observer.pressure = 0.0
    observer.horizon = "-0:50"
    noon = dt.datetime.fromisoformat(date) + dt.timedelta(hours=12 - site.longitude / 15.0)
    observer.date = ephem.Date(noon)
    sunset = observer.next_setting(ephem.Sun()).datetime()
    sunrise = observer.next_rising(ephem.Sun(), start=sunset).datetime()
    middle = sunset + (sunrise - sunset) / 2
    return middle.replace(tzinfo=dt.timezone.utc)


def _tonight(site) -> str:
    """The date of the night that holds the present (local mean solar noon rule)."""
    now = dt.datetime.now(dt.timezone.utc)
    return (now + dt.timedelta(hours=site.longitude / 15.0 - 12.0)).date().isoformat()


def _wait_for_instant(qtbot, window, check):
    qtbot.waitUntil(lambda: not window.computing() and window.now is not None
                    and check(_utc(window.now.time)), timeout=WAIT_MS)


def _alt_header(window) -> str:
    return window.model.headerData(COLUMN_INDEX["alt_now"], Qt.Orientation.Horizontal)


def test_another_night_shows_its_middle_everywhere(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    middle = _pyephem_middle_of_night(window.document.site, DEMO_NIGHT)
    _wait_for_instant(qtbot, window, lambda t: abs((t - middle).total_seconds()) < 60)

    label = _label(_utc(window.now.time))
    assert _alt_header(window) == f"Alt at {label}"
    assert label in window.instant_bar.text()
    assert label in window.ledger.title.text() and label in window.ledger.verdict.text()
    assert window.ledger.place_text("instant")[0].endswith(window.now.time)
    # The table and the chart agree there: the chart's altitude of the selected target at
    # the shown instant is the table's (both from the core, one instant).
    plan, row = window.plan, window.selected
    seconds = (_utc(window.now.time) - plan.t_ref.to_datetime(
        timezone=dt.timezone.utc)).total_seconds()
    chart_alt, _ = plan.windows.observed_altaz(np.array([row]), np.array([seconds]))
    assert window.model.computed.alt_now[row] == pytest.approx(chart_alt[0], abs=0.1)


def test_tonight_shows_the_present(make_window, qtbot):
    window = make_window()
    # Tonight at the demo plan's site (not the empty window's placeholder site, whose night
    # turns at another hour).
    tonight = _tonight(read_plan_file(DEMO_PLAN).site)
    assert window.open_path(DEMO_PLAN, night=tonight)
    wait_for_plan(qtbot, window)
    _wait_for_instant(qtbot, window, lambda t: abs(
        (t - dt.datetime.now(dt.timezone.utc)).total_seconds()) < 60)
    assert "now" in window.instant_bar.text().lower()


def test_clicking_the_night_chart_moves_the_instant(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    panel = window.tonight
    window.show_tab(0)
    qtbot.wait(50)
    panel.canvas.draw()
    plan = panel.plan
    sunset = plan.night.spans["sun"][0].to_datetime(timezone=dt.timezone.utc)
    wanted = sunset + dt.timedelta(hours=2)
    low, high = panel.ax.get_ylim()
    pos = panel.canvas.widget_pos(panel.ax, mdates.date2num(wanted), low + 0.02 * (high - low))
    qtbot.mouseClick(panel.canvas, Qt.MouseButton.LeftButton, pos=pos)
    # One pixel of a ~1000 px wide chart of a ~13 h span is under a minute.
    _wait_for_instant(qtbot, window, lambda t: abs((t - wanted).total_seconds()) < 120)
    assert _alt_header(window) == f"Alt at {_label(_utc(window.now.time))}"


def test_clicking_a_timeline_block_moves_the_instant_into_it(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    window.show_tab(0)
    qtbot.wait(50)
    timeline = window.tonight.timeline
    index, rect, start_s, end_s = max(timeline.block_rects(), key=lambda b: b[1].width())
    t_ref = window.plan.t_ref.to_datetime(timezone=dt.timezone.utc)
    start = t_ref + dt.timedelta(seconds=start_s)
    end = t_ref + dt.timedelta(seconds=end_s)
    centre = rect.center()
    qtbot.mouseClick(timeline, Qt.MouseButton.LeftButton,
                     pos=QPoint(int(centre.x()), int(centre.y())))
    _wait_for_instant(qtbot, window, lambda t: start <= t <= end)
    assert window.selected == index


def test_back_to_now_returns_to_the_present_night(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    middle = _pyephem_middle_of_night(window.document.site, DEMO_NIGHT)
    _wait_for_instant(qtbot, window, lambda t: abs((t - middle).total_seconds()) < 60)

    qtbot.mouseClick(window.instant_bar.now_button, Qt.MouseButton.LeftButton)
    assert window.document.night.date == _tonight(window.document.site)
    _wait_for_instant(qtbot, window, lambda t: abs(
        (t - dt.datetime.now(dt.timezone.utc)).total_seconds()) < 60)
    assert math.isfinite(window.model.computed.alt_now[0])


def test_sky_dome_follows_the_shown_instant(make_window, qtbot):
    window = make_window(DEMO_PLAN)
    wait_for_plan(qtbot, window)
    t_ref = window.plan.t_ref.to_datetime(timezone=dt.timezone.utc)
    sunset = window.plan.night.spans["sun"][0].to_datetime(timezone=dt.timezone.utc)
    wanted = sunset + dt.timedelta(minutes=50)  # far from the middle of the night
    window.tonight.instant_clicked.emit(wanted.strftime("%Y-%m-%dT%H:%M:%SZ"))
    _wait_for_instant(qtbot, window, lambda t: abs((t - wanted).total_seconds()) < 1)
    sky = t_ref + dt.timedelta(seconds=window.skydome.t_seconds)
    assert abs((sky - _utc(window.now.time)).total_seconds()) < 120  # one slider step
