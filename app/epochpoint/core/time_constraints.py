"""Time constraints on a target: observe only between two UTC instants, or only inside a window
of orbital phase counted from its event ephemeris.

Phase is barycentric, as published ephemerides are: the phase of an observed instant t is

    phase(t) = ((BJD_TDB(t) - T0) / P) mod 1,

phase 0 at mid-event, with BJD_TDB(t) the barycentric time of the light seen at the site at t
(Eastman, Siverd & Gaudi 2010, PASP 122, 935, eq. 1; the Roemer, Einstein and Shapiro delays
of events.py's BarycentricClock). A window [phase_min, phase_max] is the barycentric interval
T0 + (n + phase_min) P .. T0 + (n + phase_max) P of each cycle n (phase_max + 1 when the window
wraps through 0), and its edges are the observed instants whose barycentric times those are
(BarycentricClock.observed_tt, to microseconds). BJD_TDB(t) increases with t (its rate differs
from 1 by under 1e-4), so those edges bound exactly the instants of the window.

Each target's window pieces are intersected with its allowed intervals; a target left with
nothing says which constraint took it. A target with a phase window is scheduled inside it
like any other target (its events are not reserved as fixed blocks: the phase window says
when to observe it), and a reserved event block must lie wholly inside the target's allowed
intervals. Cost: one BarycentricClock for the night (about 30 ms) when any target has a phase
window, then a few microseconds per (target, cycle).
"""
from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from . import intervals as iv
from .constants import DAYS_PER_JULIAN_YEAR, JD_J2000
from .events import SECONDS_PER_DAY, BarycentricClock, EventEphemerides, target_direction, \
    tt_days_of
from .site import Site
from .targets import Targets

BEFORE_NOT_BEFORE = "before its not_before time"
AFTER_NOT_AFTER = "after its not_after time"
OUTSIDE_TIME_SPAN = "outside its not_before to not_after span"
OUTSIDE_PHASE = "outside its phase window"


@dataclass(frozen=True, eq=False)
class TimeConstraints:
    """Per target, columnar (NaN: no such constraint).

    not_before_tt, not_after_tt: the span allowed, TT days after J2000.0 (converted from UTC);
    phase_min, phase_max: the phase window, fractions of the period (min > max wraps through
    0); epoch_bjd_tdb (Julian date) and period_d (days): the ephemeris the phase counts from.
    """

    not_before_tt: np.ndarray
    not_after_tt: np.ndarray
    phase_min: np.ndarray
    phase_max: np.ndarray
    epoch_bjd_tdb: np.ndarray
    period_d: np.ndarray

    @property
    def phased(self) -> np.ndarray:
        """True for targets with a phase window."""
        return np.isfinite(self.phase_min) & np.isfinite(self.phase_max)

    @property
    def constrained(self) -> np.ndarray:
        """True for targets with any time constraint."""
        return np.isfinite(self.not_before_tt) | np.isfinite(self.not_after_tt) | self.phased

    def reserved_events(self, events: EventEphemerides | None) -> EventEphemerides | None:
        """The ephemerides whose events are reserved as fixed blocks: those of targets without
        a phase window (a phase window replaces the reservation)."""
        if events is None or not self.phased.any():
            return events
        return replace(events, epoch_bjd_tdb=np.where(self.phased, np.nan,
                                                      events.epoch_bjd_tdb))


def span_intervals(limits: TimeConstraints, ref_tt: float) -> list:
    """Per target, [(not_before, not_after)] in seconds from the reference instant (TT days
    after J2000.0 `ref_tt`), open-ended where a limit is missing; None where neither is set."""
    start = (limits.not_before_tt - ref_tt) * SECONDS_PER_DAY
    end = (limits.not_after_tt - ref_tt) * SECONDS_PER_DAY
    return [None if np.isnan(s) and np.isnan(e) else
            [(-np.inf if np.isnan(s) else float(s), np.inf if np.isnan(e) else float(e))]
            for s, e in zip(start, end)]


