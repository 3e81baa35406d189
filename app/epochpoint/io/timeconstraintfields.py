"""The per-target time constraints: a span of UTC instants and a window of orbital phase.

Target files carry them as text in `Targets.extra`, like the planning and event fields:

    not_before   ISO 8601 UTC (e.g. 2027-03-02T01:30:00Z): observe no earlier (blank: none)
    not_after    ISO 8601 UTC: observe no later (blank: none)
    phase_min    fraction 0..1 of the event period where the phase window opens
    phase_max    fraction 0..1 where it closes; phase_min > phase_max wraps through 0
                 (0.9 .. 0.1 is the fifth of the period centred on mid-event)

Phase is counted from the row's event ephemeris (event_epoch, event_period; eventfields.py) in
barycentric time, phase 0 at mid-event. Each cell is checked when the file is read
(`check_time_cells`, with the file's line); a row is refused where not_before is later than
not_after, where only one of phase_min and phase_max is given, where they are equal, or where
a phase window has no ephemeris to count from.
"""
from __future__ import annotations

import datetime as _dt
import math

import numpy as np
from astropy.time import Time

from epochpoint.core.events import EventEphemerides, tt_days_of
from epochpoint.core.targets import Targets
from epochpoint.core.time_constraints import TimeConstraints
from epochpoint.core.timescale import TimeInputError, check_year, parse_time, quiet_erfa

from .errors import InputError, quote
from .eventfields import _within
from .planningfields import blank_cell

TIME_FIELDS = ("not_before", "not_after", "phase_min", "phase_max")


def parse_instant(value) -> str | None:
    """A UTC instant from ISO 8601 text (Z or an offset; no offset means UTC) as fixed-width
    UTC text 'YYYY-MM-DDTHH:MM:SS.ffffff' (which sorts in time order); blank is None. 'now'
    is refused: a file's constraint must not change with the day it is read."""
    if blank_cell(value):
        return None
    text = str(value).strip()
    if text.lower() == "now":
        raise ValueError(f"{quote(value)} is not an ISO 8601 UTC time (e.g. 2027-03-02T01:30:00Z)")
    try:
        if ":60" in text:  # a leap second: parse_time checks UTC had one then
            t = parse_time(text)
            t.precision = 6
            return str(t.isot)
        moment = _dt.datetime.fromisoformat(text.replace("Z", "+00:00").replace("z", "+00:00"))
        if moment.tzinfo is not None:
            check_year(moment.year, f"time {text!r}")
            moment = moment.astimezone(_dt.timezone.utc).replace(tzinfo=None)
        check_year(moment.year, f"time {text!r}")
    except TimeInputError as err:
        raise ValueError(str(err)) from None
    except (ValueError, OverflowError):
        raise ValueError(f"{quote(value)} is not an ISO 8601 UTC time (e.g. "
                         f"2027-03-02T01:30:00Z)") from None
    return moment.strftime("%Y-%m-%dT%H:%M:%S.%f")


def parse_phase(value) -> float:
    """A phase, a fraction of the period from 0 to 1; blank is NaN (no window)."""
    if blank_cell(value):
        return math.nan
    return _within(value, 0.0, 1.0, "a phase from 0 to 1 (a fraction of the period)")


TIME_PARSERS = {"not_before": parse_instant, "not_after": parse_instant,
                "phase_min": parse_phase, "phase_max": parse_phase}


def _row_problem(cells: dict) -> tuple[str, str] | None:
    """(column, message) of what is wrong with one row's parsed values taken together, or None.
    `cells`: the four fields parsed, plus 'ephemeris' (whether the row has one)."""
    before, after = cells["not_before"], cells["not_after"]
    if before is not None and after is not None and before > after:
        return "not_after", (f"{after[:-3]}Z is earlier than not_before {before[:-3]}Z")
    low, high = cells["phase_min"], cells["phase_max"]
    if math.isnan(low) != math.isnan(high):
        given, empty = ("phase_min", "phase_max") if math.isnan(high) else ("phase_max",
                                                                            "phase_min")
        return empty, f"a phase window needs both phase_min and phase_max: {given} is given"
    if not math.isnan(low) and low == high:
        return "phase_max", (f"{high:g} equals phase_min: an empty phase window (0 and 1 give "
                             f"the whole period)")
    if not math.isnan(low) and not cells["ephemeris"]:
        return "phase_min", ("a phase window needs the row's event ephemeris (event_epoch and "
                             "event_period) to count the phase from")
    return None


