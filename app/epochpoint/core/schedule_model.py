"""The observing night as a problem to schedule: what each target is worth, how long its block
lasts, when it may be observed, how long the mount takes to reach it; and the answer.

Times are plain float seconds from the night's start; the night is [0, night_end_s]. A block
of `duration_s[i]` seconds counts only if it is observed without a break inside ONE of the
target's windows (every constraint, altitude, mount limits, Moon, darkness, already applied).

Slews live in one table `slew_s` of shape (n + 1, n + 1): entry [a, b] is the time from
target a to target b; row n is the park position (the mount's place at the night's start)
and column n the end of the night (always 0 s). schedule_slew.py builds it for an equatorial
mount; any other table (or callable) with that layout may be passed instead. A German mount's
targets become items, one per pier side (schedule_pier.py): `group` maps each item to its
target, and an order holds at most one item of a target.

Earliest-start timing of a fixed order is optimal: the earliest start of a block is a
non-decreasing function of its arrival time (arrival = previous end + slew), so starting every
block as early as possible never hurts a later one. The same monotony gives each block a latest
arrival time that keeps the rest of the order feasible; with it, inserting a block between two
others is checked in O(number of windows) time, the "forward time slack" idea of Savelsbergh,
ORSA Journal on Computing 4 (1992) 146-154 (from memory), here extended to several windows.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

# Why a target is left out. No window: none at all, or none overlapping the night. No window
# long enough: no window holds the block (counting the slew from the park when the block
# would open the night). Displaced: it fits on its own but the best order found is worth more
# without it.
# Times closer than this are equal for the scheduler (seconds).
TIME_TOLERANCE_S = 1e-9
NO_WINDOW = "no window"
NO_WINDOW_LONG_ENOUGH = "no window long enough"
DISPLACED = "displaced by higher-value targets"


class ScheduleInputError(ValueError):
    """Scheduling input that cannot be used, naming the target (1-based) and the argument."""

    def __init__(self, argument: str, index: int | None, message: str):
        self.argument, self.index = argument, index
        where = f"target {index + 1}, " if index is not None else ""
        super().__init__(f"{where}{argument}: {message}")


def priority_weight(priority):
    """Value of completing a target of the user's priority (1 = highest ... 5 = lowest).

    weight = 2 ** (5 - priority): 16, 8, 4, 2, 1. Each step up doubles the value, so one
    target of priority p is worth two of priority p + 1, four of priority p + 2, and so on;
    the scheduler maximises the summed weight. Accepts a scalar or an array; returns float(s).
    """
    p = np.asarray(priority, dtype=float)
    bad = ~np.isin(p, (1.0, 2.0, 3.0, 4.0, 5.0))
    if np.any(bad):
        first = int(np.flatnonzero(bad.ravel())[0]) if p.ndim else None
        raise ScheduleInputError("priority", first,
                                 f"{p.ravel()[first or 0]!r} is not a whole number 1 to 5")
    weight = 2.0 ** (5.0 - p)
    return float(weight) if weight.ndim == 0 else weight


def _positive_column(values, n, argument):
    arr = np.asarray(values, dtype=float).ravel()
    if arr.size != n:
        raise ScheduleInputError(argument, None, f"has {arr.size} values for {n} targets")
    bad = ~(np.isfinite(arr) & (arr > 0.0))
    if np.any(bad):
        i = int(np.flatnonzero(bad)[0])
        raise ScheduleInputError(argument, i, f"{arr[i]!r} is not a positive number")
    return arr


def _windows_list(windows_s, i):
    try:
        pairs = np.asarray(windows_s[i], dtype=float).reshape(-1, 2)
    except (TypeError, ValueError):
        raise ScheduleInputError("windows_s", i, "windows must be (start, end) pairs of seconds")
    if not np.all(np.isfinite(pairs)) or np.any(pairs[:, 1] < pairs[:, 0]):
        raise ScheduleInputError("windows_s", i, "a window has an end before its start or a "
                                                 "value that is not a number")
    return pairs


@dataclass(frozen=True, eq=False)
class NightProblem:
    """Validated, packed input. `win_open[i, m]` and `win_last_start[i, m]` are the opening
    time and the latest block start of target i's m-th usable window (sorted by opening;
    padding +inf / -inf); `windows[i]` holds the same pairs as Python floats for scalar loops."""
    weight: np.ndarray
    duration_s: np.ndarray
    night_end_s: float
    slew_s: np.ndarray
    win_open: np.ndarray
    win_last_start: np.ndarray
    windows: tuple
    reason: tuple  # per target: None when it fits alone, else why it never can
    slew_rows: list  # slew_s as nested Python lists, for scalar loops
    group: np.ndarray  # the target of each item (the identity without pier sides)
    target_reason: tuple  # per target, before any split into items

    @property
    def n(self) -> int:
        return self.weight.size

    @property
    def n_targets(self) -> int:
        return len(self.target_reason)


def night_problem(weight, duration_s, windows_s, night_end_s, slew_s=None, group=None,
                  target_windows=None) -> NightProblem:
    """Check and pack the input (see `schedule` for the arguments). With `group` (item ->
    target) the rows are items and `target_windows` the targets' own windows."""
    night_end_s = float(night_end_s)
    if not (math.isfinite(night_end_s) and night_end_s > 0.0):
        raise ScheduleInputError("night_end_s", None, f"{night_end_s!r} is not a positive number")
    n = np.asarray(weight).size
    weight = _positive_column(weight, n, "weight")
    duration = _positive_column(duration_s, n, "duration_s")
    if len(windows_s) != n:
        raise ScheduleInputError("windows_s", None, f"has {len(windows_s)} lists for {n} targets")
    table = _slew_input(slew_s, n)
    usable, reason = [], []
    for i in range(n):
        pairs = np.clip(_windows_list(windows_s, i), 0.0, night_end_s)
        inside = pairs[pairs[:, 1] > pairs[:, 0]]
        # A window is usable when it holds the whole block; the block's latest start is end - d
        # (plus a nanosecond, so that rounding of start + duration never rejects a fit).
        usable.append(sorted((float(a), float(b) - duration[i] + TIME_TOLERANCE_S)
                             for a, b in inside if b - a >= duration[i]))
        alone = any(max(a, table[n, i]) <= last for a, last in usable[i])
        reason.append(None if alone else NO_WINDOW if inside.size == 0 else NO_WINDOW_LONG_ENOUGH)
    width = max((len(u) for u in usable), default=0)
    win_open, win_last = np.full((n, width), np.inf), np.full((n, width), -np.inf)
    for i, pairs in enumerate(usable):
        if pairs:
            win_open[i, :len(pairs)], win_last[i, :len(pairs)] = np.array(pairs).T
    group = np.arange(n) if group is None else np.asarray(group, dtype=int)
    target_reason = tuple(reason) if target_windows is None else \
        _target_reasons(group, reason, target_windows, night_end_s)
    return NightProblem(weight, duration, night_end_s, table, win_open, win_last,
                        tuple(usable), tuple(reason), table.tolist(), group, target_reason)


