"""Timed events in the night plan: fixed-time blocks reserved before the rest is scheduled.

Every event of the night judged observable (full or partial, event_search.py) gets a block
from first contact minus its baseline to last contact plus its baseline. Where two blocks
overlap (with the slew allowance between them) the higher priority wins (1 is highest; on a
tie the earlier event), and the other is reported as a collision. The other targets' windows
lose the reserved blocks widened by the slew allowance on each side: the settle time plus a
slew of 180 deg at the mount's rate, the longest single-axis move (common practice for a
worst case), so no scheduled block, nor its slew, touches a reserved one. A target with an
event ephemeris is observed at its events only.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import intervals as iv
from .event_search import find_events
from .events import EventEphemerides, tt_days_of
from .night import NightBoundaries
from .site import Site
from .targets import Targets

AT_EVENTS_ONLY = "observed at its timed events only"


@dataclass(frozen=True)
class FixedBlock:
    """A reserved block: target index, event cycle and kind, start/end (s from t_ref)."""

    index: int
    cycle: int
    kind: str
    start_s: float
    end_s: float
    observable: str


@dataclass(frozen=True)
class Reservations:
    """The night's fixed blocks, the events that lost a collision and to whom, and the pad
    (s) kept clear on either side of each block."""

    fixed: tuple
    collisions: tuple  # (FixedBlock, index of the target whose block won)
    pad_s: float

    def cut(self, blocks: list, periodic: np.ndarray) -> list:
        """Each target's window pieces without the reserved blocks (widened by pad_s);
        targets with an ephemeris get none."""
        taken = iv.union([(b.start_s - self.pad_s, b.end_s + self.pad_s) for b in self.fixed])
        free, edge = [], -np.inf
        for start, end in taken:
            free.append((edge, start))
            edge = end
        free.append((edge, np.inf))
        return [[] if periodic[i] else iv.intersect(list(pieces), free)
                for i, pieces in enumerate(blocks)]


def reserve_events(targets: Targets, eph: EventEphemerides, site: Site,
                   boundaries: NightBoundaries, t_ref, priority: np.ndarray, darkness: str,
                   min_altitude: float | None, allowed: list | None = None) -> Reservations:
    """The night's fixed-time blocks (see module); times in seconds from t_ref. allowed: per
    target, the intervals its time constraints allow (time_constraints.py; None: any time);
    an event whose block is not wholly inside them is not reserved."""
    mount = site.interlocks.mount
    pad_s = mount.settle + 180.0 / mount.slew_rate
    if not eph.periodic.any():
        return Reservations((), (), pad_s)
    found = find_events(targets, eph, site, boundaries.date, 1, darkness=darkness,
                        min_altitude=min_altitude)
    rows = np.asarray(found.rows, dtype=int)
    half_d = eph.duration_h[rows] / 48.0 + eph.baseline_min[rows] / 1440.0
    ref_tt = float(tt_days_of(t_ref))
    start_s = (found.mid_tt - half_d - ref_tt) * 86400.0
    end_s = (found.mid_tt + half_d - ref_tt) * 86400.0
    blocks = [FixedBlock(int(i), int(c), str(k), float(s), float(e), str(o)) for i, c, k, s, e, o
              in zip(rows, found["cycle"], found["kind"], start_s, end_s, found["observable"])]
    if allowed is not None:
        from .time_constraints import inside
        blocks = [b for b in blocks if inside(allowed[b.index], b.start_s, b.end_s)]
    # Higher priority first (1 is highest), then the earlier event.
    blocks.sort(key=lambda b: (priority[b.index], b.start_s))
    fixed, collisions = [], []
    for block in blocks:
        rival = next((f for f in fixed if block.start_s < f.end_s + pad_s
                      and f.start_s < block.end_s + pad_s), None)
        if rival is None:
            fixed.append(block)
        else:
            collisions.append((block, rival.index))
    return Reservations(tuple(sorted(fixed, key=lambda b: b.start_s)), tuple(collisions), pad_s)
