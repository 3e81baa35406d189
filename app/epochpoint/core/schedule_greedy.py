"""The simple greedy baseline: most valuable target first, each at its earliest free moment.

Targets are taken in descending weight (ties in input order). Each is placed at the earliest
time at which its whole block fits inside one of its windows without touching any block placed
before it, counting the slew from the block before and the slew to the block after. Placed
blocks never move. This is what a careful observer does by hand; the optimiser in
schedule_search.py starts from it and is never worse.
"""
from __future__ import annotations

import numpy as np

from .schedule_model import NightProblem, earliest_start


def greedy_order(problem: NightProblem):
    """The baseline's order and start times (lists), in observing order."""
    rows, duration, windows = problem.slew_rows, problem.duration_s, problem.windows
    park = problem.n
    route, starts, taken = [], [], set()
    for j in np.argsort(-problem.weight, kind="stable").tolist():
        # One item per target (a German mount's targets have one item per pier side).
        if problem.reason[j] is not None or int(problem.group[j]) in taken:
            continue
        # Try the gaps in time order: before the first block, between blocks, after the last.
        for gap in range(len(route) + 1):
            before = route[gap - 1] if gap else park
            free_s = starts[gap - 1] + duration[before] if gap else 0.0
            latest_s = (starts[gap] - rows[j][route[gap]] - duration[j]
                        if gap < len(route) else np.inf)
            start = earliest_start(windows[j], free_s + rows[before][j], latest_s)
            if start is not None:
                route.insert(gap, j)
                starts.insert(gap, start)
                taken.add(int(problem.group[j]))
                break
    return route, starts
