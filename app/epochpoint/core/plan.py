"""The night plan: boundaries of the night, the Moon, each target's windows, and an order.

plan() strings together night.py (sunset, twilights), sky_track.py (Sun and Moon over the
night), windows.py (when each target may be observed) and schedule.py (which blocks, in
which order). Per-target planning fields come from the target list's extra columns:
`priority` (1 highest .. 5 lowest, default 3), `exposure` (seconds, default 300) and
`repeats` (default 1); a block is exposure x repeats observed without a break.
"""
from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
from astropy.time import Time

from .night import NightBoundaries, moon_events, night_boundaries
from .schedule import Schedule, schedule
from .schedule_model import priority_weight
from .ranges import checked
from .schedule_slew import Mount
from .site import Site
from .sky_track import SkyTrack, build_sky_track
from .targets import Targets, TargetError
from .timescale import iso_z
from .windows import Constraints, TargetWindows, observable_windows

DEFAULT_PRIORITY = 3
DEFAULT_EXPOSURE_S = 300.0
DEFAULT_REPEATS = 1
DARKNESS_LEVELS = ("civil", "nautical", "astronomical")
# The schedule search is bounded by iterations and seeded, so a plan is reproducible; its
# wall time is only an upper limit (the search reports which limit stopped it).
SCHEDULE_ITERATIONS = None  # schedule.default_iterations: 300, fewer for long lists
SCHEDULE_SEED = 0
SCHEDULE_SECONDS = 30.0


@dataclass(frozen=True, eq=False)
class Plan:
    """Everything computed for one night at one site (times in seconds from `t_ref`)."""

    site: Site
    night: NightBoundaries
    moon: dict
    constraints: Constraints
    sky: SkyTrack
    windows: TargetWindows
    schedule: Schedule
    priority: np.ndarray
    duration_s: np.ndarray
    # Fixed-time blocks of timed events (plan_events.py), or None.
    reservations: object = None

    @property
    def t_ref(self) -> Time:
        return self.sky.t_ref

    def iso(self, seconds) -> str | None:
        """ISO 8601 UTC (Z) of an instant in seconds from t_ref; None for NaN."""
        if seconds is None or not np.isfinite(seconds):
            return None
        return iso_z(self.sky.time_at(float(seconds)))

    def iso_many(self, seconds) -> list:
        """ISO 8601 UTC (Z) strings, to the millisecond, for many instants at once (None for
        NaN). Offsets are added to the reference as UTC seconds with numpy; a night that holds
        a leap second goes through astropy instead."""
        seconds = np.asarray(seconds, dtype=float).ravel()
        out = [None] * seconds.size
        finite = np.flatnonzero(np.isfinite(seconds))
        if finite.size == 0:
            return out
        if self._leap_second_inside():
            texts = iso_z(self.sky.time_at(seconds[finite]))
        else:
            ref = np.datetime64(self.t_ref.utc.isot, "ms")
            stamps = ref + np.round(seconds[finite] * 1000.0).astype("timedelta64[ms]")
            texts = [text + "Z" for text in np.datetime_as_string(stamps, unit="ms")]
        for k, text in zip(finite, texts if isinstance(texts, list) else [texts]):
            out[k] = text
        return out

    def _leap_second_inside(self) -> bool:
        """Whether UTC inserts a leap second during the night's window (elapsed SI seconds
        then differ from the calendar difference of the UTC labels)."""
        start, end = self.sky.time_at(float(self.sky.t[0])), self.sky.time_at(float(self.sky.t[-1]))
        labels = (np.datetime64(end.utc.isot, "ms") - np.datetime64(start.utc.isot, "ms"))
        elapsed = (end.tai - start.tai).to_value("s")
        return bool(abs(elapsed - labels / np.timedelta64(1, "s")) > 0.5)

    def to_json(self) -> dict:
        """The plan as documented for `epochpoint plan --format json`."""
        w, order = self.windows, self.schedule
        # Every instant the JSON names, converted to ISO text in one astropy call.
        edges = [t for win in w.windows for pair in win for t in pair]
        instants = np.concatenate([w.transit, np.asarray(edges, dtype=float),
                                   order.start_s, order.end_s])
        iso = iter(self.iso_many(instants))
        transit = [next(iso) for _ in range(len(w.names))]
        edge_text = [next(iso) for _ in edges]
        starts = [next(iso) for _ in order.start_s]
        ends = [next(iso) for _ in order.end_s]
        targets, k = [], 0
        for i, name in enumerate(w.names):
            count = 2 * len(w.windows[i])
            pairs = edge_text[k:k + count]
            k += count
            targets.append({
                "name": str(name),
                "transit": transit[i],
                "max_altitude": _rounded(w.max_altitude[i], 4),
                "windows": [pairs[j:j + 2] for j in range(0, count, 2)],
                "reason": w.reason[i] or None,
                "priority": int(self.priority[i]),
                "duration_s": float(self.duration_s[i]),
            })
        entries = [{"name": str(w.names[i]), "start": start, "end": end,
                    "slew_s": round(float(slew), 1)}
                   for i, start, end, slew in zip(order.index, starts, ends, order.slew_s)]
        unscheduled = [{"name": str(w.names[u.index]), "reason": w.reason[u.index] or u.reason}
                       for u in order.unscheduled]
        collisions = []
        if self.reservations is not None:
            entries, collisions = _with_fixed_blocks(self, entries)
            # A target observed in a reserved block is not "not scheduled".
            fixed_names = {e["name"] for e in entries if e.get("fixed")}
            unscheduled = [u for u in unscheduled if u["name"] not in fixed_names]
        return {"site": self.site.name or f"{self.site.latitude},{self.site.longitude}",
                "date": self.night.date.isoformat(), "darkness": self.constraints.darkness,
                "timezone": self.site.timezone,
                "timezone_source": self.site.timezone_source,
                "cautions": self.site.interlocks.cautions(),
                "night": self.night.to_json(), "moon": self.moon, "targets": targets,
                "schedule": entries, "unscheduled": unscheduled, "collisions": collisions,
                "search": {"iterations": int(order.iterations), "seed": int(order.seed),
                           "stopped_by": order.stopped_by}}