def _target_reasons(group, item_reason, target_windows, night_end_s) -> tuple:
    """Per target: None when one of its items fits alone, else why none ever can."""
    fits = np.zeros(len(target_windows), dtype=bool)
    fits[group[[k for k, r in enumerate(item_reason) if r is None]]] = True
    inside = [any(min(e, night_end_s) > max(s, 0.0) for s, e in w) for w in target_windows]
    return tuple(None if ok else NO_WINDOW_LONG_ENOUGH if has else NO_WINDOW
                 for ok, has in zip(fits, inside))


def _slew_input(slew_s, n) -> np.ndarray:
    """The (n + 1, n + 1) slew table from None (no slewing), an (n + 1, n) or (n + 1, n + 1)
    array, or a vectorised callable f(from_index, to_index) with index n for the park."""
    table = np.zeros((n + 1, n + 1))
    if slew_s is None:
        return table
    if callable(slew_s):
        slew_s = slew_s(np.arange(n + 1)[:, None], np.arange(n)[None, :])
    given = np.asarray(slew_s, dtype=float)
    if given.shape not in ((n + 1, n), (n + 1, n + 1)):
        raise ScheduleInputError("slew_s", None, f"shape {given.shape} is not ({n + 1}, {n})")
    if not np.all(np.isfinite(given[:, :n]) & (given[:, :n] >= 0.0)):
        raise ScheduleInputError("slew_s", None, "slew times must be finite and not negative")
    table[:, :n] = given[:, :n]
    return table


