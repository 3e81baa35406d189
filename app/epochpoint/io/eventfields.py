"""The per-target event columns: a linear ephemeris of transits or eclipses.

Target files carry them as text in `Targets.extra`, like the planning fields:

    event_epoch          mid-event time T0, a full Julian date (e.g. 2461234.56789)
    event_time_scale     bjd_tdb (default) | hjd_utc | jd_utc: what event_epoch is counted in
    event_period         days, > 0
    event_duration       hours from first to last contact, > 0 and shorter than the period
    event_epoch_error    1-sigma error of event_epoch, days (blank: unknown)
    event_period_error   1-sigma error of event_period, days (blank: unknown)
    event_baseline       minutes wanted before and after the event, default 30
    event_kind           free text (transit, primary eclipse, ...), default "event"

A row with none of epoch, period and duration has no event; a row with some but not all is an
error. Each cell is checked when the file is read, so a typo is reported with its line.
"""
from __future__ import annotations

import math

import numpy as np

from epochpoint.core.events import TIME_SCALES, EventEphemerides, target_direction, to_bjd_tdb
from epochpoint.core.targets import Targets
from epochpoint.core.timescale import FIRST_YEAR, LAST_YEAR

from .errors import InputError, quote
from .planningfields import blank_cell, cell_number

DEFAULT_BASELINE_MIN = 30.0
DEFAULT_KIND = "event"
# Julian dates of 1800-01-01 and 2201-01-01: the years the time scales are used for.
_FIRST_JD, _LAST_JD = 2378496.5, 2524958.5
MAX_DURATION_H = 72.0
MAX_PERIOD_D = 100000.0
MAX_BASELINE_MIN = 720.0
REQUIRED = ("event_epoch", "event_period", "event_duration")


def _within(value, low: float, high: float, what: str, low_open=False) -> float:
    number = cell_number(value)
    if number < low or number > high or (low_open and number == low):
        raise ValueError(f"{quote(value)} must be {what}")
    return number


def parse_epoch(value) -> float:
    """A full Julian date between the years 1800 and 2200; blank is NaN (no event)."""
    if blank_cell(value):
        return math.nan
    number = cell_number(value)
    if not _FIRST_JD <= number <= _LAST_JD:
        hint = " (a full Julian date: add 2400000 or 2450000 to a reduced one)" \
            if 0.0 <= number < 200000.0 else ""
        raise ValueError(f"{quote(value)} is not a Julian date between the years {FIRST_YEAR} "
                         f"and {LAST_YEAR}{hint}")
    return number


def parse_time_scale(value) -> str:
    """bjd_tdb, hjd_utc or jd_utc (case ignored); blank is bjd_tdb."""
    if blank_cell(value):
        return "bjd_tdb"
    text = str(value).strip().lower()
    if text not in TIME_SCALES:
        raise ValueError(f"{quote(value)} is not one of {', '.join(TIME_SCALES)}")
    return text


def parse_period(value) -> float:
    """Days, > 0; blank is NaN."""
    if blank_cell(value):
        return math.nan
    return _within(value, 0.0, MAX_PERIOD_D, f"a period in days, > 0 and up to {MAX_PERIOD_D:g}",
                   low_open=True)


def parse_duration(value) -> float:
    """Hours, > 0; blank is NaN."""
    if blank_cell(value):
        return math.nan
    return _within(value, 0.0, MAX_DURATION_H, f"hours, > 0 and up to {MAX_DURATION_H:g}",
                   low_open=True)


def parse_error(value) -> float:
    """A 1-sigma error in days, >= 0; blank is NaN (unknown)."""
    if blank_cell(value):
        return math.nan
    return _within(value, 0.0, 100.0, "an error in days, from 0 to 100")


def parse_baseline(value) -> float:
    """Minutes before and after, 0 .. 720; blank is the default 30."""
    if blank_cell(value):
        return DEFAULT_BASELINE_MIN
    return _within(value, 0.0, MAX_BASELINE_MIN, f"minutes from 0 to {MAX_BASELINE_MIN:g}")


def parse_kind(value) -> str:
    """Free text on one line; blank is 'event'."""
    if blank_cell(value):
        return DEFAULT_KIND
    return " ".join(str(value).split())


EVENT_PARSERS = {"event_epoch": parse_epoch, "event_time_scale": parse_time_scale,
                 "event_period": parse_period, "event_duration": parse_duration,
                 "event_epoch_error": parse_error, "event_period_error": parse_error,
                 "event_baseline": parse_baseline, "event_kind": parse_kind}
EVENT_FIELDS = tuple(EVENT_PARSERS)


def _parsed_columns(targets: Targets, path) -> dict:
    n, names = len(targets), targets.names()
    columns = {}
    for field, parse in EVENT_PARSERS.items():
        raw = targets.extra.get(field)
        values = []
        for i in range(n):
            try:
                values.append(parse(None if raw is None else raw[i]))
            except ValueError as err:
                raise InputError(path, str(err), line=i + 1, column=field,
                                 target=str(names[i]), row_word="target") from None
        columns[field] = np.asarray(values, dtype=object if field in (
            "event_time_scale", "event_kind") else float)
    # Either all three of epoch, period and duration, or none.
    given = np.stack([np.isfinite(columns[f]) for f in REQUIRED])
    for i in np.flatnonzero(given.any(axis=0) & ~given.all(axis=0)):
        missing = REQUIRED[int(np.flatnonzero(~given[:, i])[0])]
        raise InputError(path, f"an event needs {', '.join(REQUIRED)}: {missing} is empty",
                         line=int(i) + 1, column=missing, target=str(names[i]),
                         row_word="target")
    long = np.flatnonzero(columns["event_duration"] / 24.0 >= columns["event_period"])
    if long.size:
        i = int(long[0])
        raise InputError(path, f"{columns['event_duration'][i]:g} h is not shorter than the "
                         f"period", line=i + 1, column="event_duration", target=str(names[i]),
                         row_word="target")
    return columns


def event_ephemerides(targets: Targets, path=None) -> EventEphemerides:
    """The targets' event ephemerides, with every epoch converted to BJD_TDB (the conversion
    uses each target's direction at its epoch, after space motion). A bad value raises
    InputError naming the file (`path`, may be None), the target and the column."""
    c = _parsed_columns(targets, path)
    epoch = c["event_epoch"]
    has = np.isfinite(epoch)
    bjd, assumed = epoch.copy(), np.full(len(targets), "", dtype=object)
    rows = np.flatnonzero(has & (c["event_time_scale"] != "bjd_tdb"))
    if rows.size:
        epoch_jyear = 2000.0 + (epoch[rows] - 2451545.0) / 365.25
        direction = target_direction(targets, rows, epoch_jyear)
        bjd[rows], assumed[rows] = to_bjd_tdb(epoch[rows], c["event_time_scale"][rows],
                                              direction)
    return EventEphemerides(epoch_bjd_tdb=bjd, period_d=c["event_period"],
                            duration_h=c["event_duration"],
                            epoch_error_d=c["event_epoch_error"],
                            period_error_d=c["event_period_error"],
                            baseline_min=c["event_baseline"], kind=c["event_kind"],
                            assumed=assumed)
