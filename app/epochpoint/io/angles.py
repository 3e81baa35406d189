"""Angles as people write them: decimal degrees or sexagesimal, read and written.

Right ascension is read as decimal degrees (`187.5`) or sexagesimal hours (`12:30:00.0`,
`12 30 00.0`); declination as decimal degrees (`-45.25`) or sexagesimal degrees (`-45:15:00`,
`+07 24 25.4`). The sign of a declination belongs to the whole angle, so `-00:30:00` is -0.5
degrees (common practice; a sign taken from the degrees field alone would lose it). Minutes and
seconds must be below 60, hours below 24 and |dec| at most 90.

The formatters turn degree arrays into sexagesimal text for people; they round once, in units of
the last printed digit, so 59.999 s never prints as 60.0 s. NaN formats as an empty string.
`sidereal_time_text` gives the one form of a sidereal time shown to people: 'LST hh:mm:ss.s'.
"""
from __future__ import annotations

import math
import re

import numpy as np

from .errors import quote

DEG_PER_HOUR = 15.0

# One sexagesimal field: digits with an optional fraction.
_FIELD = re.compile(r"\d+(?:\.\d*)?|\.\d+")
# Fields are separated by a colon (spaces allowed around it) or by spaces alone.
_SEPARATOR = re.compile(r"\s*:\s*|\s+")


def _split_sexagesimal(text: str) -> list[float] | None:
    """[units, minutes(, seconds)] from 'u:m(:s)' or 'u m (s)'; None for any other form."""
    parts = _SEPARATOR.split(text)
    if len(parts) not in (2, 3) or not all(_FIELD.fullmatch(p) for p in parts):
        return None
    if any("." in p for p in parts[:-1]):  # only the last field may carry a fraction
        return None
    return [float(p) for p in parts]


def _sexagesimal_value(fields: list[float], text: str) -> float:
    """Combine [units, minutes(, seconds)] into units, checking minutes and seconds are < 60."""
    for value, what in zip(fields[1:], ("minutes", "seconds")):
        if value >= 60.0:
            raise ValueError(f"{quote(text)}: {what} must be below 60")
    units, minutes = fields[0], fields[1]
    seconds = fields[2] if len(fields) == 3 else 0.0
    return units + minutes / 60.0 + seconds / 3600.0


def _is_decimal(text: str) -> bool:
    return ":" not in text and not any(ch.isspace() for ch in text)


def parse_ra(text) -> float:
    """Right ascension in degrees from decimal degrees or sexagesimal hours; ValueError if bad."""
    text = str(text).strip()
    if _is_decimal(text):
        try:
            ra_deg = float(text)
        except ValueError:
            raise ValueError(f"{quote(text)} is not an angle (degrees or hh:mm:ss)") from None
        if not 0.0 <= ra_deg < 360.0:
            raise ValueError(f"{quote(text)} is outside [0, 360) degrees")
        return ra_deg
    fields = _split_sexagesimal(text)
    if fields is None:
        raise ValueError(f"{quote(text)} is not an angle (degrees or hh:mm:ss)")
    ra_hours = _sexagesimal_value(fields, text)
    if ra_hours >= 24.0:
        raise ValueError(f"{quote(text)} is not below 24 hours")
    return ra_hours * DEG_PER_HOUR


def parse_dec(text) -> float:
    """Declination in degrees from decimal or sexagesimal degrees (+dd:mm:ss); ValueError if bad."""
    text = str(text).strip()
    if _is_decimal(text):
        try:
            dec_deg = float(text)
        except ValueError:
            raise ValueError(f"{quote(text)} is not an angle (degrees or +dd:mm:ss)") from None
    else:
        sign = -1.0 if text.startswith("-") else 1.0
        fields = _split_sexagesimal(text[1:].lstrip() if text[:1] in "+-" else text)
        if fields is None:
            raise ValueError(f"{quote(text)} is not an angle (degrees or +dd:mm:ss)")
        dec_deg = sign * _sexagesimal_value(fields, text)
    if not abs(dec_deg) <= 90.0:  # also rejects NaN
        raise ValueError(f"{quote(text)} is outside [-90, +90] degrees")
    return dec_deg


def _format_sexagesimal(value, decimals: int, signed: bool, wrap_units: int | None):
    """Format values (in hours or degrees) as [+-]uu:mm:ss[.s...]; strings shaped like value."""
    value = np.asarray(value, dtype=float)
    ticks_per_second = 10 ** decimals
    finite = np.isfinite(value)
    ticks = np.round(np.abs(np.where(finite, value, 0.0)) * 3600.0 * ticks_per_second)
    if wrap_units is not None:  # e.g. 23:59:59.996 rounds to 24:00:00.00, which is 00:00:00.00
        ticks = np.mod(ticks, wrap_units * 3600 * ticks_per_second)
    negative = (value < 0.0) & (ticks > 0)  # no "-00:00:00.0" for a value that rounds to zero
    out = []
    for tick, neg, ok in zip(ticks.ravel(), negative.ravel(), finite.ravel()):
        if not ok:
            out.append("")
            continue
        whole_seconds, fraction = divmod(int(tick), ticks_per_second)
        units, rest = divmod(whole_seconds, 3600)
        minutes, seconds = divmod(rest, 60)
        text = f"{units:02d}:{minutes:02d}:{seconds:02d}"
        if decimals > 0:
            text += f".{fraction:0{decimals}d}"
        if signed:
            text = ("-" if neg else "+") + text
        out.append(text)
    result = np.array(out, dtype=object).reshape(value.shape)
    return result.item() if result.ndim == 0 else result


def format_ra_hms(ra_deg, decimals: int = 2):
    """Right ascension in degrees as 'hh:mm:ss.ss' (str for a scalar, object array for arrays)."""
    return _format_sexagesimal(np.mod(ra_deg, 360.0) / DEG_PER_HOUR, decimals, False, 24)


def format_dec_dms(dec_deg, decimals: int = 1):
    """Declination (or any signed angle) in degrees as '+dd:mm:ss.s'."""
    return _format_sexagesimal(dec_deg, decimals, True, None)


def format_hours(angle_deg, decimals: int = 0):
    """A signed hour angle in degrees as '+hh:mm:ss', wrapped into [-12h, +12h)."""
    wrapped_deg = np.mod(np.asarray(angle_deg, dtype=float) + 180.0, 360.0) - 180.0
    return _format_sexagesimal(wrapped_deg / DEG_PER_HOUR, decimals, True, None)


def sidereal_time_text(hours: float) -> str:
    """A sidereal time in hours as people read it: 'LST hh:mm:ss.s', 0 to 24 h, no sign.

    The one formatter shared by the command line and the app, so both print it alike. The
    value is wrapped into [0, 24) h before and after rounding to 0.1 s (23:59:59.96 prints as
    00:00:00.0); NaN gives 'LST --'.
    """
    hours = float(hours)
    if not math.isfinite(hours):
        return "LST --"
    return "LST " + _format_sexagesimal(hours % 24.0, 1, False, 24)