def earliest_start(windows, arrival_s, latest_s=math.inf):
    """Earliest block start at or after `arrival_s` inside one window and not after
    `latest_s`, or None. Windows are sorted by opening, so the first that fits is earliest."""
    for opening, last_start in windows:
        start = opening if opening > arrival_s else arrival_s
        if start <= last_start and start <= latest_s:
            return start
    return None


def earliest_starts(problem: NightProblem, route):
    """Earliest start of every block of `route` in order, or None if the order is infeasible."""
    rows, duration, windows = problem.slew_rows, problem.duration_s, problem.windows
    previous, free_s, starts = problem.n, 0.0, []
    for j in route:
        start = earliest_start(windows[j], free_s + rows[previous][j])
        if start is None:
            return None
        starts.append(start)
        previous, free_s = j, start + duration[j]
    return starts


def latest_arrivals(problem: NightProblem, route):
    """Latest arrival (= latest start) of every block that keeps the rest of `route` feasible."""
    rows, duration, windows = problem.slew_rows, problem.duration_s, problem.windows
    latest, following, limit_s = [0.0] * len(route), problem.n, math.inf
    for k in range(len(route) - 1, -1, -1):
        j = route[k]
        cap_s = limit_s - rows[j][following] - duration[j]
        best = -math.inf
        for opening, last_start in windows[j]:
            top = last_start if last_start < cap_s else cap_s
            if opening <= top and top > best:
                best = top
        latest[k], following, limit_s = best, j, best
    return latest


class Entry(NamedTuple):
    index: int
    start_s: float
    end_s: float
    slew_s: float


class Unscheduled(NamedTuple):
    index: int
    reason: str


@dataclass(frozen=True, eq=False)
class Schedule:
    """An observing order. Columns in observing order: target `index`, block `start_s` and
    `end_s`, and `slew_s` (the slew from the previous block or the park; it fits in the gap
    before `start_s`, which may also hold a wait). `unscheduled` gives every other target with
    its reason; `total_weight` the summed weight of the scheduled blocks."""
    index: np.ndarray
    start_s: np.ndarray
    end_s: np.ndarray
    slew_s: np.ndarray
    unscheduled: tuple
    total_weight: float
    iterations: int = 0
    elapsed_s: float = 0.0
    seed: int = 0
    stopped_by: str = ""  # which limit ended the search: see schedule.STOP_REASONS

    @property
    def entries(self) -> tuple:
        return tuple(Entry(int(i), float(s), float(e), float(w)) for i, s, e, w
                     in zip(self.index, self.start_s, self.end_s, self.slew_s))


def make_schedule(problem: NightProblem, route, starts, iterations=0, elapsed_s=0.0,
                  seed=0, stopped_by=""):
    """Package an order and its start times as a `Schedule` (indices of targets, not items)
    with reasons for the rest."""
    index = np.asarray(route, dtype=int)
    previous = np.concatenate(([problem.n], index))[:-1].astype(int)
    chosen = set(problem.group[index].tolist())
    unscheduled = tuple(Unscheduled(i, problem.target_reason[i] or DISPLACED)
                        for i in range(problem.n_targets) if i not in chosen)
    start = np.asarray(starts, dtype=float)
    return Schedule(problem.group[index], start, start + problem.duration_s[index],
                    problem.slew_s[previous, index], unscheduled,
                    math.fsum(problem.weight[index]), iterations, elapsed_s, seed, stopped_by)
