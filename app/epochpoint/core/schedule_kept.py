"""A saved observing order put back on a freshly computed plan, so a plan reopens as it was.

    kept = keep_schedule(plan, [{"name": ..., "start": ISO, "end": ISO}, ...])  # Plan or None

The blocks keep their saved start and end times exactly. They are kept only if they still
make sense for the plan as computed now: every name is one of the plan's targets (a name
listed twice takes its rows in list order), every block lasts the target's exposure x repeats,
lies inside one of the target's observable windows and does not overlap another block. If
not (the targets, the site or the night changed since), the result is None and the caller
keeps the plan's own order. Slew times are not stored in a plan file, so a kept order's
`slew_s` are NaN; unscheduled targets get the reasons schedule.schedule gives.
"""
from __future__ import annotations

from dataclasses import replace

import numpy as np
from astropy.time import Time

from .schedule import Schedule, Unscheduled, _alone_reason
from .schedule_model import priority_weight

# How far a saved block may overhang its window. Saved times carry milliseconds, and a plan
# saved before the Earth-orientation tables were updated (astropy-iers-data) sees its windows
# move with the change in predicted UT1, milliseconds to tens of milliseconds months ahead;
# a second is far below anything that matters at the telescope.
TIME_SLACK_S = 1.0
# A block's length is exposure x repeats up to the milliseconds of its saved times.
ROUNDING_S = 0.01


def _seconds_from_ref(plan, iso_texts: list) -> np.ndarray:
    """Seconds from plan.t_ref of ISO 8601 UTC instants (astropy; leap seconds counted)."""
    times = Time([text.rstrip("Zz") for text in iso_texts], format="isot", scale="utc")
    return np.atleast_1d((times - plan.t_ref).to_value("s"))


def keep_schedule(plan, entries: list):
    """`plan` with its schedule replaced by the saved `entries`, or None if they no longer
    fit it (see the module docstring)."""
    if not entries:
        return None
    names = [str(n) for n in plan.windows.names]
    rows: dict = {}
    for i, name in enumerate(names):
        rows.setdefault(name, []).append(i)
    used: dict = {}
    index = []
    for entry in entries:
        candidates = rows.get(str(entry["name"]), [])
        k = used.get(entry["name"], 0)
        if k >= len(candidates):
            return None  # a target no longer in the list (or listed fewer times)
        index.append(candidates[k])
        used[entry["name"]] = k + 1
    try:
        start = _seconds_from_ref(plan, [e["start"] for e in entries])
        end = _seconds_from_ref(plan, [e["end"] for e in entries])
    except ValueError:
        return None
    index = np.asarray(index, dtype=int)
    order = np.argsort(start, kind="stable")
    index, start, end = index[order], start[order], end[order]
    # The same block length, inside one window of its target, no overlap.
    if not np.allclose(end - start, plan.duration_s[index], atol=ROUNDING_S, rtol=0.0):
        return None
    for i, a, b in zip(index, start, end):
        if not any(s - TIME_SLACK_S <= a and b <= e + TIME_SLACK_S
                   for s, e in plan.windows.blocks[i]):
            return None
    if np.any(start[1:] < end[:-1] - TIME_SLACK_S):
        return None
    chosen = set(index.tolist())
    unscheduled = tuple(Unscheduled(i, _alone_reason(plan.windows.blocks[i], plan.duration_s[i]))
                        for i in range(len(names)) if i not in chosen)
    weight = float(np.sum(priority_weight(plan.priority[index]))) if index.size else 0.0
    kept = Schedule(index, start, end, np.full(index.size, np.nan), unscheduled, weight,
                    iterations=0, elapsed_s=0.0, seed=plan.schedule.seed)
    return replace(plan, schedule=kept)
