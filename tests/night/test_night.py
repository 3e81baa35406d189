"""Night boundaries, darkness stretches and Moon rise/set against outside references.

References (tests only):
- PyEphem (the `ephem` package; libastro's own Sun and Moon theories and its own rise/set
  search): Observer with pressure=0 (no refraction) and horizon '-0:50', '-6', '-12', '-18'
  with use_center=True for the Sun, or '-0:34' with the upper limb (use_center=False) for the
  Moon; next_setting / next_rising searched from the window's local noon. PyEphem's
  AlwaysUpError / NeverUpError, and events beyond the window, mean "no such event" (None);
- astropy (get_body('sun') in AltAz with pressure 0) for the odd-night stretches;
- the altitude of the Sun at its lowest and highest, 90 - |latitude - declination| and its
  mirror, with the solstice declination of 23.44 deg (common practice).
"""
import datetime as dt

import ephem
import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import AltAz, EarthLocation, get_body, solar_system_ephemeris
from astropy.time import Time

from epochpoint.core.night import (EVENT_KEYS, darkness_interval, moon_events, night_boundaries,
                                   night_window, sun_below_intervals)
from epochpoint.core.site import Site, SiteError
from epochpoint.core.timescale import TimeInputError

pytestmark = pytest.mark.filterwarnings("ignore::erfa.ErfaWarning")

# Agreement with PyEphem measured at 0.11 s at most (2024); the brief asks for 30 s.
EVENT_TOLERANCE_S = 5.0
MOON_TOLERANCE_S = 5.0

# The Sun's centre at each event, as PyEphem horizons (Astronomical Almanac definitions).
HORIZONS = {
    "sunset": ("-0:50", False), "sunrise": ("-0:50", True),
    "civil_twilight_end": ("-6", False), "civil_twilight_start": ("-6", True),
    "nautical_twilight_end": ("-12", False), "nautical_twilight_start": ("-12", True),
    "astronomical_twilight_end": ("-18", False), "astronomical_twilight_start": ("-18", True),
}

# Invented sites at real-world latitudes and zones: (site, date, what the night shows).
CHILE = Site(-30.24, -70.74, 2200.0, name="southern mountain", timezone="America/Santiago")
HAWAII = Site(19.82, -155.47, 4200.0, name="island summit", timezone="Pacific/Honolulu")
HOLLAND = Site(52.0, 5.0, 0.0, name="northern lowland", timezone="Europe/Amsterdam")
ARCTIC = Site(69.65, 18.96, 20.0, name="arctic coast", timezone="Europe/Oslo")
SVALBARD = Site(78.2, 15.6, 10.0, name="high arctic", timezone="Europe/Oslo")
OTAGO = Site(-45.0, 170.5, 300.0, name="southern plain", timezone="Pacific/Auckland")
EQUATOR = Site(0.0, 37.0, 1800.0, name="equatorial highland", timezone="Africa/Nairobi")

NIGHTS = (
    (CHILE, "2024-06-21", "long southern winter night"),
    (CHILE, "2024-12-21", "short southern summer night"),
    (HAWAII, "2024-03-20", "equinox at +20"),
    (HOLLAND, "2024-06-21", "+52 at midsummer: no astronomical darkness"),
    (ARCTIC, "2024-06-21", "+69 at midsummer: midnight Sun"),
    (ARCTIC, "2024-05-15", "+69 in May: sunset but no civil darkness"),
    (ARCTIC, "2024-12-21", "+69 at midwinter: polar night with twilights"),
    (SVALBARD, "2024-02-10", "+78 in February: polar night, all twilights"),
    (OTAGO, "2024-12-21", "-45 at midsummer: brief astronomical darkness"),
    (EQUATOR, "2024-09-22", "equator at the equinox"),
)


def _observer(site: Site, horizon: str) -> ephem.Observer:
    observer = ephem.Observer()
    observer.lat, observer.lon = str(site.latitude), str(site.longitude)
    observer.elevation, observer.pressure, observer.horizon = site.height, 0.0, horizon
    return observer


