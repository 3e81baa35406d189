"""The computations the app runs in worker threads: each is a thin call into epochpoint.core.

    night_plan(targets, site, night)                  -> core.plan.Plan
    night_plan_keeping(targets, site, night, saved)   -> (core.plan.Plan, kept: bool)
    now_state(targets, site, when="now", selected=None, night_date=None) -> NowState
    tonight_date(site, when="now")                    -> 'YYYY-MM-DD'
    calendar_of_nights(targets, site, start, nights, darkness, min_altitude)
                                                      -> core.night_calendar.NightCalendar

The night's plan is made as `epochpoint plan` makes it: event ephemerides and time
constraints from the list's columns (timing_inputs) give fixed-time event blocks and cut
windows.

The window shows one instant (the "shown instant"): `when` is "now", an ISO 8601 instant, or
"auto", which is the present while the night of `night_date` holds it and the middle of that
night (halfway from sunset to sunrise, core.night) otherwise. The night of a date runs from
the site's local mean solar noon to the next (core.night.night_window).

The pointing interlocks are the ones every motion command uses (core.export.refusals with
the Sun's separation from core.export.sun_separation_deg).
"""
from __future__ import annotations

from dataclasses import dataclass

import datetime as dt

import numpy as np

from epochpoint.core.context import make_context
from epochpoint.core.export import refusals, sun_rows, sun_separation_deg
from epochpoint.core.night import night_boundaries, night_window
from epochpoint.core.plan import SCHEDULE_ITERATIONS, SCHEDULE_SECONDS, SCHEDULE_SEED, plan
from epochpoint.core.schedule_kept import keep_schedule
from epochpoint.core.positions import positions
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.core.timescale import iso_z, parse_time
from epochpoint.io.planfile import NightSettings


def night_plan(targets: Targets, site: Site, night: NightSettings):
    """The night's plan for the document's targets (core.plan.plan with the night settings),
    searched as the command line searches by default: the same seed, iteration limit and time
    limit, so the app and `epochpoint plan` give the same order. Timed events get fixed-time
    blocks and time constraints are honoured, as `epochpoint plan` does (timing_inputs)."""
    events, constraints = timing_inputs(targets)
    return plan(targets, site, night.date, max_seconds=SCHEDULE_SECONDS, seed=SCHEDULE_SEED,
                max_iterations=SCHEDULE_ITERATIONS, events=events,
                time_constraints=constraints, **night.plan_options())


def timing_inputs(targets: Targets):
    """(events, time constraints) of the targets for core.plan.plan: the event ephemerides
    when the list has event columns (io.eventfields), the not_before/not_after and phase
    windows when it has such columns (io.timeconstraintfields); None where it has none."""
    from epochpoint.io.eventfields import event_ephemerides
    from epochpoint.io.timeconstraintfields import time_constraints

    events = event_ephemerides(targets) if "event_epoch" in targets.extra else None
    return events, time_constraints(targets, events)


def night_plan_keeping(targets: Targets, site: Site, night: NightSettings,
                       saved: list | None = None):
    """(plan, kept): the night's plan with the `saved` schedule entries put back when they
    still fit it (core.schedule_kept), else with its own order (kept False)."""
    result = night_plan(targets, site, night)
    kept = keep_schedule(result, saved) if saved else None
    return (kept, True) if kept is not None else (result, False)


@dataclass
class NowState:
    """Every target at one instant, and the correction ledger of the selected one."""

    time: str                   # ISO 8601 UTC with Z
    kind: str                   # "now", "middle of the night" or "chosen"
    alt: np.ndarray             # observed altitude, degrees
    drift: np.ndarray           # arcsec from the catalogue position
    refused: np.ndarray         # '' when pointing is allowed, else the interlock's reason
    sun_separation: np.ndarray  # degrees
    ledger_row: dict | None     # LedgerPanel.set_row input for the selected target
    selected: int | None
    earth_orientation_warning: str | None
    ra_date: np.ndarray | None = None   # body rows: topocentric apparent place of date (deg)
    dec_date: np.ndarray | None = None  # NaN on star rows


