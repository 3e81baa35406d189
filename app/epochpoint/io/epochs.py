"""Catalogue epochs as written in files: `2016.0`, `J2016.0` (Julian) or `B1950.0` (Besselian).

Everything is returned as a Julian year in TDB, the unit of `Targets.epoch`. A plain number is a
Julian year. A Besselian epoch B = 1900.0 + (JD - 2415020.31352) / 365.242198781 (Lieske 1979,
A&A 73, 282) is converted with astropy.time, which implements that definition.
"""
from __future__ import annotations

import re
from functools import lru_cache

from astropy.time import Time

from .errors import quote

# Years outside this span are refused before reaching astropy (as Targets.validate does).
EPOCH_MIN_YEAR, EPOCH_MAX_YEAR = -3000.0, 5000.0

_EPOCH = re.compile(r"([JjBb]?)\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+))")


def split_epoch(text) -> tuple[str, float]:
    """('J' or 'B' or '', year) from an epoch string; ValueError if it is not one."""
    text = str(text).strip()
    match = _EPOCH.fullmatch(text)
    if match is None:
        raise ValueError(f"{quote(text)} is not an epoch (e.g. 2016.0, J2016.0 or B1950.0)")
    year = float(match.group(2))
    if not EPOCH_MIN_YEAR <= year <= EPOCH_MAX_YEAR:
        raise ValueError(f"{quote(text)} is outside the years {EPOCH_MIN_YEAR:.0f} to "
                         f"{EPOCH_MAX_YEAR:.0f}")
    return match.group(1).upper(), year


@lru_cache(maxsize=256)
def besselian_to_julian_year(b_year: float) -> float:
    """The Julian year (TDB) of Besselian epoch b_year (cached: a file repeats a few epochs)."""
    return float(Time(b_year, format="byear", scale="tdb").jyear)


def parse_epoch(text) -> float:
    """A Julian year (TDB) from '2016.0', 'J2016.0' or 'B1950.0'; ValueError if unreadable."""
    kind, year = split_epoch(text)
    return besselian_to_julian_year(year) if kind == "B" else year