def _pyephem_event(site, window_start, window_end, horizon, rising, body, use_center):
    """PyEphem's next rising/setting after local noon, or None when it does not happen."""
    observer = _observer(site, horizon)
    observer.date = ephem.Date(window_start.utc.datetime)
    search = observer.next_rising if rising else observer.next_setting
    try:
        found = search(body, use_center=use_center)
    except (ephem.AlwaysUpError, ephem.NeverUpError):
        return None
    t = Time(ephem.Date(found).datetime(), scale="utc")
    return t if t < window_end else None


@pytest.fixture(scope="module")
def nights():
    return {(site.name, date): night_boundaries(site, date) for site, date, _ in NIGHTS}


@pytest.mark.parametrize("site,date,what", NIGHTS, ids=[n[2] for n in NIGHTS])
def test_sun_events_match_pyephem(nights, site, date, what):
    night = nights[(site.name, date)]
    for key, (horizon, rising) in HORIZONS.items():
        theirs = _pyephem_event(site, night.window_start, night.window_end, horizon, rising,
                                ephem.Sun(), use_center=True)
        ours = getattr(night, key)
        assert (ours is None) == (theirs is None), f"{key}: ours {ours}, PyEphem {theirs}"
        if ours is not None:
            diff_s = abs((ours - theirs).sec)
            assert diff_s < EVENT_TOLERANCE_S, f"{key}: {diff_s:.2f} s from PyEphem"


def test_the_odd_nights_have_the_expected_missing_events(nights):
    """From the Sun's lowest altitude, -(90 - |lat| - 23.44) at a summer solstice and its
    highest, 90 - |lat| - 23.44 at a winter one (common practice): at +52 in June the Sun
    stays above -14.6 deg, at +69.65 above +2.8 deg, and at +69.65 in December it peaks at
    -3.1 deg, between the sunset level (-50') and civil twilight (-6 deg)."""
    holland = nights[(HOLLAND.name, "2024-06-21")]
    assert holland.astronomical_twilight_end is None and holland.astronomical_twilight_start is None
    assert holland.nautical_twilight_end is not None
    assert abs(holland.sun_lowest_alt_deg - -14.6) < 0.3
    midsummer = nights[(ARCTIC.name, "2024-06-21")]
    assert all(value is None for value in midsummer.to_json().values())
    midwinter = nights[(ARCTIC.name, "2024-12-21")]
    assert midwinter.sunset is None and midwinter.sunrise is None
    assert None not in [getattr(midwinter, key) for key in EVENT_KEYS[1:-1]]


def test_darkness_covers_the_whole_window_when_the_sun_never_rises_to_minus_18():
    """At +85 on 2024-12-21 the Sun peaks at 90 - 85 - 23.44 = -18.4 deg (common practice):
    below -18 all day, so astronomical darkness spans the window and has no twilight events.
    PyEphem agrees that the Sun never reaches the -18 deg horizon."""
    site = Site(85.0, 20.0, 0.0, name="polar cap", timezone="Europe/Oslo")
    night = night_boundaries(site, "2024-12-21")
    assert night.astronomical_twilight_end is None and night.astronomical_twilight_start is None
    assert darkness_interval(night, "astronomical") == (night.window_start, night.window_end)
    assert _pyephem_event(site, night.window_start, night.window_end, "-18", False,
                          ephem.Sun(), True) is None


def test_darkness_interval_pairs_the_twilight_events(nights):
    night = nights[(CHILE.name, "2024-06-21")]
    for darkness in ("civil", "nautical", "astronomical"):
        start, end = darkness_interval(night, darkness)
        assert start == getattr(night, f"{darkness}_twilight_end")
        assert end == getattr(night, f"{darkness}_twilight_start")
    assert darkness_interval(nights[(HOLLAND.name, "2024-06-21")], "astronomical") is None
    with pytest.raises(ValueError, match="darkness 'deep'"):
        darkness_interval(night, "deep")


