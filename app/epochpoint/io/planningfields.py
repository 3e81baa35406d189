"""The per-target planning fields: priority, exposure, repeats and notes.

Target files carry them as text in `Targets.extra` (whatever the file held); a plan file and the
desktop app keep them typed:

    priority   integer 1 (highest) .. 5 (lowest), default 3
    exposure   seconds of one exposure, a number >= 0, default 300
    repeats    how many exposures in one block, an integer >= 1, default 1
    notes      free text on one line, default empty

An empty cell means the default. The checks are the ones core.plan applies, made stricter where
people type values (priority and repeats must be whole numbers) so a typo is caught at entry.
"""
from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from epochpoint.core.plan import DEFAULT_EXPOSURE_S, DEFAULT_PRIORITY, DEFAULT_REPEATS
from epochpoint.core.targets import Targets

from .errors import InputError, quote

PLANNING_FIELDS = ("priority", "exposure", "repeats", "notes")
PRIORITY_RANGE = (1, 5)
# Longest exposure accepted (one day of seconds): a larger value is a typo.
EXPOSURE_MAX_S = 86400.0
REPEATS_MAX = 10000


def blank_cell(value) -> bool:
    """True for an empty cell: None, NaN, or text '', '--' or 'nan'."""
    if value is None:
        return True
    if isinstance(value, float) and math.isnan(value):
        return True
    return isinstance(value, str) and value.strip() in ("", "--", "nan")


def cell_number(value) -> float:
    """A cell as a finite float, or ValueError naming it."""
    if isinstance(value, bool):
        raise ValueError(f"{quote(value)} is not a number")
    try:
        number = float(str(value).strip()) if isinstance(value, str) else float(value)
    except (TypeError, ValueError):
        raise ValueError(f"{quote(value)} is not a number") from None
    if not math.isfinite(number):
        raise ValueError(f"{quote(value)} is not a finite number")
    return number


def _whole(value, low: int, high: int, what: str) -> int:
    number = cell_number(value)
    if number != round(number) or not low <= number <= high:
        raise ValueError(f"{quote(value)} must be {what}")
    return int(number)


def parse_priority(value) -> int:
    """Priority 1 (highest) .. 5 (lowest); blank gives the default. ValueError if bad."""
    if blank_cell(value):
        return DEFAULT_PRIORITY
    low, high = PRIORITY_RANGE
    return _whole(value, low, high, f"a whole number from {low} (highest) to {high} (lowest)")


def parse_exposure(value) -> float:
    """Exposure in seconds, 0 .. one day; blank gives the default. ValueError if bad."""
    if blank_cell(value):
        return DEFAULT_EXPOSURE_S
    seconds = cell_number(value)
    if not 0.0 <= seconds <= EXPOSURE_MAX_S:
        raise ValueError(f"{quote(value)} must be from 0 to {EXPOSURE_MAX_S:g} seconds")
    return seconds


def parse_repeats(value) -> int:
    """Exposures per block, a whole number >= 1; blank gives the default. ValueError if bad."""
    if blank_cell(value):
        return DEFAULT_REPEATS
    return _whole(value, 1, REPEATS_MAX, f"a whole number from 1 to {REPEATS_MAX}")


def parse_notes(value) -> str:
    """Notes as one line of text (line breaks become spaces); blank is empty."""
    if blank_cell(value):
        return ""
    return " ".join(str(value).split())


PARSERS = {"priority": parse_priority, "exposure": parse_exposure, "repeats": parse_repeats,
           "notes": parse_notes}
DTYPES = {"priority": np.int64, "exposure": np.float64, "repeats": np.int64, "notes": object}


def planning_columns(targets: Targets, path=None) -> dict:
    """{field: typed numpy array} for the four planning fields of `targets` (defaults where the
    list has no such column). A bad value raises InputError naming the file (`path`, may be
    None), the target's position and name, and the column."""
    n, names = len(targets), targets.names()
    columns = {}
    for field, parse in PARSERS.items():
        raw = targets.extra.get(field)
        values = np.empty(n, dtype=DTYPES[field])
        for i in range(n):
            try:
                values[i] = parse(None if raw is None else raw[i])
            except ValueError as err:
                raise InputError(path, str(err), line=i + 1, column=field,
                                 target=str(names[i]), row_word="target") from None
        columns[field] = values
    return columns


def with_planning_columns(targets: Targets, path=None) -> Targets:
    """`targets` with exactly the four planning fields as typed extra columns (other extra
    columns are left out); see planning_columns for the errors."""
    return replace(targets, extra=planning_columns(targets, path))
