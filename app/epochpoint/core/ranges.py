"""Numbers within their range: the one-line check shared by the core functions and the command
line, so `plan(min_altitude=95)` and `--min-altitude 95` are refused with the same words.

NaN and infinities are refused everywhere: an option that means "no limit" takes None (or is
left out), never inf.
"""
from __future__ import annotations

import math


def requirement(lo=None, hi=None, *, lo_open=False, hi_open=False, unit="") -> str:
    """What a value must be, in words: 'from 0 to 90 deg', 'more than 0 s', 'a finite number'."""
    if lo is not None and hi is not None and not (lo_open or hi_open):
        bounds = f"from {lo:g} to {hi:g}"
    else:
        parts = []
        if lo is not None:
            parts.append(f"{'more than' if lo_open else 'at least'} {lo:g}")
        if hi is not None:
            parts.append(f"{'less than' if hi_open else 'at most'} {hi:g}")
        bounds = " and ".join(parts) if parts else "a finite number"
    return f"{bounds}{' ' + unit if unit else ''}"


def range_problem(value, lo=None, hi=None, *, lo_open=False, hi_open=False,
                  unit="") -> str | None:
    """None when value is a finite number inside the range, else "<value> must be <what>"."""
    shown = str(value).strip() if isinstance(value, str) else repr(value)
    try:
        x = float(value)
    except (TypeError, ValueError, OverflowError):
        return f"{shown} is not a number"
    inside = (math.isfinite(x)
              and (lo is None or (x > lo if lo_open else x >= lo))
              and (hi is None or (x < hi if hi_open else x <= hi)))
    if inside:
        return None
    if not isinstance(value, str):
        shown = repr(x)
    return f"{shown} must be " + requirement(lo, hi, lo_open=lo_open, hi_open=hi_open, unit=unit)


def checked(value, name: str, lo=None, hi=None, *, lo_open=False, hi_open=False,
            unit="") -> float:
    """value as a float, or ValueError('name: <value> must be ...') in one line."""
    problem = range_problem(value, lo, hi, lo_open=lo_open, hi_open=hi_open, unit=unit)
    if problem is not None:
        raise ValueError(f"{name}: {problem}")
    return float(value)