def tonight_date(site: Site, when="now") -> str:
    """The date of the night (core.night.night_window) that holds the instant `when`."""
    t = parse_time(when)
    day = t.to_datetime(timezone=dt.timezone.utc).date()
    for date in (day - dt.timedelta(days=1), day, day + dt.timedelta(days=1)):
        start, end = night_window(site, date)
        if start <= t < end:
            return date.isoformat()
    return day.isoformat()  # not reached: consecutive windows tile the time line


def shown_instant(site: Site, when="auto", night_date: str | None = None):
    """(Time, kind) of the shown instant (see the module docstring)."""
    if when == "now" or (when == "auto" and night_date is None):
        return parse_time("now"), "now"
    if when != "auto":
        return parse_time(when), "chosen"
    now = parse_time("now")
    start, end = night_window(site, night_date)
    if start <= now < end:
        return now, "now"
    night = night_boundaries(site, night_date)
    sun = night.spans.get("sun")
    if sun is None:  # the Sun never sets: its lowest point is the middle of the "night"
        return night.sun_lowest_time, "middle of the night"
    return sun[0] + (sun[1] - sun[0]) * 0.5, "middle of the night"


def now_state(targets: Targets, site: Site, when="now", selected: int | None = None,
              night_date: str | None = None) -> NowState:
    """Positions at the shown instant (one context for all targets), the interlocks'
    verdicts and the selected target's ledger."""
    t, kind = shown_instant(site, when, night_date)
    ctx = make_context(t, site)
    pos = positions(targets, site, t, context=ctx)
    ra_date, dec_date, body_rows = bodies_of_date(targets, ctx, pos)
    sun_sep = sun_separation_deg(site, t, ra_date, dec_date)
    refused = refusals(pos, site, sun_sep, is_sun=sun_rows(targets))
    ledger_row = None
    if selected is not None and 0 <= selected < len(targets):
        one = positions(targets[selected], site, t, ledger=True, context=ctx)
        ledger_row = {key: _scalar(values[0]) for key, values in one.items()}
        ledger_row["time"] = iso_z(t)
        ledger_row["refused"] = str(refused[selected])
        ledger_row["sun_separation"] = float(sun_sep[selected])
    is_body = np.zeros(len(ra_date), dtype=bool)
    is_body[body_rows] = True
    return NowState(time=iso_z(t), kind=kind, alt=pos["alt"], drift=pos["drift"], refused=refused,
                    sun_separation=sun_sep, ledger_row=ledger_row, selected=selected,
                    earth_orientation_warning=ctx.eop_warning,
                    ra_date=np.where(is_body, ra_date, np.nan),
                    dec_date=np.where(is_body, dec_date, np.nan))


def bodies_of_date(targets: Targets, ctx, pos) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Apparent RA, Dec (deg) for the Sun-avoidance check, and the body rows: the body rows'
    topocentric apparent place of date (core.body_track.apparent_of_date, as the mount and
    export use), the other rows' apparent place from positions()."""
    from epochpoint.core.bodies.rows import sources_of

    ra = np.array(pos["ra_apparent"], dtype=float)
    dec = np.array(pos["dec_apparent"], dtype=float)
    rows, sources = sources_of(targets)
    if len(rows):
        from epochpoint.core.body_track import apparent_of_date

        ra_topo, dec_topo, _ = apparent_of_date(sources, [ctx])
        ra[rows], dec[rows] = ra_topo[:, 0], dec_topo[:, 0]
    return ra, dec, rows


def _scalar(value):
    if isinstance(value, np.generic):
        return value.item()
    return value


def calendar_of_nights(targets: Targets, site: Site, start: str, nights: int,
                       darkness: str = "astronomical", min_altitude: float | None = None):
    """The calendar of `nights` nights from `start` (core.night_calendar) with every timed
    event touching their darkness, observable or not (epochpoint.events with include_all),
    under the same darkness and altitude limit as the night's plan."""
    import epochpoint as ep
    from epochpoint.core.night_calendar import night_calendar

    found = None
    if len(targets) and "event_epoch" in targets.extra:
        found = ep.events(targets, site, start, nights, darkness=darkness,
                          min_altitude=min_altitude, include_all=True)
    return night_calendar(site, start, nights, darkness=darkness, events=found)
