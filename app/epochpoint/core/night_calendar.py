"""A run of nights at a site, one row per night: darkness, the Moon, and the timed events.

    cal = night_calendar(site, "2027-03-01", 30, darkness="astronomical", events=found)

Each night (night.py: local mean noon to local mean noon) gets its sunset and sunrise, the
chosen darkness, the stretches the Moon is up (its upper limb above the horizon, night.py's
moonrise and moonset) and the Moon's illuminated fraction at the middle of the darkness
(night.moon_events). The events are what event_search.find_events found for the same nights
(its rows say which night each belongs to). Times are ISO 8601 UTC with Z.

Cost: one night_boundaries and one moon_events per night, about 30 ms a night.
"""
from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass

from .night import darkness_interval, moon_events, night_boundaries
from .site import Site
from .timescale import iso_z, quiet_erfa


@dataclass(frozen=True)
class CalendarNight:
    """One night: its date, window, sunset/sunrise and darkness (ISO UTC or None), the
    stretches the Moon is up [(start, end)], and its illuminated fraction (0..1)."""

    date: str
    window_start: str
    window_end: str
    sunset: str | None
    sunrise: str | None
    dark_start: str | None
    dark_end: str | None
    moon_up: tuple
    moon_illumination: float


@dataclass(frozen=True)
class NightCalendar:
    """The nights in order, the events found over them (event_search.EventList, or None when
    the list has no event ephemerides), the site and the darkness asked for."""

    site: Site
    darkness: str
    nights: tuple
    events: object = None


def moon_up_spans(window_start: str, window_end: str, moon: dict) -> tuple:
    """[(start, end)] ISO UTC stretches the Moon is up in a night's window, from whether it is
    up at the window's start and its first rise and first set in the window (night.moon_events;
    outside polar regions a window holds at most one of each)."""
    rise, set_ = moon.get("moonrise"), moon.get("moonset")
    spans = []
    if moon.get("up_at_window_start"):
        spans.append((window_start, set_ or window_end))
        if rise is not None and (set_ is None or rise > set_):
            spans.append((rise, window_end))
    elif rise is not None:
        spans.append((rise, set_ if set_ is not None and set_ > rise else window_end))
    return tuple(spans)


@quiet_erfa
def night_calendar(site: Site, start, nights: int, darkness: str = "astronomical",
                   events=None) -> NightCalendar:
    """`nights` nights from the date `start` ('YYYY-MM-DD' or a date) at the site (see
    module); `events` (an EventList over the same nights) is carried along."""
    first = start if isinstance(start, _dt.date) else _dt.date.fromisoformat(str(start).strip())
    rows = []
    for k in range(int(nights)):
        night = night_boundaries(site, first + _dt.timedelta(days=k))
        moon = moon_events(site, night)
        dark = darkness_interval(night, darkness)
        window = (iso_z(night.window_start), iso_z(night.window_end))
        rows.append(CalendarNight(
            date=night.date.isoformat(), window_start=window[0], window_end=window[1],
            sunset=None if night.sunset is None else iso_z(night.sunset),
            sunrise=None if night.sunrise is None else iso_z(night.sunrise),
            dark_start=None if dark is None else iso_z(dark[0]),
            dark_end=None if dark is None else iso_z(dark[1]),
            moon_up=moon_up_spans(*window, moon),
            moon_illumination=float(moon["illumination"])))
    return NightCalendar(site=site, darkness=darkness, nights=tuple(rows), events=events)