def phase_intervals(limits: TimeConstraints, targets: Targets, site: Site, ref_tt: float,
                    length_s: float) -> list:
    """Per target, the intervals (seconds from `ref_tt`, TT days after J2000.0) inside
    [0, length_s] when its barycentric phase is in its window (see module); None for targets
    without a phase window."""
    out = [None] * len(targets)
    rows = np.flatnonzero(limits.phased)
    if rows.size == 0:
        return out
    end_tt = ref_tt + length_s / SECONDS_PER_DAY
    clock = BarycentricClock(site, ref_tt - 1.0, end_tt + 1.0)
    # Each target's direction (after its space motion) at the middle of the span.
    mid_jyear = 2000.0 + 0.5 * (ref_tt + end_tt) / DAYS_PER_JULIAN_YEAR
    direction = target_direction(targets, rows, np.full(rows.size, mid_jyear))
    t0 = limits.epoch_bjd_tdb[rows] - JD_J2000
    period = limits.period_d[rows]
    low = limits.phase_min[rows]
    high = np.where(limits.phase_max[rows] < low, limits.phase_max[rows] + 1.0,
                    limits.phase_max[rows])
    # The cycles whose window may touch the span (one more on each side).
    b_start = clock.bjd_tdb(np.full(rows.size, ref_tt), direction)
    b_end = clock.bjd_tdb(np.full(rows.size, end_tt), direction)
    n_lo = np.floor((b_start - t0) / period).astype(np.int64) - 1
    n_hi = np.floor((b_end - t0) / period).astype(np.int64) + 1
    counts = n_hi - n_lo + 1
    first = np.repeat(np.cumsum(counts) - counts, counts)
    owner = np.repeat(np.arange(rows.size), counts)
    cycle = np.repeat(n_lo, counts) + (np.arange(int(counts.sum())) - first)
    # The window's barycentric edges in each cycle, then the observed instants of those.
    open_bjd = t0[owner] + (cycle + low[owner]) * period[owner]
    close_bjd = t0[owner] + (cycle + high[owner]) * period[owner]
    pair_direction = direction[:, owner]
    open_s = (clock.observed_tt(open_bjd, pair_direction) - ref_tt) * SECONDS_PER_DAY
    close_s = (clock.observed_tt(close_bjd, pair_direction) - ref_tt) * SECONDS_PER_DAY
    pieces = [[] for _ in rows]
    for k, start, end in zip(owner, np.maximum(open_s, 0.0), np.minimum(close_s, length_s)):
        if end > start:
            pieces[k].append((float(start), float(end)))
    for k, row in enumerate(rows):
        out[row] = iv.union(pieces[k])
    return out


def restrict_windows(windows, limits: TimeConstraints, targets: Targets, site: Site, t_ref,
                     length_s: float) -> list:
    """Cut every target's windows (windows.py TargetWindows, in place) to its allowed
    intervals, naming the constraint in its reason where nothing is left. Returns the allowed
    intervals per target (None: unconstrained), in seconds from t_ref."""
    ref_tt = float(tt_days_of(t_ref))
    spans = span_intervals(limits, ref_tt)
    phases = phase_intervals(limits, targets, site, ref_tt, length_s)
    allowed = [None] * len(targets)
    for i in np.flatnonzero(limits.constrained):
        allowed[i] = (spans[i] if phases[i] is None else phases[i] if spans[i] is None
                      else iv.intersect(phases[i], spans[i]))
        had = list(windows.windows[i])
        # Blocks may overlap (a German mount's windows either side of a flip): one at a time.
        windows.blocks[i] = [part for piece in windows.blocks[i]
                             for part in iv.intersect([piece], allowed[i])]
        windows.windows[i] = iv.union(windows.blocks[i])
        if had and not windows.windows[i] and windows.reason[i] == "":
            windows.reason[i] = _reason(had, spans[i])
    return allowed


def _reason(pieces: list, span: list | None) -> str:
    """Which constraint left no window: the not_before/not_after span, else the phase."""
    if span is not None and not iv.intersect(pieces, span):
        start, end = span[0]
        if all(e <= start for _, e in pieces):
            return BEFORE_NOT_BEFORE
        if all(s >= end for s, _ in pieces):
            return AFTER_NOT_AFTER
        return OUTSIDE_TIME_SPAN
    return OUTSIDE_PHASE


def inside(allowed: list | None, start_s: float, end_s: float) -> bool:
    """Whether [start_s, end_s] lies wholly inside one allowed interval (None: no limit)."""
    return allowed is None or any(s <= start_s and end_s <= e for s, e in allowed)