def _with_fixed_blocks(result: Plan, entries: list) -> tuple[list, list]:
    """The schedule with the reserved event blocks (`"fixed": true`) in time order, and the
    events that lost a collision."""
    res, names = result.reservations, result.windows.names
    times = iter(result.iso_many([t for b in res.fixed + tuple(c[0] for c in res.collisions)
                                  for t in (b.start_s, b.end_s)]))
    fixed = [{"name": str(names[b.index]), "start": next(times), "end": next(times),
              "slew_s": 0.0, "fixed": True, "kind": b.kind, "cycle": b.cycle,
              "observable": b.observable} for b in res.fixed]
    collisions = [{"name": str(names[b.index]), "cycle": b.cycle, "start": next(times),
                   "end": next(times), "lost_to": str(names[winner])}
                  for b, winner in res.collisions]
    return sorted(entries + fixed, key=lambda e: e["start"]), collisions


def _rounded(value, digits):
    return None if not np.isfinite(value) else round(float(value), digits)


def _extra_column(targets: Targets, name: str, default: float, minimum: float) -> np.ndarray:
    """A numeric planning column from the target list's extras, with its default."""
    n = len(targets)
    if name not in targets.extra:
        return np.full(n, default, dtype=float)
    out = np.empty(n)
    for i, value in enumerate(targets.extra[name]):
        text = "" if value is None else str(value).strip()
        try:
            out[i] = default if text in ("", "nan", "--") else float(text)
        except ValueError:
            raise TargetError(name, i, f"{text!r} is not a number") from None
        if not np.isfinite(out[i]) or out[i] < minimum:
            raise TargetError(name, i, f"{text!r} must be a number >= {minimum:g}")
    return out


def centre_on_transit(order: Schedule, blocks: list, transit_s: np.ndarray) -> Schedule:
    """The same blocks in the same order, each moved later (never earlier) towards the time
    that centres it on its target's transit, where the slack before the next block allows.

    The scheduler starts every block as early as possible; observers prefer the lowest
    airmass, which is at transit. A backward pass keeps every block inside the window piece
    it started in and keeps each slew's gap, so the schedule stays valid.
    """
    start = np.array(order.start_s, dtype=float)
    duration = np.asarray(order.end_s, dtype=float) - start
    next_start = np.inf
    for k in range(start.size - 1, -1, -1):
        i = int(order.index[k])
        piece_end = min((e for s_, e in blocks[i] if s_ <= start[k] + 1e-6 <= e + 1e-6),
                        default=start[k] + duration[k])
        latest = min(piece_end - duration[k], next_start - duration[k])
        desired = transit_s[i] - 0.5 * duration[k]
        start[k] = min(max(desired, start[k]), max(latest, start[k]))
        if k > 0:
            next_start = start[k] - order.slew_s[k]
    return replace(order, start_s=start, end_s=start + duration)