def _astropy_sun_alt(site: Site, t: Time) -> np.ndarray:
    location = EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                           site.height * u.m)
    with solar_system_ephemeris.set("builtin"):
        sun = get_body("sun", t, location)
    return sun.transform_to(AltAz(obstime=t, location=location, pressure=0 * u.hPa)).alt.deg


def test_every_stretch_below_a_level_on_an_odd_night_matches_astropy():
    """At +89.5 near the March equinox the Sun's altitude, about dec + 0.5 cos H with dec
    rising 0.4 deg a day, wobbles across the sunrise level (-50') once or twice a day. Over
    two days every stretch below it must agree with astropy's Sun altitude on a 2-minute grid,
    and each inner edge to within 5 s."""
    site = Site(89.5, 0.0, 0.0, name="near the pole", timezone="UTC")
    level = -50.0 / 60.0
    start, end = Time("2024-03-16T12:00:00", scale="utc"), Time("2024-03-18T12:00:00",
                                                               scale="utc")
    stretches = sun_below_intervals(site, start, end, level)
    assert len(stretches) >= 2
    grid = start + np.arange(0.0, 48 * 60, 2.0) * u.min
    below_theirs = _astropy_sun_alt(site, grid) < level
    below_ours = np.zeros(len(grid), dtype=bool)
    for a, b in stretches:
        below_ours |= (grid >= a) & (grid <= b)
    assert np.array_equal(below_ours, below_theirs)
    for a, b in stretches:
        for edge, sign in ((a, 1.0), (b, -1.0)):
            if edge in (start, end):
                continue
            # Above the level 5 s before a stretch begins and below it 5 s after; the mirror
            # at its end.
            alt = _astropy_sun_alt(site, edge + np.array([-5.0, 5.0]) * u.s)
            assert sign * (alt[0] - level) > 0.0 > sign * (alt[1] - level)


def test_a_window_cut_through_a_dark_stretch_clips_it_and_keeps_the_lowest_point():
    """At longitude 180 the Sun's lowest point falls near 12:00 UTC, so a UTC noon-to-noon
    window starts and ends in darkness at +89.5 on 2024-03-16 (the Sun near -1.6 deg then,
    below the -50' level): the stretches are clipped at both ends. The night of the date runs
    from local mean noon instead (00:00 UTC at longitude 180), so its sunset and sunrise bound
    the stretch that holds the lowest point, and that point lies inside the night."""
    site = Site(89.5, 180.0, 0.0, name="near the pole, date line", timezone="UTC")
    start = Time("2024-03-16T12:00:00", scale="utc")
    end = Time("2024-03-17T12:00:00", scale="utc")
    stretches = sun_below_intervals(site, start, end, -50.0 / 60.0)
    assert stretches[0][0] == start and stretches[-1][1] == end
    night = night_boundaries(site, "2024-03-16")
    # Local mean noon at longitude 180 (taken as -180: the date's noon at 24:00 UTC).
    assert abs((night.window_start - Time("2024-03-17T00:00:00", scale="utc")).sec) < 1e-3
    lowest = night.sun_lowest_time
    night_stretches = sun_below_intervals(site, night.window_start, night.window_end,
                                          -50.0 / 60.0)
    holding = [s for s in night_stretches if s[0] <= lowest <= s[1]]
    assert holding == [night.spans["sun"]]
    # The Sun's lowest point by astropy on a 1-minute grid, to the grid step.
    grid = night.window_start + np.arange(0.0, 24 * 60 + 1, 1.0) * u.min
    lowest_theirs = grid[np.argmin(_astropy_sun_alt(site, grid))]
    assert abs((lowest - lowest_theirs).sec) < 600.0


def test_stretches_over_three_days_match_pyephem():
    start, end = Time("2024-06-20T16:00:00", scale="utc"), Time("2024-06-23T16:00:00",
                                                               scale="utc")
    stretches = sun_below_intervals(CHILE, start, end, -18.0)
    assert len(stretches) == 3
    for a, b in stretches:
        setting = _pyephem_event(CHILE, a - 1 * u.hour, end, "-18", False, ephem.Sun(), True)
        rising = _pyephem_event(CHILE, b - 1 * u.hour, end, "-18", True, ephem.Sun(), True)
        assert abs((a - setting).sec) < EVENT_TOLERANCE_S
        assert abs((b - rising).sec) < EVENT_TOLERANCE_S


