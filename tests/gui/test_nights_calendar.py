"""The Nights tab: the coming nights as a calendar with the timed events and the Moon, a night
opened from it in the planning view, and reserved event blocks in the app's schedule.

Outside references (tests only, independent of the code under test):
- each event's observed mid time from astropy's barycentric light travel time
  (Time.light_travel_time(kind="barycentric", location=...)), inverted by iteration;
- the Sun's and the Moon's altitude from astropy's AltAz (get_sun, get_body), the Moon's
  illuminated fraction from its elongation: k = (1 + cos i) / 2 with the phase angle
  i = 180 deg - elongation (Meeus, Astronomical Algorithms, 2nd ed., ch. 48, the simple form;
  from memory; good to about 1 % of the fraction);
- local clock times from Python's zoneinfo (IANA database).
The targets are invented: an invented transiting planet and an invented eclipsing binary.
"""
import datetime as dt
import warnings
from zoneinfo import ZoneInfo

import astropy.units as u
import numpy as np
import pytest
from astropy.coordinates import AltAz, EarthLocation, SkyCoord, get_body, get_sun
from astropy.time import Time
from PySide6.QtCore import QPoint, Qt

import epochpoint as ep
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets

from shell_support import WAIT_MS, make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

FIRST_NIGHT = "2027-01-19"
NIGHTS = 12
ZONE = "America/Argentina/Catamarca"
# The invented transit's mid falls near 05:00 UTC on 2027-01-21 (the night of 2027-01-20).
TRANSIT_NIGHT = "2027-01-20"


SITE_SPEC = "-28.4731,-67.2918,2870"


def _site() -> Site:
    """An invented site in the Andes' foothills (the demo observatory's place, no mask), as
    the command line reads --site SITE_SPEC --timezone ZONE."""
    from dataclasses import replace

    from epochpoint.io.sitefile import parse_site_spec

    return replace(parse_site_spec(SITE_SPEC), timezone=ZONE)


def _targets() -> Targets:
    """An invented transit (P 2.2 d), an invented eclipsing binary (P 0.9137 d) and a target
    without an ephemeris."""
    return Targets.from_columns(
        name=["Candil-7 b", "Candil EB 12", "Plain star"],
        ra=[120.0, 60.0, 100.0], dec=[-30.0, 5.0, -45.0],
        extra={"event_epoch": np.array(["2461096.7083", "2461300.41", ""], dtype=object),
               "event_period": np.array(["2.2", "0.9137", ""], dtype=object),
               "event_duration": np.array(["2.0", "1.6", ""], dtype=object),
               "event_baseline": np.array(["30", "20", ""], dtype=object),
               "event_kind": np.array(["transit", "primary eclipse", ""], dtype=object),
               "priority": np.array([1, 2, 3], dtype=object)})


@pytest.fixture(autouse=True)
def _quiet():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        yield


def _location(site):
    return EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                       site.height * u.m)


def _reference_mids(targets, site, first_date, nights):
    """{(name, cycle): observed mid Time (UTC)} of every cycle from a day before the first
    night to a day after the last, by astropy's barycentric light travel time."""
    loc = _location(site)
    start = Time(f"{first_date}T00:00:00", scale="utc") - 1 * u.day
    end = start + (nights + 2) * u.day
    out = {}
    for i, name in enumerate(targets.names()):
        epoch = targets.extra["event_epoch"][i]
        if not epoch:
            continue
        t0, period = float(epoch), float(targets.extra["event_period"][i])
        cycles = np.arange(int(np.floor((start.tdb.jd - t0) / period)),
                           int(np.ceil((end.tdb.jd - t0) / period)) + 1)
        bjd = Time(t0 + cycles * period, format="jd", scale="tdb")
        coord = SkyCoord(ra=targets.ra[i] * u.deg, dec=targets.dec[i] * u.deg)
        t = Time(bjd, location=loc)
        for _ in range(4):  # t = BJD - light time(t): converges to nanoseconds
            t = Time(bjd - t.light_travel_time(coord, kind="barycentric", location=loc),
                     location=loc)
        out.update({(str(name), int(n)): t.utc[k] for k, n in enumerate(cycles)})
    return out


def _utc_of_bar(date: str, hours: float) -> dt.datetime:
    """The UTC instant of a bar position: local clock hours after 00:00 of the row's date."""
    day = dt.date.fromisoformat(date)
    wall = dt.datetime(day.year, day.month, day.day) + dt.timedelta(hours=hours)
    return wall.replace(tzinfo=ZoneInfo(ZONE)).astimezone(dt.timezone.utc)


