"""Instants of a plan for people: seconds from the plan's reference instant as clock times.

Plans count time in seconds from `plan.t_ref` (UTC); people read the site's local civil time
(IANA zone of the site, via zoneinfo) next to UTC.
"""
from __future__ import annotations

import datetime as dt

from ..core.zones import clock_label, zone_or_utc

# The site's time zone, or UTC when the name is unknown.
site_zone = zone_or_utc


def utc_datetime(plan, seconds: float) -> dt.datetime:
    """The UTC datetime `seconds` after the plan's reference instant."""
    start = plan.t_ref.to_datetime(timezone=dt.timezone.utc)
    return start + dt.timedelta(seconds=float(seconds))


def local_datetime(plan, seconds: float) -> dt.datetime:
    """The site's local datetime `seconds` after the plan's reference instant."""
    return utc_datetime(plan, seconds).astimezone(site_zone(plan.site.timezone))


def seconds_of(plan, instant: dt.datetime) -> float:
    """Seconds from the plan's reference instant to an aware datetime."""
    return (instant - utc_datetime(plan, 0.0)).total_seconds()


def clock_text(plan, seconds: float, with_seconds: bool = False) -> str:
    """'22:41 -03 (01:41 UTC)' for an instant of the plan: local time with the zone's
    abbreviation or offset, then UTC."""
    return clock_label(utc_datetime(plan, seconds), plan.site.timezone, with_seconds)
