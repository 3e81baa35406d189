"""argparse types for numeric options: a value outside its range (or NaN, or infinite) is a
one-line usage error ("argument --min-altitude: 95 must be a number from 0 to 90 deg"), exit 2,
before any file is read or any connection is made. The words come from core/ranges.py, which
the core functions use for the same checks.
"""
from __future__ import annotations

import argparse

from ..core.ranges import range_problem


def number(lo=None, hi=None, *, lo_open=False, hi_open=False, unit=""):
    """An argparse type: a finite float within the range (open ends where asked)."""
    def parse(text: str) -> float:
        problem = range_problem(text, lo, hi, lo_open=lo_open, hi_open=hi_open, unit=unit)
        if problem is not None:
            raise argparse.ArgumentTypeError(problem)
        return float(text)
    return parse


def count(lo: int = 0, hi: int | None = None):
    """An argparse type: a whole number within lo..hi."""
    def parse(text: str) -> int:
        try:
            value = int(text)
        except ValueError:
            value = None
        if value is None or value < lo or (hi is not None and value > hi):
            bounds = f"from {lo} to {hi}" if hi is not None else f"at least {lo}"
            raise argparse.ArgumentTypeError(f"{text.strip()} must be a whole number {bounds}")
        return value
    return parse