@pytest.fixture
def shown_calendar(qtbot):
    from epochpoint.gui.panels.calendar_panel import CalendarPanel

    panel = CalendarPanel()
    qtbot.addWidget(panel)
    panel.resize(1100, 760)
    panel.set_inputs(_targets(), _site(), "astronomical", None)
    panel.set_start(FIRST_NIGHT, refresh=False)
    panel.nights_box.setValue(NIGHTS)  # not shown yet: computed when shown
    with qtbot.waitSignal(panel.computed, timeout=WAIT_MS):
        panel.show()
    qtbot.waitExposed(panel)
    panel.canvas.draw()
    return panel


def test_bars_are_the_listed_events_at_their_mid_times(shown_calendar):
    """One bar per event epochpoint.events lists over the nights (observable or not), on the
    row of its night, centred on the mid time astropy's barycentric correction gives (within
    1 minute), and every cycle whose mid falls in astronomical darkness (astropy's Sun below
    -18.5 deg) is drawn."""
    panel = shown_calendar
    targets, site = _targets(), _site()
    listed = ep.events(targets, site, FIRST_NIGHT, NIGHTS, include_all=True)
    reference = _reference_mids(targets, site, FIRST_NIGHT, NIGHTS)
    rows = {night.date: k for k, night in enumerate(panel.calendar.nights)}
    patches = {p.get_gid(): p for p in panel.drawing.ax.patches if p.get_gid()}
    drawn = {}
    for k, j in panel.drawing.bars:
        bar = patches[f"event:{j}"]
        name, cycle, night = (str(listed["name"][j]), int(listed["cycle"][j]),
                              str(listed["night"][j]))
        assert rows[night] == k
        assert bar.get_y() + bar.get_height() / 2 == pytest.approx(k)
        drawn[(name, cycle)] = _utc_of_bar(night, bar.get_x() + bar.get_width() / 2)
    assert set(drawn) == {(str(n), int(c)) for n, c in zip(listed["name"], listed["cycle"])}
    assert len(drawn) >= 6
    for key, mid in drawn.items():
        expected = reference[key].to_datetime(timezone=dt.timezone.utc)
        assert abs((mid - expected).total_seconds()) < 60.0, key

    # Completeness: cycles whose mid is in darkness by astropy's Sun.
    loc = _location(site)
    first = Time(f"{FIRST_NIGHT}T12:00:00", scale="utc") - site.longitude / 360.0 * u.day
    last = first + NIGHTS * u.day
    keys = [k for k, t in reference.items() if first < t < last]
    times = Time([reference[k] for k in keys])
    sun_alt = get_sun(times).transform_to(AltAz(obstime=times, location=loc)).alt.deg
    dark = [k for k, alt in zip(keys, sun_alt) if alt < -18.5]
    assert len(dark) >= 4
    assert not set(dark) - set(drawn)


def test_bar_look_follows_observability(shown_calendar):
    """Full bars are filled solid, partial ones hatched, 'none' ones outlined only."""
    panel = shown_calendar
    events = panel.calendar.events
    patches = {p.get_gid(): p for p in panel.drawing.ax.patches if p.get_gid()}
    seen = set()
    for _, j in panel.drawing.bars:
        bar, kind = patches[f"event:{j}"], str(events["observable"][j])
        seen.add(kind)
        if kind == "full":
            assert bar.get_fill() and bar.get_facecolor()[3] > 0 and not bar.get_hatch()
        elif kind == "partial":
            assert bar.get_hatch()
        else:
            assert bar.get_facecolor()[3] == 0
    assert {"full", "none"} <= seen


def test_moon_per_night(shown_calendar):
    """Each row's Moon: its lit fraction within 2 % of astropy's elongation, and its line
    present at the middle of the darkness exactly when astropy has the Moon up (more than
    2 deg from the horizon)."""
    panel = shown_calendar
    loc = _location(_site())
    for k, night in enumerate(panel.calendar.nights):
        a = Time(night.dark_start.rstrip("Z"), scale="utc")
        b = Time(night.dark_end.rstrip("Z"), scale="utc")
        middle = a + (b - a) / 2
        moon, sun = get_body("moon", middle, loc), get_sun(middle)
        elongation = moon.separation(sun).rad
        lit = (1.0 + np.cos(np.pi - elongation)) / 2.0  # Meeus eq. 48.1
        assert night.moon_illumination == pytest.approx(lit, abs=0.02)
        texts = [t.get_text() for t in panel.drawing.ax.texts
                 if t.get_position()[1] == k and t.get_text().endswith("%")]
        assert texts == [f"{100 * night.moon_illumination:.0f}%"]
        alt = moon.transform_to(AltAz(obstime=middle, location=loc)).alt.deg
        if abs(alt) < 2.0:
            continue
        hours = (middle.to_datetime(timezone=dt.timezone.utc).astimezone(ZoneInfo(ZONE))
                 .replace(tzinfo=None) - dt.datetime.fromisoformat(night.date)
                 ).total_seconds() / 3600.0
        lines = [line.get_xdata() for line in panel.drawing.ax.lines
                 if line.get_label() == "_moon" and line.get_ydata()[0] > k
                 and line.get_ydata()[0] < k + 0.5]
        up = any(x0 <= hours <= x1 for x0, x1 in lines)
        assert up == (alt > 0.0), night.date


