"""Sets of time intervals (seconds), as sorted lists of (start, end) pairs."""
from __future__ import annotations


def intersect(a: list, b: list) -> list:
    """Intersection of two sorted, non-overlapping interval lists."""
    out, i, j = [], 0, 0
    while i < len(a) and j < len(b):
        start, end = max(a[i][0], b[j][0]), min(a[i][1], b[j][1])
        if end > start:
            out.append((start, end))
        if a[i][1] < b[j][1]:
            i += 1
        else:
            j += 1
    return out


def union(intervals: list) -> list:
    """Merge overlapping or touching intervals into a sorted list."""
    merged = []
    for start, end in sorted(intervals):
        if merged and start <= merged[-1][1]:
            merged[-1] = (merged[-1][0], max(merged[-1][1], end))
        elif end > start:
            merged.append((start, end))
    return merged


def runs(mask, times) -> list:
    """Intervals of a boolean sample mask: each run of True spans its first to last sample."""
    out, start = [], None
    for k, ok in enumerate(mask):
        if ok and start is None:
            start = k
        elif not ok and start is not None:
            out.append((times[start], times[k - 1]))
            start = None
    if start is not None:
        out.append((times[start], times[len(mask) - 1]))
    return out


def total(intervals: list) -> float:
    return sum(end - start for start, end in intervals)
