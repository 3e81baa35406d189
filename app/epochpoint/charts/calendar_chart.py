"""The calendar of nights: one row per night, its darkness, the Moon, and the timed events.

Across: the site's local clock time from noon of the row's date to noon of the next (hours
12..36, so every night is one unbroken stretch; a change of daylight-saving time shifts the
rows after it, as the observer's clock does). Down: the nights in order, the first at the top.
Each row shows the night (Sun below the horizon) and the chosen darkness as bands, a thin line
where the Moon is up with its illuminated fraction at the right, and each event as a bar from
first to last contact, its baselines as thinner ends; the bar's look says its observability:
solid (full), hatched (partial), outlined only (none), in the style's event colours.
"""
from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass

import numpy as np
from matplotlib.figure import Figure
from matplotlib.patches import Patch, Rectangle

from ..core.zones import zone_or_utc
from .chart_style import apply_axes_style, legend_style, mix, resolve_style

ROW_HEIGHT = 1.0
BAR_HEIGHT = 0.46
BASELINE_HEIGHT = 0.18
MOON_OFFSET = 0.36
HOURS_SPAN = (12.0, 36.0)
# How each observability is drawn: fill alpha, hatch, line style of the edge.
BAR_LOOK = {"full": (1.0, None, "-"), "partial": (0.55, "////", "-"), "none": (0.0, None, "--")}


@dataclass
class CalendarDrawing:
    """The axes and, for every drawn event bar, (night row, event row in cal.events)."""

    ax: object
    bars: list


def _utc(iso: str) -> _dt.datetime:
    return _dt.datetime.fromisoformat(iso.replace("Z", "+00:00"))


def clock_hours(iso: str, date: str, zone_name: str | None) -> float:
    """Local clock hours of an ISO UTC instant counted from 00:00 of `date` in the site's zone
    (so 12 is noon of that date and 36 noon of the next)."""
    zone = zone_or_utc(zone_name)
    day = _dt.date.fromisoformat(date)
    midnight = _dt.datetime(day.year, day.month, day.day, tzinfo=zone)
    local = _utc(iso).astimezone(zone).replace(tzinfo=None)
    return (local - midnight.replace(tzinfo=None)).total_seconds() / 3600.0


def draw_calendar(figure: Figure, cal, style: dict | None = None,
                  selected: int | None = None) -> CalendarDrawing:
    """Draw the NightCalendar `cal` (core.night_calendar) into `figure`; `selected` is a night
    row to outline. Returns the axes and the drawn bars."""
    look = resolve_style(style)
    figure.clear()
    ax = figure.add_subplot(1, 1, 1)
    apply_axes_style(figure, ax, look)
    zone = cal.site.timezone
    n = len(cal.nights)
    x = lambda iso, date: clock_hours(iso, date, zone)  # noqa: E731

    # Night and darkness bands, and the Moon, row by row.
    for k, night in enumerate(cal.nights):
        if night.sunset and night.sunrise:
            a, b = x(night.sunset, night.date), x(night.sunrise, night.date)
            ax.add_patch(Rectangle((a, k - 0.5), b - a, ROW_HEIGHT, color=look["shades"][0],
                                   lw=0, zorder=0))
        if night.dark_start and night.dark_end:
            a, b = x(night.dark_start, night.date), x(night.dark_end, night.date)
            ax.add_patch(Rectangle((a, k - 0.5), b - a, ROW_HEIGHT, color=look["shades"][3],
                                   lw=0, zorder=0.1))
        strength = 0.3 + 0.7 * night.moon_illumination
        for a, b in night.moon_up:
            ax.plot([x(a, night.date), x(b, night.date)], [k + MOON_OFFSET] * 2,
                    color=mix(look["background"], look["moon"], strength), lw=2.2,
                    solid_capstyle="butt", zorder=2, label="_moon")
        ax.text(HOURS_SPAN[1] + 0.15, k, f"{100 * night.moon_illumination:.0f}%",
                va="center", ha="left", fontsize=7, color=look["muted"], clip_on=False)

    bars = _draw_events(ax, cal, look, x)
    if selected is not None and 0 <= selected < n:
        ax.add_patch(Rectangle((HOURS_SPAN[0], selected - 0.5), HOURS_SPAN[1] - HOURS_SPAN[0],
                               ROW_HEIGHT, fill=False, edgecolor=look["accent"], lw=2.0,
                               zorder=4))

    ax.set_xlim(*HOURS_SPAN)
    ax.set_ylim(n - 0.5, -0.5)
    hours = np.arange(HOURS_SPAN[0], HOURS_SPAN[1] + 0.1, 2.0)
    ax.set_xticks(hours)
    ax.set_xticklabels([f"{int(h) % 24:02d}" for h in hours])
    ax.set_yticks(np.arange(n))
    ax.set_yticklabels([f"{_dt.date.fromisoformat(c.date):%a %d %b}" for c in cal.nights],
                       fontsize=7)
    tz_name = _utc(cal.nights[0].window_start).astimezone(zone_or_utc(zone)).tzname() \
        if n else "UTC"
    ax.set_xlabel(f"local time ({tz_name}); Moon up: line, lit fraction at right")
    ax.grid(axis="x", color=look["rings"], lw=0.5, zorder=0.2)
    handles = [Patch(facecolor=look["event_full"], label="full"),
               Patch(facecolor=mix(look["background"], look["event_partial"], 0.55),
                     edgecolor=look["event_partial"], hatch="////", label="partial"),
               Patch(facecolor="none", edgecolor=look["event_none"], ls="--", label="none")]
    ax.legend(handles=handles, loc="lower left", bbox_to_anchor=(0.0, 1.0), ncol=3,
              fontsize=7, frameon=False, labelcolor=legend_style(look)["labelcolor"])
    return CalendarDrawing(ax=ax, bars=bars)


def _draw_events(ax, cal, look: dict, x) -> list:
    """One bar per event (first to last contact) with its baselines; see module."""
    events = cal.events
    if events is None or len(events["name"]) == 0:
        return []
    row_of = {night.date: k for k, night in enumerate(cal.nights)}
    bars = []
    for j, (name, date, start, end, base_min, seen) in enumerate(zip(
            events["name"], events["night"], events["start"], events["end"],
            events["baseline_min"], events["observable"])):
        k = row_of.get(str(date))
        if k is None:
            continue
        a, b = x(start, date), x(end, date)
        base_h = float(base_min) / 60.0
        colour = look[f"event_{seen}"]
        alpha, hatch, ls = BAR_LOOK[str(seen)]
        face = mix(look["background"], colour, alpha) if alpha else "none"
        for lo, hi in ((a - base_h, a), (b, b + base_h)):
            ax.add_patch(Rectangle((lo, k - BASELINE_HEIGHT / 2), hi - lo, BASELINE_HEIGHT,
                                   facecolor=face, edgecolor=colour, lw=0.6, ls=ls, zorder=2.5))
        bar = Rectangle((a, k - BAR_HEIGHT / 2), b - a, BAR_HEIGHT, facecolor=face,
                        edgecolor=colour, hatch=hatch, lw=1.0, ls=ls, zorder=3,
                        gid=f"event:{j}")
        ax.add_patch(bar)
        ax.text(b + base_h + 0.1, k, str(name), va="center", ha="left", fontsize=6.5,
                color=look["foreground"], zorder=3, clip_on=True)
        bars.append((k, j))
    return bars
