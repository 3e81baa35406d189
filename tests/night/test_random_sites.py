"""The night of a date at random sites all over the Earth, no time zone given, against PyEphem.

A site given as LAT,LON,HEIGHT far from Greenwich once lost half its night: the search window
ran from noon UTC, not from the site's own noon. Here the reference search is built in the
test, independently of the code: PyEphem (tests only; libastro's own Sun theory and its own
rise/set search) looks for each event from the site's local mean solar noon, 12:00 UTC minus
longitude/15 hours (common practice: mean solar time), up to the next one. The sites and
dates are drawn from a seeded generator over every longitude, latitudes -65..+65 and dates
1995-2045 (the seed is in the test so a failure can be replayed).

Event definitions (Astronomical Almanac; common practice): the Sun's centre, unrefracted, at
-50' (sunset, sunrise), -6, -12 and -18 deg (civil, nautical, astronomical twilight).
"""
import datetime as dt

import ephem
import numpy as np
import pytest
from astropy.time import Time
from hypothesis import given, settings
from hypothesis import strategies as st

from epochpoint.core.night import EVENT_KEYS, night_boundaries, night_date_at
from epochpoint.core.site import Site
from epochpoint.io import read_site

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

SEED = 20270320
N_SITES = 60
# PyEphem and the engine agreed within 0.11 s on the fixed test nights; libastro's Sun is
# good to about an arcsecond, i.e. well under a second in time away from grazing events.
EVENT_TOLERANCE_S = 5.0
# Events where the Sun grazes the level (its extreme within this of the level) are timed
# poorly by any search; they are checked for presence only when clear of it.
GRAZE_DEG = 0.05

# Each event: PyEphem horizon, and whether the Sun rises through it (morning) or sets.
HORIZONS = {
    "sunset": ("-0:50", False), "sunrise": ("-0:50", True),
    "civil_twilight_end": ("-6", False), "civil_twilight_start": ("-6", True),
    "nautical_twilight_end": ("-12", False), "nautical_twilight_start": ("-12", True),
    "astronomical_twilight_end": ("-18", False), "astronomical_twilight_start": ("-18", True),
}
LEVEL_DEG = {"-0:50": -50.0 / 60.0, "-6": -6.0, "-12": -12.0, "-18": -18.0}


def random_cases():
    rng = np.random.default_rng(SEED)
    latitudes = rng.uniform(-65.0, 65.0, N_SITES)
    longitudes = rng.uniform(-180.0, 180.0, N_SITES)
    # Make sure the far east and far west are both well represented.
    longitudes[:4] = [-179.5, -150.0, 150.0, 179.5]
    heights = rng.uniform(0.0, 4000.0, N_SITES)
    days = rng.integers(0, 365 * 50, N_SITES)
    dates = [dt.date(1995, 1, 1) + dt.timedelta(days=int(d)) for d in days]
    return [(round(float(lat), 4), round(float(lon), 4), round(float(h)), day.isoformat())
            for lat, lon, h, day in zip(latitudes, longitudes, heights, dates)]


CASES = random_cases()


def mean_noon(longitude_deg: float, date: str) -> dt.datetime:
    """Local mean solar noon of date: 12:00 UTC minus longitude/15 hours (longitude east
    positive, taken in [-180, 180))."""
    lon = (longitude_deg + 180.0) % 360.0 - 180.0
    noon = dt.datetime.fromisoformat(date + "T12:00:00")
    return noon - dt.timedelta(hours=lon / 15.0)


def sun_extremes(observer: ephem.Observer, start: dt.datetime) -> tuple[float, float]:
    """The Sun's lowest and highest unrefracted altitudes (deg) over 24 h, 5-minute grid."""
    alts = []
    for minutes in range(0, 24 * 60 + 1, 5):
        observer.date = ephem.Date(start + dt.timedelta(minutes=minutes))
        alts.append(np.degrees(float(ephem.Sun(observer).alt)))
    return min(alts), max(alts)