def plan(targets: Targets, site: Site, night, *, darkness: str = "astronomical",
         min_altitude: float | None = None, max_airmass: float | None = None,
         moon_separation: float = 0.0, moon_scale: bool = False,
         max_seconds: float = SCHEDULE_SECONDS, seed: int = SCHEDULE_SEED,
         max_iterations: int | None = SCHEDULE_ITERATIONS,
         mount_position: tuple[float, float] | None = None, events=None,
         time_constraints=None) -> Plan:
    """Plan the local night starting on `night` (date or 'YYYY-MM-DD') at `site`.

    Altitudes are observed (refracted) altitudes with the site's weather; pressure 0 turns
    refraction off. The mount limits, horizon mask and Sun avoidance of the site always apply.
    The schedule search runs `max_iterations` seeded by `seed` (the same plan every time);
    max_seconds is only an upper limit on it. Slews start from the site's park position or
    from `mount_position`, the (hour angle, declination) in degrees the mount reports.
    events: the targets' EventEphemerides (io.eventfields.event_ephemerides) or None; the
    night's observable events then get fixed-time blocks (plan_events.py).
    time_constraints: the targets' not_before/not_after and phase windows
    (io.timeconstraintfields.time_constraints) or None; windows, reserved events and the
    schedule keep inside them (time_constraints.py).
    """
    if darkness not in DARKNESS_LEVELS:
        raise ValueError(f"darkness must be one of {', '.join(DARKNESS_LEVELS)}, "
                         f"got {darkness!r}")
    checked(max_seconds, "max_seconds", 0.0, unit="s")
    if max_iterations is not None:
        checked(max_iterations, "max_iterations", 0.0)
    if isinstance(seed, bool) or not isinstance(seed, (int, np.integer)) or seed < 0:
        raise ValueError(f"seed must be a whole number >= 0, got {seed!r}")
    constraints = Constraints(darkness=darkness, min_altitude=min_altitude,
                              max_airmass=max_airmass, moon_separation=moon_separation,
                              moon_scale=moon_scale)
    priority = _extra_column(targets, "priority", DEFAULT_PRIORITY, 1.0)
    duration = (_extra_column(targets, "exposure", DEFAULT_EXPOSURE_S, 0.0)
                * _extra_column(targets, "repeats", DEFAULT_REPEATS, 1.0))
    boundaries = night_boundaries(site, night)
    t_ref = boundaries.window_start
    length_s = float((boundaries.window_end - t_ref).to_value("s"))
    sky = build_sky_track(site, t_ref, length_s)
    span = boundaries.spans.get(darkness)
    dark = [] if span is None else [(float((span[0] - t_ref).to_value("s")),
                                     float((span[1] - t_ref).to_value("s")))]
    windows = observable_windows(targets, site, sky, dark, constraints)
    limits = site.interlocks.mount
    park_ha, park_dec = (limits.park(site.latitude) if mount_position is None
                         else (float(mount_position[0]), float(mount_position[1])))
    mount = Mount(settle_s=limits.settle, slew_rate_deg_s=limits.slew_rate,
                  german=limits.mount_type == "german", latitude_deg=site.latitude,
                  lst_start_deg=float(windows.geometry.local_sidereal_deg(0.0)),
                  park_ha_deg=park_ha, park_dec_deg=park_dec)
    allowed = None
    if time_constraints is not None:
        from .time_constraints import restrict_windows
        allowed = restrict_windows(windows, time_constraints, targets, site, t_ref, length_s)
        events = time_constraints.reserved_events(events)
    reservations, blocks = None, windows.blocks
    if events is not None and events.periodic.any():
        from .plan_events import AT_EVENTS_ONLY, reserve_events
        reservations = reserve_events(targets, events, site, boundaries, t_ref, priority,
                                      darkness, min_altitude, allowed)
        blocks = reservations.cut(windows.blocks, events.periodic)
        windows.reason[events.periodic & (windows.reason == "")] = AT_EVENTS_ONLY
    order = schedule(priority_weight(priority), np.maximum(duration, 1.0), blocks,
                     length_s, ra_deg=windows.ra, dec_deg=windows.dec, mount=mount,
                     max_seconds=max_seconds, seed=int(seed),
                     max_iterations=None if max_iterations is None else int(max_iterations))
    order = centre_on_transit(order, blocks, windows.transit)
    return Plan(site=site, night=boundaries, moon=moon_events(site, boundaries),
                constraints=constraints, sky=sky, windows=windows, schedule=order,
                priority=priority, duration_s=duration, reservations=reservations)
