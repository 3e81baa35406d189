"""Which target rows are solar-system bodies, and their sources.

A row is a major body when its `body` column names one (sun, moon, mercury .. neptune,
pluto; case-insensitive), and a minor body when it carries osculating elements:
`semimajor_axis` or `perihelion_distance` (AU), `eccentricity`, `inclination`,
`ascending_node`, `argument_of_perihelion` (deg, ecliptic and equinox J2000), and either
`mean_anomaly` (deg) at `orbit_epoch` or `perihelion_time` (ISO 8601 TT or a Julian date);
optional `abs_magnitude`, `slope` (H, G) and `comet_m1`, `comet_k1`. The columns live in
`Targets.extra`, as text or numbers; the RA/Dec of such rows are placeholders.
"""
from __future__ import annotations

import math

import numpy as np

from .ephemeris import MAJOR_BODIES
from .kepler import Orbit
from .sources import MajorBody, MinorBody

ELEMENT_COLUMNS = ("semimajor_axis", "perihelion_distance", "eccentricity", "inclination",
                   "ascending_node", "argument_of_perihelion", "mean_anomaly", "orbit_epoch",
                   "perihelion_time")
MAGNITUDE_COLUMNS = ("abs_magnitude", "slope", "comet_m1", "comet_k1")
BODY_COLUMNS = ("body",) + ELEMENT_COLUMNS + MAGNITUDE_COLUMNS


class BodyRowError(ValueError):
    """A body or element cell that cannot be used: names the column (and the row index)."""

    def __init__(self, column: str, index: int | None, message: str):
        self.column, self.index = column, index
        where = f"target {index + 1}, " if index is not None else ""
        super().__init__(f"{where}column {column}: {message}")


def blank(value) -> bool:
    if value is None:
        return True
    if isinstance(value, (float, np.floating)) and math.isnan(value):
        return True
    return isinstance(value, str) and value.strip() in ("", "--", "nan")


def parse_number(value) -> float:
    try:
        number = float(value.strip()) if isinstance(value, str) else float(value)
    except (TypeError, ValueError):
        raise ValueError(f"'{value}' is not a number") from None
    if not math.isfinite(number):
        raise ValueError(f"'{value}' is not a finite number")
    return number


def parse_tt_instant(value) -> float:
    """A TT Julian date from a Julian date number or an ISO 8601 date/time (TT)."""
    try:
        return parse_number(value)
    except ValueError:
        pass
    from astropy.time import Time
    text = str(value).strip().rstrip("Z")
    try:
        return float(Time(text, format="isot" if "T" in text else "iso", scale="tt").jd)
    except ValueError:
        raise ValueError(f"'{value}' is neither a Julian date nor an ISO 8601 date") from None


def parse_body_name(value) -> str:
    key = str(value).strip().lower()
    if key not in MAJOR_BODIES:
        raise ValueError(f"'{value}' is not a body; expected one of {', '.join(MAJOR_BODIES)}")
    return key


def _cell(extra: dict, column: str, i: int):
    values = extra.get(column)
    return None if values is None else values[i]


def _number_cell(extra, column, i, required=True, low=None, high=None):
    value = _cell(extra, column, i)
    if blank(value):
        if required:
            raise BodyRowError(column, i, "no value given (an orbit needs one)")
        return math.nan
    try:
        number = parse_number(value)
    except ValueError as err:
        raise BodyRowError(column, i, str(err)) from None
    if (low is not None and number < low) or (high is not None and number > high):
        raise BodyRowError(column, i, f"'{value}' is outside [{low}, {high}]")
    return number


def orbit_of_row(extra: dict, i: int) -> Orbit:
    """The orbit of row i from its element cells (BodyRowError naming the column)."""
    e = _number_cell(extra, "eccentricity", i, low=0.0, high=100.0)
    inc = _number_cell(extra, "inclination", i, low=0.0, high=180.0)
    node = _number_cell(extra, "ascending_node", i, low=-360.0, high=360.0)
    peri = _number_cell(extra, "argument_of_perihelion", i, low=-360.0, high=360.0)
    a = _number_cell(extra, "semimajor_axis", i, required=False)
    q = _number_cell(extra, "perihelion_distance", i, required=False)
    time_value = _cell(extra, "perihelion_time", i)
    if not blank(time_value):
        try:
            t_peri = parse_tt_instant(time_value)
        except ValueError as err:
            raise BodyRowError("perihelion_time", i, str(err)) from None
        if math.isnan(q):
            if math.isnan(a):
                raise BodyRowError("perihelion_distance", i, "no value given (nor a "
                                   "semimajor_axis)")
            q = a * (1.0 - e)
        if not q > 0:
            raise BodyRowError("perihelion_distance", i, "must be positive")
        epoch_value = _cell(extra, "orbit_epoch", i)
        epoch = t_peri if blank(epoch_value) else parse_tt_instant(epoch_value)
        return Orbit(q, e, inc, node, peri, t_peri, epoch)
    if math.isnan(a):
        raise BodyRowError("semimajor_axis", i, "no value given (or give perihelion_distance "
                           "and perihelion_time)")
    if not (a > 0 and e < 1.0):
        raise BodyRowError("semimajor_axis", i, "a mean anomaly needs an ellipse (a > 0, "
                           "e < 1); give perihelion_time otherwise")
    m = _number_cell(extra, "mean_anomaly", i)
    epoch_value = _cell(extra, "orbit_epoch", i)
    if blank(epoch_value):
        raise BodyRowError("orbit_epoch", i, "no value given (the mean anomaly's epoch)")
    try:
        epoch = parse_tt_instant(epoch_value)
    except ValueError as err:
        raise BodyRowError("orbit_epoch", i, str(err)) from None
    return Orbit.from_mean_anomaly(a, e, inc, node, peri, m, epoch)


def is_body_row(extra: dict, i: int) -> bool:
    return any(not blank(_cell(extra, c, i)) for c in ("body",) + ELEMENT_COLUMNS)


def body_rows(extra: dict, n: int) -> np.ndarray:
    """Boolean mask of the rows that are bodies (a body name or any element given)."""
    present = [c for c in ("body",) + ELEMENT_COLUMNS if c in extra]
    mask = np.zeros(n, dtype=bool)
    for c in present:
        mask |= np.array([not blank(v) for v in extra[c]], dtype=bool)
    return mask


def source_of_row(extra: dict, i: int, name: str):
    """The MajorBody or MinorBody of row i."""
    body = _cell(extra, "body", i)
    if not blank(body):
        try:
            return MajorBody(parse_body_name(body))
        except ValueError as err:
            raise BodyRowError("body", i, str(err)) from None
    magnitudes = {c: _number_cell(extra, c, i, required=False) for c in MAGNITUDE_COLUMNS}
    return MinorBody(name, orbit_of_row(extra, i), **magnitudes)


def sources_of(targets) -> tuple[np.ndarray, list]:
    """(row indices, sources) of the body rows of a Targets (empty when there are none)."""
    extra = {k.strip().lower(): v for k, v in targets.extra.items()}
    if not any(c in extra for c in ("body",) + ELEMENT_COLUMNS):
        return np.zeros(0, dtype=int), []
    rows = np.flatnonzero(body_rows(extra, len(targets)))
    names = targets.names()
    return rows, [source_of_row(extra, int(i), str(names[i])) for i in rows]