def _load(window, site, targets, night_date="2027-01-19"):
    from epochpoint.io.planfile import NightSettings, PlanDocument

    window.document.load(PlanDocument(site=site, night=NightSettings(date=night_date),
                                      targets=targets), None)


def test_double_click_opens_the_night_in_the_planning_view(make_window, qtbot):
    """A double click on a night row sets the plan's night to that date (one undoable
    change, as the night bar's) and shows the Tonight tab."""
    window = make_window()
    _load(window, _site(), _targets())
    calendar = window.calendar
    calendar.set_start(FIRST_NIGHT, refresh=False)
    calendar.nights_box.setValue(5)
    with qtbot.waitSignal(calendar.computed, timeout=WAIT_MS):
        window.show_tab(window.tabs.indexOf(calendar))
    calendar.canvas.draw()
    row = 3
    pos = calendar.canvas.widget_pos(calendar.drawing.ax, 24.0, row)
    qtbot.mouseDClick(calendar.canvas, Qt.MouseButton.LeftButton, pos=QPoint(pos))
    qtbot.waitUntil(lambda: window.document.night.date == "2027-01-22", timeout=5000)
    assert window.tabs.currentWidget() is window.tonight
    assert window.night_bar.date.date().toString(Qt.DateFormat.ISODate) == "2027-01-22"
    window.document.undo_stack.undo()
    assert window.document.night.date == "2027-01-19"


def test_app_schedule_reserves_the_observable_event(make_window, qtbot, tmp_path):
    """The app's plan of the transit's night has a fixed block for it, from first contact
    minus the baseline to last contact plus it, around astropy's mid time (within 1 s); its
    schedule JSON matches `epochpoint plan --format json` on the same list, "fixed" entries
    included; the timeline draws it as a reserved block."""
    import json

    from epochpoint.cli.main import main
    from epochpoint.io import write_targets

    window = make_window()
    site, targets = _site(), _targets()
    _load(window, site, targets, TRANSIT_NIGHT)
    wait_for_plan(qtbot, window, lambda plan: plan.night.date.isoformat() == TRANSIT_NIGHT)
    data = window.plan.to_json()
    fixed = [e for e in data["schedule"] if e.get("fixed")]
    transit = [e for e in fixed if e["name"] == "Candil-7 b"]
    assert len(transit) == 1 and transit[0]["observable"] == "full"
    mid = _reference_mids(targets, site, TRANSIT_NIGHT, 1)[("Candil-7 b", transit[0]["cycle"])]
    start = Time(transit[0]["start"].rstrip("Z"), scale="utc")
    end = Time(transit[0]["end"].rstrip("Z"), scale="utc")
    half_s = 3600.0 + 30 * 60.0  # half the 2 h transit plus the 30 min baseline
    assert abs((start - mid).sec + half_s) < 1.0 and abs((end - mid).sec - half_s) < 1.0
    # No other block overlaps a reserved one.
    spans = sorted((e["start"], e["end"]) for e in data["schedule"])
    assert all(a[1] <= b[0] for a, b in zip(spans, spans[1:]))
    names = window.plan.windows.names
    assert sorted(str(names[i]) for i, *_ in window.tonight.timeline.fixed_rects()) == \
        sorted(e["name"] for e in fixed)

    # The command line on the same list and site gives the same schedule.
    csv = tmp_path / "events.csv"
    write_targets(targets, str(csv))
    out = tmp_path / "plan.json"
    assert main(["plan", str(csv), f"--site={SITE_SPEC}", "--timezone", ZONE, "--night",
                 TRANSIT_NIGHT, "--format", "json", "--output", str(out)]) == 0
    cli = json.loads(out.read_text())
    assert cli["schedule"] == data["schedule"]