MOON_NIGHTS = [n for n in NIGHTS if n[0] is not SVALBARD]
# PyEphem's rise search starts from the transit after the start and gives up (NeverUpError)
# when that transit is below the horizon, which misses grazing rises near the poles: the
# +78 night is left out of the Moon comparison.


@pytest.mark.parametrize("site,date,what", MOON_NIGHTS, ids=[n[2] for n in MOON_NIGHTS])
def test_moonrise_and_moonset_match_pyephem(nights, site, date, what):
    night = nights[(site.name, date)]
    events = moon_events(site, night)
    for key, rising in (("moonrise", True), ("moonset", False)):
        theirs = _pyephem_event(site, night.window_start, night.window_end, "-0:34", rising,
                                ephem.Moon(), use_center=False)
        ours = events[key]
        assert (ours is None) == (theirs is None), f"{key}: ours {ours}, PyEphem {theirs}"
        if ours is not None:
            diff_s = abs((Time(ours.rstrip("Z"), scale="utc") - theirs).sec)
            assert diff_s < MOON_TOLERANCE_S, f"{key}: {diff_s:.2f} s from PyEphem"


def test_moon_events_are_json_ready_and_phase_is_at_mid_darkness():
    """Full Moon 2024-01-25 17:54 UTC (USNO phase tables, from memory): the night of
    2024-01-25 in Chile has a nearly full Moon at mid-darkness, just past full."""
    night = night_boundaries(CHILE, "2024-01-25")
    events = moon_events(CHILE, night)
    assert set(events) == {"moonrise", "moonset", "up_at_window_start", "phase_time",
                           "phase_time_basis", "illumination", "phase_angle_deg", "waxing"}
    assert events["phase_time_basis"] == "astronomical"
    start, end = darkness_interval(night, "astronomical")
    middle = Time(events["phase_time"].rstrip("Z"), scale="utc")
    assert abs((middle - (start + 0.5 * (end - start))).sec) < 0.01
    assert events["illumination"] > 0.98 and events["waxing"] is False
    assert isinstance(events["phase_angle_deg"], float)


def test_to_json_has_exactly_the_eight_events_as_utc_z_strings(nights):
    record = nights[(ARCTIC.name, "2024-12-21")].to_json()
    assert tuple(record) == EVENT_KEYS
    assert record["sunset"] is None and record["sunrise"] is None
    for key in EVENT_KEYS[1:-1]:
        assert record[key].endswith("Z")
        parsed = dt.datetime.fromisoformat(record[key].replace("Z", "+00:00"))
        assert parsed.tzinfo is not None


def test_the_window_runs_from_local_mean_noon_whatever_the_clock_does():
    """The night of a date runs from local mean solar noon, 12:00 UTC minus longitude/15 h
    (common practice), to the next one: 24 hours even across the start of Central European
    summer time (last Sunday of March at 01:00 UTC, EU Directive 2000/84/EC: 2024-03-31).
    At 5 deg east: 11:40 UTC on 2024-03-30 to 11:40 UTC on 2024-03-31."""
    start, end = night_window(HOLLAND, dt.date(2024, 3, 30))
    assert start.isot == "2024-03-30T11:40:00.000" and end.isot == "2024-03-31T11:40:00.000"
    night = night_boundaries(HOLLAND, "2024-03-30")
    assert night.window_start == start and night.window_end == end
    assert start < night.sunset < night.sunrise < end


def test_bad_dates_and_zones_are_one_line_errors():
    with pytest.raises(TimeInputError, match="date '2024-13-01' is not a calendar date"):
        night_boundaries(CHILE, "2024-13-01")
    with pytest.raises(SiteError, match="site timezone: 'Mars/Olympus_Mons'"):
        Site(10.0, 10.0, timezone="Mars/Olympus_Mons")