def pyephem_night(lat, lon, height, date) -> tuple[dict, float, float]:
    """Every event of the night searched from local mean noon to the next, or None."""
    start = mean_noon(lon, date)
    end = start + dt.timedelta(days=1)
    observer = ephem.Observer()
    observer.lat, observer.lon = str(lat), str(lon)
    observer.elevation, observer.pressure = height, 0.0
    events = {}
    for key, (horizon, rising) in HORIZONS.items():
        observer.horizon = horizon
        observer.date = ephem.Date(start)
        search = observer.next_rising if rising else observer.next_setting
        try:
            found = ephem.Date(search(ephem.Sun(), use_center=True)).datetime()
        except (ephem.AlwaysUpError, ephem.NeverUpError):
            found = None
        events[key] = found if found is not None and found < end else None
    lowest, highest = sun_extremes(observer, start)
    return events, lowest, highest


@pytest.mark.parametrize("lat,lon,height,date", CASES,
                         ids=[f"{c[0]:+.1f}_{c[1]:+.1f}_{c[3]}" for c in CASES])
def test_every_event_of_the_night_matches_pyephem(lat, lon, height, date):
    site = read_site(f"{lat},{lon},{height}")
    assert site.timezone_from_coordinates
    ours = night_boundaries(site, date)
    theirs, lowest, highest = pyephem_night(lat, lon, height, date)
    for key in EVENT_KEYS:
        level = LEVEL_DEG[HORIZONS[key][0]]
        grazing = abs(lowest - level) < GRAZE_DEG or abs(highest - level) < GRAZE_DEG
        mine = getattr(ours, key)
        if grazing:
            continue
        assert (mine is None) == (theirs[key] is None), \
            f"{key}: ours {mine}, PyEphem {theirs[key]} (Sun {lowest:.2f}..{highest:.2f} deg)"
        if mine is not None:
            diff_s = abs((mine - Time(theirs[key], scale="utc")).sec)
            assert diff_s < EVENT_TOLERANCE_S, f"{key}: {diff_s:.2f} s from PyEphem"


def test_every_ordinary_night_has_all_its_events():
    """Away from the polar circles and the high-latitude summer, every night has all eight
    events (common practice: astronomical darkness comes every night below about 48 deg of
    latitude). A window that misses half the night fails here at once."""
    checked = 0
    for lat, lon, height, date in CASES:
        if abs(lat) > 48.0:
            continue
        night = night_boundaries(read_site(f"{lat},{lon},{height}"), date)
        missing = [key for key in EVENT_KEYS if getattr(night, key) is None]
        assert not missing, f"{lat},{lon} on {date}: no {missing}"
        checked += 1
    assert checked >= 30


def test_zone_found_from_coordinates_keeps_near_solar_time():
    """The civil zone found for a site keeps within a few hours of its mean solar time
    (common practice: the widest real gaps, such as western China on UTC+8, are about 3 h);
    over open sea it is the nautical zone, exactly round(longitude/15) hours."""
    for lat, lon, height, date in CASES:
        site = read_site(f"{lat},{lon},{height}")
        noon = mean_noon(lon, date).replace(tzinfo=dt.timezone.utc)
        offset_h = noon.astimezone(__import__("zoneinfo").ZoneInfo(site.timezone)
                                   ).utcoffset().total_seconds() / 3600.0
        gap = (offset_h - lon / 15.0 + 12.0) % 24.0 - 12.0
        assert abs(gap) <= 3.6, (lat, lon, site.timezone, offset_h)
        if site.timezone.startswith("Etc/GMT"):
            assert offset_h == round(lon / 15.0), (lon, site.timezone)


@settings(max_examples=60, deadline=None)
@given(lat=st.floats(-65.0, 65.0), lon=st.floats(-180.0, 180.0),
       offset_d=st.floats(0.0, 3650.0))
def test_tonight_is_the_night_whose_window_holds_the_instant(lat, lon, offset_d):
    """Property: for any instant and site, the night 'tonight' names is the one whose window
    (local mean noon to the next, computed here from the longitude) holds the instant."""
    site = Site(lat, lon, 0.0, timezone="UTC")
    instant = dt.datetime(2020, 1, 1, tzinfo=dt.timezone.utc) + dt.timedelta(days=offset_d)
    date = night_date_at(site, instant.strftime("%Y-%m-%dT%H:%M:%S.%fZ"))
    start = mean_noon(lon, date.isoformat()).replace(tzinfo=dt.timezone.utc)
    assert start <= instant < start + dt.timedelta(days=1) + dt.timedelta(microseconds=1)