def _labels(extra: dict) -> dict:
    """{field: the column's label as written} for the time and ephemeris fields present."""
    wanted = TIME_FIELDS + ("event_epoch", "event_period")
    return {name: label for label in extra
            if (name := str(label).strip().lower()) in wanted}


def check_time_cells(extra: dict, note) -> None:
    """Check every time-constraint cell of a file's extra columns, then each row's cells taken
    together; problems go to note(row index, column label, message)."""
    labels = _labels(extra)
    if not any(field in labels for field in TIME_FIELDS):
        return
    n = len(next(iter(extra.values())))
    for i in range(n):
        cells, bad = {}, False
        for field in TIME_FIELDS:
            label = labels.get(field)
            try:
                cells[field] = TIME_PARSERS[field](None if label is None else extra[label][i])
            except ValueError as err:
                note(i, label, str(err))
                bad = True
        if bad:
            continue
        cells["ephemeris"] = all(field in labels and not blank_cell(extra[labels[field]][i])
                                 for field in ("event_epoch", "event_period"))
        problem = _row_problem(cells)
        if problem is not None:
            note(i, labels.get(problem[0], problem[0]), problem[1])


@quiet_erfa
def _tt_days(instants: list) -> np.ndarray:
    """TT days after J2000.0 of UTC instants (parse_instant's text; None: NaN), converted in
    one astropy call."""
    out = np.full(len(instants), np.nan)
    given = [k for k, t in enumerate(instants) if t is not None]
    if given:
        out[given] = tt_days_of(Time([instants[k] for k in given], format="isot",
                                     scale="utc"))
    return out


def time_constraints(targets: Targets, events: EventEphemerides | None = None,
                     path=None) -> TimeConstraints | None:
    """The targets' time constraints (None when the list has none of the four columns).

    events: the rows' ephemerides (eventfields.event_ephemerides), needed for phase windows.
    A bad value raises InputError naming the file (`path`, may be None), the target's
    position and name, and the column."""
    labels = _labels(targets.extra)
    if not any(field in labels for field in TIME_FIELDS):
        return None
    n, names = len(targets), targets.names()
    periodic = np.zeros(n, bool) if events is None else np.asarray(events.periodic)
    parsed = {field: [] for field in TIME_FIELDS}
    for i in range(n):
        cells = {}
        for field in TIME_FIELDS:
            raw = targets.extra.get(labels.get(field))
            try:
                cells[field] = TIME_PARSERS[field](None if raw is None else raw[i])
            except ValueError as err:
                raise InputError(path, str(err), line=i + 1, column=labels[field],
                                 target=str(names[i]), row_word="target") from None
            parsed[field].append(cells[field])
        cells["ephemeris"] = bool(periodic[i])
        problem = _row_problem(cells)
        if problem is not None:
            raise InputError(path, problem[1], line=i + 1,
                             column=labels.get(problem[0], problem[0]),
                             target=str(names[i]), row_word="target")
    nan = np.full(n, np.nan)
    return TimeConstraints(
        not_before_tt=_tt_days(parsed["not_before"]), not_after_tt=_tt_days(parsed["not_after"]),
        phase_min=np.array(parsed["phase_min"], dtype=float),
        phase_max=np.array(parsed["phase_max"], dtype=float),
        epoch_bjd_tdb=nan if events is None else np.asarray(events.epoch_bjd_tdb, float),
        period_d=nan if events is None else np.asarray(events.period_d, float))
